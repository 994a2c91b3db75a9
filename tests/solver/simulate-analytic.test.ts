import { describe, expect, it } from "vitest";
import { expm, matrix, multiply } from "mathjs";
import { watchDownwardCrossing } from "../../solver/output-grid.ts";
import { k, model, run, rx, sp } from "./mechanism-helpers.ts";
import { compileMechanism } from "../../solver/model.ts";
import { simulate } from "../../solver/simulate.ts";

const rel = (a: number, b: number) => Math.abs(a - b) / Math.max(Math.abs(b), 1e-300);

describe("simulate against analytic solutions", () => {
  it("A → B → C (Bateman 1910 solution of consecutive first-order steps)", () => {
    const m = model({ species: sp("A", "B", "C"), reactions: [rx("1", [["A", 1]], [["B", 1]]), rx("2", [["B", 1]], [["C", 1]])] });
    const k1 = 2, k2 = 0.5;
    const r = run(m, { rateConstants: [{ kf: k(k1) }, { kf: k(k2) }], initial: { A: 1 }, tEnd: 20, grid: { kind: "linear", points: 41 } });
    r.times.forEach((t, i) => {
      const A = Math.exp(-k1 * t);
      const B = (k1 / (k2 - k1)) * (Math.exp(-k1 * t) - Math.exp(-k2 * t));
      expect(Math.abs(r.conc[0][i] - A)).toBeLessThan(1e-7);
      expect(Math.abs(r.conc[1][i] - B)).toBeLessThan(1e-7);
      expect(Math.abs(r.conc[2][i] - (1 - A - B))).toBeLessThan(1e-7);
    });
    expect(r.maxDrift).toBeLessThan(1e-9);
  });

  it("A → B → C agrees with the matrix exponential from mathjs (c(t) = expm(K t)·c0)", () => {
    const m = model({ species: sp("A", "B", "C"), reactions: [rx("1", [["A", 1]], [["B", 1]]), rx("2", [["B", 1]], [["C", 1]])] });
    const r = run(m, { rateConstants: [{ kf: k(1.3) }, { kf: k(0.2) }], initial: [0.8, 0.1, 0], tEnd: 10, grid: { kind: "times", times: [0.5, 2, 10] } });
    const K = [
      [-1.3, 0, 0],
      [1.3, -0.2, 0],
      [0, 0.2, 0],
    ];
    r.times.forEach((t, i) => {
      const E = expm(matrix(K.map((row) => row.map((v) => v * t))));
      const c = multiply(E, matrix([0.8, 0.1, 0])).toArray() as number[];
      for (let s = 0; s < 3; s++) expect(Math.abs(r.conc[s][i] - c[s])).toBeLessThan(1e-8);
    });
  });

  it("A ⇌ B relaxes exponentially to equilibrium (first-order reversible, textbook)", () => {
    const m = model({ species: sp("A", "B"), reactions: [rx("1", [["A", 1]], [["B", 1]], true)] });
    const kf = 3, kr = 1;
    const r = run(m, { rateConstants: [{ kf: k(kf), kr: k(kr) }], initial: { A: 1, B: 0.2 }, tEnd: 5, grid: { kind: "linear", points: 26 } });
    const Aeq = (kr / (kf + kr)) * 1.2;
    r.times.forEach((t, i) => expect(Math.abs(r.conc[0][i] - (Aeq + (1 - Aeq) * Math.exp(-(kf + kr) * t)))).toBeLessThan(1e-8));
  });

  it("2A → P: 1/[A] = 1/[A]0 + 2kt with the IUPAC convention v = k[A]² (IUPAC Green Book)", () => {
    const m = model({ species: sp("A", "P"), reactions: [rx("1", [["A", 2]], [["P", 1]])] });
    const kk = 0.7, A0 = 1.5;
    const r = run(m, { rateConstants: [{ kf: k(kk) }], initial: { A: A0 }, tEnd: 100, grid: { kind: "log", points: 30 } });
    r.times.forEach((t, i) => {
      const A = 1 / (1 / A0 + 2 * kk * t);
      expect(rel(r.conc[0][i], A)).toBeLessThan(1e-6);
      expect(rel(r.conc[1][i] + 1e-30, (A0 - A) / 2 + 1e-30)).toBeLessThan(1e-6);
    });
  });

  it("A + B → P with unequal starts (second-order mixed, textbook integrated rate law)", () => {
    const m = model({ species: sp("A", "B", "P"), reactions: [rx("1", [["A", 1], ["B", 1]], [["P", 1]])] });
    const kk = 2, A0 = 0.5, B0 = 0.8;
    const r = run(m, { rateConstants: [{ kf: k(kk) }], initial: { A: A0, B: B0 }, tEnd: 10, grid: { kind: "linear", points: 21 } });
    r.times.forEach((t, i) => {
      const A = (A0 * (B0 - A0)) / (B0 * Math.exp((B0 - A0) * kk * t) - A0);
      expect(rel(r.conc[0][i], A)).toBeLessThan(1e-6);
      expect(Math.abs(r.conc[1][i] - (B0 - A0 + A))).toBeLessThan(1e-8);
    });
    // conservation: A + P and B + P (mass balance)
    expect(r.drift.length).toBe(2);
    expect(r.maxDrift).toBeLessThan(1e-9);
  });

  it("the non-stiff path (odex) agrees with the stiff path on a non-stiff mechanism (cross-check)", () => {
    const m = model({
      species: sp("A", "B", "C", "D"),
      reactions: [rx("1", [["A", 1], ["B", 1]], [["C", 1]], true), rx("2", [["C", 1]], [["D", 1]])],
    });
    const common = { rateConstants: [{ kf: k(1.5), kr: k(0.3) }, { kf: k(0.4) }], initial: { A: 1, B: 0.7 }, tEnd: 8, grid: { kind: "linear" as const, points: 9 } };
    const a = run(m, { ...common, method: "stiff" });
    const b = run(m, { ...common, method: "nonstiff" });
    for (let s = 0; s < 4; s++) for (let i = 0; i < 9; i++) expect(Math.abs(a.conc[s][i] - b.conc[s][i])).toBeLessThan(1e-7);
  });

  it("linear ramp: A → B with Arrhenius k(T) matches ln(A/A0) = −∫k(T(t))dt (Simpson quadrature, 20000 panels)", () => {
    const m = model({ species: sp("A", "B"), reactions: [rx("1", [["A", 1]], [["B", 1]])] });
    const R = 8.314462618; // J/(mol K), CODATA 2018 (k_B·N_A)
    const kf = (T: number) => 1e10 * Math.exp(-80000 / (R * T));
    const prog = { kind: "ramp" as const, T0: 300, T1: 360, rate: 10, rateUnit: "K/min" as const, holdBefore: 60 };
    const tEnd = 600;
    const r = run(m, { rateConstants: [{ kf }], initial: { A: 1 }, tEnd, temperature: prog, grid: { kind: "times", times: [tEnd] } });
    const Tof = (t: number) => (t < 60 ? 300 : Math.min(360, 300 + ((t - 60) * 10) / 60));
    const N = 20000;
    let I = 0;
    for (let j = 0; j <= N; j++) {
      const t = (tEnd * j) / N;
      const w = j === 0 || j === N ? 1 : j % 2 ? 4 : 2;
      I += w * kf(Tof(t));
    }
    I *= tEnd / N / 3;
    expect(rel(r.conc[0][0], Math.exp(-I))).toBeLessThan(1e-5);
    expect(r.temperatures[0]).toBe(360);
  });

  it("stepped holds: piecewise-constant k gives A = A0·exp(−Σ k_j Δt_j) (analytic)", () => {
    const m = model({ species: sp("A", "B"), reactions: [rx("1", [["A", 1]], [["B", 1]])] });
    const kf = (T: number) => (T === 300 ? 0.01 : 0.2);
    const r = run(m, { rateConstants: [{ kf }], initial: { A: 1 }, tEnd: 30, temperature: { kind: "holds", holds: [[0, 300], [10, 350]] }, grid: { kind: "times", times: [10, 30] } });
    expect(rel(r.conc[0][0], Math.exp(-0.1))).toBeLessThan(1e-7);
    expect(rel(r.conc[0][1], Math.exp(-0.1 - 0.2 * 20))).toBeLessThan(1e-6);
  });

  it("finds the half-life on dense output: t½ = ln2/k for first order (textbook)", () => {
    const m = model({ species: sp("A", "B"), reactions: [rx("1", [["A", 1]], [["B", 1]])] });
    const w = watchDownwardCrossing(2, 0, 0.5);
    run(m, { rateConstants: [{ kf: k(0.3) }], initial: { A: 1 }, tEnd: 10, onStep: w.onStep, rtol: 1e-8 });
    expect(rel(w.time!, Math.LN2 / 0.3)).toBeLessThan(1e-6);
  });
});

