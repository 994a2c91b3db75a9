import { describe, expect, it } from "vitest";
import { integrateBDF } from "../../solver/bdf.ts";
import { BDF_MIN_SPECIES, simulate, type SimulateOptions, type SimulationError } from "../../solver/simulate.ts";
import type { EngineError } from "../../solver/types.ts";
import type { OdeProblem, StepView } from "../../solver/ode-problem.ts";
import { stiffNetwork } from "../../bench/stiff-network.ts";
import { HIRES_REF, HIRES_T_END, HIRES_Y0, ROBERTSON_REFS, ROBERTSON_REF_1E11, ROBERTSON_Y0, hires, relErr, robertson } from "./reference-problems.ts";
import { k, model, runWith, rx, sp } from "./mechanism-helpers.ts";

const run = runWith({ stiffMethod: "bdf" });

/** Linear first-order chain A → B → C as a generic ODE with a dense Jacobian. */
function chain(k1: number, k2: number): OdeProblem {
  return {
    n: 3,
    autonomous: true,
    rhs(_t, y, dy) {
      dy[0] = -k1 * y[0];
      dy[1] = k1 * y[0] - k2 * y[1];
      dy[2] = k2 * y[1];
    },
    jacobian: {
      kind: "dense",
      fill(_t, _y, J) {
        J.fill(0);
        J[0] = -k1;
        J[3] = k1; J[4] = -k2;
        J[7] = k2;
      },
    },
  };
}

describe("BDF integrator on published stiff test problems", () => {
  it("Robertson matches the references at every second decade up to t = 1e11", () => {
    // References: Bari IVP test set (Mazzia & Magherini) at t = 1e11, recalled from memory, and an
    // independent scipy Radau run at the other decades (reference-problems.ts).
    const atol = [1e-12, 1e-18, 1e-12];
    const r = integrateBDF(robertson(), 0, ROBERTSON_Y0, 1e11, { rtol: 1e-8, atol: Float64Array.from(atol), outputTimes: ROBERTSON_REFS.map((x) => x[0]) });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    ROBERTSON_REFS.forEach(([, ref], kk) => {
      for (let i = 0; i < 3; i++) if (Math.abs(ref[i]) > 1e3 * atol[i]) expect(relErr(r.value.states[kk * 3 + i], ref[i])).toBeLessThan(1e-4);
    });
    // the Jacobian and the LU factorisation are reused over many steps
    expect(r.value.stats.jacEvals).toBeLessThan(r.value.stats.accepted / 3);
    expect(r.value.stats.luDecomps).toBeLessThan(r.value.stats.accepted / 2);
  });

  it("HIRES matches the published reference at t = 321.8122", () => {
    // Reference: Bari IVP test set, problem HIRES (recalled from memory; see reference-problems.ts).
    const r = integrateBDF(hires(), 0, HIRES_Y0, HIRES_T_END, { rtol: 1e-8, atol: 1e-12 });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    for (let i = 0; i < 8; i++) expect(relErr(r.value.yFinal[i], HIRES_REF[i])).toBeLessThan(1e-4);
  });

  it("a finite-difference Jacobian gives the same HIRES answer", () => {
    const p = hires();
    delete p.jacobian;
    const r = integrateBDF(p, 0, HIRES_Y0, HIRES_T_END, { rtol: 1e-8, atol: 1e-12 });
    expect(r.ok).toBe(true);
    if (r.ok) for (let i = 0; i < 8; i++) expect(relErr(r.value.yFinal[i], HIRES_REF[i])).toBeLessThan(1e-4); // Bari IVP test set
  });
});

