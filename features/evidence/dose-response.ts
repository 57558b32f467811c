// Dose–response per summary (docs/statistics.md, "Dose–response"): a logistic model on log10 dose fitted by
// maximum likelihood to grouped trials, with the benchmark dose and its profile-likelihood limits. Pure code.
import { normalQuantile, zFor } from "./stats";

/** Reports at one distinct dose: n courses, `adverse` of them went badly. */
export interface Trial {
  dose: number;
  n: number;
  adverse: number;
}

export interface CurvePoint {
  dose: number;
  risk: number;
  low: number;
  high: number;
}

export interface DoseResponseFit {
  model: "logit-log10";
  a: number;
  b: number;
  seA: number;
  seB: number;
  covAB: number;
  bmr: number;
  bmd: number;
  bmdl: number;
  bmdu: number;
  deviance: number;
  df: number;
  curve: CurvePoint[];
}

export interface DoseResponseNone {
  model: "logit-log10";
  fit: null;
  reason: string;
}

export type DoseResponse = DoseResponseFit | DoseResponseNone;

export const BMR = 0.1;
export const MIN_REPORTS_FOR_CURVE = 10;
const CURVE_POINTS = 50;
/** How far (in decades of dose) the limits are searched for beyond the benchmark dose. */
const SEARCH_DECADES = 30;

export const logit = (p: number) => Math.log(p / (1 - p));
/** 1 / (1 + e^−t), without overflow either side. */
export const expit = (t: number) => (t >= 0 ? 1 / (1 + Math.exp(-t)) : Math.exp(t) / (1 + Math.exp(t)));
/** log(1 + e^t), without overflow. */
const softplus = (t: number) => (t > 0 ? t + Math.log1p(Math.exp(-t)) : Math.log1p(Math.exp(t)));

/** The χ²₁ quantile at p: (Φ⁻¹((1 + p)/2))². */
export const chiSquare1Quantile = (p: number) => normalQuantile((1 + p) / 2) ** 2;

/** The profile-deviance cut-off for one-sided limits at `level` %: χ²₁ at 1 − 2α, α = 1 − level/100. */
export const profileCutoff = (level: number) => normalQuantile(level / 100) ** 2;

export const isFitted = (d: DoseResponse | null | undefined): d is DoseResponseFit =>
  !!d && !("fit" in d && d.fit === null);

const none = (reason: string): DoseResponseNone => ({ model: "logit-log10", fit: null, reason });

/** Merges trials at the same dose, drops doses at or below zero; sorted by dose. */
export function groupTrials(trials: Trial[]): Trial[] {
  const by = new Map<number, Trial>();
  for (const t of trials) {
    if (!(t.dose > 0) || !(t.n > 0)) continue;
    const g = by.get(t.dose) ?? { dose: t.dose, n: 0, adverse: 0 };
    g.n += t.n;
    g.adverse += t.adverse;
    by.set(t.dose, g);
  }
  return [...by.values()].sort((p, q) => p.dose - q.dose);
}

interface Data {
  x: number[];
  n: number[];
  y: number[];
}

const dataOf = (g: Trial[]): Data => ({
  x: g.map((t) => Math.log10(t.dose)),
  n: g.map((t) => t.n),
  y: g.map((t) => t.adverse),
});

/** ℓ(a, b) without the binomial coefficients: Σ y·η − n·log(1 + e^η), η = a + b·log10 dose. */
export function logLikelihood(trials: Trial[], a: number, b: number): number {
  return logLik(dataOf(groupTrials(trials)), a, b);
}

function logLik(d: Data, a: number, b: number): number {
  let s = 0;
  for (let i = 0; i < d.x.length; i++) {
    const eta = a + b * d.x[i]!;
    s += d.y[i]! * eta - d.n[i]! * softplus(eta);
  }
  return s;
}

/**
 * Newton–Raphson (= IRLS for the logit link) in centred log dose, with step halving whenever a step lowers
 * the likelihood. Returns null if it does not settle.
 */
