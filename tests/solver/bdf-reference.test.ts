import { describe, expect, it } from "vitest";
import { integrateBDF } from "../../solver/bdf.ts";
import { compileMechanism, type MechanismInput } from "../../solver/model.ts";
import { simulate, type SimulateOptions } from "../../solver/simulate.ts";
import type { OdeProblem, StepView } from "../../solver/ode-problem.ts";
import { stiffNetwork } from "../../bench/stiff-network.ts";
import { HIRES_REF, HIRES_T_END, HIRES_Y0, ROBERTSON_REFS, ROBERTSON_Y0, hires, relErr, robertson } from "./reference-problems.ts";

const sp = (...ids: string[]) => ids.map((id) => ({ id }));
const rx = (id: string, r: [string, number][], p: [string, number][], reversible = false) => ({
  id,
  reactants: r.map(([species, coef]) => ({ species, coef })),
  products: p.map(([species, coef]) => ({ species, coef })),
  reversible,
});
const k = (v: number) => () => v;
function model(m: MechanismInput) {
  const r = compileMechanism(m);
  if (!r.ok) throw new Error(r.error.message);
  return r.value;
}
function run(m: ReturnType<typeof model>, o: Partial<SimulateOptions> & Pick<SimulateOptions, "rateConstants" | "initial" | "tEnd">) {
  const r = simulate(m, { temperature: { kind: "isothermal", T: 298.15 }, rtol: 1e-9, atol: 1e-14, stiffMethod: "bdf", ...o });
  if (!r.ok) throw new Error(r.error.message);
  return r.value;
}

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
    const small = model({ species: sp("A", "B"), reactions: [rx("1", [["A", 1]], [["B", 1]], true)] });
    const r = run(small, { rateConstants: [{ kf: k(3), kr: k(1) }], initial: { A: 1 }, tEnd: 5, stiffMethod: "auto" });
    expect(r.stats.jacEvals).toBe(r.stats.accepted);
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