describe("BDF integrator against analytic solutions", () => {
  it("A → B → C follows the Bateman (1910) solution at every output time (dense output)", () => {
    const k1 = 2, k2 = 0.5;
    const times = Array.from({ length: 41 }, (_, i) => i * 0.5);
    const r = integrateBDF(chain(k1, k2), 0, [1, 0, 0], 20, { rtol: 1e-9, atol: 1e-14, outputTimes: times });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    times.forEach((t, i) => {
      const A = Math.exp(-k1 * t);
      const B = (k1 / (k2 - k1)) * (Math.exp(-k1 * t) - Math.exp(-k2 * t));
      expect(Math.abs(r.value.states[i * 3] - A)).toBeLessThan(1e-7);
      expect(Math.abs(r.value.states[i * 3 + 1] - B)).toBeLessThan(1e-7);
      expect(Math.abs(r.value.states[i * 3 + 2] - (1 - A - B))).toBeLessThan(1e-7);
    });
  });

  it("A ⇌ B relaxes as A(t) = (kr + kf·e^(−(kf+kr)t))/(kf + kr) through simulate()", () => {
    // first-order reversible step, textbook closed form (common practice)
    const m = model({ species: sp("A", "B"), reactions: [rx("1", [["A", 1]], [["B", 1]], true)] });
    const kf = 3, kr = 1;
    const r = run(m, { rateConstants: [{ kf: k(kf), kr: k(kr) }], initial: { A: 1 }, tEnd: 5, grid: { kind: "linear", points: 26 } });
    r.times.forEach((t, i) => {
      const A = (kr + kf * Math.exp(-(kf + kr) * t)) / (kf + kr);
      expect(Math.abs(r.conc[0][i] - A)).toBeLessThan(1e-7);
      expect(Math.abs(r.conc[1][i] - (1 - A))).toBeLessThan(1e-7);
    });
    expect(r.maxDrift).toBeLessThan(1e-9);
  });

  it("a stepped temperature program restarts at its breakpoints: A → B with k(T) piecewise constant gives A = exp(−Σ k_i·Δt_i)", () => {
    // Closed form of first-order decay with a piecewise-constant rate constant (common practice).
    const m = model({ species: sp("A", "B"), reactions: [rx("1", [["A", 1]], [["B", 1]])] });
    const kOf = (T: number) => (T < 310 ? 0.2 : T < 330 ? 2 : 0.05);
    const holds: [number, number][] = [[0, 300], [3, 320], [4.5, 350]];
    const exact = (t: number) => {
      const a = 0.2 * Math.min(t, 3) + 2 * Math.max(0, Math.min(t, 4.5) - 3) + 0.05 * Math.max(0, t - 4.5);
      return Math.exp(-a);
    };
    const r = run(m, { rateConstants: [{ kf: kOf }], initial: { A: 1 }, tEnd: 10, temperature: { kind: "holds", holds }, grid: { kind: "linear", points: 41 } });
    r.times.forEach((t, i) => expect(Math.abs(r.conc[0][i] - exact(t))).toBeLessThan(1e-7));
    expect(r.temperatures[r.temperatures.length - 1]).toBe(350);
  });

  it("a linear ramp (non-autonomous) agrees with RODAS4 at tight tolerance", () => {
    // A → B with an Arrhenius-like k(T) under a ramp with a hold before it (two breakpoints)
    const m = model({ species: sp("A", "B", "C"), reactions: [rx("1", [["A", 1]], [["B", 1]]), rx("2", [["B", 1]], [["C", 1]])] });
    const rc = [{ kf: (T: number) => 1e3 * Math.exp(-3000 / T) }, { kf: (T: number) => 1e5 * Math.exp(-5000 / T) }];
    const temperature = { kind: "ramp" as const, T0: 300, T1: 400, rate: 2, holdBefore: 5 };
    const a = run(m, { rateConstants: rc, initial: { A: 1 }, tEnd: 100, temperature, rtol: 1e-8, atol: 1e-14 });
    const b = run(m, { rateConstants: rc, initial: { A: 1 }, tEnd: 100, temperature, rtol: 1e-10, atol: 1e-16, stiffMethod: "rosenbrock" });
    for (let i = 0; i < 3; i++) {
      for (let q = 0; q < a.times.length; q++) {
        const ref = b.conc[i][q];
        // components far above atol (early C is ~1e-10, where atol governs the error)
        if (ref > 1e-6) expect(relErr(a.conc[i][q], ref)).toBeLessThan(1e-5);
      }
    }
  });
});

