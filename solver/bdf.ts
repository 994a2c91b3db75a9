/**
 * The engine's second stiff integrator, for large mechanisms: a variable-order (1–5),
 * quasi-constant step size NDF/BDF method in backward-difference form, with a simplified
 * Newton iteration whose Jacobian and LU factorisation are reused over many steps.
 *
 * Method (implemented here from the published descriptions):
 *  - The numerical differentiation formulas (NDF) of orders 1–4 and BDF5, written as
 *      (1 − κ_k)·γ_k·(y_{n+1} − y⁽⁰⁾_{n+1}) + Σ_{j=1..k} γ_j ∇^j y_n − h·f(t_{n+1}, y_{n+1}) = 0,
 *    γ_j = Σ_{i=1..j} 1/i, with the predictor y⁽⁰⁾ = Σ_{j=0..k} ∇^j y_n and the local error
 *    estimate (κ_k γ_k + 1/(k+1))·∇^{k+1} y_{n+1}. Coefficients κ = (−0.1850, −1/9, −0.0823,
 *    −0.0415, 0): L. F. Shampine & M. W. Reichelt, "The MATLAB ODE Suite", SIAM J. Sci. Comput.
 *    18 (1997) 1–22, §2 and Table 1 (published constants, facts of the method).
 *  - Quasi-constant step size: the backward differences are kept for one step size h; when h
 *    changes, the interpolating polynomial through the last k+1 solution values is re-sampled
 *    on the new spacing (Shampine & Reichelt §2; derivation of the re-sampling matrix our own:
 *    new ∇̃^j = Σ_m (−1)^m C(j,m)·p(t_n − mρh)). The step size and order are reconsidered only
 *    after k+1 steps of equal size, and the order changes by at most one, choosing among k−1,
 *    k, k+1 the one allowing the largest step (Hairer, Nørsett & Wanner, "Solving ODEs I",
 *    §III.5–III.7 on variable step size and order in multistep methods — section numbers from
 *    memory; common practice).
 *  - Simplified Newton iteration with M = I − (h/α_k)·J. J = ∂f/∂y is kept until the iteration
 *    converges slowly (more than two iterations or rate θ > 0.5) or fails; M is refactored when J
 *    is refreshed or when c = h/α_k has moved by more than 30 % since the factorisation; in
 *    between, each Newton correction is scaled by 2/(1 + c/c_LU), which halves the mismatch in
 *    both the stiff and the non-stiff directions (common practice in BDF codes). Convergence test
 *    on the contraction rate θ (η·‖Δ‖ ≤ 0.03 in the error-weighted norm, η = θ/(1 − θ), with η
 *    carried over from the previous step for the first iteration: Hairer & Wanner II §IV.8,
 *    common practice). A failed iteration first refreshes a stale J, then cuts h by 0.3.
 *  - Dense output: the step's interpolating polynomial in Newton backward form, of degree k.
 *  - Breakpoints (temperature-program corners): the method stops on them and restarts at order 1.
 *
 * Same signature, options, statistics and typed failures as integrateStiff (rosenbrock.ts).
 *
 * Non-negativity: with a loose atol the method needs `nonNegative` (reject steps that take a
 * component below −atol); simulate() always sets it. Without it, a component that falls below
 * atol can be driven far negative and the run diverges: Robertson to t = 1e11 with atol 1e-6
 * ended at y₁ ≈ −4e7 (rtol 1e-2 and 1e-3), and scipy 1.17's BDF on the same problem ends at
 * y₁ ≈ −3.2e6 (rtol 1e-4). With it, such runs may instead stop with a step-size underflow
 * (Robertson at atol 1e-6, rtol 1e-3 or 1e-4) where RODAS4 succeeds; simulate()'s automatic
 * choice then reruns the mechanism with RODAS4 (simulate.ts, FALLBACK_REASONS).
 * Units: t and h in the problem's time unit (s), y in its state unit (mol/L); rtol unitless,
 * atol in state units.
 */
import type { IntegrateOptions, IntegrationOutcome, OdeProblem, StepView, StopReason } from "./ode-problem.ts";
import { GROWTH_STEP, REASON_CODE, fail, partialResult, setUpRun, startingStep as startingStepFor, stiffLinearAlgebra, validateIntegrationInput } from "./integrator-common.ts";

