/**
 * Ensembles of simulations: the members of a parameter sweep or of an uncertainty propagation,
 * and the statistics of their outcomes. Pure computation (no DB, no React, no node-only APIs).
 *
 * Units: temperatures K, initial concentrations mol/L, barrier shifts J/mol (added to a step's
 * ΔG‡, so k_fwd and k_rev both scale by exp(−shift/RT) and K_eq is unchanged), σ of a barrier
 * J/mol, σ of T in K.
 *
 * Correlated barrier errors (common practice for errors of one computational method): the steps
 * of one method group share a common standard normal z_g, so
 *   shift_i = σ_i (√ρ_g z_g + √(1 − ρ_g) z_i),
 * which keeps each shift ~ N(0, σ_i²) and gives two steps of the group the correlation ρ_g.
 */
import { erf } from "mathjs";
import { probit, quantileSorted } from "simple-statistics";
import { seededUniform } from "./random.ts";
import type { Result } from "./types.ts";

// ---------------------------------------------------------------- random numbers

/** Standard normal cumulative distribution Φ(z) = ½(1 + erf(z/√2)). */
export function normalCdf(z: number): number {
  return 0.5 * (1 + erf(z / Math.SQRT2));
}

/**
 * Standard normal quantile Φ⁻¹(p), 0 < p < 1: simple-statistics' probit (about 3 digits) refined by
 * Newton steps on Φ, to about 1e-12.
 */
export function normalQuantile(p: number): number {
  if (!(p > 0 && p < 1)) return p <= 0 ? -Infinity : Infinity;
  let z = probit(p);
  for (let i = 0; i < 4; i++) {
    const dens = Math.exp(-0.5 * z * z) / Math.sqrt(2 * Math.PI);
    if (!(dens > 0)) break;
    const step = (normalCdf(z) - p) / dens;
    z -= step;
    if (Math.abs(step) < 1e-14 * Math.max(1, Math.abs(z))) break;
  }
  return z;
}

/** A uniform in (0, 1), never exactly 0. */
function openUniform(rand: () => number): number {
  let u = rand();
  while (u <= 0) u = rand();
  return u;
}

/**
 * n × d standard normal draws. "monte-carlo": independent draws (inverse CDF of a uniform).
 * "latin-hypercube": each column takes exactly one draw from each of the n equal-probability
 * strata [j/n, (j+1)/n) of the uniform, in a random order (McKay, Beckman & Conover,
 * Technometrics 21, 1979), then the inverse CDF.
 */
export function standardNormalSample(n: number, d: number, sampler: "monte-carlo" | "latin-hypercube", rand: () => number): Float64Array[] {
  const rows = Array.from({ length: n }, () => new Float64Array(d));
  if (sampler === "monte-carlo") {
    for (let i = 0; i < n; i++) for (let j = 0; j < d; j++) rows[i][j] = normalQuantile(openUniform(rand));
    return rows;
  }
  for (let j = 0; j < d; j++) {
    const u = latinHypercubeColumn(n, rand);
    for (let i = 0; i < n; i++) rows[i][j] = normalQuantile(u[i]);
  }
  return rows;
}

/** One Latin-hypercube column of n uniforms: value i lies in stratum perm[i]. */
export function latinHypercubeColumn(n: number, rand: () => number): Float64Array {
  const perm = Array.from({ length: n }, (_, i) => i);
  for (let i = n - 1; i > 0; i--) {
    const k = Math.floor(rand() * (i + 1));
    [perm[i], perm[k]] = [perm[k], perm[i]];
  }
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let u = (perm[i] + rand()) / n;
    if (u <= 0) u = 0.5 / n / 1e6;
    out[i] = u;
  }
  return out;
}

// ---------------------------------------------------------------- the members

export type SweepParameter = { kind: "temperature" } | { kind: "initial"; species: string } | { kind: "barrier"; step: string };

export interface SweepAxis {
  parameter: SweepParameter;
  /** K, mol/L or J/mol by parameter kind */
  from: number;
  to: number;
  points: number;
  grid: "linear" | "log";
}

export interface UncertainStep {
  step: string;
  /** J/mol, standard uncertainty of the barrier */
  sigma: number;
  /** method group (level of theory / technique); null: an error of its own */
  group: string | null;
}

