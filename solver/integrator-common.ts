/**
 * What the integrators share (rosenbrock.ts, bdf.ts, nonstiff.ts): input validation, the
 * resolved options and output buffers of a run, typed failures, and the stiff methods' linear
 * algebra — the Jacobian (analytic sparse or dense, else forward differences) and the choice
 * between the dense LU and the sparse LU of matrices shift·I + scale·J.
 * Units: t in the problem's time unit (s), y in its state unit (mol/L); rtol unitless, atol in
 * state units; Jacobian entries in 1/time.
 */
import {
  defaultNow,
  type IntegrateOptions,
  type IntegrationError,
  type IntegrationResult,
  type IntegrationStats,
  type OdeProblem,
  type StopReason,
} from "./ode-problem.ts";
import { createDenseLU } from "./linalg-dense.ts";
import { createSparseLU, type SparseLU } from "./linalg-sparse.ts";

export function fail(
  reason: StopReason | "bad-input",
  code: string,
  message: string,
  partial?: IntegrationResult,
  path?: string,
): { ok: false; error: IntegrationError } {
  const error: IntegrationError = { code, message, reason };
  if (partial) error.partial = partial;
  if (path) error.path = path;
  return { ok: false, error };
}

export const REASON_CODE: Record<StopReason, string> = {
  "budget-steps": "BUDGET_STEPS",
  "budget-time": "BUDGET_TIME",
  cancelled: "CANCELLED",
  "step-size-underflow": "STEP_SIZE_UNDERFLOW",
  "non-finite": "NON_FINITE",
  singular: "SINGULAR",
};

/** Validate the common inputs of both integrators; returns an error or null. */
export function validateIntegrationInput(
  problem: OdeProblem,
  t0: number,
  y0: ArrayLike<number>,
  tEnd: number,
  options: IntegrateOptions,
): { ok: false; error: IntegrationError } | null {
  const n = problem.n;
  if (!Number.isInteger(n) || n < 1) return fail("bad-input", "BAD_INPUT", "The problem must have at least one unknown.", undefined, "n");
  if (y0.length !== n) return fail("bad-input", "BAD_INPUT", `The initial state has ${y0.length} values but the problem has ${n} unknowns.`, undefined, "y0");
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(y0[i])) return fail("bad-input", "NON_FINITE", `Initial value ${i} is not a finite number.`, undefined, `y0[${i}]`);
  }
  if (!Number.isFinite(t0) || !Number.isFinite(tEnd)) return fail("bad-input", "NON_FINITE", "Start and end times must be finite numbers.", undefined, "tEnd");
  if (!(tEnd > t0)) return fail("bad-input", "TIME_SPAN", "The end time must be later than the start time.", undefined, "tEnd");
  const rtol = options.rtol ?? 1e-6;
  if (!(rtol > 0) || !Number.isFinite(rtol) || rtol >= 1) return fail("bad-input", "BAD_TOLERANCE", "The relative tolerance must be a number between 0 and 1 (exclusive).", undefined, "rtol");
  const atol = options.atol ?? 1e-12;
  if (typeof atol === "number") {
    if (!(atol >= 0) || !Number.isFinite(atol)) return fail("bad-input", "BAD_TOLERANCE", "The absolute tolerance must be a finite number ≥ 0.", undefined, "atol");
  } else {
    if (atol.length !== n) return fail("bad-input", "BAD_TOLERANCE", "The absolute tolerance array must have one entry per unknown.", undefined, "atol");
    for (let i = 0; i < n; i++) if (!(atol[i] >= 0) || !Number.isFinite(atol[i])) return fail("bad-input", "BAD_TOLERANCE", "Every absolute tolerance must be a finite number ≥ 0.", undefined, `atol[${i}]`);
  }
  const out = options.outputTimes;
  if (out) {
    let prev = -Infinity;
    for (let k = 0; k < out.length; k++) {
      const tk = out[k];
      if (!Number.isFinite(tk) || tk < t0 || tk > tEnd || tk < prev) return fail("bad-input", "BAD_OUTPUT_TIMES", "Output times must be finite, ascending and within the integration interval.", undefined, `outputTimes[${k}]`);
      prev = tk;
    }
  }
  if (options.maxSteps !== undefined && !(options.maxSteps >= 1)) return fail("bad-input", "BAD_BUDGET", "The step budget must be at least 1.", undefined, "maxSteps");
  if (options.maxWallMs !== undefined && !(options.maxWallMs > 0)) return fail("bad-input", "BAD_BUDGET", "The wall-time budget must be positive.", undefined, "maxWallMs");
  return null;
}

/** The options of one run, resolved, with its output buffers and statistics. */
export interface RunSetup {
  n: number;
  now: () => number;
  /** ms, by `now` */
  wallStart: number;
  rtol: number;
  /** per component, state units */
  atol: Float64Array;
  maxSteps: number;
  maxWallMs: number;
  /** tEnd − t0 */
  span: number;
  maxStep: number;
  nonNeg: boolean;
  /** output times, and the row-major states at them */
  outT: Float64Array;
  nOut: number;
  states: Float64Array;
  /** breakpoints strictly inside (t0, tEnd), ascending */
  bps: number[];
  stats: IntegrationStats;
}

