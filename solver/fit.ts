/**
 * Least-squares fitting of chosen step barriers to measured concentration–time data.
 *
 * Parameters are barrier shifts δ_i (J/mol) of the chosen steps: shifting a step's transition
 * state multiplies its forward and reverse rate constants by exp(−δ_i/RT(t)) (K_eq unchanged),
 * which applies to every barrier form; shiftBarrier() writes the fitted shift back into a
 * step in its own form. The objective is Σ ((c_model − c_obs)/σ)² over every observation of
 * every experiment (σ = 1 mol/L when not given, i.e. ordinary least squares in mol/L).
 *
 * Method: Levenberg–Marquardt with Marquardt's diagonal scaling (D. W. Marquardt, J. SIAM 11,
 * 431 (1963)) and Nielsen's damping update (H. B. Nielsen, IMM-REP-1999-05; as presented in
 * K. Madsen, H. B. Nielsen, O. Tingleff, "Methods for non-linear least squares problems",
 * 2nd ed., DTU 2004, §3.2 — common practice). The Jacobian is a forward difference during
 * the iterations and a central difference at the solution. Covariance at the solution:
 * s²·(JᵀJ)⁻¹ with s² = SSR/(n − p) (or (JᵀJ)⁻¹ with absoluteSigma when σ are true standard
 * uncertainties); standard errors are the square roots of its diagonal.
 *
 * Units: times s; concentrations and σ mol/L; temperatures K; shifts, SEs and bounds J/mol.
 */
import { R_GAS } from "./constants.ts";
import type { CompiledModel } from "./model.ts";
import { simulate, type SimulateOptions, type StepRateFunctions } from "./simulate.ts";
import { studentTQuantile } from "./statistics.ts";
import type { TemperatureProgram } from "./temperature-program.ts";
import type { EngineError, Result, StepKinetics } from "./types.ts";

export interface Observation {
  species: string;
  /** s, each ≥ 0 */
  times: number[];
  /** mol/L, one per time */
  values: number[];
  /** mol/L, standard uncertainty: one value for all points or one per point; default 1. */
  sigma?: number | number[];
}

export interface FitExperiment {
  /** Optional label used in messages and results. */
  id?: string;
  temperature: TemperatureProgram;
  /** mol/L, by species id or in species order. */
  initial: Record<string, number> | ArrayLike<number>;
  observations: Observation[];
}

export interface FitParameter {
  stepId: string;
  /** J/mol, starting shift; default 0. */
  initial?: number;
  /** J/mol bounds of the shift; default ±60 kJ/mol. */
  lower?: number;
  upper?: number;
}

export interface FitOptions {
  rtol?: number; // default 1e-8
  atol?: number; // mol/L, default 1e-14
  maxIterations?: number; // default 60
  /** Simulation method for every run; default "stiff". */
  method?: SimulateOptions["method"];
  /** Confidence level of the intervals, default 0.95. */
  confidence?: number;
  /** Treat σ as absolute standard uncertainties (covariance (JᵀJ)⁻¹ unscaled). Default false. */
  absoluteSigma?: boolean;
  /** Finite-difference step of the shifts, J/mol; default 10. */
  fdStep?: number;
  maxWallMs?: number;
  now?: () => number;
  signal?: AbortSignal;
}

export interface FittedParameter {
  stepId: string;
  /** J/mol */
  shift: number;
  /** J/mol */
  se: number;
  /** J/mol, half-width of the confidence interval */
  ci: number;
  /** True when the shift ended on a bound (its SE is then not meaningful). */
  atBound: boolean;
}

export interface FitResult {
  parameters: FittedParameter[];
  /** Correlation matrix of the shifts, row-major p × p. */
  correlation: number[][];
  /** J²/mol², row-major p × p */
  covariance: number[][];
  /** Per experiment, per observation: model − measured (mol/L) at each time. */
  residuals: number[][][];
  /** Per experiment, per observation: model concentrations (mol/L) at each time. */
  fitted: number[][][];
  /** Σ ((model − measured)/σ)² at the solution. */
  ssr: number;
  /** Σ at the starting point. */
  ssrInitial: number;
  n: number;
  dof: number;
  iterations: number;
  simulations: number;
  converged: boolean;
  /** Why the iteration stopped. */
  stopReason: "gradient" | "step" | "max-iterations";
  confidence: number;
}

