import { describe, expect, it } from "vitest";
import {
  concentrationFromGrams,
  courseSchedule,
  doseQuerySchema,
  gramsForTarget,
  planDose,
  planDrySalt,
  weighable,
} from "@/features/dosing";

const tank40 = { kind: "volume" as const, volume: 40, unit: "L" as const };

describe("salt weighed dry, in grams", () => {
  it("gives 120 g of dry salt for 3 g/L in 40 L, the same salt as 1200 mL of 10 % w/v brine", () => {
    // Mass concentration is mass over volume (SI Brochure, 9th ed., quantity "mass concentration", kg/m³ = g/L):
    // 3 g/L × 40 L = 120 g. 10 % w/v is 10 g per 100 mL (definition of % w/v), so 120 g is in 1200 mL of it.
    const dry = planDrySalt({ agentSlug: "salt", unit: "g/L", water: tank40, target: 3 });
    expect(dry.doseGrams).toBeCloseTo(120, 10);
    expect(dry.concentration).toBe(3);
    const brine = planDose({
      agentSlug: "salt",
      unit: "g/L",
      stock: { percent: 10, basis: "w/v" },
      water: tank40,
      target: 3,
    });
    expect(brine.doseMl).toBeCloseTo(1200, 10);
    expect(brine.activeGrams).toBeCloseTo(dry.doseGrams, 10);
  });

  it("reads 1 g/L as about 1 ppt by mass in fresh water: 1 g in 1 L of water weighing about 1000 g", () => {
    // Pure water at 4 °C has a density of 0.99997 g/mL (CRC Handbook of Chemistry and Physics, density of water
    // table; value from memory); dilute salt water differs by under 1 %, so g/L ≈ g per 1000 g = ppt by mass.
    const gPerKg = (gramsForTarget(1, 1) / (1000 * 0.99997)) * 1000;
    expect(gPerKg).toBeCloseTo(1, 3);
  });

  it("works through US gallons: 1 g/L in 10 US gal is about 37.85 g", () => {
    // 1 US gallon = 231 in³ = 3.785411784 L exactly (NIST Handbook 44, Appendix C).
    const p = planDrySalt({
      agentSlug: "salt",
      unit: "g/L",
      water: { kind: "volume", volume: 10, unit: "gal_us" },
      target: 1,
    });
    expect(p.volumeL).toBeCloseTo(37.85411784, 9);
    expect(p.doseGrams).toBeCloseTo(37.85411784, 9);
  });

  it("gives the concentration grams already dissolved make, and a reduced first dose", () => {
    expect(concentrationFromGrams(50, 40)).toBeCloseTo(1.25, 12);
    const p = planDrySalt({ agentSlug: "salt", unit: "g/L", water: tank40, addedGrams: 50 });
    expect(p.target).toBeNull();
    expect(p.concentration).toBeCloseTo(1.25, 12);
    const half = planDrySalt({ agentSlug: "salt", unit: "g/L", water: tank40, target: 3, fraction: 0.5 });
    expect(half.firstDose).toMatchObject({ fraction: 0.5, concentration: 1.5 });
    expect(half.firstDose!.doseGrams).toBeCloseTo(60, 10);
  });

  it("rounds down to what a scale reads: 0.1 g steps up to 100 g, then 1 g (common practice, no published source)", () => {
    expect(weighable(37.85411784)).toMatchObject({ grams: 37.8, step: 0.1 });
    expect(weighable(120)).toMatchObject({ grams: 120, step: 1 });
    expect(weighable(150.9)).toMatchObject({ grams: 150, step: 1 });
    expect(weighable(0.04).grams).toBe(0);
  });

  it("refuses a target and grams together, neither, and a bad fraction, naming the field", () => {
    expect(() => planDrySalt({ agentSlug: "salt", unit: "g/L", water: tank40, target: 3, addedGrams: 5 })).toThrow(
      /not both/,
    );
    expect(() => planDrySalt({ agentSlug: "salt", unit: "g/L", water: tank40 })).toThrow(/either/);
    expect(() => planDrySalt({ agentSlug: "salt", unit: "g/L", water: tank40, target: 3, fraction: 0 })).toThrow(
      /fraction/,
    );
  });

  it("schedules grams, not mL, on each dose of the course", () => {
    const p = planDrySalt({ agentSlug: "salt", unit: "g/L", water: tank40, target: 3, fraction: 0.5 });
    const doses = courseSchedule(p, new Date("2026-12-01T09:00:00Z"), 2, 24, 10).filter((i) => i.kind === "dose");
    expect(doses.map((d) => [d.doseGrams, d.doseMl, d.concentration])).toEqual([
      [60, undefined, 1.5],
      [120, undefined, 3],
    ]);
  });
});

describe("the dose query with form=dry", () => {
  const issues = (q: Record<string, string>) => {
    const r = doseQuerySchema.safeParse(q);
    return r.success ? [] : r.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`);
  };
  it("needs no stock strength, and names each field that does not belong", () => {
    const ok = { agent: "salt", form: "dry", volume: "40", volumeUnit: "L", target: "3" };
    expect(issues(ok)).toEqual([]);
    expect(issues({ ...ok, target: "", addedGrams: "50" }).length).toBeGreaterThan(0);
    const { target: _t, ...noTarget } = ok;
    expect(issues({ ...noTarget, addedGrams: "50" })).toEqual([]);
    expect(issues({ ...ok, stockPercent: "10" })).toEqual([
      "stockPercent: Dry salt has no stock strength: leave stockPercent out with form=dry.",
    ]);
    expect(issues({ ...noTarget, addedMl: "5" })).toEqual([
      "addedMl: Dry salt is weighed: give addedGrams instead of addedMl with form=dry.",
    ]);
    expect(issues({ ...ok, addedGrams: "5" })).toEqual(["addedGrams: Give either target or addedGrams, not both."]);
    expect(issues({ agent: "salt", stockPercent: "10", volume: "40", volumeUnit: "L", addedGrams: "5" })[0]).toMatch(
      /^addedGrams: addedGrams is for dry salt/,
    );
    expect(issues({ ...ok, form: "powder" })[0]).toMatch(/^form:/);
  });
});