/** Resolves the options of a validated run (see validateIntegrationInput) with their defaults. */
export function setUpRun(problem: OdeProblem, t0: number, tEnd: number, options: IntegrateOptions): RunSetup {
  const now = options.now ?? defaultNow;
  const n = problem.n;
  const atolOpt = options.atol ?? 1e-12;
  const span = tEnd - t0;
  const outT = options.outputTimes ? Float64Array.from(options.outputTimes) : Float64Array.of(tEnd);
  return {
    n,
    now,
    wallStart: now(),
    rtol: options.rtol ?? 1e-6,
    atol: typeof atolOpt === "number" ? new Float64Array(n).fill(atolOpt) : Float64Array.from(atolOpt),
    maxSteps: options.maxSteps ?? 100000,
    maxWallMs: options.maxWallMs ?? Infinity,
    span,
    maxStep: Math.min(options.maxStep ?? span, span),
    nonNeg: options.nonNegative ?? false,
    outT,
    nOut: outT.length,
    states: new Float64Array(outT.length * n),
    bps: options.breakpoints ? Array.from(options.breakpoints).filter((b) => b > t0 && b < tEnd).sort((a, b) => a - b) : [],
    stats: { steps: 0, accepted: 0, rejected: 0, rhsEvals: 0, jacEvals: 0, luDecomps: 0, wallMs: 0 },
  };
}

/**
 * Under `nonNegative` (chemistry), a step may not exceed GROWTH_STEP / g, g = the fastest
 * self-amplification rate ∂f_i/∂y_i > 0 of a present component (selfGrowthRate). An implicit
 * method damps a growing mode it steps over (hλ ≫ 1 gives |R(hλ)| < 1): an autocatalyst seeded
 * below atol would be stepped over, clipped to zero and never ignite, and the error estimate
 * would not notice, as the seed is below the tolerance. Following the growth with hλ ≤ 1 lets
 * the error test see it. Measured on A + B → 2A, k = 1e6 L/(mol·s), [A]₀ = 1e-9, [B]₀ = 1 mol/L
 * (tests/solver/simulate-honesty.test.ts): without the limit both integrators returned [A] ≈ 0
 * at t = 10 s at atol 1e-10 (the exact logistic answer is 1 mol/L).
 */
export const GROWTH_STEP = 1;

/** The stiff methods' Jacobian and linear solver for one run. */
export interface StiffLinearAlgebra {
  /** J at (t, y) into the solver's storage; fdBase must hold f(t, y) when the problem has no analytic Jacobian. */
  evalJacobian(t: number, y: Float64Array, fdBase: Float64Array): void;
  /** Factor shift·I + scale·J (J as last evaluated); false when singular or not finite. */
  factor(shift: number, scale: number): boolean;
  /** Solve with the last factorisation, in place. */
  solve(b: Float64Array): void;
  /**
   * The fastest self-amplification in the last evaluated J: max ∂f_i/∂y_i over components with
   * y_i > 0 and a positive diagonal (1/time), 0 when none grows. An autocatalyst (A + B → 2A)
   * has ∂f_A/∂y_A = k·[B] > 0.
   */
  selfGrowthRate(y: Float64Array): number;
}

/**
 * Sets up the Jacobian storage and the LU for a run. "auto" picks the sparse LU for a sparse
 * Jacobian when its operation count after ordering (from the one-time symbolic analysis) beats
 * the dense one: a factorisation ≈ flops, about six solves per factorisation ≈ 2·nnz(L+U) each,
 * with a factor 2 for indirect addressing; dense: n³/3 + 6n².
 * @param rhs the run's counted right-hand side (used for forward-difference Jacobians)
 */
