import { describe, expect, it } from "vitest";
import { PGlite } from "@electric-sql/pglite";
import fc from "fast-check";
import { probit } from "simple-statistics";
import { medianRank, normalCdf, quantileType7, wilson, zFor } from "@/features/evidence";

describe("normal quantiles for the confidence levels", () => {
  it("match the published table of z values to 9 significant digits", () => {
    // NIST/SEMATECH e-Handbook of Statistical Methods, 1.3.6.7.1 (critical values of the normal
    // distribution), and Abramowitz & Stegun Table 26.5; values to 10 digits from memory of those tables.
    expect(zFor(80)).toBeCloseTo(1.281551566, 8);
    expect(zFor(90)).toBeCloseTo(1.644853627, 8);
    expect(zFor(95)).toBeCloseTo(1.959963985, 8);
    expect(zFor(99)).toBeCloseTo(2.575829304, 8);
  });

  it("are better than simple-statistics' probit, which approximates to about two decimals", () => {
    // simple-statistics (a general-purpose library from the registry) returns 1.6434 for p = 0.95 and 2.5692 for p = 0.995 where the
    // table gives 1.6449 and 2.5758: close, but not the 6 significant digits statistics.md asks for, so it is not used.
    const table: [number, number][] = [
      [0.9, 1.281551566],
      [0.95, 1.644853627],
      [0.975, 1.959963985],
      [0.995, 2.575829304],
    ];
    for (const [p, z] of table) {
      expect(Math.abs(probit(p) - z)).toBeLessThan(1e-2);
      expect(Math.abs(zFor(200 * p - 100) - z)).toBeLessThan(1e-9);
    }
    // Φ(1.96) = 0.9750021 (A&S Table 26.1), and Φ(Φ⁻¹(p)) = p throughout.
    expect(normalCdf(1.96)).toBeCloseTo(0.9750021, 7);
    fc.assert(
      fc.property(fc.double({ min: 0.5, max: 0.9999, noNaN: true }), (p) => {
        expect(normalCdf(zFor(200 * p - 100))).toBeCloseTo(p, 10);
      }),
    );
  });
});

describe("Wilson score interval", () => {
  it("matches Newcombe's worked examples (score method without continuity correction)", () => {
    // Newcombe RG (1998), "Two-sided confidence intervals for the single proportion: comparison of
    // seven methods", Statistics in Medicine 17:857–872, Table II, method 3; values from memory of the table.
    const cases: [number, number, number, number][] = [
      [81, 263, 0.2553, 0.3662],
      [15, 148, 0.0624, 0.1605],
      [0, 20, 0, 0.1611],
      [1, 29, 0.0061, 0.1718],
    ];
    for (const [k, n, lo, hi] of cases) {
      const w = wilson(k, n, 95);
      expect(w.low!).toBeCloseTo(lo, 4);
      expect(w.high!).toBeCloseTo(hi, 4);
    }
  });

  it("gives z²/(n+z²) as the upper bound of 0 of n (closed form)", () => {
    const z = zFor(95);
    expect(wilson(0, 10, 95).high!).toBeCloseTo((z * z) / (10 + z * z), 12);
  });

  it("puts the bounds exactly at 0 for 0 of n and exactly at 1 for n of n", () => {
    // Closed form (Wilson 1927, J. Am. Stat. Assoc. 22:209–212; the score interval's limits solve
    // (p̂ − π)² = z²π(1 − π)/n): at p̂ = 0 the roots are π = 0 and z²/(n + z²); at p̂ = 1 they are
    // n/(n + z²) and π = 1. Floating point alone gives residues such as 2.8e-17 (n = 7) or 0.9999999999999999 (n = 10).
    for (const level of [80, 90, 95, 99]) {
      const z = zFor(level);
      for (const n of [1, 2, 3, 7, 10, 13, 100, 1000, 12345]) {
        const none = wilson(0, n, level);
        expect(none.low).toBe(0);
        expect(none.high!).toBeCloseTo((z * z) / (n + z * z), 12);
        const all = wilson(n, n, level);
        expect(all.high).toBe(1);
        expect(all.low!).toBeCloseTo(n / (n + z * z), 12);
      }
    }
  });
});

