/**
 * The in-house stiff integrator: RODAS4, an L-stable, stiffly accurate Rosenbrock method
 * of order 4 with an embedded order-3 error estimate and a continuous (dense) output of
 * order 3.
 *
 * Method and coefficients: E. Hairer & G. Wanner, "Solving Ordinary Differential Equations II:
 * Stiff and Differential-Algebraic Problems", 2nd ed., Springer 1996, §VI.4 (Table 4.?, method
 * RODAS, in the transformed variables of their eq. (4.12) so that no matrix–vector products are
 * needed). The numbers below are the published coefficients (facts of the method).
 *
 * Each step solves six linear systems with the same matrix W = I/(hγ) − J, J = ∂f/∂y at the
 * start of the step. Non-autonomous problems (temperature programs) get ∂f/∂t by a forward
 * difference and the method's γ_i (here d_i) terms.
 *
 * Step-size control: Hairer & Wanner's standard controller with Gustafsson's predictive
 * (PI-type) modification, safety 0.9, factor limits [0.2, 6] (HW II §IV.8, common practice).
 *
 * Units: t and h in the problem's time unit (s), y in its state unit (mol/L); tolerances:
 * rtol unitless, atol in state units.
 */
import type { IntegrateOptions, IntegrationOutcome, OdeProblem, StepView, StopReason } from "./ode-problem.ts";
import { GROWTH_STEP, REASON_CODE, fail, partialResult, setUpRun, startingStep, stiffLinearAlgebra, validateIntegrationInput } from "./integrator-common.ts";

// RODAS4 coefficients, Hairer & Wanner II (1996), transformed form.
const GAMMA = 0.25;
const C2 = 0.386, C3 = 0.21, C4 = 0.63;
const D1 = 0.25, D2 = -0.1043, D3 = 0.1035, D4 = -0.3620000000000023e-1;
const A21 = 0.1544e1;
const A31 = 0.9466785280815826, A32 = 0.2557011698983284;
const A41 = 0.3314825187068521e1, A42 = 0.2896124015972201e1, A43 = 0.9986419139977817;
const A51 = 0.1221224509226641e1, A52 = 0.6019134481288629e1, A53 = 0.1253708332932087e2, A54 = -0.687886036105895;
const C21 = -0.56688e1;
const C31 = -0.2430093356833875e1, C32 = -0.2063599157091915;
const C41 = -0.1073529058151375, C42 = -0.9594562251023355e1, C43 = -0.2047028614809616e2;
const C51 = 0.7496443313967647e1, C52 = -0.1024680431464352e2, C53 = -0.3399990352819905e2, C54 = 0.117089089320616e2;
const C61 = 0.8083246795921522e1, C62 = -0.7981132988064893e1, C63 = -0.3152159432874371e2, C64 = 0.1631930543123136e2, C65 = -0.6058818238834054e1;
// dense output
const H21 = 0.1012623508344586e2, H22 = -0.7487995877610167e1, H23 = -0.3480091861555747e2, H24 = -0.7992771707568823e1, H25 = 0.1025137723295662e1;
const H31 = -0.6762803392801253, H32 = 0.6087714651680015e1, H33 = 0.1643084320892478e2, H34 = 0.2476722511418386e2, H35 = -0.6594389125716872e1;

const SAFE = 0.9;
const FAC_MIN_INV = 1 / 6; // h may grow by at most 6×
const FAC_MAX_INV = 5; // h may shrink by at most 5× per controller decision

/**
 * Integrate y' = f(t, y) from t0 to tEnd with RODAS4.
 * @param problem the ODE (rhs, optional analytic Jacobian)
 * @param t0 start time (time units)
 * @param y0 initial state (state units)
 * @param tEnd end time (time units), > t0
 * @returns states at the output times, statistics; or a typed failure with the partial result.
 */
