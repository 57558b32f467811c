import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { uncmin } from "numeric";
import {
  chiSquare1Quantile,
  fitDoseResponse,
  isFitted,
  profileCutoff,
  profileDeviance,
  type DoseResponseFit,
  type Trial,
} from "@/features/evidence";
import { generatedReports } from "../support/dose-data";

const fitted = (d: ReturnType<typeof fitDoseResponse>): DoseResponseFit => {
  if (!isFitted(d)) throw new Error(`expected a fit, got: ${d.reason}`);
  return d;
};
const rel = (x: number, ref: number) => Math.abs(x - ref) / Math.abs(ref);

describe("the χ² cut-off for one-sided benchmark-dose limits", () => {
  it("matches the χ² table at 1 degree of freedom", () => {
    // χ²₁ upper 10 % point 2.706 and upper 5 % point 3.841: NIST/SEMATECH e-Handbook of Statistical Methods,
    // 1.3.6.7.4 (critical values of the chi-square distribution), printed to 3 decimals.
    expect(chiSquare1Quantile(0.9).toFixed(3)).toBe("2.706");
    expect(chiSquare1Quantile(0.95).toFixed(3)).toBe("3.841");
    // One-sided 95 % limits use the 90 % quantile (1 − 2α): 1.644853627² = 2.705543 (z from the same handbook's normal table).
    expect(profileCutoff(95)).toBeCloseTo(1.644853627 ** 2, 9);
    expect(profileCutoff(95)).toBeCloseTo(2.705543, 6);
  });
});

describe("the beetle-mortality data (Bliss 1935)", () => {
  // Eight doses of carbon disulphide, as printed in Dobson & Barnett, An Introduction to Generalized Linear Models
  // (Table "Beetle mortality data"), and in Agresti, Categorical Data Analysis: log10 dose, beetles, killed.
  // Published logistic estimates b1 = −60.72 (s.e. 5.18), b2 = 34.27 (s.e. 2.91), deviance 11.23 on 6 df —
  // the figures are from memory of the textbook's table, checked here to the precision it prints.
  const x = [1.6907, 1.7242, 1.7552, 1.7842, 1.8113, 1.8369, 1.861, 1.8839];
  const n = [59, 60, 62, 56, 63, 59, 62, 60];
  const killed = [6, 13, 18, 28, 52, 53, 61, 60];
  const trials: Trial[] = x.map((v, i) => ({ dose: 10 ** v, n: n[i]!, adverse: killed[i]! }));

  it("gives the published estimates, standard errors and deviance", () => {
    const f = fitted(fitDoseResponse(trials, 95));
    expect(f.a.toFixed(2)).toBe("-60.72");
    expect(f.seA.toFixed(2)).toBe("5.18");
    expect(f.b.toFixed(2)).toBe("34.27");
    expect(f.seB.toFixed(2)).toBe("2.91");
    expect(f.deviance.toFixed(2)).toBe("11.23");
    expect(f.df).toBe(6);
    // The benchmark dose is where the fitted risk is 10 %: logit(0.1) = a + b·log10 bmd.
    expect(f.a + f.b * Math.log10(f.bmd)).toBeCloseTo(Math.log(1 / 9), 12);
    expect(f.bmdl).toBeLessThan(f.bmd);
    expect(f.bmdu).toBeGreaterThan(f.bmd);
  });
});

/** ℓ over individual reports (Bernoulli terms), written out independently of the app's grouped code. */
function bernoulliLogLik(reports: { dose: number; adverse: boolean }[], a: number, b: number): number {
  let s = 0;
  for (const r of reports) {
    const p = 1 / (1 + Math.exp(-(a + b * Math.log10(r.dose))));
    s += r.adverse ? Math.log(p) : Math.log(1 - p);
  }
  return s;
}

/** numeric's quasi-Newton minimiser (with its own numerical gradient) on −f, restarted once from its answer. */
function maximise(f: (x: number[]) => number, x0: number[]): { x: number[]; fx: number } {
  let r = uncmin((x) => -f(x), x0, 1e-12, undefined, 5000);
  r = uncmin((x) => -f(x), r.solution, 1e-12, undefined, 5000);
  return { x: r.solution, fx: -r.f };
}