const MAX_ORDER = 5;
// Shampine & Reichelt (1997), Table 1: NDF κ for orders 1–4; order 5 is plain BDF (κ = 0).
const KAPPA = [0, -0.185, -1 / 9, -0.0823, -0.0415, 0];
// γ_k = Σ_{j=1..k} 1/j
const GAMMA = [0, 1, 3 / 2, 11 / 6, 25 / 12, 137 / 60];
/** α_k = (1 − κ_k)·γ_k: the iteration matrix is I − (h/α_k)·J. */
const ALPHA = KAPPA.map((k, i) => (1 - k) * GAMMA[i]);
/** Error constants κ_k·γ_k + 1/(k+1) (Shampine & Reichelt 1997, §2). */
const ERR_CONST = KAPPA.map((k, i) => k * GAMMA[i] + 1 / (i + 1));

const NEWTON_MAX_ITER = 4; // common practice for simplified Newton in BDF codes
/** Newton iterations stop when the estimated remaining error is this fraction of the tolerance (weighted norm). */
const NEWTON_TOL = 0.03;
const SAFETY = 0.9;
const MAX_GROWTH = 10;
const MIN_SHRINK = 0.2;
/** Largest relative change of c = h/α_k for which the factored M is reused. */
const LU_REUSE = 0.3;

/**
 * Integrate y' = f(t, y) from t0 to tEnd with the variable-order NDF/BDF method.
 * @param problem the ODE (rhs, optional analytic Jacobian)
 * @param t0 start time (time units)
 * @param y0 initial state (state units)
 * @param tEnd end time (time units), > t0
 * @returns states at the output times and statistics, or a typed failure with the partial result.
 */
