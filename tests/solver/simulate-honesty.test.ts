/**
 * Honest answers on hard transients: an autocatalytic ignition from a seed below the tolerance
 * is followed, not stepped over; no concentration below zero is handed out (steps that would go
 * below −atol are rejected, smaller undershoots clipped); a run that cannot meet its tolerance
 * stops with a typed error instead of returning numbers.
 *
 * Reference: A + B → 2A has d[A]/dt = k[A][B] with [A] + [B] = N constant, the logistic
 * equation, [A](t) = N·A₀·e^(kNt)/(N − A₀ + A₀·e^(kNt)) (textbook autocatalysis, e.g. Atkins,
 * "autocatalysis").
 */
import { describe, expect, it } from "vitest";
import { compileMechanism } from "../../solver/model.ts";
import { simulate, type SimulateOptions } from "../../solver/simulate.ts";
import { integrateBDF } from "../../solver/bdf.ts";
import { integrateStiff } from "../../solver/rosenbrock.ts";
import type { OdeProblem } from "../../solver/ode-problem.ts";

const K = 1e6; // L mol⁻¹ s⁻¹
const A0 = 1e-9; // mol/L, a seed below usual absolute tolerances
const N = 1 + A0;
const logistic = (t: number) => {
  const x = K * N * t;
  if (x > 700) return N;
  const e = Math.exp(x);
  return (N * A0 * e) / (N - A0 + A0 * e);
};

const compiled = compileMechanism({
  species: [{ id: "A" }, { id: "B" }],
  reactions: [{ id: "ignition", reactants: [{ species: "A", coef: 1 }, { species: "B", coef: 1 }], products: [{ species: "A", coef: 2 }], reversible: false }],
});
if (!compiled.ok) throw new Error(compiled.error.message);
const model = compiled.value;
// the front passes t ≈ ln(1e9)/(k·N) ≈ 2.1e-5 s
const TIMES = [0, 1e-5, 2e-5, 2.1e-5, 2.5e-5, 4e-5, 1e-3, 10];

function run(over: Partial<SimulateOptions>) {
  return simulate(model, { rateConstants: [{ kf: () => K }], temperature: { kind: "isothermal", T: 300 }, initial: { A: A0, B: 1 }, tEnd: 10, grid: { kind: "times", times: TIMES }, ...over });
}

describe("autocatalytic ignition from a seed below atol", () => {
  for (const stiffMethod of ["rosenbrock", "bdf"] as const) {
    it(`${stiffMethod}: ignites and ends at [A] = N (it used to step over the seed and return [A] ≈ 0)`, () => {
      const r = run({ stiffMethod, rtol: 1e-6, atol: 1e-10 });
      if (!r.ok) throw new Error(r.error.message);
      const A = r.value.conc[0];
      expect(Math.abs(A[A.length - 1] - N)).toBeLessThan(1e-6);
      // along the front (where a time shift of the steep rise shows as a large absolute error)
      const worst = Math.max(...TIMES.map((t, i) => Math.abs(A[i] - logistic(t))));
      // measured: RODAS4 4.5e-4, BDF 6.0e-2 mol/L at the steepest output time
      expect(worst).toBeLessThan(stiffMethod === "rosenbrock" ? 2e-3 : 0.1);
    });
  }

  it("no output concentration is negative or NaN, at loose and tight tolerances", () => {
    for (const stiffMethod of ["rosenbrock", "bdf"] as const) {
      for (const [rtol, atol] of [[1e-3, 1e-3], [1e-6, 1e-10], [1e-10, 1e-16]]) {
        const r = run({ stiffMethod, rtol, atol, grid: { kind: "linear", points: 2001 }, tEnd: 1e-4 });
        if (!r.ok) throw new Error(r.error.message);
        for (const c of r.value.conc) for (const v of c) expect(v >= 0 && Number.isFinite(v)).toBe(true);
      }
    }
  });

  it("a relative tolerance double precision cannot honour is refused with a typed error", () => {
    for (const rtol of [1e-17, 0, Number.NaN, 0.5]) {
      const r = run({ rtol });
      expect(r.ok).toBe(false);
      if (!r.ok) {
        expect(r.error.code).toBe("BAD_TOLERANCE");
        expect(r.error.path).toBe("rtol");
      }
    }
  });
});

describe("a run that cannot meet its tolerance says so", () => {
  // y' = +1 below 0.5 and −1 above: the solution sticks at 0.5 and no step across the switch
  // passes a tight error test, so the integrators cannot get past t = 0.5.
  const chattering: OdeProblem = { n: 1, autonomous: true, rhs: (_t, y, f) => void (f[0] = y[0] < 0.5 ? 1 : -1) };
  for (const [name, integrate] of [["RODAS4", integrateStiff], ["BDF", integrateBDF]] as const) {
    it(`${name} stops with a typed error and the results up to where it got`, () => {
      const r = integrate(chattering, 0, [0], 2, { rtol: 1e-10, atol: 1e-12, maxSteps: 20000 });
      expect(r.ok).toBe(false);
      if (r.ok) return;
      expect(["BUDGET_STEPS", "STEP_SIZE_UNDERFLOW"]).toContain(r.error.code);
      expect(r.error.message).toMatch(/t = 0\.5/);
      expect(r.error.partial?.tReached).toBeLessThan(0.51);
    });
  }
});
