import { describe, expect, it } from "vitest";
import fc from "fast-check";
import {
  CM_PER_INCH,
  LITRES_PER_IMPERIAL_GALLON,
  LITRES_PER_US_GALLON,
  celsiusFromFahrenheit,
  concentrationFromMl,
  doseMlForTarget,
  fahrenheitFromCelsius,
  litresFromDimensions,
  planDose,
  readStrength,
  stockMgPerMl,
  toLitres,
} from "@/features/dosing";
import { COPPER_IN_PENTAHYDRATE, starterAgents } from "@/features/catalogue/starter-data";

describe("length and volume units", () => {
  it("uses the exact inch and gallons", () => {
    // NIST Special Publication 811 (2008), Appendix B.8/B.9: inch = 2.54 × 10⁻² m exactly;
    // gallon (U.S.) = 3.785 411 784 × 10⁻³ m³ exactly (231 in³); gallon (UK) = 4.546 09 × 10⁻³ m³ exactly.
    expect(CM_PER_INCH).toBe(2.54);
    expect(LITRES_PER_US_GALLON).toBeCloseTo(3.785411784, 12);
    expect(LITRES_PER_IMPERIAL_GALLON).toBe(4.54609);
    expect(toLitres(1, "gal_us")).toBeCloseTo(3.785411784, 12);
    expect(toLitres(250, "mL")).toBe(0.25);
  });

  it("gives the same litres from inches, centimetres and the value-and-unit path", () => {
    // A tank of 24 × 12 × 16 inches holds 4608 in³ = 4608/231 US gallons (NIST SP 811 definitions above).
    const fromInches = litresFromDimensions(24, 12, 16, "in");
    const fromCm = litresFromDimensions(24 * 2.54, 12 * 2.54, 16 * 2.54, "cm");
    const fromGallons = toLitres(4608 / 231, "gal_us");
    expect(fromInches).toBeCloseTo(fromGallons, 9);
    expect(fromCm).toBeCloseTo(fromGallons, 9);
    // 60 × 30 × 40 cm = 72 000 cm³ = 72 L; with 10 % displaced by decor, 64.8 L (arithmetic).
    expect(litresFromDimensions(60, 30, 40, "cm", 10)).toBeCloseTo(64.8, 10);
  });

  it("converts temperatures on the fixed points of water", () => {
    // NIST SP 811 B.8: t/°C = (t/°F − 32)/1.8; water freezes at 32 °F and boils at 212 °F at one atmosphere.
    expect(celsiusFromFahrenheit(32)).toBe(0);
    expect(celsiusFromFahrenheit(212)).toBe(100);
    expect(fahrenheitFromCelsius(37)).toBeCloseTo(98.6, 10);
    expect(celsiusFromFahrenheit(-40)).toBe(-40);
  });
});

describe("stock strengths", () => {
  it("reads % w/v as grams per 100 mL", () => {
    // Definition of % w/v (g solute per 100 mL solution): 3 % w/v = 30 mg/mL.
    expect(stockMgPerMl({ percent: 3, basis: "w/v" })).toBe(30);
  });

  it("uses a published density for % w/w", () => {
    // CRC Handbook of Chemistry and Physics, "Concentrative properties of aqueous solutions", H₂O₂ at 20 °C:
    // 35 % w/w ≈ 1.13 g/mL (value from memory of the table; corroborated by secondary references giving
    // ≈ 1.01 g/cm³ for 3 % and ≈ 1.13 g/cm³ for 35 %). 35 % w/w → 350 mg/g × 1.13 g/mL = 395.5 mg/mL.
    expect(stockMgPerMl({ percent: 35, basis: "w/w", densityGPerMl: 1.13 })).toBeCloseTo(395.5, 10);
    const presets = starterAgents.find((a) => a.slug === "hydrogen-peroxide")!.stocks;
    const densityFromMemoryOfCrc: Record<number, number> = { 6: 1.02, 12: 1.04, 35: 1.13 }; // from memory, ±0.005
    for (const p of presets.filter((s) => s.basis === "w/w")) {
      expect(Math.abs(p.densityGPerMl! - densityFromMemoryOfCrc[p.percent]!)).toBeLessThanOrEqual(0.005);
    }
  });

  it("refuses a w/w strength without density and an impossible strength", () => {
    expect(() => stockMgPerMl({ percent: 6, basis: "w/w" })).toThrow(/density/);
    expect(() => stockMgPerMl({ percent: 0, basis: "w/v" })).toThrow(/above 0/);
    expect(() => stockMgPerMl({ percent: 120, basis: "w/v" })).toThrow(/100/);
  });

  it("doses copper as Cu²⁺ from copper sulfate pentahydrate by standard atomic weights", () => {
    // IUPAC/CIAAW standard atomic weights (abridged, 2021): Cu 63.546, S 32.06, O 15.999, H 1.008.
    // M(CuSO₄·5H₂O) = 249.68 g/mol (CRC Handbook lists 249.69); Cu share = 63.546 / 249.68 = 0.25451.
    expect(COPPER_IN_PENTAHYDRATE).toBeCloseTo(0.25451, 4);
    // 1 % w/v CuSO₄·5H₂O = 10 mg/mL of salt = 2.545 mg/mL as Cu²⁺.
    expect(stockMgPerMl({ percent: 1, basis: "w/v", activeFraction: COPPER_IN_PENTAHYDRATE })).toBeCloseTo(2.5451, 3);
  });

  it("works 0.2 mg/L Cu²⁺ in 100 L from a 1 % w/v bottle both ways: as Cu²⁺ it is 2 mL, as copper sulfate pentahydrate 7.86 mL", () => {
    const sulfate = starterAgents.find((a) => a.slug === "copper")!.stocks.find((s) => s.id === "cu-sulfate-1")!;
    // Worked by hand from the definition of % w/v (g per 100 mL): 1 % w/v = 10 mg/mL. Read as the agent's own
    // measure (Cu²⁺), 0.2 mg/L × 100 L = 20 mg of Cu²⁺ = 20 / 10 = 2 mL.
    const asIon = readStrength({ percent: 1, basis: "w/v" });
    expect(asIon).toMatchObject({ of: "agent", activeFraction: 1, presetId: null, mgPerMl: 10 });
    expect(doseMlForTarget(0.2, 100, asIon.mgPerMl)).toBe(2);
    // IUPAC/CIAAW standard atomic weights (abridged, 2021): Cu 63.546, S 32.06, O 15.999, H 1.008 →
    // M(CuSO₄·5H₂O) = 63.546 + 32.06 + 9 × 15.999 + 10 × 1.008 = 249.677 g/mol; Cu share 63.546 / 249.677 = 0.254513.
    // Named as the pentahydrate: 10 mg/mL of the salt is 2.54513 mg/mL of Cu²⁺, so 20 mg of Cu²⁺ takes 20 / 2.54513 = 7.858 mL.
    const asSalt = readStrength({
      percent: 1,
      basis: "w/v",
      preset: { ...sulfate, activeFraction: sulfate.activeFraction!, compound: sulfate.compound ?? null },
    });
    expect(asSalt).toMatchObject({ of: "compound", presetId: "cu-sulfate-1" });
    expect(asSalt.activeFraction).toBeCloseTo(0.254513, 6);
    expect(asSalt.mgPerMl).toBeCloseTo(2.54513, 5);
    expect(doseMlForTarget(0.2, 100, asSalt.mgPerMl)).toBeCloseTo(7.858, 3);
  });
});