export function stiffLinearAlgebra(
  problem: OdeProblem,
  options: IntegrateOptions,
  stats: IntegrationStats,
  rhs: (t: number, y: Float64Array, dy: Float64Array) => void,
): StiffLinearAlgebra {
  const n = problem.n;
  const jacDef = problem.jacobian;
  const choice = options.linearSolver ?? "auto";
  let slu: SparseLU | null = null;
  if (jacDef?.kind === "sparse" && choice !== "dense") {
    const cand = createSparseLU(n, jacDef.rowPtr, jacDef.colIdx);
    const sparseCost = 2 * (cand.flops + 12 * cand.nnzLU);
    const denseCost = (n * n * n) / 3 + 6 * n * n;
    if (choice === "sparse" || sparseCost < denseCost) slu = cand;
  }
  const jacValues = jacDef?.kind === "sparse" ? new Float64Array(jacDef.rowPtr[n]) : null;
  const Jd = slu ? null : new Float64Array(n * n); // dense Jacobian, row-major
  const ytmp = new Float64Array(n);
  const ftmp = new Float64Array(n);

  const evalJacobian = (t: number, y: Float64Array, fdBase: Float64Array) => {
    stats.jacEvals++;
    if (jacDef?.kind === "sparse") {
      jacDef.fill(t, y, jacValues!);
      if (Jd) {
        Jd.fill(0);
        const rp = jacDef.rowPtr, ci = jacDef.colIdx;
        for (let i = 0; i < n; i++) for (let p = rp[i]; p < rp[i + 1]; p++) Jd[i * n + ci[p]] += jacValues![p];
      }
    } else if (jacDef?.kind === "dense") {
      jacDef.fill(t, y, Jd!);
    } else {
      // forward differences, column by column (HW II, common practice)
      const J = Jd!;
      ytmp.set(y);
      for (let j = 0; j < n; j++) {
        const yj = ytmp[j];
        const del = Math.sqrt(1e-16 * Math.max(1e-5, Math.abs(yj)));
        ytmp[j] = yj + del;
        rhs(t, ytmp, ftmp);
        ytmp[j] = yj;
        for (let i = 0; i < n; i++) J[i * n + j] = (ftmp[i] - fdBase[i]) / del;
      }
    }
  };
  // where each diagonal entry lives: in the sparse values (−1 when absent), else in the dense J
  const diagPos = new Int32Array(n).fill(-1);
  if (jacValues) {
    const rp = jacDef!.kind === "sparse" ? jacDef!.rowPtr : new Int32Array(0);
    const ci = jacDef!.kind === "sparse" ? jacDef!.colIdx : new Int32Array(0);
    for (let i = 0; i < n; i++) for (let p = rp[i]; p < rp[i + 1]; p++) if (ci[p] === i) diagPos[i] = p;
  }
  const selfGrowthRate = (y: Float64Array): number => {
    let g = 0;
    for (let i = 0; i < n; i++) {
      if (!(y[i] > 0)) continue;
      const d = jacValues ? (diagPos[i] >= 0 ? jacValues[diagPos[i]] : 0) : Jd![i * n + i];
      if (d > g) g = d;
    }
    return g;
  };
  if (slu) {
    const s = slu, jv = jacValues!;
    return { evalJacobian, factor: (shift, scale) => s.factorShifted(jv, shift, scale), solve: s.solve, selfGrowthRate };
  }
  const dlu = createDenseLU(n);
  const J = Jd!;
  return { evalJacobian, factor: (shift, scale) => dlu.factorShifted(J, shift, scale), solve: dlu.solve, selfGrowthRate };
}

/** The run so far, for a typed failure. */
export function partialResult(run: RunSetup, outIdx: number, tReached: number, yFinal: Float64Array): IntegrationResult {
  return {
    times: run.outT.slice(0, outIdx),
    states: run.states.slice(0, outIdx * run.n),
    tReached,
    yFinal,
    stats: { ...run.stats, wallMs: run.now() - run.wallStart },
  };
}

/**
 * Starting step size for a method of order `order` from (t, y) with f = f(t, y) (Hairer,
 * Nørsett & Wanner I, §II.4, starting-step algorithm; common practice). One extra evaluation
 * of f at an explicit Euler step of trial size.
 * @param limit largest step allowed (time units); @param scale fallback scale: 1e-6·scale is used
 *   when the estimates are degenerate
 */
export function startingStep(a: {
  n: number;
  t: number;
  y: ArrayLike<number>;
  f: ArrayLike<number>;
  atol: Float64Array;
  rtol: number;
  limit: number;
  scale: number;
  order: number;
  rhs: (t: number, y: Float64Array, dy: Float64Array) => void;
  ytmp: Float64Array;
  ftmp: Float64Array;
}): number {
  const { n, t, y, f, atol, rtol, limit, scale, order, ytmp, ftmp } = a;
  let d0 = 0, d1 = 0;
  for (let i = 0; i < n; i++) {
    const sc = atol[i] + rtol * Math.abs(y[i]);
    const s = sc > 0 ? sc : 1e-300;
    d0 += (y[i] / s) ** 2;
    d1 += (f[i] / s) ** 2;
  }
  d0 = Math.sqrt(d0 / n);
  d1 = Math.sqrt(d1 / n);
  let h0 = d0 < 1e-5 || d1 < 1e-5 ? 1e-6 * scale : (0.01 * d0) / d1;
  h0 = Math.min(h0, limit);
  for (let i = 0; i < n; i++) ytmp[i] = y[i] + h0 * f[i];
  a.rhs(t + h0, ytmp, ftmp);
  let d2 = 0;
  for (let i = 0; i < n; i++) {
    const sc = atol[i] + rtol * Math.abs(y[i]);
    const s = sc > 0 ? sc : 1e-300;
    d2 += ((ftmp[i] - f[i]) / s) ** 2;
  }
  d2 = Math.sqrt(d2 / n) / h0;
  const dm = Math.max(d1, d2);
  const h1 = Number.isFinite(dm) && dm > 1e-15 ? (order === 1 ? Math.sqrt(0.01 / dm) : Math.pow(0.01 / dm, 1 / (order + 1))) : Math.max(1e-6 * scale, h0 * 1e-3);
  let h = Math.min(100 * h0, h1, limit);
  if (!(h > 0) || !Number.isFinite(h)) h = 1e-6 * scale;
  return h;
}
