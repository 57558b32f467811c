import { describe, expect, it } from "vitest";
import {
  cautiousPlan,
  doseWarnings,
  floorSig3,
  planDose,
  readStrength,
  suggestFirstDose,
  type GuardEvidence,
} from "@/features/dosing";

/** A group whose lowest adverse dose (19.2) lies below its tolerated median (25.1): the case that must be loud. */
const tetras: GuardEvidence = {
  group: { slug: "tetras", name: "Tetras" },
  reports: 24,
  sparse: false,
  toleratedDose: { median: 25.1, max: 48 },
  lowestAdverseDose: 19.2,
};
const codes = (w: { code: string }[]) => w.map((x) => x.code).sort();

describe("dose guard rails", () => {
  it("warns when scheduled doses reach the lowest adverse dose, and says loudly that it lies below the median", () => {
    const w = doseWarnings({
      unit: "mg/L",
      ceiling: 150,
      evidence: tetras,
      doses: [
        { label: "dose 1", concentration: 12.55 },
        { label: "dose 2", concentration: 25.1 },
        { label: "dose 3", concentration: 25.1 },
      ],
    });
    expect(codes(w)).toEqual(["at_or_above_lowest_adverse", "lowest_adverse_at_or_below_median"]);
    const adverse = w.find((x) => x.code === "at_or_above_lowest_adverse")!;
    expect(adverse.message).toContain("Dose 2 and dose 3 (25.1 mg/L) are at or above");
    expect(adverse.message).toContain("19.2 mg/L");
  });

  it("counts a dose exactly at the lowest adverse dose as at it, and one just below as not", () => {
    const at = doseWarnings({
      unit: "mg/L",
      ceiling: null,
      evidence: { ...tetras, toleratedDose: { median: 10, max: 30 } },
      doses: [{ label: "the target", concentration: 19.2 }],
    });
    expect(codes(at)).toEqual(["at_or_above_lowest_adverse"]);
    const below = doseWarnings({
      unit: "mg/L",
      ceiling: null,
      evidence: { ...tetras, toleratedDose: { median: 10, max: 30 } },
      doses: [{ label: "the target", concentration: 19.19 }],
    });
    expect(below).toEqual([]);
  });

  it("warns above the catalogue's plausible ceiling: 250 typed for 25 mg/L of peroxide", () => {
    const w = doseWarnings({ unit: "mg/L", ceiling: 150, doses: [{ label: "the target", concentration: 250 }] });
    expect(w).toHaveLength(1);
    expect(w[0]!.code).toBe("above_ceiling");
    expect(w[0]!.message).toMatch(/250 mg\/L.*150 mg\/L/);
    expect(doseWarnings({ unit: "mg/L", ceiling: 150, doses: [{ label: "the target", concentration: 150 }] })).toEqual(
      [],
    );
  });

  it("warns above the highest dose the group has tolerated", () => {
    const w = doseWarnings({
      unit: "mg/L",
      ceiling: 150,
      evidence: { ...tetras, lowestAdverseDose: null },
      doses: [{ label: "the target", concentration: 50 }],
    });
    expect(codes(w)).toEqual(["above_highest_tolerated"]);
  });

  it("warns above the BMDL once summaries carry a dose–response fit, and ignores a fit without one", () => {
    const fitted = { ...tetras, lowestAdverseDose: null, doseResponse: { bmdl: 20 } };
    expect(
      codes(
        doseWarnings({
          unit: "mg/L",
          ceiling: null,
          evidence: fitted,
          doses: [{ label: "the target", concentration: 21 }],
        }),
      ),
    ).toEqual(["above_bmdl"]);
    const unfitted = { ...tetras, lowestAdverseDose: null, doseResponse: { fit: null } as { bmdl?: number | null } };
    expect(
      doseWarnings({
        unit: "mg/L",
        ceiling: null,
        evidence: unfitted,
        doses: [{ label: "the target", concentration: 21 }],
      }),
    ).toEqual([]);
  });

  it("says when the evidence is sparse, and when there is none", () => {
    const sparse = doseWarnings({
      unit: "mg/L",
      ceiling: null,
      evidence: { ...tetras, reports: 3, sparse: true, lowestAdverseDose: null },
      doses: [{ label: "the target", concentration: 10 }],
    });
    expect(codes(sparse)).toEqual(["sparse_evidence"]);
    expect(sparse[0]!.message).toContain("Only 3 accepted reports");
    const none = doseWarnings({
      unit: "mg/L",
      ceiling: null,
      evidence: {
        ...tetras,
        reports: 0,
        sparse: true,
        toleratedDose: { median: null, max: null },
        lowestAdverseDose: null,
      },
      doses: [{ label: "the target", concentration: 10 }],
    });
    expect(codes(none)).toEqual(["no_evidence"]);
    expect(
      codes(
        doseWarnings({
          unit: "mg/L",
          ceiling: null,
          evidence: null,
          doses: [{ label: "the target", concentration: 10 }],
        }),
      ),
    ).toEqual(["no_evidence"]);
  });

  it("gives no evidence warnings when no group was asked about", () => {
    expect(doseWarnings({ unit: "mg/L", ceiling: 150, doses: [{ label: "the target", concentration: 25 }] })).toEqual(
      [],
    );
  });
});