/** Plain bisection for g(u) = 0 between a point where g < 0 and one where g > 0. */
function bisect(g: (u: number) => number, inside: number, outside: number): number {
  for (let i = 0; i < 200 && Math.abs(outside - inside) > 1e-13; i++) {
    const mid = (inside + outside) / 2;
    if (g(mid) < 0) inside = mid;
    else outside = mid;
  }
  return (inside + outside) / 2;
}

describe("generated reports from a known curve, fitted again by a general-purpose optimiser", () => {
  // 48 reports over 5–90 mg/L drawn from risk = 1 / (1 + exp(−(a + b·log10 dose))) with a seeded generator; the
  // second code path is numeric's quasi-Newton minimiser (npm registry, numerical gradients) on the Bernoulli
  // log-likelihood, a numerical Hessian and bisection on the profile — sharing nothing with the app's
  // Newton–Raphson but the model's definition.
  const reports = generatedReports(1, 48);
  const trials: Trial[] = reports.map((r) => ({ dose: r.dose, n: 1, adverse: r.adverse ? 1 : 0 }));
  const app = fitted(fitDoseResponse(trials, 95));
  const ll = (p: number[]) => bernoulliLogLik(reports, p[0]!, p[1]!);
  const mle = maximise(ll, [0, 1]);
  const [a, b] = mle.x as [number, number];

  it("has a mix of outcomes over 5–90 mg/L", () => {
    const doses = reports.map((r) => r.dose);
    expect(Math.min(...doses)).toBeGreaterThanOrEqual(5);
    expect(Math.max(...doses)).toBeLessThanOrEqual(90);
    expect(reports.filter((r) => r.adverse).length).toBeGreaterThan(5);
    expect(reports.filter((r) => !r.adverse).length).toBeGreaterThan(5);
  });

  it("agrees on a and b to 1e-6", () => {
    expect(rel(app.a, a)).toBeLessThan(1e-6);
    expect(rel(app.b, b)).toBeLessThan(1e-6);
  });

  it("agrees on the standard errors and covariance from a numerical Hessian to 1e-6", () => {
    // Central second differences with one Richardson step (error of order h⁴).
    const hess = (h: number) => {
      const f = (da: number, db: number) => ll([a + da, b + db]);
      const haa = (f(h, 0) - 2 * f(0, 0) + f(-h, 0)) / (h * h);
      const hbb = (f(0, h) - 2 * f(0, 0) + f(0, -h)) / (h * h);
      const hab = (f(h, h) - f(h, -h) - f(-h, h) + f(-h, -h)) / (4 * h * h);
      return [haa, hab, hbb];
    };
    const h1 = hess(2e-3),
      h2 = hess(1e-3);
    const [haa, hab, hbb] = h2.map((v, i) => (4 * v - h1[i]!) / 3) as [number, number, number];
    const det = haa * hbb - hab * hab;
    // Covariance = inverse of the observed information (minus the Hessian).
    const varA = -hbb / det,
      varB = -haa / det,
      cov = hab / det;
    expect(rel(app.seA, Math.sqrt(varA))).toBeLessThan(1e-6);
    expect(rel(app.seB, Math.sqrt(varB))).toBeLessThan(1e-6);
    expect(rel(app.covAB, cov)).toBeLessThan(1e-6);
    // Each curve point's Wald band, recomputed from this covariance (z for 95 %: 1.959963985, NIST handbook).
    for (const pt of [app.curve[0]!, app.curve[24]!, app.curve[49]!]) {
      const x = Math.log10(pt.dose),
        eta = a + b * x,
        se = Math.sqrt(varA + 2 * x * cov + x * x * varB);
      const ex = (t: number) => 1 / (1 + Math.exp(-t));
      expect(rel(pt.risk, ex(eta))).toBeLessThan(1e-6);
      expect(rel(pt.low, ex(eta - 1.959963985 * se))).toBeLessThan(1e-6);
      expect(rel(pt.high, ex(eta + 1.959963985 * se))).toBeLessThan(1e-6);
    }
  });

  it("agrees on the benchmark dose and its profile-likelihood limits to 1e-6", () => {
    const L = Math.log(0.1 / 0.9);
    const bmd = 10 ** ((L - a) / b);
    expect(rel(app.bmd, bmd)).toBeLessThan(1e-6);
    // Profile: with BMD = 10^u fixed, a = logit(0.1) − b·u; maximise over b alone.
    const prof = (u: number) => 2 * (mle.fx - maximise((p) => ll([L - p[0]! * u, p[0]!]), [b]).fx);
    const cut = 2.705543; // χ²₁ at 0.90 (see the table test above)
    const u0 = Math.log10(bmd);
    expect(prof(u0 - 2)).toBeGreaterThan(cut);
    expect(prof(u0 + 2)).toBeGreaterThan(cut);
    const lower = 10 ** bisect((u) => prof(u) - cut, u0, u0 - 2);
    const upper = 10 ** bisect((u) => prof(u) - cut, u0, u0 + 2);
    expect(rel(app.bmdl, lower)).toBeLessThan(1e-6);
    expect(rel(app.bmdu, upper)).toBeLessThan(1e-6);
    // The profile deviance, by this second path, equals the cut-off at the app's limits.
    expect(Math.abs(prof(Math.log10(app.bmdl)) - profileCutoff(95))).toBeLessThan(1e-6);
    expect(Math.abs(prof(Math.log10(app.bmdu)) - profileCutoff(95))).toBeLessThan(1e-6);
    // … and by the app's own profile.
    expect(Math.abs(profileDeviance(trials, app, app.bmdl) - profileCutoff(95))).toBeLessThan(1e-6);
    expect(Math.abs(profileDeviance(trials, app, app.bmdu) - profileCutoff(95))).toBeLessThan(1e-6);
  });

  it("draws about 50 log-spaced curve points over the observed doses, each inside its own interval", () => {
    const doses = reports.map((r) => r.dose);
    expect(app.curve).toHaveLength(50);
    expect(app.curve[0]!.dose).toBe(Math.min(...doses));
    expect(app.curve[49]!.dose).toBe(Math.max(...doses));
    const ratio = app.curve[1]!.dose / app.curve[0]!.dose;
    for (let i = 1; i < app.curve.length; i++) {
      const p = app.curve[i]!;
      expect(p.dose / app.curve[i - 1]!.dose).toBeCloseTo(ratio, 9);
      expect(p.risk).toBeGreaterThan(app.curve[i - 1]!.risk);
    }
    for (const p of app.curve) {
      expect(p.low).toBeLessThanOrEqual(p.risk);
      expect(p.risk).toBeLessThanOrEqual(p.high);
    }
  });

  it("widens the limits at a higher confidence level", () => {
    const f99 = fitted(fitDoseResponse(trials, 99));
    expect(f99.bmd).toBeCloseTo(app.bmd, 10);
    expect(f99.bmdl).toBeLessThan(app.bmdl);
    expect(f99.bmdu).toBeGreaterThan(app.bmdu);
  });
});