export interface EnsembleDesign {
  mode: "sweep" | "uncertainty";
  /** K, the isothermal base temperature; null when the base conditions are a temperature program */
  baseT: number | null;
  sweep?: SweepAxis[];
  uncertainty?: {
    samples: number;
    sampler: "monte-carlo" | "latin-hypercube";
    seed: number;
    steps: UncertainStep[];
    /** correlation ρ (0…1) of each method group; a group not listed has ρ = 0 */
    rho: Record<string, number>;
    /** K, standard uncertainty of the temperature (isothermal base only) */
    temperatureSigma?: number;
  };
}

export interface EnsembleMember {
  index: number;
  /** K; null: the base conditions' temperature or program */
  T: number | null;
  /** mol/L by species id: overrides of the base initial concentrations */
  initial: Record<string, number>;
  /** J/mol by step id, added to the step's barrier */
  shifts: Record<string, number>;
}

export const ENSEMBLE_MAX_MEMBERS = 5000;

/** The values of one sweep axis, ends included. */
export function axisValues(a: SweepAxis): number[] {
  if (a.points === 1) return [a.from];
  const out: number[] = [];
  for (let i = 0; i < a.points; i++) {
    const f = i / (a.points - 1);
    out.push(a.grid === "log" ? a.from * Math.pow(a.to / a.from, f) : a.from + (a.to - a.from) * f);
  }
  return out;
}

function err(code: string, message: string, path: string): Result<never> {
  return { ok: false, error: { code, message, path } };
}

/** The members of a design, in index order. */
export function planMembers(d: EnsembleDesign): Result<EnsembleMember[]> {
  if (d.mode === "sweep") return planSweep(d);
  return planUncertainty(d);
}

function planSweep(d: EnsembleDesign): Result<EnsembleMember[]> {
  const axes = d.sweep ?? [];
  if (axes.length < 1 || axes.length > 2) return err("BAD_SWEEP", "A sweep has one or two parameters.", "sweep");
  for (let i = 0; i < axes.length; i++) {
    const a = axes[i];
    if (!(a.points >= 1) || !Number.isInteger(a.points)) return err("BAD_SWEEP", "The number of points must be a whole number of at least 1.", `sweep[${i}].points`);
    if (!Number.isFinite(a.from) || !Number.isFinite(a.to)) return err("BAD_SWEEP", "The range must be finite.", `sweep[${i}].from`);
    if (a.grid === "log" && !(a.from > 0 && a.to > 0)) return err("BAD_SWEEP", "A logarithmic grid needs both ends above 0.", `sweep[${i}].from`);
    if (a.parameter.kind === "temperature" && (!(a.from > 0) || !(a.to > 0))) return err("BAD_SWEEP", "Temperatures must be above 0 K.", `sweep[${i}].from`);
    if (a.parameter.kind === "temperature" && d.baseT === null) return err("BAD_SWEEP", "A temperature sweep needs isothermal base conditions, not a temperature program.", `sweep[${i}].parameter`);
    if (a.parameter.kind === "initial" && (a.from < 0 || a.to < 0)) return err("BAD_SWEEP", "Concentrations must be 0 or more.", `sweep[${i}].from`);
  }
  if (axes.length === 2 && JSON.stringify(axes[0].parameter) === JSON.stringify(axes[1].parameter)) return err("BAD_SWEEP", "The two sweep parameters must differ.", "sweep[1].parameter");
  const total = axes.reduce((n, a) => n * a.points, 1);
  if (total > ENSEMBLE_MAX_MEMBERS) return err("TOO_MANY_MEMBERS", `The sweep has ${total} members; the limit is ${ENSEMBLE_MAX_MEMBERS}.`, "sweep");
  const values = axes.map(axisValues);
  const members: EnsembleMember[] = [];
  const outer = values[0];
  const inner = values[1] ?? [null];
  for (const v0 of outer) {
    for (const v1 of inner) {
      const m: EnsembleMember = { index: members.length, T: d.baseT, initial: {}, shifts: {} };
      const set = (a: SweepAxis, v: number) => {
        if (a.parameter.kind === "temperature") m.T = v;
        else if (a.parameter.kind === "initial") m.initial[a.parameter.species] = v;
        else m.shifts[a.parameter.step] = v;
      };
      set(axes[0], v0);
      if (v1 !== null) set(axes[1], v1);
      members.push(m);
    }
  }
  return { ok: true, value: members };
}