function newton(d: Data, xbar: number): { alpha: number; beta: number; info: [number, number, number] } | null {
  const N = d.n.reduce((s, v) => s + v, 0);
  const Y = d.y.reduce((s, v) => s + v, 0);
  let alpha = logit((Y + 0.5) / (N + 1));
  let beta = 0;
  const ll = (al: number, be: number) => logLik(d, al - be * xbar, be);
  let cur = ll(alpha, beta);
  for (let iter = 0; iter < 200; iter++) {
    let g0 = 0,
      g1 = 0,
      i00 = 0,
      i01 = 0,
      i11 = 0;
    for (let i = 0; i < d.x.length; i++) {
      const xc = d.x[i]! - xbar;
      const p = expit(alpha + beta * xc);
      const r = d.y[i]! - d.n[i]! * p;
      const w = d.n[i]! * p * (1 - p);
      g0 += r;
      g1 += r * xc;
      i00 += w;
      i01 += w * xc;
      i11 += w * xc * xc;
    }
    const det = i00 * i11 - i01 * i01;
    if (!(det > 0)) return null;
    let s0 = (i11 * g0 - i01 * g1) / det;
    let s1 = (i00 * g1 - i01 * g0) / det;
    let next = ll(alpha + s0, beta + s1);
    for (let h = 0; h < 60 && !(next >= cur - 1e-12 * Math.abs(cur)); h++) {
      s0 /= 2;
      s1 /= 2;
      next = ll(alpha + s0, beta + s1);
    }
    // No step along Newton's direction raises the likelihood: at its maximum to rounding.
    if (!(next >= cur - 1e-12 * Math.abs(cur))) return { alpha, beta, info: informationAt(d, xbar, alpha, beta) };
    alpha += s0;
    beta += s1;
    cur = next;
    if (!Number.isFinite(alpha) || !Number.isFinite(beta) || Math.abs(beta) > 1e6) return null;
    // Quadratic convergence: once a full step is this small, the error left after it is far below rounding.
    if (Math.abs(s0) <= 1e-9 * (1 + Math.abs(alpha)) && Math.abs(s1) <= 1e-9 * (1 + Math.abs(beta))) {
      return { alpha, beta, info: informationAt(d, xbar, alpha, beta) };
    }
  }
  return null;
}

function informationAt(d: Data, xbar: number, alpha: number, beta: number): [number, number, number] {
  let i00 = 0,
    i01 = 0,
    i11 = 0;
  for (let i = 0; i < d.x.length; i++) {
    const xc = d.x[i]! - xbar;
    const p = expit(alpha + beta * xc);
    const w = d.n[i]! * p * (1 - p);
    i00 += w;
    i01 += w * xc;
    i11 += w * xc * xc;
  }
  return [i00, i01, i11];
}

/** ℓ, its derivative in b, minus its second derivative in b, and Σ(y − n·p), at a = logit(bmr) − b·u: one pass. */
function profilePass(d: Data, u: number, b: number) {
  const L = logit(BMR);
  let ll = 0,
    g = 0,
    h = 0,
    r = 0;
  for (let i = 0; i < d.x.length; i++) {
    const t = d.x[i]! - u;
    const eta = L + b * t;
    const e = Math.exp(-Math.abs(eta));
    const p = eta >= 0 ? 1 / (1 + e) : e / (1 + e);
    const n = d.n[i]!,
      res = d.y[i]! - n * p;
    ll += d.y[i]! * eta - n * (Math.max(eta, 0) + Math.log1p(e));
    g += res * t;
    h += n * p * (1 - p) * t * t;
    r += res;
  }
  return { ll, g, h, r };
}

/**
 * max over b of ℓ given BMD = 10^u, i.e. a = logit(bmr) − b·u: concave in b, so Newton with step halving.
 * Also returns Σ(y − n·p) there: by the envelope theorem d(max ℓ)/du = −b·Σ(y − n·p).
 */
function profileLogLik(d: Data, u: number, start: number): { ll: number; b: number; r: number } {
  let b = start;
  let cur = profilePass(d, u, b);
  // Far from where `start` came from, the fitted risks can saturate at 0 or 1 (no curvature left to follow):
  // start from a flat curve instead, where every risk is bmr.
  if (!(cur.h > 0) || !Number.isFinite(cur.ll)) {
    b = 0;
    cur = profilePass(d, u, b);
  }
  for (let iter = 0; iter < 200; iter++) {
    if (!(cur.h > 0)) break;
    let step = cur.g / cur.h;
    let next = profilePass(d, u, b + step);
    for (let k = 0; k < 60 && !(next.ll >= cur.ll - 1e-12 * Math.abs(cur.ll)); k++) {
      step /= 2;
      next = profilePass(d, u, b + step);
    }
    if (!(next.ll >= cur.ll - 1e-12 * Math.abs(cur.ll))) break;
    b += step;
    cur = next;
    // Newton converges quadratically: after a step this small the remaining error is below 1e-14.
    if (Math.abs(step) <= 1e-8 * (1 + Math.abs(b))) break;
  }
  return { ll: cur.ll, b, r: cur.r };
}