describe("cases where the model cannot be estimated answer fit null with a reason", () => {
  const reasonOf = (t: Trial[]) => {
    const d = fitDoseResponse(t, 95);
    expect(d).toMatchObject({ model: "logit-log10", fit: null });
    expect(isFitted(d)).toBe(false);
    return (d as { reason: string }).reason;
  };

  it("three reports", () => {
    expect(
      reasonOf([
        { dose: 10, n: 1, adverse: 0 },
        { dose: 20, n: 1, adverse: 1 },
        { dose: 30, n: 1, adverse: 0 },
      ]),
    ).toMatch(/Only 3 reports.*at least 10/);
  });

  it("no reports at all", () => {
    expect(reasonOf([])).toMatch(/No accepted reports/);
  });

  it("fewer than 2 that went badly", () => {
    expect(
      reasonOf([
        { dose: 10, n: 5, adverse: 0 },
        { dose: 20, n: 5, adverse: 1 },
        { dose: 30, n: 5, adverse: 0 },
      ]),
    ).toMatch(/Only 1 of 15 reports went badly/);
  });

  it("fewer than 3 distinct doses", () => {
    expect(
      reasonOf([
        { dose: 10, n: 10, adverse: 2 },
        { dose: 40, n: 10, adverse: 6 },
      ]),
    ).toMatch(/only 2 distinct doses/);
  });

  it("complete separation: every course above a dose went badly, every one below it went well", () => {
    expect(
      reasonOf([
        { dose: 10, n: 4, adverse: 0 },
        { dose: 20, n: 4, adverse: 0 },
        { dose: 40, n: 4, adverse: 4 },
        { dose: 80, n: 4, adverse: 4 },
      ]),
    ).toMatch(/split cleanly by dose/);
  });

  it("quasi-complete separation: outcomes mixed only at the dividing dose", () => {
    expect(
      reasonOf([
        { dose: 10, n: 4, adverse: 0 },
        { dose: 20, n: 4, adverse: 0 },
        { dose: 40, n: 4, adverse: 2 },
        { dose: 80, n: 4, adverse: 4 },
      ]),
    ).toMatch(/split cleanly by dose/);
  });

  it("risk falling with dose (b ≤ 0)", () => {
    expect(
      reasonOf([
        { dose: 10, n: 6, adverse: 3 },
        { dose: 20, n: 6, adverse: 2 },
        { dose: 40, n: 6, adverse: 2 },
        { dose: 80, n: 6, adverse: 1 },
      ]),
    ).toMatch(/does not rise with dose/);
    // Fully reversed: badly at low doses only.
    expect(
      reasonOf([
        { dose: 10, n: 5, adverse: 5 },
        { dose: 20, n: 5, adverse: 0 },
        { dose: 40, n: 5, adverse: 0 },
      ]),
    ).toMatch(/does not rise with dose/);
  });

  it("a slope too weak to bound the benchmark dose", () => {
    expect(
      reasonOf([
        { dose: 10, n: 6, adverse: 2 },
        { dose: 20, n: 6, adverse: 2 },
        { dose: 40, n: 6, adverse: 3 },
      ]),
    ).toMatch(/clearly enough to bound/);
  });
});