function bad<T>(code: string, message: string, path?: string): Result<T> {
  const error: EngineError = path ? { code, message, path } : { code, message };
  return { ok: false, error };
}

/** Solve the small symmetric positive (semi)definite system A x = b by Gaussian elimination with pivoting; null if singular. */
function solveSmall(A: number[][], b: number[]): number[] | null {
  const n = b.length;
  const M = A.map((r, i) => [...r, b[i]]);
  for (let c = 0; c < n; c++) {
    let p = c;
    for (let i = c + 1; i < n; i++) if (Math.abs(M[i][c]) > Math.abs(M[p][c])) p = i;
    if (!(Math.abs(M[p][c]) > 1e-300)) return null;
    [M[c], M[p]] = [M[p], M[c]];
    for (let i = c + 1; i < n; i++) {
      const f = M[i][c] / M[c][c];
      for (let j = c; j <= n; j++) M[i][j] -= f * M[c][j];
    }
  }
  const x = new Array<number>(n).fill(0);
  for (let i = n - 1; i >= 0; i--) {
    let s = M[i][n];
    for (let j = i + 1; j < n; j++) s -= M[i][j] * x[j];
    x[i] = s / M[i][i];
  }
  return x.every(Number.isFinite) ? x : null;
}

function invertSmall(A: number[][]): number[][] | null {
  const n = A.length;
  const cols: number[][] = [];
  for (let j = 0; j < n; j++) {
    const e = new Array<number>(n).fill(0);
    e[j] = 1;
    const x = solveSmall(A, e);
    if (!x) return null;
    cols.push(x);
  }
  return A.map((_, i) => cols.map((c) => c[i]));
}

/**
 * Fit barrier shifts of the chosen steps to measured data. `rateConstants` are the unshifted
 * rate functions in model order (e.g. from stepRateFunctions).
 */