export function integrateBDF(
  problem: OdeProblem,
  t0: number,
  y0: ArrayLike<number>,
  tEnd: number,
  options: IntegrateOptions = {},
): IntegrationOutcome {
  const bad = validateIntegrationInput(problem, t0, y0, tEnd, options);
  if (bad) return bad;
  const run = setUpRun(problem, t0, tEnd, options);
  const { n, now, wallStart, rtol, atol, maxSteps, maxWallMs, maxStep, nonNeg, outT, nOut, states, bps, stats } = run;

  // ---- linear algebra: M = I − c·J, factored as shift 1, scale −c
  const la = stiffLinearAlgebra(problem, options, stats, (tt, yy, dy) => rhs(tt, yy, dy));
  const solve = la.solve;
  const factorM = (c: number) => la.factor(1, -c);

  // ---- state: backward differences D[j] = ∇^j y_n, j = 0 … MAX_ORDER+2, stored row by row
  const ND = MAX_ORDER + 3;
  const D = new Float64Array(ND * n);
  const y = new Float64Array(n); // Newton iterate
  const psi = new Float64Array(n);
  const dcor = new Float64Array(n); // y − ypred
  const delta = new Float64Array(n);
  const f = new Float64Array(n);
  const scale = new Float64Array(n);
  const ytmp = new Float64Array(n);
  const ftmp = new Float64Array(n);
  const f0 = new Float64Array(n); // f at the current solution, for finite-difference Jacobians
  for (let i = 0; i < n; i++) D[i] = y0[i];

  let t = t0;
  let outIdx = 0;
  while (outIdx < nOut && outT[outIdx] <= t0) {
    states.set(D.subarray(0, n), outIdx * n);
    outIdx++;
  }

  const rhs = (tt: number, yy: Float64Array, dy: Float64Array) => {
    stats.rhsEvals++;
    problem.rhs(tt, yy, dy);
  };

  /** Re-sample the differences D[0..order] for a step size ρ·h (polynomial of degree `order`). */
  const T = new Float64Array((MAX_ORDER + 1) * (MAX_ORDER + 1));
  const P = new Float64Array((MAX_ORDER + 1) * (MAX_ORDER + 1));
  const rescale = (order: number, rho: number) => {
    const K = order + 1;
    // P[m][i] = Π_{q<i} (q − mρ)/(q + 1): the Newton backward basis at s = −mρ
    for (let m = 0; m < K; m++) {
      let prod = 1;
      P[m * K] = 1;
      for (let i = 1; i < K; i++) {
        prod *= (i - 1 - m * rho) / i;
        P[m * K + i] = prod;
      }
    }
    // T[j][i] = Σ_{m≤j} (−1)^m C(j, m) P[m][i]
    for (let j = 0; j < K; j++) {
      for (let i = 0; i < K; i++) {
        let s = 0, binom = 1;
        for (let m = 0; m <= j; m++) {
          s += (m % 2 === 0 ? binom : -binom) * P[m * K + i];
          binom = (binom * (j - m)) / (m + 1);
        }
        T[j * K + i] = s;
      }
    }
    // T is upper triangular (the j-th difference of a degree-i polynomial in m vanishes for
    // j > i), so the rows can be replaced in place in ascending order.
    applyUpperTriangular(n, K, T, D);
  };

  // dense output of the last accepted step: p(tNew + s·h), s ∈ [−1, 0]
  let viewOrder = 1, viewH = 0, viewT = t0;
  const view: StepView = {
    t0: t0,
    t1: t0,
    interpolate(tt: number, out: Float64Array) {
      const s = viewH > 0 ? (tt - viewT) / viewH : 0;
      for (let i = 0; i < n; i++) out[i] = D[i];
      let coef = 1;
      for (let j = 1; j <= viewOrder; j++) {
        coef *= (s + j - 1) / j;
        const off = j * n;
        for (let i = 0; i < n; i++) out[i] += coef * D[off + i];
      }
    },
  };

  const yCurrent = () => {
    const out = Float64Array.from(D.subarray(0, n));
    if (nonNeg) for (let i = 0; i < n; i++) if (out[i] < 0 && out[i] >= -atol[i]) out[i] = 0;
    return out;
  };
  const stop = (reason: StopReason, message: string) => {
    stats.wallMs = now() - wallStart;
    return fail(reason, REASON_CODE[reason], message, partialResult(run, outIdx, t, yCurrent()));
  };
  const tooSmall = (hh: number, tt: number) => !(hh > 1e-300) || hh < 8 * 2.220446049250313e-16 * Math.abs(tt);

  /** Starting step for order 1 from (t, D[0]) with f in `f`. */
  const startingStep = (tStart: number, room: number): number => {
    if (options.initialStep && options.initialStep > 0 && tStart === t0) return Math.min(options.initialStep, room);
    return startingStepFor({ n, t: tStart, y: D.subarray(0, n), f, atol, rtol, limit: Math.min(maxStep, room), scale: room, order: 1, rhs, ytmp, ftmp });
  };

  let bpIdx = 0;
  while (bpIdx < bps.length && bps[bpIdx] <= t) bpIdx++;
  let nextStop = bpIdx < bps.length ? bps[bpIdx] : tEnd;

  // (re)start at order 1 from (t, D[0]): D[1] = h·f(t, y)
  rhs(t, D.subarray(0, n), f);
  for (let i = 0; i < n; i++) if (!Number.isFinite(f[i])) return stop("non-finite", "The right-hand side is not finite at the initial state.");
  let h = startingStep(t, nextStop - t);
  let order = 1;
  for (let i = 0; i < n; i++) D[n + i] = h * f[i];
  la.evalJacobian(t, D.subarray(0, n), f);
  let jacCurrent = true; // J was evaluated at the current solution
  let luValid = false; // M is factored for the current Jacobian
  let cLU = 1; // c = h/α_k at which M was factored
  let nEqual = 0; // steps taken with the current h and order
  let eta = 1; // Newton convergence factor carried between steps
  let hWanted = h;
  let orderWanted = order;
  let failStreak = 0; // consecutive failed attempts of any kind
  let nonFiniteStreak = 0; // consecutive attempts that met a non-finite value
  let errFails = 0;
  const hasOnStep = options.onStep !== undefined;

  while (t < tEnd) {
    if (options.signal?.aborted) return stop("cancelled", "The simulation was cancelled.");
    if (stats.steps >= maxSteps) return stop("budget-steps", `The step budget of ${maxSteps} steps ran out at t = ${t}.`);
    if (now() - wallStart > maxWallMs) return stop("budget-time", `The wall-time budget of ${maxWallMs} ms ran out at t = ${t}.`);

    // step size and order for this attempt
    hWanted = Math.min(hWanted, maxStep);
    if (nonNeg) {
      // follow a self-amplifying component (GROWTH_STEP): the limit comes from J at the current
      // solution, so a stale J is refreshed first when it would bind
      let g = la.selfGrowthRate(D.subarray(0, n));
      if (g > 0 && hWanted * g > GROWTH_STEP && !jacCurrent) {
        refreshJacobian();
        g = la.selfGrowthRate(D.subarray(0, n));
      }
      if (g > 0 && hWanted * g > GROWTH_STEP) hWanted = GROWTH_STEP / g;
    }
    const room = nextStop - t;
    if (hWanted >= room || t + hWanted >= nextStop) hWanted = room;
    else if (t + 2 * hWanted > nextStop && hWanted > 0.5 * room) hWanted = 0.5 * room; // avoid a sliver step before the stop
    if (orderWanted !== order) {
      order = orderWanted;
      nEqual = 0;
    }
    if (hWanted !== h) {
      rescale(order, hWanted / h);
      h = hWanted;
      nEqual = 0;
    }
    if (tooSmall(h, t)) {
      if (nonFiniteStreak > 0) return stop("non-finite", `The solution became non-finite near t = ${t}.`);
      return stop("step-size-underflow", `The step size fell below the smallest resolvable value at t = ${t}.`);
    }
    const tNew = h >= room ? nextStop : t + h;

    const c = h / ALPHA[order];
    // M = I − c·J is refactored when J was refreshed or c moved by more than LU_REUSE (relative)
    // from the factored value; otherwise the correction is scaled by 2/(1 + c/c_LU), which
    // splits the mismatch between the stiff and the non-stiff directions (common practice).
    if (!luValid || Math.abs(c / cLU - 1) > LU_REUSE) {
      stats.luDecomps++;
      if (!factorM(c)) {
        stats.steps++;
        stats.rejected++;
        luValid = false;
        if (++failStreak > 40) return stop("singular", `The iteration matrix stayed singular at t = ${t}.`);
        hWanted = 0.25 * h;
        continue;
      }
      luValid = true;
      cLU = c;
    }
    const gfac = 2 / (1 + c / cLU);
    stats.steps++;

    // predictor and ψ
    predict(n, order, D, y, psi, dcor, scale, atol, rtol, 1 / ALPHA[order]);

    // simplified Newton iteration
    let converged = false;
    let finite = true;
    let dnormOld = 0;
    let etaIt = Math.pow(Math.max(eta, 1e-16), 0.8);
    let iters = 0;
    let theta = 0;
    for (let it = 0; it < NEWTON_MAX_ITER; it++) {
      rhs(tNew, y, f);
      iters++;
      newtonResidual(n, c, f, psi, dcor, delta);
      solve(delta);
      // apply the correction and measure it in one pass (a diverging iterate is discarded anyway)
      const s2 = applyCorrection(n, gfac, delta, y, dcor, scale);
      const dnorm = Math.sqrt(s2 / n);
      if (!Number.isFinite(dnorm)) {
        finite = false;
        break;
      }
      if (it > 0) {
        theta = dnorm / dnormOld;
        if (theta >= 1) break; // diverging
        etaIt = theta / (1 - theta);
        // the remaining iterations cannot reach the tolerance at this rate
        if (Math.pow(theta, NEWTON_MAX_ITER - 1 - it) * etaIt * dnorm > NEWTON_TOL) break;
      }
      if (dnorm === 0 || etaIt * dnorm <= NEWTON_TOL) {
        converged = true;
        break;
      }
      dnormOld = dnorm;
    }

    if (!converged) {
      stats.rejected++;
      eta = 1;
      failStreak++;
      nonFiniteStreak = finite ? 0 : nonFiniteStreak + 1;
      if (nonFiniteStreak > 40) return stop("non-finite", `The solution became non-finite near t = ${t}.`);
      if (finite && !jacCurrent) {
        // refresh the Jacobian at the current solution and retry with the same step
        refreshJacobian();
      } else {
        hWanted = (finite ? 0.3 : 0.25) * h;
      }
      if (failStreak > 60) return stop("step-size-underflow", `The Newton iteration kept failing near t = ${t}.`);
      continue;
    }
    eta = etaIt;

    // error estimate: (κ_k γ_k + 1/(k+1))·(y_{n+1} − y⁽⁰⁾)
    const check = errorScale(n, y, D, atol, rtol, scale, nonNeg);
    const ok = check !== 1;
    const negative = check === 2;
    if (!ok) {
      stats.rejected++;
      failStreak++;
      if (++nonFiniteStreak > 40) return stop("non-finite", `The solution became non-finite near t = ${t}.`);
      hWanted = 0.25 * h;
      continue;
    }
    const err = ERR_CONST[order] * wnorm(n, dcor, 0, scale);
    if (err > 1 || negative || !Number.isFinite(err)) {
      stats.rejected++;
      errFails++;
      let fac = err > 1 && Number.isFinite(err) ? Math.max(MIN_SHRINK, SAFETY * Math.pow(err, -1 / (order + 1))) : 0.5;
      if (negative) fac = Math.min(fac, 0.5);
      if (errFails >= 2) {
        if (order > 1) orderWanted = order - 1;
        fac = Math.min(fac, 0.5);
      }
      hWanted = fac * h;
      if (++failStreak > 60 || errFails > 60) return stop("step-size-underflow", `The step size kept failing the error test near t = ${t}.`);
      continue;
    }

    // accept: update the differences (D[k+2] = d − D[k+1], D[k+1] = d, D[j] += D[j+1] downward)
    failStreak = 0;
    nonFiniteStreak = 0;
    errFails = 0;
    stats.accepted++;
    updateDifferences(n, order, D, dcor);
    const tPrev = t;
    t = tNew;
    jacCurrent = false;
    nEqual++;

    viewOrder = order;
    viewH = h;
    viewT = t;
    view.t0 = tPrev;
    view.t1 = t;
    while (outIdx < nOut && outT[outIdx] <= t) {
      const slot = states.subarray(outIdx * n, outIdx * n + n);
      if (outT[outIdx] === t) slot.set(D.subarray(0, n));
      else view.interpolate(outT[outIdx], slot);
      if (nonNeg) for (let i = 0; i < n; i++) if (slot[i] < 0) slot[i] = 0;
      outIdx++;
    }
    if (hasOnStep) options.onStep!(view);
    if (options.onProgress) options.onProgress(t);
    if (t >= tEnd) break;

    if (t >= nextStop) {
      // breakpoint: restart at order 1 with a fresh Jacobian
      bpIdx++;
      while (bpIdx < bps.length && bps[bpIdx] <= t) bpIdx++;
      nextStop = bpIdx < bps.length ? bps[bpIdx] : tEnd;
      rhs(t, D.subarray(0, n), f);
      for (let i = 0; i < n; i++) if (!Number.isFinite(f[i])) return stop("non-finite", `The right-hand side became non-finite at t = ${t}.`);
      h = Math.min(startingStep(t, nextStop - t), 10 * h);
      hWanted = h;
      order = 1;
      orderWanted = 1;
      for (let i = 0; i < n; i++) D[n + i] = h * f[i];
      la.evalJacobian(t, D.subarray(0, n), f);
      jacCurrent = true;
      luValid = false;
      nEqual = 0;
      eta = 1;
      continue;
    }

    // slow convergence: refresh J before the next step
    if (iters > 2 || theta > 0.5) {
      refreshJacobian();
    }

    // step size and order after k+1 equal steps
    if (nEqual >= order + 1) {
      const errM = order > 1 ? ERR_CONST[order - 1] * wnorm(n, D, order * n, scale) : Infinity;
      const errP = order < MAX_ORDER ? ERR_CONST[order + 1] * wnorm(n, D, (order + 2) * n, scale) : Infinity;
      const facM = order > 1 ? Math.pow(Math.max(errM, 1e-10), -1 / order) : 0;
      const fac0 = Math.pow(Math.max(err, 1e-10), -1 / (order + 1));
      const facP = order < MAX_ORDER ? Math.pow(Math.max(errP, 1e-10), -1 / (order + 2)) : 0;
      let best = fac0, newOrder = order;
      if (facM > best) ((best = facM), (newOrder = order - 1));
      if (facP > best) ((best = facP), (newOrder = order + 1));
      const rho = Math.min(MAX_GROWTH, SAFETY * best);
      // applied even when small: M is refactored only when c moved by more than LU_REUSE
      orderWanted = newOrder;
      hWanted = rho * h;
    }
  }

  /** Re-evaluate J at the current solution (t, D[0]); the LU must then be refactored. */
  function refreshJacobian(): void {
    const yc = D.subarray(0, n);
    if (problem.jacobian === undefined) rhs(t, yc, f0);
    la.evalJacobian(t, yc, f0);
    jacCurrent = true;
    luValid = false;
  }

  while (outIdx < nOut) {
    states.set(D.subarray(0, n), outIdx * n);
    if (nonNeg) for (let i = outIdx * n; i < outIdx * n + n; i++) if (states[i] < 0) states[i] = 0;
    outIdx++;
  }
  stats.wallMs = now() - wallStart;
  return { ok: true, value: { times: outT, states, tReached: t, yFinal: yCurrent(), stats } };
}