describe("any set of reports", () => {
  it("gives either a proper fit or a reason, never a curve from separated data", () => {
    let fits = 0;
    const trial = fc.record({
      dose: fc.integer({ min: 1, max: 200 }),
      n: fc.integer({ min: 1, max: 8 }),
      adverse: fc.integer({ min: 0, max: 8 }),
    });
    fc.assert(
      fc.property(
        fc.array(trial, { minLength: 0, maxLength: 25, size: "max" }),
        fc.constantFrom(80, 90, 95, 99),
        (raw, level) => {
          const trials = raw.map((t) => ({ ...t, adverse: Math.min(t.adverse, t.n) }));
          const d = fitDoseResponse(trials, level);
          if (!isFitted(d)) {
            expect(d.reason.length).toBeGreaterThan(10);
            return;
          }
          // A fit only where the outcomes overlap in dose: some adverse dose below some tolerated dose.
          const adverseDoses = trials.filter((t) => t.adverse > 0).map((t) => t.dose);
          const toleratedDoses = trials.filter((t) => t.n > t.adverse).map((t) => t.dose);
          expect(Math.min(...adverseDoses)).toBeLessThan(Math.max(...toleratedDoses));
          expect(Math.max(...adverseDoses)).toBeGreaterThan(Math.min(...toleratedDoses));
          fits++;
          expect(d.b).toBeGreaterThan(0);
          expect(d.bmdl).toBeLessThan(d.bmd);
          expect(d.bmd).toBeLessThan(d.bmdu);
          expect(Math.abs(profileDeviance(trials, d, d.bmdl) - profileCutoff(level))).toBeLessThan(1e-6);
          expect(Math.abs(profileDeviance(trials, d, d.bmdu) - profileCutoff(level))).toBeLessThan(1e-6);
          for (const p of d.curve) expect(p.low <= p.risk && p.risk <= p.high).toBe(true);
        },
      ),
      { numRuns: 300, seed: 20261202 },
    );
    // Enough of the random sets are fitted for the checks above to mean something.
    expect(fits).toBeGreaterThan(20);
  });
});
