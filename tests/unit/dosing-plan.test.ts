import { describe, expect, it } from "vitest";
import { doseQuerySchema, measurable, planDose, redoseChecklist } from "@/features/dosing";

const base = {
  agentSlug: "hydrogen-peroxide",
  unit: "mg/L" as const,
  stock: { percent: 3, basis: "w/v" as const },
  water: { kind: "volume" as const, volume: 40, unit: "L" as const },
};

describe("planning a dose", () => {
  it("gives mL for a target and a half first dose", () => {
    const p = planDose({ ...base, target: 25, fraction: 0.5 });
    expect(p.doseMl).toBeCloseTo((25 * 40) / 30, 12);
    expect(p.concentration).toBe(25);
    expect(p.firstDose).toMatchObject({ fraction: 0.5, concentration: 12.5 });
    expect(p.firstDose!.doseMl).toBeCloseTo(p.doseMl / 2, 12);
  });

  it("gives the concentration a measured amount made", () => {
    const p = planDose({ ...base, addedMl: 40 });
    expect(p.concentration).toBeCloseTo(30, 12);
    expect(p.target).toBeNull();
  });

  it("refuses both target and mL, neither, and out-of-range fractions", () => {
    expect(() => planDose({ ...base, target: 25, addedMl: 3 })).toThrow(/not both/);
    expect(() => planDose({ ...base })).toThrow(/either/);
    expect(() => planDose({ ...base, target: 25, fraction: 1.5 })).toThrow(/fraction/);
    expect(() => planDose({ ...base, target: 25, fraction: 0 })).toThrow(/fraction/);
  });

  it("works in g/L for salt", () => {
    // 3 g/L in 50 L = 150 g of salt = 1500 mL of 10 % w/v brine (100 mg/mL).
    const p = planDose({
      agentSlug: "salt",
      unit: "g/L",
      stock: { percent: 10, basis: "w/v" },
      water: { kind: "volume", volume: 50, unit: "L" },
      target: 3,
    });
    expect(p.doseMl).toBeCloseTo(1500, 9);
  });
});

describe("measuring with a syringe", () => {
  it("rounds down to the marks of the smallest tool that holds the dose", () => {
    expect(measurable(0.337)).toMatchObject({ ml: 0.33, step: 0.01 });
    expect(measurable(6.309)).toMatchObject({ ml: 6.2, step: 0.2 });
    expect(measurable(10)).toMatchObject({ ml: 10, step: 0.2 });
    expect(measurable(33.3)).toMatchObject({ ml: 33, step: 1 });
    expect(measurable(0.004).ml).toBe(0);
  });
});

describe("the redosing checklist", () => {
  it("lists a dose every 48 hours and a week of watching after the last", () => {
    const start = new Date("2026-12-01T09:00:00Z");
    const items = redoseChecklist(start, 3, 48, 7);
    const doses = items.filter((i) => i.kind === "dose").map((i) => i.at.toISOString());
    expect(doses).toEqual(["2026-12-01T09:00:00.000Z", "2026-12-03T09:00:00.000Z", "2026-12-05T09:00:00.000Z"]);
    expect(items.at(-1)).toMatchObject({ kind: "end", at: new Date("2026-12-12T09:00:00Z") });
  });
});

describe("the dose query schema", () => {
  const issues = (q: Record<string, string>) => {
    const r = doseQuerySchema.safeParse(q);
    return r.success ? [] : r.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`);
  };
  it("names the field for each impossible combination", () => {
    const ok = { agent: "hydrogen-peroxide", stockPercent: "3", volume: "10", volumeUnit: "L", target: "25" };
    expect(issues(ok)).toEqual([]);
    expect(issues({ ...ok, volume: "-5" })).toEqual(["volume: volume must be above 0."]);
    expect(issues({ ...ok, stockPercent: "0" })).toEqual(["stockPercent: stockPercent must be above 0."]);
    expect(issues({ ...ok, addedMl: "5" })).toEqual(["addedMl: Give either target or addedMl, not both."]);
    expect(issues({ ...ok, length: "60" })[0]).toMatch(/^volume: Give the volume or the tank's dimensions, not both/);
    expect(issues({ ...ok, volumeUnit: "bucket" })[0]).toMatch(/^volumeUnit:/);
    expect(issues({ ...ok, fraction: "2" })[0]).toMatch(/^fraction:/);
    expect(issues({ ...ok, volume: "abc" })[0]).toMatch(/^volume: volume must be/);
    // Under 100 mL of water is a slip of the unit: 1e-300 L made concentrations of 1e303 mg/L.
    expect(issues({ ...ok, volume: "1e-300" })).toEqual([
      "volume: The water must be at least 100 mL (0.1 L); check the volume and its unit.",
    ]);
    expect(issues({ ...ok, volume: "50", volumeUnit: "mL" })[0]).toMatch(/^volume: The water must be at least 100 mL/);
    expect(issues({ ...ok, volume: "100", volumeUnit: "mL" })).toEqual([]);
    // 0.1 US gallon = 0.3785 L (NIST SP 811): enough.
    expect(issues({ ...ok, volume: "0.1", volumeUnit: "gal_us" })).toEqual([]);
    const dims = { agent: "hydrogen-peroxide", stockPercent: "3", target: "25", lengthUnit: "cm" };
    // 4 × 5 × 4 cm = 80 cm³ = 0.08 L; 5 × 5 × 4 cm = 0.1 L.
    expect(issues({ ...dims, length: "4", width: "5", depth: "4" })[0]).toMatch(/^depth: The water must be at least/);
    expect(issues({ ...dims, length: "5", width: "5", depth: "4" })).toEqual([]);
    const { volume: _v, volumeUnit: _u, ...noVolume } = ok;
    expect(issues(noVolume)[0]).toMatch(/^volume: Give the water volume/);
  });
});

describe("numbers past what a double holds", () => {
  it("refuses them with a message instead of answering Infinity", () => {
    expect(() =>
      planDose({ ...base, water: { kind: "volume", volume: 1e308, unit: "gal_imp" }, target: 1e308 }),
    ).toThrow(/too large or too small/);
  });
});
