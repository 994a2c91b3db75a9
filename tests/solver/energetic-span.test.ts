/**
 * The energetic span model of catalytic cycles: Kozuch, S.; Shaik, S. "How to Conceptualize
 * Catalytic Cycles? The Energetic Span Model", Acc. Chem. Res. 2011, 44, 101–110.
 *
 * What is checked, and against what:
 * - The paper's rules (from memory of the paper; no numbers of its figures are reproduced
 *   here): δE = T_TDTS − I_TDI when the TDTS comes after the TDI, and T_TDTS − I_TDI + ΔG_r
 *   when it comes before; the TDTS need not be the highest transition state, nor the TDI the
 *   lowest intermediate; for a strongly exergonic cycle with one dominant term the exact TOF
 *   tends to (k_B T/h)·e^{−δE/RT}. The profiles below are invented and worked by hand.
 * - Independently of the closed form: the steady state of the cycle's linear rate equations
 *   (Eyring rate constants k_j = (k_B T/h)e^{−(T_j−I_j)/RT}, reverse k_−j from the state after,
 *   the last reverse step from I_0 of the next turnover at I_0 + ΔG_r), solved with the
 *   engine's dense LU; the TOF and the degrees of TOF control (as −RT ∂ln TOF/∂T_i and
 *   +RT ∂ln TOF/∂I_j by central differences) must agree with the span model's exact values.
 * Constants: CODATA 2018 (k_B/h, R).
 */
import { describe, expect, it } from "vitest";
import { KB_OVER_H, R_GAS } from "../../solver/constants.ts";
import { energeticSpan, type EnergeticSpanInput } from "../../solver/energetic-span.ts";
import { createDenseLU } from "../../solver/linalg-dense.ts";
import type { Result } from "../../solver/types.ts";

function get<T>(r: Result<T>): T {
  if (!r.ok) throw new Error(`${r.error.code}: ${r.error.message}`);
  return r.value;
}
const kJ = (xs: number[]) => xs.map((x) => x * 1000);

/** Steady-state TOF of the cycle's first-order rate equations (total catalyst 1), by dense LU. */
function steadyStateTof({ intermediates: I, transitionStates: TS, reactionEnergy: dGr, T }: EnergeticSpanInput): number {
  const n = I.length;
  const RT = R_GAS * T;
  const kf = TS.map((t, j) => KB_OVER_H * T * Math.exp(-(t - I[j]) / RT));
  const kr = TS.map((t, j) => KB_OVER_H * T * Math.exp(-(t - (j + 1 < n ? I[j + 1] : I[0] + dGr)) / RT));
  // rate of step j: r_j = kf_j x_j − kr_j x_{j+1 mod n}; dx_j/dt = r_{j−1} − r_j = 0 (j ≥ 1), Σx = 1
  const A = new Float64Array(n * n);
  const b = new Float64Array(n);
  for (let j = 1; j < n; j++) {
    const prev = j - 1;
    A[j * n + prev] += kf[prev];
    A[j * n + j] -= kr[prev];
    A[j * n + j] -= kf[j];
    A[j * n + ((j + 1) % n)] += kr[j];
  }
  for (let j = 0; j < n; j++) A[j] = 1;
  b[0] = 1;
  // scale rows so the LU sees numbers of one size
  for (let j = 1; j < n; j++) {
    let m = 0;
    for (let q = 0; q < n; q++) m = Math.max(m, Math.abs(A[j * n + q]));
    for (let q = 0; q < n; q++) A[j * n + q] /= m;
  }
  const lu = createDenseLU(n);
  if (!lu.factor(A)) throw new Error("singular");
  lu.solve(b);
  // every step carries the same net rate; read it where forward and reverse cancel least
  let best = 0;
  for (let j = 1; j < n; j++) if (kr[j] * b[(j + 1) % n] * kf[best] * b[best] < kr[best] * b[(best + 1) % n] * kf[j] * b[j]) best = j;
  return kf[best] * b[best] - kr[best] * b[(best + 1) % n];
}