export function fitBarriers(
  model: CompiledModel,
  rateConstants: StepRateFunctions[],
  experiments: FitExperiment[],
  parameters: FitParameter[],
  options: FitOptions = {},
): Result<FitResult> {
  // ---- validation
  if (!Array.isArray(rateConstants) || rateConstants.length !== model.nReactions) {
    return bad("BAD_RATE_CONSTANTS", `Rate constants must be given for each of the ${model.nReactions} steps.`, "rateConstants");
  }
  if (!Array.isArray(experiments) || experiments.length === 0) return bad("EMPTY_INPUT", "At least one experiment with data is needed.", "experiments");
  if (!Array.isArray(parameters) || parameters.length === 0) return bad("EMPTY_INPUT", "Choose at least one step barrier to fit.", "parameters");
  const p = parameters.length;
  const stepIdx: number[] = [];
  const lo: number[] = [];
  const hi: number[] = [];
  const x0: number[] = [];
  const seen = new Set<string>();
  for (let j = 0; j < p; j++) {
    const q = parameters[j];
    const r = model.reactionIds.indexOf(q?.stepId);
    if (r < 0) return bad("UNKNOWN_STEP", `Step "${String(q?.stepId)}" is not in the mechanism.`, `parameters[${j}].stepId`);
    if (seen.has(q.stepId)) return bad("DUPLICATE_STEP", `Step "${q.stepId}" is chosen twice.`, `parameters[${j}].stepId`);
    seen.add(q.stepId);
    const l = q.lower ?? -60e3, u = q.upper ?? 60e3, s = q.initial ?? 0;
    if (![l, u, s].every(Number.isFinite) || !(l < u) || s < l || s > u) {
      return bad("BAD_BOUNDS", "Bounds and start of a barrier shift must be finite with lower ≤ start ≤ upper.", `parameters[${j}]`);
    }
    stepIdx.push(r);
    lo.push(l);
    hi.push(u);
    x0.push(s);
  }
  let n = 0;
  const expTimes: number[][] = [];
  const weights: number[][][] = [];
  for (let e = 0; e < experiments.length; e++) {
    const ex = experiments[e];
    const path = `experiments[${e}]`;
    if (!ex || !Array.isArray(ex.observations) || ex.observations.length === 0) return bad("EMPTY_INPUT", "Each experiment needs at least one observed species.", `${path}.observations`);
    const ts = new Set<number>();
    const wE: number[][] = [];
    for (let o = 0; o < ex.observations.length; o++) {
      const ob = ex.observations[o];
      const op = `${path}.observations[${o}]`;
      if (!ob || !model.speciesIndex.has(ob.species)) return bad("UNKNOWN_SPECIES", `Observed species "${String(ob?.species)}" is not in the mechanism.`, `${op}.species`);
      if (!Array.isArray(ob.times) || !Array.isArray(ob.values) || ob.times.length !== ob.values.length || ob.times.length === 0) {
        return bad("BAD_DATA", "Each observation needs equally long, non-empty lists of times and values.", op);
      }
      const w: number[] = [];
      for (let k = 0; k < ob.times.length; k++) {
        const t = ob.times[k], v = ob.values[k];
        if (!Number.isFinite(t) || t < 0) return bad("BAD_DATA", "Observation times must be finite numbers of seconds ≥ 0.", `${op}.times[${k}]`);
        if (!Number.isFinite(v)) return bad("NON_FINITE", "Observed concentrations must be finite numbers.", `${op}.values[${k}]`);
        const s = ob.sigma === undefined ? 1 : typeof ob.sigma === "number" ? ob.sigma : ob.sigma[k];
        if (!(s > 0) || !Number.isFinite(s)) return bad("BAD_DATA", "Each σ must be a positive finite number of mol/L.", `${op}.sigma`);
        w.push(1 / s);
        ts.add(t);
        n++;
      }
      wE.push(w);
    }
    const sorted = [...ts].sort((a, b) => a - b);
    if (!(sorted[sorted.length - 1] > 0)) return bad("TIME_SPAN", "An experiment needs an observation after t = 0.", path);
    expTimes.push(sorted);
    weights.push(wE);
  }
  if (n <= p) return bad("TOO_FEW_POINTS", `Fitting ${p} barrier(s) needs more than ${p} observations (got ${n}).`, "experiments");
  const fd = options.fdStep ?? 10;
  if (!(fd > 0) || !Number.isFinite(fd)) return bad("BAD_DELTA", "The finite-difference step must be a positive number of J/mol.", "fdStep");
  const maxIt = options.maxIterations ?? 60;
  const confidence = options.confidence ?? 0.95;
  if (!(confidence > 0 && confidence < 1)) return bad("BAD_CONFIDENCE", "The confidence level must lie strictly between 0 and 1.", "confidence");
  const now = options.now ?? (() => (typeof performance !== "undefined" ? performance.now() : Date.now()));
  const wallStart = now();

  // ---- model evaluation: weighted residuals for shifts x
  let simulations = 0;
  const evaluate = (x: number[], model_out?: number[][][]): Result<Float64Array> => {
    if (options.signal?.aborted) return bad("CANCELLED", "The fit was cancelled.");
    if (options.maxWallMs !== undefined && now() - wallStart > options.maxWallMs) return bad("BUDGET_TIME", `The wall-time budget of ${options.maxWallMs} ms ran out during the fit.`);
    const fns = rateConstants.slice();
    for (let j = 0; j < p; j++) {
      const r = stepIdx[j];
      const f = rateConstants[r];
      const d = x[j];
      const g = (T: number) => Math.exp(-d / (R_GAS * T));
      fns[r] = { kf: (T) => f.kf(T) * g(T), kr: f.kr ? (T) => f.kr!(T) * g(T) : undefined };
    }
    const res = new Float64Array(n);
    let q = 0;
    for (let e = 0; e < experiments.length; e++) {
      const ex = experiments[e];
      const times = expTimes[e];
      simulations++;
      const r = simulate(model, {
        rateConstants: fns,
        temperature: ex.temperature,
        initial: ex.initial,
        tEnd: times[times.length - 1],
        grid: { kind: "times", times },
        rtol: options.rtol ?? 1e-8,
        atol: options.atol ?? 1e-14,
        method: options.method,
        conservation: false,
        signal: options.signal,
      });
      if (!r.ok) return bad(r.error.code, `${r.error.message} (experiment ${ex.id ?? e})`, r.error.path ? `experiments[${e}].${r.error.path}` : `experiments[${e}]`);
      const outE: number[][] = [];
      for (let o = 0; o < ex.observations.length; o++) {
        const ob = ex.observations[o];
        const c = r.value.conc[model.speciesIndex.get(ob.species)!];
        const outO: number[] = [];
        for (let k = 0; k < ob.times.length; k++) {
          const v = c[times.indexOf(ob.times[k])];
          outO.push(v);
          res[q++] = (v - ob.values[k]) * weights[e][o][k];
        }
        outE.push(outO);
      }
      if (model_out) model_out.push(outE);
    }
    return { ok: true, value: res };
  };
  const ssrOf = (r: Float64Array) => r.reduce((s, v) => s + v * v, 0);
  const clamp = (x: number[]) => x.map((v, j) => Math.min(hi[j], Math.max(lo[j], v)));
  const jacobian = (x: number[], r0: Float64Array, central: boolean): Result<Float64Array[]> => {
    const cols: Float64Array[] = [];
    for (let j = 0; j < p; j++) {
      const up = x.slice();
      // step inward at an upper bound
      const h = x[j] + fd > hi[j] ? -fd : fd;
      up[j] += h;
      const ru = evaluate(up);
      if (!ru.ok) return ru;
      const col = new Float64Array(n);
      if (central && x[j] - h >= lo[j] && x[j] - h <= hi[j]) {
        const dn = x.slice();
        dn[j] -= h;
        const rd = evaluate(dn);
        if (!rd.ok) return rd;
        for (let i = 0; i < n; i++) col[i] = (ru.value[i] - rd.value[i]) / (2 * h);
      } else for (let i = 0; i < n; i++) col[i] = (ru.value[i] - r0[i]) / h;
      cols.push(col);
    }
    return { ok: true, value: cols };
  };
  const normal = (J: Float64Array[], r: Float64Array) => {
    const A = Array.from({ length: p }, () => new Array<number>(p).fill(0));
    const g = new Array<number>(p).fill(0);
    for (let a = 0; a < p; a++) {
      for (let b = a; b < p; b++) {
        let s = 0;
        for (let i = 0; i < n; i++) s += J[a][i] * J[b][i];
        A[a][b] = A[b][a] = s;
      }
      let s = 0;
      for (let i = 0; i < n; i++) s += J[a][i] * r[i];
      g[a] = s;
    }
    return { A, g };
  };

  // ---- Levenberg–Marquardt iteration
  let x = clamp(x0);
  const r0 = evaluate(x);
  if (!r0.ok) return r0;
  let r = r0.value;
  let F = ssrOf(r);
  const ssrInitial = F;
  let mu = -1;
  let nu = 2;
  let it = 0;
  let stopReason: FitResult["stopReason"] = "max-iterations";
  let J = jacobian(x, r, false);
  if (!J.ok) return J;
  let { A, g } = normal(J.value, r);
  while (it < maxIt) {
    const gInf = Math.max(...g.map(Math.abs));
    if (gInf <= 1e-12 * Math.max(F, 1e-300) + 1e-300) {
      stopReason = "gradient";
      break;
    }
    if (mu < 0) mu = 1e-3 * Math.max(...A.map((row, j) => row[j]));
    it++;
    const Ad = A.map((row, a) => row.map((v, b) => (a === b ? v + mu * Math.max(v, 1e-300) : v)));
    const step = solveSmall(Ad, g.map((v) => -v));
    if (!step) {
      mu *= nu;
      nu *= 2;
      continue;
    }
    const xNew = clamp(x.map((v, j) => v + step[j]));
    const dx = xNew.map((v, j) => v - x[j]);
    const stepNorm = Math.sqrt(dx.reduce((s, v) => s + v * v, 0));
    if (stepNorm < 1e-4) {
      // below 0.1 mJ/mol: nothing left to gain
      stopReason = "step";
      break;
    }
    const rn = evaluate(xNew);
    let accepted = false;
    if (rn.ok) {
      const Fn = ssrOf(rn.value);
      // predicted decrease of the linear model: −dxᵀg − ½dxᵀA dx
      let pred = 0;
      for (let a = 0; a < p; a++) {
        pred -= dx[a] * g[a];
        let Adx = 0;
        for (let b = 0; b < p; b++) Adx += A[a][b] * dx[b];
        pred -= 0.5 * dx[a] * Adx;
      }
      const rho = pred > 0 ? (F - Fn) / pred : -1;
      if (rho > 0 && Fn <= F) {
        accepted = true;
        const relGain = (F - Fn) / Math.max(F, 1e-300);
        x = xNew;
        r = rn.value;
        F = Fn;
        mu *= Math.max(1 / 3, 1 - (2 * rho - 1) ** 3);
        nu = 2;
        const Jn = jacobian(x, r, false);
        if (!Jn.ok) return Jn;
        ({ A, g } = normal(Jn.value, r));
        if (relGain < 1e-12) {
          stopReason = "step";
          break;
        }
      }
    } else if (rn.error.code === "CANCELLED" || rn.error.code === "BUDGET_TIME") return rn;
    if (!accepted) {
      mu *= nu;
      nu *= 2;
      if (!Number.isFinite(mu) || mu > 1e30) {
        stopReason = "step";
        break;
      }
    }
  }

  // ---- statistics at the solution (central-difference Jacobian)
  const Jc = jacobian(x, r, true);
  if (!Jc.ok) return Jc;
  const { A: Ac } = normal(Jc.value, r);
  const inv = invertSmall(Ac);
  const dof = n - p;
  const s2 = options.absoluteSigma ? 1 : F / dof;
  const cov = inv ? inv.map((row) => row.map((v) => v * s2)) : Ac.map((row) => row.map(() => NaN));
  const tq = studentTQuantile(0.5 + confidence / 2, dof);
  const fitted: number[][][] = [];
  const final = evaluate(x, fitted);
  if (!final.ok) return final;
  const residuals = experiments.map((ex, e) => ex.observations.map((ob, o) => ob.values.map((v, k) => fitted[e][o][k] - v)));
  const se = cov.map((row, j) => Math.sqrt(Math.max(0, row[j])));
  if (!inv) return bad("SINGULAR_FIT", "The data do not determine the chosen barriers independently (singular normal matrix); fit fewer barriers or add data.");
  const correlation = cov.map((row, a) => row.map((v, b) => v / (se[a] * se[b])));
  return {
    ok: true,
    value: {
      parameters: parameters.map((q, j) => ({
        stepId: q.stepId,
        shift: x[j],
        se: se[j],
        ci: tq * se[j],
        atBound: x[j] <= lo[j] || x[j] >= hi[j],
      })),
      correlation,
      covariance: cov,
      residuals,
      fitted,
      ssr: F,
      ssrInitial,
      n,
      dof,
      iterations: it,
      simulations,
      converged: stopReason !== "max-iterations",
      stopReason,
      confidence,
    },
  };
}