describe("BDF integrator: options, budgets and typed failures", () => {
  it("onStep views are contiguous and their dense output reproduces the step ends", () => {
    const views: [number, number][] = [];
    const buf = new Float64Array(3);
    let maxGap = 0;
    const r = integrateBDF(chain(2, 0.5), 0, [1, 0, 0], 20, {
      rtol: 1e-8,
      atol: 1e-14,
      onStep(v: StepView) {
        views.push([v.t0, v.t1]);
        v.interpolate(v.t0, buf);
        // value at t0 is exp(−2·t0) for A
        maxGap = Math.max(maxGap, Math.abs(buf[0] - Math.exp(-2 * v.t0)));
      },
    });
    expect(r.ok).toBe(true);
    for (let q = 1; q < views.length; q++) expect(views[q][0]).toBe(views[q - 1][1]);
    expect(views[views.length - 1][1]).toBe(20);
    expect(maxGap).toBeLessThan(1e-7);
  });

  it("a step budget returns a typed failure with the partial result", () => {
    const r = integrateBDF(robertson(), 0, ROBERTSON_Y0, 1e11, { maxSteps: 20, outputTimes: [1e-6, 1e-3, 1e11] });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.error.reason).toBe("budget-steps");
    expect(r.error.code).toBe("BUDGET_STEPS");
    expect(r.error.partial).toBeDefined();
    expect(r.error.partial!.stats.steps).toBe(20);
    expect(r.error.partial!.tReached).toBeGreaterThan(0);
    for (const v of r.error.partial!.states) expect(Number.isFinite(v)).toBe(true);
  });

  it("a wall-time budget stops the run with a fake clock (no timing in tests)", () => {
    let clock = 0;
    const r = integrateBDF(robertson(), 0, ROBERTSON_Y0, 1e11, { maxWallMs: 50, now: () => (clock += 1) });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.reason).toBe("budget-time");
  });

  it("an already-aborted signal returns 'cancelled', and an abort during the run stops it", () => {
    const ac = new AbortController();
    ac.abort();
    const r = integrateBDF(robertson(), 0, ROBERTSON_Y0, 1e11, { signal: ac.signal });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.reason).toBe("cancelled");
    const ac2 = new AbortController();
    let steps = 0;
    const r2 = integrateBDF(robertson(), 0, ROBERTSON_Y0, 1e11, { signal: ac2.signal, onProgress: () => ++steps === 10 && ac2.abort() });
    expect(r2.ok).toBe(false);
    if (!r2.ok) {
      expect(r2.error.reason).toBe("cancelled");
      expect(r2.error.partial!.stats.accepted).toBe(10);
    }
  });

  it("a right-hand side that turns non-finite gives a typed 'non-finite' failure, never NaN output", () => {
    const p: OdeProblem = {
      n: 1,
      autonomous: false,
      rhs(t, y, dy) {
        dy[0] = t > 1 ? NaN : -y[0];
      },
    };
    const r = integrateBDF(p, 0, [1], 10, { outputTimes: [0.5, 1, 5, 10] });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.error.reason).toBe("non-finite");
    expect(r.error.code).toBe("NON_FINITE");
    expect(r.error.partial!.tReached).toBeGreaterThan(0.9);
    for (const v of r.error.partial!.states) expect(Number.isFinite(v)).toBe(true);
    for (const v of r.error.partial!.yFinal) expect(Number.isFinite(v)).toBe(true);
  });

  it("rejects bad input like RODAS4 does", () => {
    const r = integrateBDF(robertson(), 0, [1, 0], 1, {});
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.reason).toBe("bad-input");
    const r2 = integrateBDF(robertson(), 0, ROBERTSON_Y0, 1, { rtol: 2 });
    expect(r2.ok).toBe(false);
  });
});

