/**
 * Small statistics toolkit for regression and fitting: weighted straight-line least squares
 * with standard errors, and quantiles of Student's t distribution for confidence intervals.
 * Unitless: callers' units carry through (x, y and their products).
 *
 * Methods (textbook; common practice):
 *  - straight line by weighted least squares, covariance s²·(XᵀWX)⁻¹ with s² = Σw·r²/(n−2);
 *  - ln Γ by the Lanczos approximation (C. Lanczos, SIAM J. Numer. Anal. B 1, 86 (1964);
 *    the g = 7, n = 9 coefficient set widely published, e.g. in Wikipedia's "Lanczos
 *    approximation" article — from memory, checked in tests against Γ at integers and ½);
 *  - regularised incomplete beta I_x(a, b) by its continued fraction evaluated with the
 *    modified Lentz method (Abramowitz & Stegun 26.5.8; Lentz, Appl. Opt. 15, 668 (1976));
 *  - Student t CDF F(t; ν) = 1 − ½·I_{ν/(ν+t²)}(ν/2, ½) for t ≥ 0 (A&S 26.7.1), inverted by
 *    bisection.
 */

const LANCZOS_G = 7;
const LANCZOS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059, 12.507343278686905,
  -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
];

/** ln Γ(x) for x > 0. */
export function lnGamma(x: number): number {
  if (x < 0.5) return Math.log(Math.PI / Math.abs(Math.sin(Math.PI * x))) - lnGamma(1 - x);
  const z = x - 1;
  let a = LANCZOS[0];
  const t = z + LANCZOS_G + 0.5;
  for (let i = 1; i < LANCZOS.length; i++) a += LANCZOS[i] / (z + i);
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(a);
}

/** Continued fraction of the incomplete beta function (modified Lentz). */
function betaContinuedFraction(x: number, a: number, b: number): number {
  const TINY = 1e-300;
  let c = 1;
  let d = 1 - ((a + b) * x) / (a + 1);
  if (Math.abs(d) < TINY) d = TINY;
  d = 1 / d;
  let f = d;
  for (let m = 1; m <= 500; m++) {
    const m2 = 2 * m;
    let num = (m * (b - m) * x) / ((a + m2 - 1) * (a + m2));
    d = 1 + num * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + num / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    f *= d * c;
    num = (-(a + m) * (a + b + m) * x) / ((a + m2) * (a + m2 + 1));
    d = 1 + num * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + num / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const delta = d * c;
    f *= delta;
    if (Math.abs(delta - 1) < 1e-15) break;
  }
  return f;
}

/** Regularised incomplete beta I_x(a, b), 0 ≤ x ≤ 1, a, b > 0. */
export function incompleteBeta(x: number, a: number, b: number): number {
  if (x <= 0) return 0;
  if (x >= 1) return 1;
  const lnFront = lnGamma(a + b) - lnGamma(a) - lnGamma(b) + a * Math.log(x) + b * Math.log(1 - x);
  if (x < (a + 1) / (a + b + 2)) return (Math.exp(lnFront) * betaContinuedFraction(x, a, b)) / a;
  return 1 - (Math.exp(lnFront) * betaContinuedFraction(1 - x, b, a)) / b;
}

/** Student t cumulative distribution F(t; ν), ν > 0 degrees of freedom. */
export function studentTCdf(t: number, dof: number): number {
  const tail = 0.5 * incompleteBeta(dof / (dof + t * t), dof / 2, 0.5);
  return t >= 0 ? 1 - tail : tail;
}

/** Quantile t_p(ν): F(t_p; ν) = p, for 0 < p < 1 (e.g. p = 0.975 for a two-sided 95 % interval). */
export function studentTQuantile(p: number, dof: number): number {
  if (!(p > 0 && p < 1) || !(dof > 0)) return NaN;
  if (p === 0.5) return 0;
  if (p < 0.5) return -studentTQuantile(1 - p, dof);
  let lo = 0;
  let hi = 1;
  while (studentTCdf(hi, dof) < p && hi < 1e12) hi *= 2;
  for (let i = 0; i < 200 && hi - lo > 1e-13 * hi; i++) {
    const mid = 0.5 * (lo + hi);
    if (studentTCdf(mid, dof) < p) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

export interface LineFit {
  slope: number;
  intercept: number;
  slopeSE: number;
  interceptSE: number;
  /** Covariance of (slope, intercept). */
  covariance: number;
  /** Coefficient of determination (weighted). */
  r2: number;
  /** y − fitted, per point. */
  residuals: number[];
  /** n − 2 */
  dof: number;
  /** Residual variance s² = Σ w·r²/(n − 2). */
  s2: number;
}

/**
 * Weighted straight-line least squares y ≈ intercept + slope·x (weights w_i = 1/σ_i², default 1).
 * Needs ≥ 3 points and at least two distinct x; the caller checks those. With weights given as
 * true 1/σ², the caller may prefer absolute SEs (pass absoluteSigma): covariance (XᵀWX)⁻¹.
 */
export function fitLine(x: ArrayLike<number>, y: ArrayLike<number>, w?: ArrayLike<number>, absoluteSigma = false): LineFit {
  const n = x.length;
  let sw = 0, sx = 0, sy = 0;
  for (let i = 0; i < n; i++) {
    const wi = w ? w[i] : 1;
    sw += wi;
    sx += wi * x[i];
    sy += wi * y[i];
  }
  const mx = sx / sw, my = sy / sw;
  let sxx = 0, sxy = 0, syy = 0;
  for (let i = 0; i < n; i++) {
    const wi = w ? w[i] : 1;
    const dx = x[i] - mx, dy = y[i] - my;
    sxx += wi * dx * dx;
    sxy += wi * dx * dy;
    syy += wi * dy * dy;
  }
  const slope = sxy / sxx;
  const intercept = my - slope * mx;
  const residuals: number[] = new Array(n);
  let ssr = 0;
  for (let i = 0; i < n; i++) {
    const r = y[i] - (intercept + slope * x[i]);
    residuals[i] = r;
    ssr += (w ? w[i] : 1) * r * r;
  }
  const dof = n - 2;
  const s2 = dof > 0 ? ssr / dof : 0;
  const scale = absoluteSigma ? 1 : s2;
  const varSlope = scale / sxx;
  const varIntercept = scale * (1 / sw + (mx * mx) / sxx);
  const covariance = (-scale * mx) / sxx;
  return {
    slope,
    intercept,
    slopeSE: Math.sqrt(varSlope),
    interceptSE: Math.sqrt(varIntercept),
    covariance,
    r2: syy > 0 ? 1 - ssr / syy : 1,
    residuals,
    dof,
    s2,
  };
}
