// Pure statistics for the evidence summaries (docs/statistics.md). Deterministic: no resampling.

const SQRT2 = Math.SQRT2;

/** erf by its Maclaurin series (|x| ≤ 3) or continued fraction for erfc (|x| > 3); ~1e-13 here. */
function erf(x: number): number {
  const ax = Math.abs(x);
  if (ax <= 3) {
    let term = x;
    let sum = x;
    for (let n = 1; n < 200; n++) {
      term *= (-x * x) / n;
      const add = term / (2 * n + 1);
      sum += add;
      if (Math.abs(add) < 1e-17 * Math.abs(sum)) break;
    }
    return (2 / Math.sqrt(Math.PI)) * sum;
  }
  // Lentz's continued fraction for erfc.
  let f = ax;
  let c = ax;
  let d = 0;
  for (let i = 1; i < 300; i++) {
    const an = i / 2;
    d = ax + an * d;
    d = d === 0 ? 1e-300 : 1 / d;
    c = ax + an / c;
    if (c === 0) c = 1e-300;
    const delta = c * d;
    f *= delta;
    if (Math.abs(delta - 1) < 1e-16) break;
  }
  const erfc = Math.exp(-ax * ax) / (f * Math.sqrt(Math.PI));
  return Math.sign(x) * (1 - erfc);
}

/** Standard normal CDF Φ(z). */
export function normalCdf(z: number): number {
  return 0.5 * (1 + erf(z / SQRT2));
}

/** Φ⁻¹(p) by Newton's method on Φ, from a rational start; accurate to ~1e-12. */
export function normalQuantile(p: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError("p must be in (0, 1)");
  // Start: Tukey's lambda approximation, then Newton steps.
  let z = 4.91 * (p ** 0.14 - (1 - p) ** 0.14);
  for (let i = 0; i < 50; i++) {
    const pdf = Math.exp(-0.5 * z * z) / Math.sqrt(2 * Math.PI);
    const step = (normalCdf(z) - p) / pdf;
    z -= step;
    if (Math.abs(step) < 1e-14) break;
  }
  return z;
}

/** z for a two-sided interval at `level` percent: Φ⁻¹(1 − α/2). */
export const zFor = (level: number) => normalQuantile(1 - (1 - level / 100) / 2);

export interface Interval {
  value: number | null;
  low: number | null;
  high: number | null;
}

/** Wilson score interval for k of n, without continuity correction. */
export function wilson(k: number, n: number, level: number): Interval {
  if (n === 0) return { value: null, low: null, high: null };
  const z = zFor(level);
  const p = k / n;
  const z2 = z * z;
  const denom = 1 + z2 / n;
  const centre = (p + z2 / (2 * n)) / denom;
  const half = (z / denom) * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n));
  // At 0/n the lower bound is exactly 0 and at n/n the upper exactly 1 (centre ∓ half cancel in exact
  // arithmetic); floating point leaves residues like 2.8e-17 or 0.9999999999999999, so set the edges.
  return { value: p, low: k === 0 ? 0 : Math.max(0, centre - half), high: k === n ? 1 : Math.min(1, centre + half) };
}

/**
 * Rank r for the distribution-free median interval (x₍r₎, x₍n−r+1₎): the largest r with
 * P(B ≤ r−1) ≤ α/2, B ~ Binomial(n, ½); its exact coverage is 1 − 2·P(B ≤ r−1). Null when no r ≥ 1 qualifies.
 */
export function medianRank(n: number, level: number): { r: number; coverage: number } | null {
  if (n < 1) return null;
  const half = (1 - level / 100) / 2;
  const ln2n = n * Math.LN2;
  let logC = 0; // log C(n, 0)
  let cdf = 0;
  let best: { r: number; coverage: number } | null = null;
  for (let k = 0; k <= Math.floor(n / 2); k++) {
    if (k > 0) logC += Math.log(n - k + 1) - Math.log(k);
    cdf += Math.exp(logC - ln2n);
    // Tolerance for rounding in the sum; a tie at α/2 exactly counts as qualifying.
    if (cdf <= half * (1 + 1e-12)) best = { r: k + 1, coverage: 1 - 2 * cdf };
    else break;
  }
  return best;
}

/** Sample quantile by linear interpolation between order statistics (Hyndman & Fan type 7). */
export function quantileType7(sorted: number[], p: number): number {
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, sorted.length - 1);
  return sorted[lo]! + (h - lo) * (sorted[hi]! - sorted[lo]!);
}