export function integrateStiff(
  problem: OdeProblem,
  t0: number,
  y0: ArrayLike<number>,
  tEnd: number,
  options: IntegrateOptions = {},
): IntegrationOutcome {
  const bad = validateIntegrationInput(problem, t0, y0, tEnd, options);
  if (bad) return bad;
  const run = setUpRun(problem, t0, tEnd, options);
  const { n, now, wallStart, rtol, atol, maxSteps, maxWallMs, span, maxStep, nonNeg, outT, nOut, states, bps, stats } = run;
  const autonomous = problem.autonomous ?? false;

  // ---- linear algebra: W = I/(hγ) − J, factored as shift 1/(hγ), scale −1
  const la = stiffLinearAlgebra(problem, options, stats, (tt, yy, dy) => rhs(tt, yy, dy));
  const solve = la.solve;
  const factorW = (fac: number) => la.factor(fac, -1);

  // ---- work arrays
  const y = Float64Array.from(y0 as ArrayLike<number>);
  const ynew = new Float64Array(n);
  const yold = new Float64Array(n);
  const f0 = new Float64Array(n);
  const ft = new Float64Array(n);
  const ftmp = new Float64Array(n);
  const ytmp = new Float64Array(n);
  const k1 = new Float64Array(n), k2 = new Float64Array(n), k3 = new Float64Array(n);
  const k4 = new Float64Array(n), k5 = new Float64Array(n), k6 = new Float64Array(n);
  const q1 = new Float64Array(n), q2 = new Float64Array(n);

  let t = t0;
  let outIdx = 0;
  while (outIdx < nOut && outT[outIdx] <= t0) {
    states.set(y, outIdx * n);
    outIdx++;
  }

  const rhs = (tt: number, yy: Float64Array, dy: Float64Array) => {
    stats.rhsEvals++;
    problem.rhs(tt, yy, dy);
  };

  const evalJacobian = (tt: number) => la.evalJacobian(tt, y, f0);

  const view: StepView = {
    t0: t0,
    t1: t0,
    interpolate(tt: number, out: Float64Array) {
      const h = view.t1 - view.t0;
      const s = h > 0 ? (tt - view.t0) / h : 1;
      const s1 = 1 - s;
      for (let i = 0; i < n; i++) out[i] = s1 * yold[i] + s * (ynew[i] + s1 * (q1[i] + s * q2[i]));
    },
  };

  const stop = (reason: StopReason, message: string) => {
    stats.wallMs = now() - wallStart;
    return fail(reason, REASON_CODE[reason], message, partialResult(run, outIdx, t, Float64Array.from(y)));
  };

  rhs(t, y, f0);
  for (let i = 0; i < n; i++) if (!Number.isFinite(f0[i])) return stop("non-finite", "The right-hand side is not finite at the initial state.");

  // initial step (HW I §II.4 heuristic, common practice), for order 4
  let h =
    options.initialStep && options.initialStep > 0
      ? options.initialStep
      : startingStep({ n, t, y, f: f0, atol, rtol, limit: Math.min(maxStep, span * 0.1), scale: span, order: 4, rhs, ytmp, ftmp });
  const tooSmall = (hh: number, tt: number) => !(hh > 1e-300) || hh < 8 * 2.220446049250313e-16 * Math.abs(tt);

  let bpIdx = 0;
  let hAcc = 0, errAcc = 1e-2;
  let lastRejected = false;
  let nonFiniteStreak = 0;
  // dense-output coefficients are needed for step callbacks and for output times inside the step
  const hasOnStep = options.onStep !== undefined;

  while (t < tEnd) {
    if (options.signal?.aborted) return stop("cancelled", "The simulation was cancelled.");
    if (stats.steps >= maxSteps) return stop("budget-steps", `The step budget of ${maxSteps} steps ran out at t = ${t}.`);
    if (now() - wallStart > maxWallMs) return stop("budget-time", `The wall-time budget of ${maxWallMs} ms ran out at t = ${t}.`);

    while (bpIdx < bps.length && bps[bpIdx] <= t * (1 + 1e-15)) bpIdx++;
    const nextStop = bpIdx < bps.length ? bps[bpIdx] : tEnd;
    h = Math.min(h, maxStep);
    if (t + 1.0001 * h >= nextStop) h = nextStop - t;
    if (tooSmall(h, t)) return stop("step-size-underflow", `The step size fell below the smallest resolvable value at t = ${t}.`);

    evalJacobian(t);
    if (nonNeg) {
      const g = la.selfGrowthRate(y);
      if (g > 0 && h * g > GROWTH_STEP) h = GROWTH_STEP / g;
    }
    if (!autonomous) {
      const del = Math.sqrt(1e-16) * Math.max(Math.abs(t), 1e-5);
      rhs(t + del, y, ftmp);
      for (let i = 0; i < n; i++) ft[i] = (ftmp[i] - f0[i]) / del;
    }

    // attempt steps with this Jacobian until one is accepted
    for (;;) {
      if (options.signal?.aborted) return stop("cancelled", "The simulation was cancelled.");
      if (stats.steps >= maxSteps) return stop("budget-steps", `The step budget of ${maxSteps} steps ran out at t = ${t}.`);
      if (tooSmall(h, t)) return stop("step-size-underflow", `The step size fell below the smallest resolvable value at t = ${t}.`);
      stats.steps++;
      const hitStop = t + h >= nextStop;
      const tNext = hitStop ? nextStop : t + h;
      const fac = 1 / (h * GAMMA);
      stats.luDecomps++;
      if (!factorW(fac)) {
        stats.rejected++;
        h *= 0.25;
        lastRejected = true;
        if (++nonFiniteStreak > 40) return stop("singular", `The iteration matrix stayed singular at t = ${t}.`);
        continue;
      }
      const hd1 = h * D1, hd2 = h * D2, hd3 = h * D3, hd4 = h * D4;
      const hc21 = C21 / h, hc31 = C31 / h, hc32 = C32 / h, hc41 = C41 / h, hc42 = C42 / h, hc43 = C43 / h;
      const hc51 = C51 / h, hc52 = C52 / h, hc53 = C53 / h, hc54 = C54 / h;
      const hc61 = C61 / h, hc62 = C62 / h, hc63 = C63 / h, hc64 = C64 / h, hc65 = C65 / h;
      // stage 1
      if (autonomous) k1.set(f0);
      else for (let i = 0; i < n; i++) k1[i] = f0[i] + hd1 * ft[i];
      solve(k1);
      // stage 2
      for (let i = 0; i < n; i++) ytmp[i] = y[i] + A21 * k1[i];
      rhs(t + C2 * h, ytmp, ftmp);
      if (autonomous) for (let i = 0; i < n; i++) k2[i] = ftmp[i] + hc21 * k1[i];
      else for (let i = 0; i < n; i++) k2[i] = ftmp[i] + hc21 * k1[i] + hd2 * ft[i];
      solve(k2);
      // stage 3
      for (let i = 0; i < n; i++) ytmp[i] = y[i] + A31 * k1[i] + A32 * k2[i];
      rhs(t + C3 * h, ytmp, ftmp);
      if (autonomous) for (let i = 0; i < n; i++) k3[i] = ftmp[i] + hc31 * k1[i] + hc32 * k2[i];
      else for (let i = 0; i < n; i++) k3[i] = ftmp[i] + hc31 * k1[i] + hc32 * k2[i] + hd3 * ft[i];
      solve(k3);
      // stage 4
      for (let i = 0; i < n; i++) ytmp[i] = y[i] + A41 * k1[i] + A42 * k2[i] + A43 * k3[i];
      rhs(t + C4 * h, ytmp, ftmp);
      if (autonomous) for (let i = 0; i < n; i++) k4[i] = ftmp[i] + hc41 * k1[i] + hc42 * k2[i] + hc43 * k3[i];
      else for (let i = 0; i < n; i++) k4[i] = ftmp[i] + hc41 * k1[i] + hc42 * k2[i] + hc43 * k3[i] + hd4 * ft[i];
      solve(k4);
      // stage 5
      for (let i = 0; i < n; i++) ytmp[i] = y[i] + A51 * k1[i] + A52 * k2[i] + A53 * k3[i] + A54 * k4[i];
      rhs(tNext, ytmp, ftmp);
      for (let i = 0; i < n; i++) k5[i] = ftmp[i] + hc51 * k1[i] + hc52 * k2[i] + hc53 * k3[i] + hc54 * k4[i];
      solve(k5);
      // stage 6 (embedded solution is ytmp + k5; k6 is the error estimate)
      for (let i = 0; i < n; i++) ytmp[i] += k5[i];
      rhs(tNext, ytmp, ftmp);
      for (let i = 0; i < n; i++) k6[i] = ftmp[i] + hc61 * k1[i] + hc62 * k2[i] + hc63 * k3[i] + hc64 * k4[i] + hc65 * k5[i];
      solve(k6);
      let err = 0;
      let finite = true;
      let negative = false;
      for (let i = 0; i < n; i++) {
        const yi = ytmp[i] + k6[i];
        ynew[i] = yi;
        if (!Number.isFinite(yi)) finite = false;
        if (nonNeg && yi < -atol[i]) negative = true;
        const sc = atol[i] + rtol * Math.max(Math.abs(y[i]), Math.abs(yi));
        const r = k6[i] / sc;
        err += r * r;
      }
      err = Math.sqrt(err / n);
      if (!finite || !Number.isFinite(err)) {
        stats.rejected++;
        lastRejected = true;
        h *= 0.25;
        if (++nonFiniteStreak > 40) return stop("non-finite", `The solution became non-finite near t = ${t}.`);
        continue;
      }
      nonFiniteStreak = 0;
      // controller
      let facc = Math.max(FAC_MIN_INV, Math.min(FAC_MAX_INV, Math.pow(err, 0.25) / SAFE));
      let hNew = h / facc;
      if (err <= 1 && !negative) {
        // predictive modification (Gustafsson), as in HW II's RODAS
        if (stats.accepted > 0) {
          let facgus = ((hAcc / h) * Math.pow((err * err) / errAcc, 0.25)) / SAFE;
          facgus = Math.max(FAC_MIN_INV, Math.min(FAC_MAX_INV, facgus));
          facc = Math.max(facc, facgus);
          hNew = h / facc;
        }
        hAcc = h;
        errAcc = Math.max(1e-2, err);
        stats.accepted++;
        if (hasOnStep || (outIdx < nOut && outT[outIdx] < tNext)) {
          for (let i = 0; i < n; i++) {
            q1[i] = H21 * k1[i] + H22 * k2[i] + H23 * k3[i] + H24 * k4[i] + H25 * k5[i];
            q2[i] = H31 * k1[i] + H32 * k2[i] + H33 * k3[i] + H34 * k4[i] + H35 * k5[i];
          }
        }
        yold.set(y);
        if (nonNeg) for (let i = 0; i < n; i++) if (ynew[i] < 0) ynew[i] = 0;
        view.t0 = t;
        view.t1 = tNext;
        while (outIdx < nOut && outT[outIdx] <= tNext) {
          const slot = states.subarray(outIdx * n, outIdx * n + n);
          if (outT[outIdx] === tNext) slot.set(ynew);
          else {
            view.interpolate(outT[outIdx], slot);
            if (nonNeg) for (let i = 0; i < n; i++) if (slot[i] < 0) slot[i] = 0;
          }
          outIdx++;
        }
        y.set(ynew);
        t = tNext;
        if (options.onStep) options.onStep(view);
        if (options.onProgress) options.onProgress(t);
        if (lastRejected) hNew = Math.min(hNew, h);
        lastRejected = false;
        h = hNew;
        if (t < tEnd) rhs(t, y, f0);
        if (t < tEnd) for (let i = 0; i < n; i++) if (!Number.isFinite(f0[i])) return stop("non-finite", `The right-hand side became non-finite at t = ${t}.`);
        break;
      } else {
        stats.rejected++;
        if (negative) hNew = Math.min(hNew, 0.5 * h);
        if (lastRejected) hNew = Math.min(hNew, 0.5 * h);
        lastRejected = true;
        h = hNew;
        if (stats.accepted === 0) h = Math.min(h, 0.1 * (tNext - t)); // first step: shrink hard
      }
    }
  }
  // t reached tEnd
  while (outIdx < nOut) {
    states.set(y, outIdx * n);
    outIdx++;
  }
  stats.wallMs = now() - wallStart;
  return { ok: true, value: { times: outT, states, tReached: t, yFinal: Float64Array.from(y), stats } };
}