/** 2·(ℓ̂ − max ℓ | BMD = dose) for these trials (ℓ̂ from the fit). */
export function profileDeviance(trials: Trial[], fit: Pick<DoseResponseFit, "a" | "b">, dose: number): number {
  const d = dataOf(groupTrials(trials));
  return 2 * (logLik(d, fit.a, fit.b) - profileLogLik(d, Math.log10(dose), fit.b).ll);
}

/**
 * The u on one side of u0 (dir −1 or +1) where the profile deviance reaches `cut`; null if it never does.
 * Brackets it stepping outward from the Wald guess, then Newton on the deviance (its slope in u is 2·b·Σ(y − n·p)),
 * falling back to bisection whenever a step would leave the bracket.
 */
function profileLimit(
  d: Data,
  llHat: number,
  u0: number,
  b0: number,
  seU: number,
  dir: -1 | 1,
  cut: number,
): number | null {
  const at = (u: number, start: number) => {
    const p = profileLogLik(d, u, start);
    return { u, dev: 2 * (llHat - p.ll), slope: 2 * p.b * p.r, b: p.b };
  };
  let inner = { u: u0, dev: 0, slope: 0, b: b0 };
  let step = Math.min(Math.max(Math.sqrt(cut) * seU, 1e-3), 1);
  let outer = at(u0 + dir * step, b0);
  while (outer.dev < cut) {
    if (step > SEARCH_DECADES) return null;
    inner = outer;
    step *= 2;
    outer = at(u0 + dir * step, inner.b);
  }
  let cur = outer;
  for (let i = 0; i < 200; i++) {
    let u = cur.u - (cur.dev - cut) / cur.slope;
    const lo = Math.min(inner.u, outer.u),
      hi = Math.max(inner.u, outer.u);
    if (!(u > lo && u < hi)) u = (inner.u + outer.u) / 2;
    const next = at(u, cur.b);
    if (next.dev >= cut) outer = next;
    else inner = next;
    const moved = Math.abs(next.u - cur.u);
    cur = next;
    if (
      Math.abs(cur.dev - cut) < 1e-11 ||
      moved <= 1e-14 * (1 + Math.abs(cur.u)) ||
      Math.abs(outer.u - inner.u) <= 1e-14 * (1 + Math.abs(cur.u))
    )
      break;
  }
  return cur.u;
}

const fmt = (v: number) => Number(v.toPrecision(3)).toString();

/**
 * Fits P(adverse | dose) = 1 / (1 + exp(−(a + b·log10 dose))) by maximum likelihood to grouped trials, with
 * the benchmark dose at `bmr` = 10 %, its profile-likelihood limits, and the fitted curve with Wald bands,
 * at the club's confidence level (80, 90, 95 or 99). `fit: null` with a reason where it cannot be estimated.
 */