describe("distribution-free interval for the median", () => {
  it("matches the published table of ranks and coverages for n = 6 … 30", () => {
    // Campbell MJ, Gardner MJ (1988), "Calculating confidence intervals for some non-parametric analyses",
    // BMJ 296:1454–1456, Table 1 (95 %): ranks r and n−r+1 with exact confidence; values from memory of the table.
    const table: [number, number, number][] = [
      [6, 1, 96.9],
      [7, 1, 98.4],
      [8, 1, 99.2],
      [9, 2, 96.1],
      [10, 2, 97.9],
      [15, 4, 96.5],
      [20, 6, 95.9],
      [25, 8, 95.7],
      [30, 10, 95.7],
    ];
    for (const [n, r, cov] of table) {
      const got = medianRank(n, 95)!;
      expect(got.r).toBe(r);
      expect(got.coverage * 100).toBeCloseTo(cov, 1);
    }
    expect(medianRank(5, 95)).toBeNull();
    expect(medianRank(6, 95)!.coverage).toBe(1 - 2 / 64); // 0.96875 exactly
  });

  it("gives exact coverage from the binomial sum for large n (checked by an independent exact sum)", () => {
    // Independent check: exact binomial CDF with BigInt arithmetic.
    const cdf = (n: number, k: number) => {
      let c = 1n,
        sum = 0n;
      for (let i = 0; i <= k; i++) {
        sum += c;
        c = (c * BigInt(n - i)) / BigInt(i + 1);
      }
      return Number((sum * 10n ** 15n) / 2n ** BigInt(n)) / 1e15;
    };
    for (const n of [50, 101, 400]) {
      const { r, coverage } = medianRank(n, 95)!;
      expect(cdf(n, r - 1)).toBeLessThanOrEqual(0.025);
      expect(cdf(n, r)).toBeGreaterThan(0.025);
      expect(coverage).toBeCloseTo(1 - 2 * cdf(n, r - 1), 10);
    }
  });
});

describe("quantiles", () => {
  // Hyndman RJ, Fan Y (1996), "Sample quantiles in statistical packages", The American Statistician 50:361–365,
  // definition 7: Q(p) = x[j] + g (x[j+1] − x[j]) with j = ⌊(n − 1)p⌋ + 1 (1-based), g its fractional part.
  const hyndmanFan7 = (xs: number[], p: number) => {
    const s = [...xs].sort((a, b) => a - b);
    const m = 1 - p;
    const j = Math.floor(s.length * p + m);
    const g = s.length * p + m - j;
    return j >= s.length ? s[s.length - 1]! : (1 - g) * s[j - 1]! + g * s[j]!;
  };

  it("follow definition 7 on a worked example", () => {
    // For 1..10, p = 0.1: (n−1)p = 0.9 → 1 + 0.9 × (2 − 1) = 1.9 (arithmetic of definition 7).
    expect(quantileType7([1, 2, 3, 4, 5, 6, 7, 8, 9, 10], 0.1)).toBeCloseTo(1.9, 12);
    expect(hyndmanFan7([1, 2, 3, 4, 5, 6, 7, 8, 9, 10], 0.1)).toBeCloseTo(1.9, 12);
  });

  it("equal PostgreSQL's percentile_cont and an independent implementation", async () => {
    const pg = await PGlite.create();
    try {
      await fc.assert(
        fc.asyncProperty(
          fc.array(fc.double({ min: 0, max: 500, noNaN: true }), { minLength: 1, maxLength: 40 }),
          async (xs) => {
            const sorted = [...xs].sort((a, b) => a - b);
            const res = await pg.query<{ q: number[] }>(
              "select percentile_cont(array[0, 0.1, 0.25, 0.5, 0.75, 0.9, 1]::float8[]) within group (order by x) as q from unnest($1::float8[]) as t(x)",
              [xs],
            );
            const q = res.rows[0]!.q;
            [0, 0.1, 0.25, 0.5, 0.75, 0.9, 1].forEach((p, i) => {
              expect(quantileType7(sorted, p)).toBeCloseTo(q[i]!, 9);
              expect(hyndmanFan7(xs, p)).toBeCloseTo(q[i]!, 9);
            });
          },
        ),
        { numRuns: 60 },
      );
    } finally {
      await pg.close();
    }
  }, 60_000); // starting an in-memory PostgreSQL takes a few seconds on two busy cores
});