describe("energetic span model (Kozuch & Shaik, Acc. Chem. Res. 2011, 44, 101–110)", () => {
  const T = 298.15;

  it("TDTS after TDI: δE = T_TDTS − I_TDI (invented three-step cycle, worked by hand)", () => {
    // pairs T_i − I_j (+ΔG_r when i < j): the largest is T_2 − I_1 = 90 − (−20) = 110 kJ/mol
    const r = get(energeticSpan({ intermediates: kJ([0, -20, 10]), transitionStates: kJ([60, 50, 90]), reactionEnergy: -40e3, T }));
    expect(r.tdts).toBe(2);
    expect(r.tdi).toBe(1);
    expect(r.tdtsBeforeTdi).toBe(false);
    expect(r.span).toBeCloseTo(110e3, 6);
  });

  it("TDTS before TDI: δE = T_TDTS − I_TDI + ΔG_r (invented two-step cycle)", () => {
    // T_0 − I_1 + ΔG_r = 80 + 60 − 30 = 110 beats T_1 − I_1 = 100 and T_0 − I_0 = 80
    const r = get(energeticSpan({ intermediates: kJ([0, -60]), transitionStates: kJ([80, 40]), reactionEnergy: -30e3, T }));
    expect([r.tdts, r.tdi, r.tdtsBeforeTdi]).toEqual([0, 1, true]);
    expect(r.span).toBeCloseTo(110e3, 6);
  });

  it("the highest transition state is not necessarily the TDTS", () => {
    // T_1 = 60 after the deep I_1 = −50 gives 110; the highest, T_0 = 70, gives at most 70
    const r = get(energeticSpan({ intermediates: kJ([0, -50]), transitionStates: kJ([70, 60]), reactionEnergy: -100e3, T }));
    expect(r.tdts).toBe(1);
    expect(r.tdi).toBe(1);
    expect(r.span).toBeCloseTo(110e3, 6);
    expect(r.controlTS[1]).toBeGreaterThan(0.99);
    expect(r.controlI[1]).toBeGreaterThan(0.99);
  });

  it("strongly exergonic cycle with one dominant term: exact TOF → (k_B T/h)e^{−δE/RT}", () => {
    const r = get(energeticSpan({ intermediates: kJ([0, -30, -5]), transitionStates: kJ([40, 85, 30]), reactionEnergy: -150e3, T }));
    // δE = 85 + 30 = 115 kJ/mol; the next term (T_1 − I_0 = 85) is 30 kJ/mol lower, a factor 5.5e-6
    expect(r.span).toBeCloseTo(115e3, 6);
    expect(r.tofApprox / (KB_OVER_H * T * Math.exp(-115e3 / (R_GAS * T)))).toBeCloseTo(1, 12);
    expect(r.tof / r.tofApprox).toBeCloseTo(1, 4);
  });

  const cycles: Array<[string, EnergeticSpanInput]> = [
    ["three steps, exergonic", { intermediates: kJ([0, -20, 10]), transitionStates: kJ([60, 50, 90]), reactionEnergy: -40e3, T }],
    ["two steps, TDTS first", { intermediates: kJ([0, -60]), transitionStates: kJ([80, 40]), reactionEnergy: -30e3, T }],
    ["four steps, mildly exergonic, 350 K", { intermediates: kJ([0, 12, -8, 4]), transitionStates: kJ([55, 62, 48, 70]), reactionEnergy: -5e3, T: 350 }],
    ["one step", { intermediates: [0], transitionStates: [75e3], reactionEnergy: -20e3, T }],
    ["endergonic cycle runs backwards", { intermediates: kJ([0, -10]), transitionStates: kJ([50, 60]), reactionEnergy: 15e3, T }],
  ];

  it.each(cycles)("exact TOF equals the steady state of the cycle's rate equations: %s", (_name, input) => {
    const r = get(energeticSpan(input));
    const ss = steadyStateTof(input);
    expect(Math.sign(r.tof)).toBe(Math.sign(ss));
    expect(r.tof / ss).toBeCloseTo(1, 9);
  });

  it.each(cycles.slice(0, 3))("degrees of TOF control equal −RT ∂ln TOF/∂T_i and RT ∂ln TOF/∂I_j of the steady state: %s", (_name, input) => {
    const r = get(energeticSpan(input));
    const RT = R_GAS * input.T;
    const h = 1; // J/mol
    const lnTof = (inp: EnergeticSpanInput) => Math.log(steadyStateTof(inp));
    input.transitionStates.forEach((_, i) => {
      const up = { ...input, transitionStates: input.transitionStates.map((v, q) => (q === i ? v + h : v)) };
      const dn = { ...input, transitionStates: input.transitionStates.map((v, q) => (q === i ? v - h : v)) };
      expect(-RT * (lnTof(up) - lnTof(dn)) / (2 * h)).toBeCloseTo(r.controlTS[i], 5);
    });
    // moving I_0 moves the zero of the turnover too; keep ΔG_r fixed, as the model does
    input.intermediates.forEach((_, j) => {
      const up = { ...input, intermediates: input.intermediates.map((v, q) => (q === j ? v + h : v)) };
      const dn = { ...input, intermediates: input.intermediates.map((v, q) => (q === j ? v - h : v)) };
      expect((RT * (lnTof(up) - lnTof(dn))) / (2 * h)).toBeCloseTo(r.controlI[j], 5);
    });
    expect(r.controlTS.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 12);
    expect(r.controlI.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 12);
  });

  it("ΔG_r = 0 gives zero TOF with a warning; bad input is a typed error", () => {
    const r = get(energeticSpan({ intermediates: [0, -5e3], transitionStates: [50e3, 60e3], reactionEnergy: 0, T }));
    expect(r.tof).toBe(0);
    expect(r.warning).toMatch(/no driving force/);
    const e1 = energeticSpan({ intermediates: [0, 1], transitionStates: [50e3], reactionEnergy: -1e3, T });
    expect(!e1.ok && e1.error.code).toBe("CYCLE_SHAPE");
    const e2 = energeticSpan({ intermediates: [0], transitionStates: [Number.NaN], reactionEnergy: -1e3, T });
    expect(!e2.ok && e2.error.path).toBe("transitionStates[0]");
    const e3 = energeticSpan({ intermediates: [], transitionStates: [], reactionEnergy: -1e3, T });
    expect(!e3.ok && e3.error.code).toBe("EMPTY_CYCLE");
    const e4 = energeticSpan({ intermediates: [0], transitionStates: [50e3], reactionEnergy: -1e3, T: 0 });
    expect(!e4.ok && e4.error.code).toBe("TEMPERATURE");
  });

  it("spans of hundreds of kJ/mol neither overflow nor underflow", () => {
    const r = get(energeticSpan({ intermediates: kJ([0, -300]), transitionStates: kJ([400, 100]), reactionEnergy: -500e3, T }));
    expect(Number.isFinite(r.tof) && r.tof > 0).toBe(true);
    expect(r.span).toBeCloseTo(400e3, 3);
  });
});