describe("open and fractional steps against analytic solutions", () => {
  const base = { temperature: { kind: "isothermal" as const, T: 298.15 }, rtol: 1e-10, atol: 1e-14, grid: { kind: "times" as const, times: [0, 0.5, 2, 5] } };
  const kc = (v: number) => ({ kf: () => v });

  it("∅ → A (k0), A → ∅ (k1): A(t) = k0/k1 + (A0 − k0/k1)·e^(−k1·t) (linear ODE, textbook solution)", () => {
    const mr = compileMechanism({ species: [{ id: "A" }], reactions: [
      { id: "in", reactants: [], products: [{ species: "A", coef: 1 }], reversible: false },
      { id: "out", reactants: [{ species: "A", coef: 1 }], products: [], reversible: false },
    ] });
    if (!mr.ok) throw new Error(mr.error.message);
    const r = simulate(mr.value, { ...base, rateConstants: [kc(0.3), kc(1.2)], initial: { A: 1 }, tEnd: 5 });
    if (!r.ok) throw new Error(r.error.message);
    r.value.times.forEach((t, k) => expect(r.value.conc[0][k]).toBeCloseTo(0.25 + 0.75 * Math.exp(-1.2 * t), 8));
  });

  it("A + B → 2A: logistic growth A(t) = N·A0·e^(kNt)/(N − A0 + A0·e^(kNt)), N = A0 + B0 (textbook autocatalysis)", () => {
    const mr = compileMechanism({ species: [{ id: "A" }, { id: "B" }], reactions: [
      { id: "auto", reactants: [{ species: "A", coef: 1 }, { species: "B", coef: 1 }], products: [{ species: "A", coef: 2 }], reversible: false },
    ] });
    if (!mr.ok) throw new Error(mr.error.message);
    const A0 = 0.01, N = 1, k = 2;
    const r = simulate(mr.value, { ...base, rateConstants: [kc(k)], initial: { A: A0, B: N - A0 }, tEnd: 5 });
    if (!r.ok) throw new Error(r.error.message);
    r.value.times.forEach((t, i) => {
      const e = Math.exp(k * N * t);
      expect(r.value.conc[0][i]).toBeCloseTo((N * A0 * e) / (N - A0 + A0 * e), 8);
    });
  });

  it("1.5 A → P (order 1.5): A^(−1/2) = A0^(−1/2) + 0.75·k·t (separable ODE dA/dt = −1.5·k·A^1.5)", () => {
    const mr = compileMechanism({ species: [{ id: "A" }, { id: "P" }], reactions: [
      { id: "r", reactants: [{ species: "A", coef: 1.5 }], products: [{ species: "P", coef: 1 }], reversible: false },
    ] });
    if (!mr.ok) throw new Error(mr.error.message);
    const r = simulate(mr.value, { ...base, rateConstants: [kc(0.8)], initial: { A: 2 }, tEnd: 5 });
    if (!r.ok) throw new Error(r.error.message);
    r.value.times.forEach((t, i) => expect(r.value.conc[0][i]).toBeCloseTo(1 / (2 ** -0.5 + 0.75 * 0.8 * t) ** 2, 8));
  });
});