describe("simulate() on a generated stiff network: BDF path against RODAS4", () => {
  const net = stiffNetwork(60, 4321);
  const m = model(net.mechanism);
  const rc = Array.from({ length: m.nReactions }, (_, r) => ({ kf: k(net.kf[r]), kr: k(net.kr[r]) }));
  const base = { rateConstants: rc, temperature: { kind: "isothermal" as const, T: 298.15 }, initial: net.c0, tEnd: net.tEnd, conservation: false };

  it("agrees with a tight RODAS4 run to within the tolerance on every output time", () => {
    const bdf = simulate(m, { ...base, rtol: 1e-6, atol: 1e-12, stiffMethod: "bdf", grid: { kind: "log", points: 30 } });
    const ref = simulate(m, { ...base, rtol: 1e-10, atol: 1e-18, stiffMethod: "rosenbrock", grid: { kind: "log", points: 30 } });
    expect(bdf.ok && ref.ok).toBe(true);
    if (!bdf.ok || !ref.ok) return;
    let worst = 0;
    for (let i = 0; i < m.nSpecies; i++) {
      for (let q = 0; q < ref.value.times.length; q++) {
        const y = ref.value.conc[i][q];
        if (y > 1e-9) worst = Math.max(worst, relErr(bdf.value.conc[i][q], y));
      }
    }
    expect(worst).toBeLessThan(1e-4);
  });

  it("'auto' uses BDF for this mechanism (Jacobian reused across steps) and RODAS4 for a small one (one per step)", () => {
    const auto = simulate(m, { ...base, grid: { kind: "times", times: [net.tEnd] } });
    expect(auto.ok).toBe(true);
    if (auto.ok) expect(auto.value.stats.jacEvals).toBeLessThan(auto.value.stats.accepted / 3);
    if (auto.ok) expect(auto.value.method).toBe("bdf");
    const small = model({ species: sp("A", "B"), reactions: [rx("1", [["A", 1]], [["B", 1]], true)] });
    const r = run(small, { rateConstants: [{ kf: k(3), kr: k(1) }], initial: { A: 1 }, tEnd: 5, stiffMethod: "auto" });
    expect(r.stats.jacEvals).toBe(r.stats.accepted);
    expect(r.method).toBe("rosenbrock");
  });

  it("dense and sparse LU paths give the same answer", () => {
    const opts = { ...base, rtol: 1e-6, atol: 1e-12, stiffMethod: "bdf" as const, grid: { kind: "times" as const, times: [net.tEnd] } };
    const a = simulate(m, { ...opts, linearSolver: "sparse" });
    const b = simulate(m, { ...opts, linearSolver: "dense" });
    expect(a.ok && b.ok).toBe(true);
    if (!a.ok || !b.ok) return;
    for (let i = 0; i < m.nSpecies; i++) {
      const y = b.value.conc[i][0];
      if (y > 1e-9) expect(relErr(a.value.conc[i][0], y)).toBeLessThan(1e-6);
    }
  });
});