/**
 * A copy of `step` whose barrier is raised by `shift` J/mol at the transition state, written
 * in the step's own barrier form so that every k (forward and reverse) is multiplied by
 * exp(−shift/RT) at every T: ΔG‡ (and ΔH‡ if given) + shift; ΔH‡ + shift; Ea + shift (thermal
 * and Arrhenius); a measured k times exp(−shift/RT₀), with Ea + shift when Ea is given.
 */
export function shiftBarrier(step: StepKinetics, shift: number): Result<StepKinetics> {
  if (!Number.isFinite(shift)) return bad("NON_FINITE", "The barrier shift must be a finite number of J/mol.", "shift");
  const b = step?.barrier;
  if (!b || typeof b !== "object") return bad("EMPTY_INPUT", "The step has no barrier.", "barrier");
  switch (b.form) {
    case "dG":
      return { ok: true, value: { ...step, barrier: { ...b, dG: b.dG + shift, ...(b.dH !== undefined ? { dH: b.dH + shift } : {}) } } };
    case "dHdS":
      return { ok: true, value: { ...step, barrier: { ...b, dH: b.dH + shift } } };
    case "thermal":
      return { ok: true, value: { ...step, barrier: { ...b, Ea: b.Ea + shift } } };
    case "arrhenius":
      return { ok: true, value: { ...step, barrier: { ...b, Ea: b.Ea + shift } } };
    case "measured": {
      const k = b.k * Math.exp(-shift / (R_GAS * b.T));
      return { ok: true, value: { ...step, barrier: { ...b, k, ...(b.Ea !== undefined ? { Ea: b.Ea + shift } : {}) } } };
    }
    default:
      return bad("EMPTY_INPUT", `Unknown barrier form "${String((b as { form?: unknown }).form)}".`, "barrier.form");
  }
}