function planUncertainty(d: EnsembleDesign): Result<EnsembleMember[]> {
  const u = d.uncertainty;
  if (!u) return err("BAD_UNCERTAINTY", "An uncertainty ensemble needs its sampling settings.", "uncertainty");
  if (!(u.samples >= 2) || !Number.isInteger(u.samples) || u.samples > ENSEMBLE_MAX_MEMBERS) {
    return err("BAD_UNCERTAINTY", `The sample count must be a whole number from 2 to ${ENSEMBLE_MAX_MEMBERS}.`, "uncertainty.samples");
  }
  const steps = u.steps.filter((s) => s.sigma > 0);
  for (const s of u.steps) if (!(s.sigma >= 0) || !Number.isFinite(s.sigma)) return err("BAD_UNCERTAINTY", `The uncertainty of step ${s.step} must be 0 or more.`, "uncertainty.steps");
  for (const [g, r] of Object.entries(u.rho)) if (!(r >= 0 && r <= 1)) return err("BAD_UNCERTAINTY", `The correlation of method group "${g}" must be between 0 and 1.`, "uncertainty.rho");
  const sigmaT = u.temperatureSigma ?? 0;
  if (!(sigmaT >= 0)) return err("BAD_UNCERTAINTY", "The temperature uncertainty must be 0 or more.", "uncertainty.temperatureSigma");
  if (sigmaT > 0 && d.baseT === null) return err("BAD_UNCERTAINTY", "A temperature uncertainty needs isothermal base conditions.", "uncertainty.temperatureSigma");
  if (steps.length === 0 && sigmaT === 0) return err("BAD_UNCERTAINTY", "Nothing is uncertain: give at least one step an uncertainty above 0, or the temperature.", "uncertainty.steps");

  // Columns: one per step, one per correlated method group, one for T.
  const groups = [...new Set(steps.map((s) => s.group).filter((g): g is string => g !== null && (u.rho[g] ?? 0) > 0))];
  const groupCol = new Map(groups.map((g, i) => [g, steps.length + i]));
  const tCol = sigmaT > 0 ? steps.length + groups.length : -1;
  const d_ = steps.length + groups.length + (tCol >= 0 ? 1 : 0);
  const z = standardNormalSample(u.samples, d_, u.sampler, seededUniform(u.seed));
  const members: EnsembleMember[] = [];
  for (let i = 0; i < u.samples; i++) {
    const row = z[i];
    const shifts: Record<string, number> = {};
    steps.forEach((s, j) => {
      const col = s.group !== null ? groupCol.get(s.group) : undefined;
      const rho = col !== undefined ? u.rho[s.group!] : 0;
      const common = col !== undefined ? Math.sqrt(rho) * row[col] : 0;
      shifts[s.step] = s.sigma * (common + Math.sqrt(1 - rho) * row[j]);
    });
    let T = d.baseT;
    if (tCol >= 0) T = Math.max(1, d.baseT! + sigmaT * row[tCol]);
    members.push({ index: i, T, initial: {}, shifts });
  }
  return { ok: true, value: members };
}

// ---------------------------------------------------------------- statistics of the outcomes

export interface Distribution {
  n: number;
  mean: number;
  sd: number;
  p5: number;
  p25: number;
  p50: number;
  p75: number;
  p95: number;
}

export interface HistogramBin {
  from: number;
  to: number;
  count: number;
}

/** Mean, sample standard deviation and percentiles (linear interpolation between order statistics). Null for no values. */
export function distribution(values: readonly number[]): Distribution | null {
  const v = values.filter(Number.isFinite).sort((a, b) => a - b);
  const n = v.length;
  if (n === 0) return null;
  const mean = v.reduce((s, x) => s + x, 0) / n;
  const sd = n > 1 ? Math.sqrt(v.reduce((s, x) => s + (x - mean) ** 2, 0) / (n - 1)) : 0;
  const q = (p: number) => quantileSorted(v, p);
  return { n, mean, sd, p5: q(0.05), p25: q(0.25), p50: q(0.5), p75: q(0.75), p95: q(0.95) };
}

/** Equal-width bins from the smallest to the largest value (one bin when all are equal). */
export function histogram(values: readonly number[], bins = 20): HistogramBin[] {
  const v = values.filter(Number.isFinite);
  if (v.length === 0) return [];
  let lo = Infinity, hi = -Infinity;
  for (const x of v) ((lo = Math.min(lo, x)), (hi = Math.max(hi, x)));
  if (!(hi > lo)) return [{ from: lo, to: hi, count: v.length }];
  const w = (hi - lo) / bins;
  const out = Array.from({ length: bins }, (_, i) => ({ from: lo + i * w, to: i === bins - 1 ? hi : lo + (i + 1) * w, count: 0 }));
  for (const x of v) out[Math.min(bins - 1, Math.floor((x - lo) / w))].count++;
  return out;
}