// ---- kernels (top-level so that the engine optimises each loop on its own)

/** D_j ← Σ_{i ≥ j} T[j][i]·D_i for j = 1 … K−1 (T is K×K, upper triangular), in place. */
function applyUpperTriangular(n: number, K: number, T: Float64Array, D: Float64Array): void {
  for (let j = 1; j < K; j++) {
    const oj = j * n, tjj = T[j * K + j];
    for (let x = 0; x < n; x++) D[oj + x] *= tjj;
    for (let i = j + 1; i < K; i++) {
      const tji = T[j * K + i];
      if (tji === 0) continue;
      const oi = i * n;
      for (let x = 0; x < n; x++) D[oj + x] += tji * D[oi + x];
    }
  }
}

/** Weighted RMS norm of v[off … off+n) with weights 1/scale. */
function wnorm(n: number, v: Float64Array, off: number, scale: Float64Array): number {
  let s = 0;
  for (let i = 0; i < n; i++) {
    const r = v[off + i] / scale[i];
    s += r * r;
  }
  return Math.sqrt(s / n);
}

/** Predictor y = Σ_{j≤k} D_j, ψ = Σ_{j=1..k} γ_j D_j / α_k, d = 0 and the Newton weights. */
function predict(n: number, order: number, D: Float64Array, y: Float64Array, psi: Float64Array, dcor: Float64Array, scale: Float64Array, atol: Float64Array, rtol: number, invAlpha: number): void {
  for (let i = 0; i < n; i++) {
    const v = D[n + i];
    y[i] = D[i] + v;
    psi[i] = v;
  }
  for (let j = 2; j <= order; j++) {
    const off = j * n, g = GAMMA[j];
    for (let i = 0; i < n; i++) {
      const v = D[off + i];
      y[i] += v;
      psi[i] += g * v;
    }
  }
  for (let i = 0; i < n; i++) {
    psi[i] *= invAlpha;
    dcor[i] = 0;
    scale[i] = atol[i] + rtol * Math.abs(y[i]);
  }
}