describe("simulate() 'auto': RODAS4 takes over when BDF stops", () => {
  // Robertson's problem (Robertson 1966; Hairer & Wanner II §IV.1: A → B k = 0.04, 2B → B + C
  // k = 3e7, B + C → A + C k = 1e4) with 17 slow isomerisations X1 → … → X17 (1e-13 s⁻¹, taking
  // no part in the fast chemistry) to reach 20 species, so that "auto" picks BDF. At atol 1e-6
  // mol/L BDF stops with a step-size underflow on it, RODAS4 solves it.
  /** The partial result a failed simulate() carries (SimulationError). */
  const partialOf = (e: EngineError) => (e as SimulationError).partial;
  const inert = Array.from({ length: 17 }, (_, i) => `X${i + 1}`);
  const reactions = [rx("r1", [["A", 1]], [["B", 1]]), rx("r2", [["B", 2]], [["B", 1], ["C", 1]]), rx("r3", [["B", 1], ["C", 1]], [["A", 1], ["C", 1]])];
  for (let i = 1; i < inert.length; i++) reactions.push(rx(`x${i}`, [[`X${i}`, 1]], [[`X${i + 1}`, 1]]));
  const m = model({ species: sp("A", "B", "C", ...inert), reactions });
  const rc = [0.04, 3e7, 1e4, ...inert.slice(1).map(() => 1e-13)].map((v) => ({ kf: k(v) }));
  const base: SimulateOptions = {
    rateConstants: rc,
    temperature: { kind: "isothermal", T: 298.15 },
    initial: { A: 1, X1: 0.5 },
    tEnd: 1e11,
    atol: 1e-6,
    conversionEvents: [{ species: "A", conversion: 0.5 }],
  };

  for (const rtol of [1e-2, 1e-3, 1e-4]) {
    it(`rtol ${rtol}: explicit "bdf" fails with a typed error; "auto" falls back and agrees with RODAS4`, () => {
      expect(m.nSpecies).toBeGreaterThanOrEqual(BDF_MIN_SPECIES);
      const bdf = simulate(m, { ...base, rtol, stiffMethod: "bdf" });
      expect(bdf.ok).toBe(false);
      if (bdf.ok) return;
      expect(bdf.error.code).toBe("STEP_SIZE_UNDERFLOW");
      expect((bdf.error as SimulationError).reason).toBe("step-size-underflow");
      expect(partialOf(bdf.error)?.method).toBe("bdf");

      const progress: number[] = [];
      const auto = simulate(m, { ...base, rtol, onProgress: (t) => progress.push(t) });
      const ros = simulate(m, { ...base, rtol, stiffMethod: "rosenbrock" });
      expect(auto.ok && ros.ok).toBe(true);
      if (!auto.ok || !ros.ok) return;
      expect(auto.value.method).toBe("rosenbrock");
      expect(ros.value.method).toBe("rosenbrock");
      expect(auto.value.warnings.some((w) => /BDF integrator stopped.*RODAS4/.test(w))).toBe(true);
      expect(ros.value.warnings.some((w) => /RODAS4/.test(w))).toBe(false);
      // the rerun is the RODAS4 run: same values at every output time, same event time
      for (let i = 0; i < m.nSpecies; i++) {
        for (let q = 0; q < ros.value.times.length; q++) expect(auto.value.conc[i][q]).toBe(ros.value.conc[i][q]);
      }
      expect(auto.value.events[0].time).toBe(ros.value.events[0].time);
      // statistics cover both attempts
      expect(auto.value.stats.steps).toBe(ros.value.stats.steps + partialOf(bdf.error)!.stats.steps);
      // progress never goes back
      for (let q = 1; q < progress.length; q++) expect(progress[q]).toBeGreaterThan(progress[q - 1]);
      expect(progress[progress.length - 1]).toBe(1e11);
      // against the Bari test-set reference at t = 1e11 (reference-problems.ts): C to within
      // 10·atol; A (≈ 2.1e-8 mol/L) lies below atol, so only |A − A_ref| ≤ atol says anything
      const last = ros.value.times.length - 1;
      expect(Math.abs(ros.value.conc[2][last] - ROBERTSON_REF_1E11[2])).toBeLessThan(1e-5);
      expect(Math.abs(ros.value.conc[0][last] - ROBERTSON_REF_1E11[0])).toBeLessThan(1e-6);
    });
  }

  it("the rerun gets only the steps BDF left over", () => {
    const bdf = simulate(m, { ...base, rtol: 1e-3, stiffMethod: "bdf" });
    expect(bdf.ok).toBe(false);
    if (bdf.ok) return;
    const used = partialOf(bdf.error)!.stats.steps;
    const r = simulate(m, { ...base, rtol: 1e-3, maxSteps: used + 5 });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.error.code).toBe("BUDGET_STEPS");
    expect(r.error.message).toMatch(/RODAS4/);
    expect(partialOf(r.error)?.method).toBe("rosenbrock");
    expect(partialOf(r.error)!.stats.steps).toBe(used + 5);
  });

  it("the rerun gets only the wall time BDF left over (a clock that ticks 1 ms per reading)", () => {
    const counting = () => {
      let ticks = 0;
      return () => ticks++;
    };
    const clock = counting();
    const bdf = simulate(m, { ...base, rtol: 1e-3, stiffMethod: "bdf", now: clock });
    expect(bdf.ok).toBe(false);
    const used = clock(); // readings BDF took
    const r = simulate(m, { ...base, rtol: 1e-3, now: counting(), maxWallMs: used + 20 });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.error.code).toBe("BUDGET_TIME");
    expect(partialOf(r.error)?.method).toBe("rosenbrock");
  });
});