describe("the pharmacopoeia's range for 3 % hydrogen peroxide", () => {
  it("shows the concentration a 3 % bottle really gives as between 2.5/3 and 3.5/3 of the nominal", () => {
    // USP monograph "Hydrogen Peroxide Topical Solution": not less than 2.5 g and not more than 3.5 g H₂O₂
    // per 100 mL (value from memory of the monograph).
    const plan = planDose({
      agentSlug: "hydrogen-peroxide",
      unit: "mg/L",
      stock: { percent: 3, basis: "w/v" },
      water: { kind: "volume", volume: 100, unit: "L" },
      target: 30,
    });
    expect(plan.strengthRange).toMatchObject({ lowPercent: 2.5, highPercent: 3.5 });
    expect(plan.strengthRange!.concentrationLow).toBeCloseTo(25, 10);
    expect(plan.strengthRange!.concentrationHigh).toBeCloseTo(35, 10);
  });
});

describe("the keepers' rule of thumb", () => {
  it("about 6.5 mL of 3 % peroxide in one US gallon gives about 50 mg/L", () => {
    // Common practice, no published source: "1 mL of 3 % per 0.15 gallon ≈ 50 mg/L".
    const made = concentrationFromMl(6.5, toLitres(1, "gal_us"), stockMgPerMl({ percent: 3, basis: "w/v" }));
    expect(Math.abs(made - 50) / 50).toBeLessThan(0.05);
    // Exact arithmetic: 50 mg/L × 3.785411784 L / 30 mg/mL = 6.309 mL.
    expect(doseMlForTarget(50, LITRES_PER_US_GALLON, 30)).toBeCloseTo(6.30902, 5);
  });
});

describe("round trips (property tests)", () => {
  it("mL → mg/L → mL returns the same mL for any tank and stock", () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.01, max: 1000, noNaN: true }),
        fc.double({ min: 0.5, max: 10000, noNaN: true }),
        fc.double({ min: 0.1, max: 100, noNaN: true }),
        fc.constantFrom("w/v" as const, "w/w" as const),
        fc.double({ min: 0.9, max: 1.5, noNaN: true }),
        (ml, litres, percent, basis, density) => {
          const mgPerMl = stockMgPerMl({ percent, basis, densityGPerMl: density });
          const c = concentrationFromMl(ml, litres, mgPerMl);
          expect(doseMlForTarget(c, litres, mgPerMl)).toBeCloseTo(ml, 6);
        },
      ),
    );
  });

  it("every volume unit converts to litres and back", () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.001, max: 1e6, noNaN: true }),
        fc.constantFrom("L" as const, "mL" as const, "gal_us" as const, "gal_imp" as const),
        (v, unit) => {
          const plan = planDose({
            agentSlug: "x",
            unit: "mg/L",
            stock: { percent: 3, basis: "w/v" },
            water: { kind: "volume", volume: v, unit },
            addedMl: 1,
          });
          expect(plan.volumeL / toLitres(1, unit)).toBeCloseTo(v, 6);
        },
      ),
    );
  });
});