describe("a cautious first dose from the evidence", () => {
  it("offers half the median when that stays below the lowest adverse dose", () => {
    expect(suggestFirstDose({ ...tetras, lowestAdverseDose: 30 })).toEqual({
      fraction: 0.5,
      concentration: 12.55,
      limitedBy: "median",
    });
    expect(suggestFirstDose({ ...tetras, lowestAdverseDose: 30 }, 1 / 3)!.concentration).toBeCloseTo(25.1 / 3, 12);
  });

  it("never offers one at or above the lowest adverse dose", () => {
    // ½ × 25.1 = 12.55 is below 19.2; with a lowest adverse dose of 10, ½ of that (5) is offered instead.
    expect(suggestFirstDose(tetras)!.concentration).toBeLessThan(19.2);
    const s = suggestFirstDose({ ...tetras, lowestAdverseDose: 10 })!;
    expect(s).toMatchObject({ concentration: 5, limitedBy: "lowest_adverse" });
    expect(s.fraction).toBeCloseTo(5 / 25.1, 12);
    const atIt = suggestFirstDose({ ...tetras, lowestAdverseDose: 12.55 })!;
    expect(atIt.concentration).toBeLessThan(12.55);
  });

  it("never offers one above the BMDL, and none without a tolerated median", () => {
    expect(suggestFirstDose({ ...tetras, doseResponse: { bmdl: 8 } })).toMatchObject({
      concentration: 8,
      limitedBy: "bmdl",
    });
    expect(suggestFirstDose({ ...tetras, toleratedDose: { median: null, max: null } })).toBeNull();
    expect(suggestFirstDose(null)).toBeNull();
  });
});

