import { beforeAll, describe, expect, it } from "vitest";
import fc from "fast-check";
import * as doseRoute from "@/app/api/dose/route";
import { getDb } from "@/db/client";
import { seedCatalogue } from "@/features/catalogue/server";
import { call } from "../support/http";

const get = (q: Record<string, string | number>) =>
  call(doseRoute.GET, `/api/dose?${new URLSearchParams(Object.entries(q).map(([k, v]) => [k, String(v)]))}`);

beforeAll(async () => {
  await seedCatalogue(await getDb());
});

describe("GET /api/dose", () => {
  it("answers about 6.3 mL of 3 % peroxide for 50 mg/L in one US gallon, and 6.5 mL makes about 50 mg/L", async () => {
    const r = await get({ agent: "hydrogen-peroxide", stockPercent: 3, volume: 1, volumeUnit: "gal_us", target: 50 });
    expect(r.status).toBe(200);
    // 50 mg/L × 3.785411784 L / 30 mg/mL (NIST SP 811 gallon; % w/v definition) = 6.309 mL.
    expect(r.body.doseMl).toBeCloseTo(6.309, 3);
    expect(r.body).toMatchObject({
      agent: "hydrogen-peroxide",
      unit: "mg/L",
      stockMgPerMl: 30,
      target: 50,
      concentration: 50,
    });
    expect(r.body.volumeL).toBeCloseTo(3.785411784, 9);
    expect(r.body.firstDose).toBeUndefined();

    const made = await get({
      agent: "hydrogen-peroxide",
      stockPercent: 3,
      volume: 1,
      volumeUnit: "gal_us",
      addedMl: 6.5,
    });
    expect(made.status).toBe(200);
    expect(Math.abs(made.body.concentration - 50) / 50).toBeLessThan(0.05);
    expect(made.body.target).toBeNull();
  });

  it("offers a first dose as a fraction and the label strength's range", async () => {
    const r = await get({
      agent: "hydrogen-peroxide",
      stockPercent: 3,
      volume: 80,
      volumeUnit: "L",
      target: 30,
      fraction: 0.5,
    });
    expect(r.body.firstDose).toMatchObject({ fraction: 0.5, concentration: 15 });
    expect(r.body.firstDose.doseMl).toBeCloseTo(40, 9);
    expect(r.body.strengthRange).toMatchObject({ concentrationLow: 25, concentrationHigh: 35 });
  });

  it("gives the same litres for a tank measured in inches, in centimetres and as a volume", async () => {
    const q = { agent: "hydrogen-peroxide", stockPercent: 3, target: 25 };
    const inches = await get({ ...q, length: 24, width: 12, depth: 16, lengthUnit: "in" });
    const cm = await get({ ...q, length: 60.96, width: 30.48, depth: 40.64, lengthUnit: "cm" });
    const gallons = await get({ ...q, volume: 4608 / 231, volumeUnit: "gal_us" });
    expect(inches.status).toBe(200);
    expect(inches.body.volumeL).toBeCloseTo(gallons.body.volumeL, 9);
    expect(cm.body.volumeL).toBeCloseTo(gallons.body.volumeL, 9);
    const less = await get({ ...q, length: 24, width: 12, depth: 16, lengthUnit: "in", displacementPercent: 10 });
    expect(less.body.volumeL).toBeCloseTo(gallons.body.volumeL * 0.9, 9);
  });

  it("takes density and active fraction from a named preset, and never guesses one from a bare percentage", async () => {
    // Before: 35 % w/w without a stockFormId was matched to the h2o2-35 preset by its number. A percentage alone no
    // longer picks a preset (two bottles of the same percentage can hold different things), so w/w needs a density.
    const w = await get({
      agent: "hydrogen-peroxide",
      stockFormId: "h2o2-35",
      volume: 100,
      volumeUnit: "L",
      target: 30,
    });
    expect(w.body.stock).toMatchObject({
      percent: 35,
      basis: "w/w",
      densityGPerMl: 1.13,
      of: "agent",
      presetId: "h2o2-35",
    });
    expect(w.body.stockMgPerMl).toBeCloseTo(395.5, 9);
    const bare = await get({
      agent: "hydrogen-peroxide",
      stockPercent: 35,
      basis: "w/w",
      volume: 100,
      volumeUnit: "L",
      target: 30,
    });
    expect(bare.status).toBe(422);
    expect(bare.body.error.issues.map((i: { path: string }) => i.path)).toContain("densityGPerMl");
    const cu = await get({ agent: "copper", stockFormId: "cu-sulfate-1", volume: 100, volumeUnit: "L", target: 0.2 });
    expect(cu.status).toBe(200);
    expect(cu.body.stockMgPerMl).toBeCloseTo(2.5451, 3);
  });

  it("answers 422 naming the field for every invalid combination", async () => {
    const ok = { agent: "hydrogen-peroxide", stockPercent: 3, volume: 10, volumeUnit: "L", target: 25 };
    const cases: [Record<string, string | number>, string][] = [
      [{ ...ok, volume: -1 }, "volume"],
      [{ ...ok, stockPercent: 0 }, "stockPercent"],
      [{ ...ok, addedMl: 3 }, "addedMl"],
      [{ ...ok, stockPercent: 8, basis: "w/w" }, "densityGPerMl"],
      [{ ...ok, agent: "snake-oil" }, "agent"],
      [{ ...ok, fraction: 0 }, "fraction"],
      [{ ...ok, volumeUnit: "bucket" }, "volumeUnit"],
      [{ ...ok, stockFormId: "nope" }, "stockFormId"],
    ];
    for (const [q, field] of cases) {
      const r = await get(q);
      expect(r.status, JSON.stringify(q)).toBe(422);
      expect(r.body.error.code).toBe("invalid");
      expect(r.body.error.issues.map((i: { path: string }) => i.path)).toContain(field);
    }
  });

  it("never answers 500, whatever the query", async () => {
    const keys = [
      "agent",
      "stockPercent",
      "basis",
      "densityGPerMl",
      "volume",
      "volumeUnit",
      "length",
      "width",
      "depth",
      "lengthUnit",
      "displacementPercent",
      "target",
      "addedMl",
      "fraction",
      "stockFormId",
      "speciesId",
      "group",
    ];
    const value = fc.oneof(
      fc.string({ maxLength: 8 }),
      fc.double().map(String),
      fc.constantFrom("hydrogen-peroxide", "L", "in", "w/w", "1e308", "-0", "NaN", "Infinity"),
    );
    await fc.assert(
      fc.asyncProperty(fc.dictionary(fc.constantFrom(...keys), value, { maxKeys: 8 }), async (q) => {
        const r = await get(q);
        expect([200, 422]).toContain(r.status);
        if (r.status === 200) expect(Number.isFinite(r.body.doseMl)).toBe(true);
      }),
      { numRuns: 150 },
    );
  });
});