/** Ranks 1…n, ties sharing their average rank. */
export function ranks(values: readonly number[]): number[] {
  const idx = values.map((_, i) => i).sort((a, b) => values[a] - values[b]);
  const r = new Array<number>(values.length);
  for (let i = 0; i < idx.length; ) {
    let j = i;
    while (j + 1 < idx.length && values[idx[j + 1]] === values[idx[i]]) j++;
    const avg = (i + j) / 2 + 1;
    for (let k = i; k <= j; k++) r[idx[k]] = avg;
    i = j + 1;
  }
  return r;
}

function pearson(x: readonly number[], y: readonly number[]): number {
  const n = x.length;
  const mx = x.reduce((s, a) => s + a, 0) / n;
  const my = y.reduce((s, a) => s + a, 0) / n;
  let sxy = 0, sxx = 0, syy = 0;
  for (let i = 0; i < n; i++) {
    sxy += (x[i] - mx) * (y[i] - my);
    sxx += (x[i] - mx) ** 2;
    syy += (y[i] - my) ** 2;
  }
  return sxx > 0 && syy > 0 ? sxy / Math.sqrt(sxx * syy) : 0;
}

/** Spearman's rank correlation (Pearson correlation of the ranks, ties averaged); 0 when either is constant. */
export function spearman(x: readonly number[], y: readonly number[]): number {
  if (x.length !== y.length || x.length < 3) return 0;
  return pearson(ranks(x), ranks(y));
}

export interface MemberResult {
  index: number;
  /** J/mol by step id */
  shifts: Record<string, number>;
  /** K, when the temperature varied */
  T?: number | null;
  /** by observable key and time index: values[`${key}@${k}`] */
  values: Record<string, number>;
}

export interface ObservableSummary {
  key: string;
  /** one per time of `times`; null where no member had a value */
  series: (Distribution | null)[];
  /** histograms at the chosen times (indices into `times`) */
  histograms: { timeIndex: number; bins: HistogramBin[] }[];
}

export interface SensitivityEntry {
  observable: string;
  timeIndex: number;
  /** by |ρ_s|, largest first; `parameter` is a step id or "T" */
  ranking: { parameter: string; rankCorrelation: number }[];
}

export interface EnsembleSummary {
  /** s */
  times: number[];
  chosen: number[];
  members: { total: number; ok: number; failed: number };
  observables: ObservableSummary[];
  sensitivity: SensitivityEntry[];
}

export const valueKey = (observable: string, timeIndex: number) => `${observable}@${timeIndex}`;

/**
 * Statistics of the members that succeeded: per observable and time, the distribution; histograms
 * at the chosen times; and (when parameters were sampled) Spearman rank correlations of each
 * sampled parameter against each observable at each chosen time, largest |ρ_s| first.
 */
export function summarizeOutcomes(input: { times: number[]; chosen: number[]; observables: string[]; total: number; results: MemberResult[]; failed: number; sensitivity: boolean }): EnsembleSummary {
  const { times, chosen, observables, results } = input;
  const summaries: ObservableSummary[] = observables.map((key) => {
    const series = times.map((_, k) => distribution(results.map((r) => r.values[valueKey(key, k)]).filter((v) => v !== undefined)));
    const histograms = chosen.map((k) => ({ timeIndex: k, bins: histogram(results.map((r) => r.values[valueKey(key, k)]).filter((v) => v !== undefined)) }));
    return { key, series, histograms };
  });
  const sensitivity: SensitivityEntry[] = [];
  if (input.sensitivity && results.length >= 3) {
    const params = [...new Set(results.flatMap((r) => Object.keys(r.shifts)))];
    const withT = results.some((r) => r.T != null && r.T !== results[0].T);
    for (const key of observables) {
      for (const k of chosen) {
        const rows = results.filter((r) => Number.isFinite(r.values[valueKey(key, k)]));
        const y = rows.map((r) => r.values[valueKey(key, k)]);
        const ranking = params.map((p) => ({ parameter: p, rankCorrelation: spearman(rows.map((r) => r.shifts[p] ?? 0), y) }));
        if (withT) ranking.push({ parameter: "T", rankCorrelation: spearman(rows.map((r) => r.T ?? 0), y) });
        ranking.sort((a, b) => Math.abs(b.rankCorrelation) - Math.abs(a.rankCorrelation));
        sensitivity.push({ observable: key, timeIndex: k, ranking });
      }
    }
  }
  return { times, chosen, members: { total: input.total, ok: results.length, failed: input.failed }, observables: summaries, sensitivity };
}
