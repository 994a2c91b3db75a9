/**
 * The generic initial-value problem shape the integrators accept, and the shared
 * option/result types of the stiff (rosenbrock.ts) and non-stiff (nonstiff.ts) paths.
 * Units: t in the problem's time unit (s for kinetics), y in the problem's state unit
 * (mol/L for kinetics), rhs in state/time, Jacobian entries in 1/time.
 */
import type { EngineError } from "./types.ts";

/** Dense Jacobian: fill the row-major n×n array J[i*n+j] = ∂f_i/∂y_j. */
export interface DenseJacobian {
  kind: "dense";
  fill(t: number, y: Float64Array, J: Float64Array): void;
}

/** Sparse Jacobian in CSR form with a fixed pattern; fill writes values in pattern order. */
export interface SparseJacobian {
  kind: "sparse";
  rowPtr: Int32Array; // length n+1
  colIdx: Int32Array; // length nnz, column indices ascending within each row
  fill(t: number, y: Float64Array, values: Float64Array): void;
}

export interface OdeProblem {
  n: number;
  /** dy/dt = f(t, y): write f into dy. Must not keep references to y or dy. */
  rhs(t: number, y: Float64Array, dy: Float64Array): void;
  /** Analytic Jacobian; if absent the stiff integrator uses forward differences. */
  jacobian?: DenseJacobian | SparseJacobian;
  /** True when f does not depend on t explicitly (then ∂f/∂t is taken as 0). Default false. */
  autonomous?: boolean;
}

/** Why an integration stopped early. */
export type StopReason = "budget-steps" | "budget-time" | "cancelled" | "step-size-underflow" | "non-finite" | "singular";

export interface IntegrationStats {
  steps: number; // attempted steps
  accepted: number;
  rejected: number;
  rhsEvals: number;
  jacEvals: number;
  luDecomps: number;
  wallMs: number; // ms, by the `now` clock
}

/** View of one accepted step, for event detection on dense output. */
export interface StepView {
  t0: number;
  t1: number;
  /** Dense output: write y(t) for t in [t0, t1] into out. */
  interpolate(t: number, out: Float64Array): void;
}

export interface IntegrateOptions {
  rtol?: number; // relative tolerance, default 1e-6
  atol?: number | Float64Array; // absolute tolerance in state units, default 1e-12
  /** Times (ascending, within [t0, tEnd]) at which the solution is wanted. Default: [tEnd]. */
  outputTimes?: ArrayLike<number>;
  /** Times the integrator must not step across (discontinuities of f in t). */
  breakpoints?: ArrayLike<number>;
  maxSteps?: number; // default 100000
  maxWallMs?: number; // ms, default Infinity
  now?: () => number; // clock in ms, default performance.now or Date.now
  signal?: AbortSignal;
  initialStep?: number; // time units; default chosen automatically
  maxStep?: number; // time units; default |tEnd − t0|
  /** Reject steps that take a component below −atol and clip tiny negatives to 0. Default false. */
  nonNegative?: boolean;
  /** Linear solver choice; "auto" uses the sparse LU for a sparse Jacobian when its operation count (after ordering) is below the dense one. */
  linearSolver?: "auto" | "dense" | "sparse";
  /** Called after each accepted step. */
  onStep?: (step: StepView) => void;
  /** Called after each accepted step with the time reached. */
  onProgress?: (t: number) => void;
}

export interface IntegrationResult {
  /** The output times actually reached (all of outputTimes on success). */
  times: Float64Array;
  /** Row-major states: states[k*n + i] = y_i(times[k]). */
  states: Float64Array;
  tReached: number;
  yFinal: Float64Array;
  stats: IntegrationStats;
}

/** An integration failure: a typed engine error carrying the reason and what was reached. */
export interface IntegrationError extends EngineError {
  reason: StopReason | "bad-input";
  partial?: IntegrationResult;
}

export type IntegrationOutcome = { ok: true; value: IntegrationResult } | { ok: false; error: IntegrationError };

/** Default clock in ms, available in browsers and in Node. */
export function defaultNow(): number {
  return typeof performance !== "undefined" && typeof performance.now === "function" ? performance.now() : Date.now();
}