describe("the cautious plan offered from the evidence", () => {
  // Hand-worked cases; "never plan a later dose where fish have fared badly" is the club's rule (common practice,
  // no published source).
  it("goes on to the median only where the median is below the lowest adverse dose and the BMDL", () => {
    // Median 25.1 below a lowest adverse dose of 30, no curve: ½ × 25.1 = 12.55 first, then 25.1.
    expect(cautiousPlan({ ...tetras, lowestAdverseDose: 30 })).toMatchObject({ target: 25.1, fraction: 0.5 });
    expect(cautiousPlan({ ...tetras, lowestAdverseDose: 30 }, 1 / 3)!.fraction).toBeCloseTo(1 / 3, 12);
  });

  it("holds every dose at the first where the median is at or above the lowest adverse dose", () => {
    // Tetras: 19.2 went badly below the median 25.1; ½ × 25.1 = 12.55 is below 19.2, so 12.5 (rounded down) for all.
    expect(cautiousPlan(tetras)).toMatchObject({ target: 12.5, fraction: 1 });
    // The demo's curve limit: a BMDL of 3.7649 holds the dose at 3.76, never the 3.77 that rounding up would give.
    const p = cautiousPlan({ ...tetras, doseResponse: { bmdl: 3.7649 } })!;
    expect(p).toMatchObject({ target: 3.76, fraction: 1 });
    expect(p.first.limitedBy).toBe("bmdl");
    const w = doseWarnings({
      unit: "mg/L",
      ceiling: 150,
      evidence: { ...tetras, doseResponse: { bmdl: 3.7649 } },
      doses: [{ label: "every dose", concentration: p.target * p.fraction }],
    });
    expect(codes(w)).toEqual(["lowest_adverse_at_or_below_median"]);
    expect(cautiousPlan({ ...tetras, toleratedDose: { median: null, max: null } })).toBeNull();
  });

  it("rounds down to three significant figures", () => {
    expect([floorSig3(3.7649), floorSig3(12.55), floorSig3(25.1), floorSig3(0.012345), floorSig3(1234.5)]).toEqual([
      3.76, 12.5, 25.1, 0.0123, 1230,
    ]);
  });
});

describe("reading a stock strength", () => {
  const sulfate = {
    id: "cu-sulfate-1",
    percent: 1,
    basis: "w/v" as const,
    densityGPerMl: null,
    activeFraction: 0.254513,
    compound: "copper sulfate pentahydrate",
  };

  it("reads a bare percentage as the agent's own measure, whatever presets share its number", () => {
    expect(readStrength({ percent: 1, basis: "w/v" })).toEqual({
      percent: 1,
      basis: "w/v",
      densityGPerMl: null,
      of: "agent",
      compound: null,
      activeFraction: 1,
      presetId: null,
      mgPerMl: 10,
    });
  });

  it("applies a named preset's compound and fraction, taking its percentage when none is given", () => {
    const r = readStrength({ preset: sulfate });
    expect(r).toMatchObject({
      percent: 1,
      basis: "w/v",
      of: "compound",
      compound: "copper sulfate pentahydrate",
      presetId: "cu-sulfate-1",
    });
    expect(r.mgPerMl).toBeCloseTo(2.54513, 10);
    expect(readStrength({ percent: 2, preset: sulfate }).mgPerMl).toBeCloseTo(5.09026, 10);
  });

  it("takes a w/w preset's density, and asks for one without a preset", () => {
    const h2o2 = {
      id: "h2o2-35",
      percent: 35,
      basis: "w/w" as const,
      densityGPerMl: 1.13,
      activeFraction: 1,
      compound: null,
    };
    const r = readStrength({ preset: h2o2 });
    expect(r).toMatchObject({ of: "agent", densityGPerMl: 1.13 });
    expect(r.mgPerMl).toBeCloseTo(395.5, 9);
    expect(() => readStrength({ percent: 35, basis: "w/w" })).toThrow(/density/);
    expect(() => readStrength({ percent: 35, basis: "w/v", preset: h2o2 })).toThrow(/w\/w/);
  });
});

describe("salt in grams as well as brine", () => {
  it("gives the dry salt for 3 g/L in 40 L as 120 g, beside the mL of 10 % brine", () => {
    const plan = planDose({
      agentSlug: "salt",
      unit: "g/L",
      stock: { percent: 10, basis: "w/v" },
      water: { kind: "volume", volume: 40, unit: "L" },
      target: 3,
    });
    // 3 g/L × 40 L = 120 g; 10 % w/v brine holds 100 mg/mL, so 120 000 mg / 100 mg/mL = 1200 mL.
    expect(plan.activeGrams).toBeCloseTo(120, 10);
    expect(plan.doseMl).toBeCloseTo(1200, 10);
  });
});