export function fitDoseResponse(trials: Trial[], level: number): DoseResponse {
  const g = groupTrials(trials);
  const N = g.reduce((s, t) => s + t.n, 0);
  const Y = g.reduce((s, t) => s + t.adverse, 0);
  if (N === 0) return none("No accepted reports with a dose above zero yet.");
  if (N < MIN_REPORTS_FOR_CURVE)
    return none(
      `Only ${N} report${N === 1 ? "" : "s"} with a dose; a dose–response curve needs at least ${MIN_REPORTS_FOR_CURVE}.`,
    );
  if (Y < 2)
    return none(
      `Only ${Y} of ${N} reports went badly; a dose–response curve needs at least 2 that went badly and 2 that went well.`,
    );
  if (N - Y < 2)
    return none(
      `Only ${N - Y} of ${N} reports went well; a dose–response curve needs at least 2 that went badly and 2 that went well.`,
    );
  if (g.length < 3)
    return none(
      `The reports cover only ${g.length} distinct dose${g.length === 1 ? "" : "s"}; a dose–response curve needs at least 3.`,
    );

  // (Quasi-)complete separation: a dose splitting the outcomes perfectly leaves no finite estimate.
  const adv = g.filter((t) => t.adverse > 0),
    tol = g.filter((t) => t.n - t.adverse > 0);
  const minAdv = adv[0]!.dose,
    maxAdv = adv[adv.length - 1]!.dose,
    minTol = tol[0]!.dose,
    maxTol = tol[tol.length - 1]!.dose;
  if (minAdv >= maxTol) {
    return none(
      `The reports split cleanly by dose: every course at ${fmt(minAdv)} or above went badly and every one at ${fmt(maxTol)} or below went well, so how steeply the risk rises cannot be estimated.`,
    );
  }
  if (maxAdv <= minTol) {
    return none(
      `The risk does not rise with dose here: every course at ${fmt(maxAdv)} or below went badly and every one at ${fmt(minTol)} or above went well.`,
    );
  }

  const d = dataOf(g);
  const xbar = d.x.reduce((s, x, i) => s + x * d.n[i]!, 0) / N;
  const m = newton(d, xbar);
  if (!m) return none("The fit did not settle (its estimates kept growing), so no curve is shown.");
  const b = m.beta;
  if (!(b > 0))
    return none(`The fitted risk does not rise with dose (slope ${fmt(b)}), so there is no benchmark dose.`);
  const a = m.alpha - b * xbar;
  // Covariance: the inverse information in centred coordinates, moved back to (a, b) = (α − β·x̄, β).
  const [i00, i01, i11] = m.info;
  const det = i00 * i11 - i01 * i01;
  const vAl = i11 / det,
    vBe = i00 / det,
    cAlBe = -i01 / det;
  const varA = vAl + xbar * xbar * vBe - 2 * xbar * cAlBe;
  const covAB = cAlBe - xbar * vBe;
  const seA = Math.sqrt(varA),
    seB = Math.sqrt(vBe);

  const llHat = logLik(d, a, b);
  const u0 = (logit(BMR) - a) / b;
  const cut = profileCutoff(level);
  // Delta-method standard error of log10 bmd: only to size the first step of the search for the limits.
  const seU = Math.sqrt(Math.max(0, varA + 2 * u0 * covAB + u0 * u0 * vBe)) / b;
  const uL = profileLimit(d, llHat, u0, b, seU, -1, cut);
  const uU = profileLimit(d, llHat, u0, b, seU, 1, cut);
  if (uL === null || uU === null) {
    return none(
      `The reports do not show the risk rising with dose clearly enough to bound the benchmark dose at the ${level} % level.`,
    );
  }

  let deviance = 0;
  for (let i = 0; i < d.x.length; i++) {
    const n = d.n[i]!,
      y = d.y[i]!;
    const mu = n * expit(a + b * d.x[i]!);
    if (y > 0) deviance += 2 * y * Math.log(y / mu);
    if (n - y > 0) deviance += 2 * (n - y) * Math.log((n - y) / (n - mu));
  }

  const z = zFor(level);
  const lo = d.x[0]!,
    hi = d.x[d.x.length - 1]!;
  const curve: CurvePoint[] = Array.from({ length: CURVE_POINTS }, (_, i) => {
    const x = lo + ((hi - lo) * i) / (CURVE_POINTS - 1);
    const dose = i === 0 ? g[0]!.dose : i === CURVE_POINTS - 1 ? g[g.length - 1]!.dose : 10 ** x;
    const eta = a + b * x;
    const se = Math.sqrt(Math.max(0, varA + 2 * x * covAB + x * x * vBe));
    return { dose, risk: expit(eta), low: expit(eta - z * se), high: expit(eta + z * se) };
  });

  return {
    model: "logit-log10",
    a,
    b,
    seA,
    seB,
    covAB,
    bmr: BMR,
    bmd: 10 ** u0,
    bmdl: 10 ** uL,
    bmdu: 10 ** uU,
    deviance,
    df: g.length - 2,
    curve,
  };
}

/** The fitted risk at a dose with its Wald interval on the linear predictor, at the club's level. */
export function riskAt(fit: DoseResponseFit, dose: number, level: number): CurvePoint {
  const x = Math.log10(dose);
  const eta = fit.a + fit.b * x;
  const se = Math.sqrt(Math.max(0, fit.seA ** 2 + 2 * x * fit.covAB + x * x * fit.seB ** 2));
  const z = zFor(level);
  return { dose, risk: expit(eta), low: expit(eta - z * se), high: expit(eta + z * se) };
}
