/**
 * Non-stiff integrator: a wrapper around the `odex` package (Hairer's GBS extrapolation code
 * ported to JavaScript) with the same problem, options and result shape as the stiff
 * integrator, for non-stiff problems and cross-checks.
 * Units: as the problem's (t in s, y in mol/L for kinetics).
 */
import { Solver as OdexSolverClass } from "./odex-binding.js";
import type { Solver as OdexSolver } from "odex";
import {
  type IntegrateOptions,
  type IntegrationError,
  type IntegrationOutcome,
  type OdeProblem,
  type StopReason,
} from "./ode-problem.ts";
import { setUpRun, validateIntegrationInput } from "./integrator-common.ts";

type SolverCtor = new (n: number) => OdexSolver;
const SolverClass: SolverCtor = OdexSolverClass;

/** Integrate y' = f(t, y) from t0 to tEnd with odex (non-stiff). The Jacobian is not used. */
export function integrateNonStiff(
  problem: OdeProblem,
  t0: number,
  y0: ArrayLike<number>,
  tEnd: number,
  options: IntegrateOptions = {},
): IntegrationOutcome {
  const bad = validateIntegrationInput(problem, t0, y0, tEnd, options);
  if (bad) return bad;
  const { n, now, wallStart, outT, nOut, states, maxSteps, maxWallMs, stats, bps } = setUpRun(problem, t0, tEnd, options);
  const segEnds = [...bps, tEnd];
  const yb = new Float64Array(n);
  const db = new Float64Array(n);
  const f = (x: number, yy: number[]): number[] => {
    for (let i = 0; i < n; i++) yb[i] = yy[i];
    problem.rhs(x, yb, db);
    return Array.from(db);
  };
  let y = Array.from(y0 as ArrayLike<number>);
  let t = t0;
  let outIdx = 0;
  while (outIdx < nOut && outT[outIdx] <= t0) {
    for (let i = 0; i < n; i++) states[outIdx * n + i] = y[i];
    outIdx++;
  }
  let stopReason: StopReason | null = null;
  for (const segEnd of segEnds) {
    const s = new SolverClass(n);
    s.denseOutput = true;
    s.relativeTolerance = options.rtol ?? 1e-6;
    const atol = options.atol ?? 1e-12;
    s.absoluteTolerance = typeof atol === "number" ? atol : Array.from(atol);
    s.maxSteps = Math.max(1, maxSteps - stats.steps);
    if (options.maxStep) s.maxStepSize = options.maxStep;
    if (options.initialStep) s.initialStepSize = options.initialStep;
    const res = s.solve(f, t, y, segEnd, (_nr, xold, x, yy, dense) => {
      if (options.signal?.aborted) {
        stopReason = "cancelled";
        return false;
      }
      if (now() - wallStart > maxWallMs) {
        stopReason = "budget-time";
        return false;
      }
      while (outIdx < nOut && outT[outIdx] <= x && x > xold) {
        for (let i = 0; i < n; i++) states[outIdx * n + i] = outT[outIdx] === x || !dense ? yy[i] : dense(i, outT[outIdx]);
        outIdx++;
      }
      if (x > xold && options.onProgress) options.onProgress(x);
    });
    stats.steps += res.nStep;
    stats.accepted += res.nAccept;
    stats.rejected += res.nReject;
    stats.rhsEvals += res.nEval;
    y = res.y;
    t = res.xEnd;
    if (stopReason === null && res.outcome !== 0) stopReason = "budget-steps";
    if (stopReason === null && !res.y.every(Number.isFinite)) stopReason = "non-finite";
    if (stopReason) break;
  }
  stats.wallMs = now() - wallStart;
  if (stopReason) {
    const messages: Record<StopReason, string> = {
      "budget-steps": `The step budget of ${maxSteps} steps ran out at t = ${t}.`,
      "budget-time": `The wall-time budget of ${maxWallMs} ms ran out at t = ${t}.`,
      cancelled: "The simulation was cancelled.",
      "non-finite": `The solution became non-finite near t = ${t}.`,
      "step-size-underflow": `The step size fell below the smallest resolvable value at t = ${t}.`,
      singular: "The iteration matrix was singular.",
    };
    const codes: Record<StopReason, string> = {
      "budget-steps": "BUDGET_STEPS",
      "budget-time": "BUDGET_TIME",
      cancelled: "CANCELLED",
      "non-finite": "NON_FINITE",
      "step-size-underflow": "STEP_SIZE_UNDERFLOW",
      singular: "SINGULAR",
    };
    const reason: StopReason = stopReason;
    const error: IntegrationError = {
      code: codes[reason],
      message: messages[reason],
      reason,
      partial: { times: outT.slice(0, outIdx), states: states.slice(0, outIdx * n), tReached: t, yFinal: Float64Array.from(y), stats },
    };
    return { ok: false, error };
  }
  while (outIdx < nOut) {
    for (let i = 0; i < n; i++) states[outIdx * n + i] = y[i];
    outIdx++;
  }
  return { ok: true, value: { times: outT, states, tReached: t, yFinal: Float64Array.from(y), stats } };
}