/** Right-hand side of the Newton system: c·f − ψ − d. */
function newtonResidual(n: number, c: number, f: Float64Array, psi: Float64Array, dcor: Float64Array, out: Float64Array): void {
  for (let i = 0; i < n; i++) out[i] = c * f[i] - psi[i] - dcor[i];
}

/** y += g·Δ, d += g·Δ; returns Σ (g·Δ_i / scale_i)². */
function applyCorrection(n: number, g: number, delta: Float64Array, y: Float64Array, dcor: Float64Array, scale: Float64Array): number {
  let s2 = 0;
  for (let i = 0; i < n; i++) {
    const di = delta[i] * g;
    y[i] += di;
    dcor[i] += di;
    const r = di / scale[i];
    s2 += r * r;
  }
  return s2;
}

/** Error weights from the new and the old solution; returns 1 if y is not finite, 2 if a component is below −atol (when nonNeg), else 0. */
function errorScale(n: number, y: Float64Array, D: Float64Array, atol: Float64Array, rtol: number, scale: Float64Array, nonNeg: boolean): number {
  let code = 0;
  for (let i = 0; i < n; i++) {
    const yi = y[i];
    if (!(Math.abs(yi) < Infinity)) return 1;
    if (nonNeg && yi < -atol[i]) code = 2;
    scale[i] = atol[i] + rtol * Math.max(Math.abs(yi), Math.abs(D[i]));
  }
  return code;
}

/** After an accepted step: D_{k+2} = d − D_{k+1}, D_{k+1} = d, then D_j += D_{j+1} for j = k … 0. */
function updateDifferences(n: number, order: number, D: Float64Array, dcor: Float64Array): void {
  const o1 = (order + 1) * n, o2 = (order + 2) * n;
  for (let i = 0; i < n; i++) {
    const d = dcor[i];
    D[o2 + i] = d - D[o1 + i];
    D[o1 + i] = d;
  }
  for (let j = order; j >= 0; j--) {
    const oj = j * n, oj1 = (j + 1) * n;
    for (let i = 0; i < n; i++) D[oj + i] += D[oj1 + i];
  }
}
