/**
 * Activation parameters from a table of measured rate constants k(T): Eyring and Arrhenius
 * regression with standard errors, confidence intervals and R².
 *
 * Units: T in K; k in (mol/L)^(1−m)·s⁻¹ (s⁻¹, L mol⁻¹ s⁻¹, L² mol⁻² s⁻¹), so the Eyring
 * activation parameters refer to the 1 mol/L standard state; ΔH‡, Ea, ΔG‡ in J/mol; ΔS‡ in
 * J/(mol·K); ln A with A in the units of k. Relations (linearised forms, textbook — common
 * practice):
 *     Eyring:     ln(k/T) = ln(κ·k_B/h) + ΔS‡/R − (ΔH‡/R)·(1/T)
 *     Arrhenius:  ln k = ln A − (Ea/R)·(1/T)
 * Both are ordinary least squares in ln k (constant relative error of k), or weighted with
 * w = 1/σ(ln k)² = (k/σ_k)² when uncertainties of k are given. ΔG‡(T) = ΔH‡ − T·ΔS‡ with
 * SE² = SE(ΔH‡)² + T²·SE(ΔS‡)² − 2T·cov(ΔH‡, ΔS‡).
 */
import { LN_KB_OVER_H, R_GAS } from "./constants.ts";
import { fail, ok } from "./input-checks.ts";
import { fitLine, studentTQuantile } from "./statistics.ts";
import type { Result } from "./types.ts";

export interface RatePoint {
  /** K */
  T: number;
  /** (mol/L)^(1−m)·s⁻¹ */
  k: number;
  /** Standard uncertainty of k, same units (optional; all points or none). */
  sigmaK?: number;
}

export interface RegressionOptions {
  /** Transmission coefficient assumed in the Eyring analysis, default 1. */
  kappa?: number;
  /** Two-sided confidence level of the intervals, default 0.95. */
  confidence?: number;
  /** K, temperature at which ΔG‡ is reported, default 298.15. */
  Tref?: number;
}

export interface Estimate {
  value: number;
  /** Standard error, same units. */
  se: number;
  /** Half-width of the confidence interval at the requested level, same units. */
  ci: number;
}

export interface EyringResult {
  /** J/mol */
  dH: Estimate;
  /** J/(mol·K) */
  dS: Estimate;
  /** J/mol at Tref */
  dG: Estimate;
  /** K */
  Tref: number;
  /** cov(ΔH‡, ΔS‡), J²/(mol²·K) */
  covHS: number;
  r2: number;
  /** ln(k/T) observed − fitted, per point (unitless). */
  residuals: number[];
  n: number;
  dof: number;
  confidence: number;
  standardState: "1M";
  relations: string[];
}

export interface ArrheniusResult {
  /** J/mol */
  Ea: Estimate;
  /** ln of A in (mol/L)^(1−m)·s⁻¹ */
  lnA: Estimate;
  /** (mol/L)^(1−m)·s⁻¹ */
  A: number;
  /** cov(Ea, ln A), J/mol */
  covEaLnA: number;
  r2: number;
  /** ln k observed − fitted, per point. */
  residuals: number[];
  n: number;
  dof: number;
  confidence: number;
  relations: string[];
}

interface Prepared {
  x: Float64Array; // 1/T
  lnk: Float64Array;
  lnT: Float64Array;
  w?: Float64Array;
  tq: number;
  confidence: number;
}

function prepare(points: RatePoint[], options: RegressionOptions): Result<Prepared> {
  if (!Array.isArray(points) || points.length === 0) return fail("EMPTY_INPUT", "The k(T) table is empty.", "points");
  if (points.length < 3) return fail("TOO_FEW_POINTS", `A regression with standard errors needs at least 3 points (got ${points.length}).`, "points");
  const n = points.length;
  const x = new Float64Array(n), lnk = new Float64Array(n), lnT = new Float64Array(n);
  const withSigma = points.filter((p) => p?.sigmaK !== undefined).length;
  if (withSigma !== 0 && withSigma !== n) return fail("EMPTY_INPUT", "Give an uncertainty of k for every point or for none.", "points");
  const w = withSigma ? new Float64Array(n) : undefined;
  for (let i = 0; i < n; i++) {
    const p = points[i];
    if (!p || typeof p.T !== "number" || !Number.isFinite(p.T)) return fail("NON_FINITE", "Each temperature must be a finite number of kelvin.", `points[${i}].T`);
    if (p.T <= 0) return fail("TEMPERATURE", `The temperature must be above 0 K (got ${p.T} K).`, `points[${i}].T`);
    if (typeof p.k !== "number" || !Number.isFinite(p.k)) return fail("NON_FINITE", "Each rate constant must be a finite number.", `points[${i}].k`);
    if (p.k <= 0) return fail("RATE_CONSTANT", `A rate constant must be positive to take its logarithm (got ${p.k}).`, `points[${i}].k`);
    x[i] = 1 / p.T;
    lnk[i] = Math.log(p.k);
    lnT[i] = Math.log(p.T);
    if (w) {
      const s = p.sigmaK!;
      if (!Number.isFinite(s) || s <= 0) return fail("NON_FINITE", "Each uncertainty of k must be a positive finite number.", `points[${i}].sigmaK`);
      const sl = s / p.k;
      w[i] = 1 / (sl * sl);
    }
  }
  let distinct = false;
  for (let i = 1; i < n; i++) if (Math.abs(x[i] - x[0]) > 1e-12 * x[0]) distinct = true;
  if (!distinct) return fail("TEMPERATURES_NOT_DISTINCT", "The k(T) table needs at least two different temperatures.", "points");
  const confidence = options.confidence ?? 0.95;
  if (!(confidence > 0 && confidence < 1)) return fail("NON_FINITE", "The confidence level must lie strictly between 0 and 1.", "confidence");
  const tq = studentTQuantile(0.5 + confidence / 2, n - 2);
  return ok({ x, lnk, lnT, w, tq, confidence });
}

const est = (value: number, se: number, tq: number): Estimate => ({ value, se, ci: tq * se });

/** Eyring regression of a k(T) table: ΔH‡, ΔS‡ (1 mol/L state) and ΔG‡(Tref) with standard errors. */
export function eyringRegression(points: RatePoint[], options: RegressionOptions = {}): Result<EyringResult> {
  const pr = prepare(points, options);
  if (!pr.ok) return pr;
  const kappa = options.kappa ?? 1;
  if (!(kappa > 0) || !Number.isFinite(kappa)) return fail("KAPPA", `The transmission coefficient κ must be positive (got ${kappa}).`, "kappa");
  const Tref = options.Tref ?? 298.15;
  if (!(Tref > 0) || !Number.isFinite(Tref)) return fail("TEMPERATURE", "The reference temperature must be above 0 K.", "Tref");
  const { x, lnk, lnT, w, tq, confidence } = pr.value;
  const y = lnk.map((v, i) => v - lnT[i]);
  const f = fitLine(x, y, w);
  const lnPre = LN_KB_OVER_H + Math.log(kappa);
  const dH = -R_GAS * f.slope;
  const dS = R_GAS * (f.intercept - lnPre);
  const seH = R_GAS * f.slopeSE;
  const seS = R_GAS * f.interceptSE;
  const covHS = -R_GAS * R_GAS * f.covariance;
  const seG = Math.sqrt(Math.max(0, seH * seH + Tref * Tref * seS * seS - 2 * Tref * covHS));
  return ok({
    dH: est(dH, seH, tq),
    dS: est(dS, seS, tq),
    dG: est(dH - Tref * dS, seG, tq),
    Tref,
    covHS,
    r2: f.r2,
    residuals: f.residuals,
    n: x.length,
    dof: f.dof,
    confidence,
    standardState: "1M",
    relations: [
      "ln(k/T) = ln(κ·k_B/h) + ΔS‡/R − (ΔH‡/R)·(1/T)",
      "ΔH‡ = −R·slope, ΔS‡ = R·(intercept − ln(κ·k_B/h))",
      "ΔG‡(Tref) = ΔH‡ − Tref·ΔS‡",
      "k in mol/L units: parameters refer to the 1 mol/L standard state",
    ],
  });
}

/** Arrhenius regression of a k(T) table: Ea and ln A with standard errors. */
export function arrheniusRegression(points: RatePoint[], options: RegressionOptions = {}): Result<ArrheniusResult> {
  const pr = prepare(points, options);
  if (!pr.ok) return pr;
  const { x, lnk, w, tq, confidence } = pr.value;
  const f = fitLine(x, lnk, w);
  const Ea = -R_GAS * f.slope;
  return ok({
    Ea: est(Ea, R_GAS * f.slopeSE, tq),
    lnA: est(f.intercept, f.interceptSE, tq),
    A: Math.exp(f.intercept),
    covEaLnA: -R_GAS * f.covariance,
    r2: f.r2,
    residuals: f.residuals,
    n: x.length,
    dof: f.dof,
    confidence,
    relations: ["ln k = ln A − (Ea/R)·(1/T)", "Ea = −R·slope, ln A = intercept"],
  });
}
