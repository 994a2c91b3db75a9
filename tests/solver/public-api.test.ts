/**
 * The public entry solver/index.ts end to end: a step given as ΔG‡ = 20 kcal/mol at 298.15 K
 * (k = 1.359e-2 s⁻¹ by Eyring–Polanyi with CODATA 2018 constants, the worked value of the
 * rate-constant tests) simulated to its half-life ln 2/k (first-order kinetics, textbook).
 */
import { describe, expect, it } from "vitest";
import * as solver from "../../solver/index.ts";

describe("solver public API", () => {
  it("builds, simulates and analyses a mechanism from barrier-form steps", () => {
    const steps: solver.StepKinetics[] = [
      { id: "iso", reactants: [{ species: "A", coef: 1 }], products: [{ species: "B", coef: 1 }], reversible: false, barrier: { form: "dG", dG: 20 * 4184, Tref: 298.15, standardState: "1M" } },
    ];
    const mech = solver.buildMechanism([{ id: "A" }, { id: "B" }], steps);
    expect(mech.ok).toBe(true);
    if (!mech.ok) return;
    const k = mech.value.rateConstants[0].kf(298.15);
    expect(k).toBeCloseTo(1.359e-2, 5);
    const options: solver.SimulateOptions = { rateConstants: mech.value.rateConstants, temperature: { kind: "isothermal", T: 298.15 }, initial: { A: 1 }, tEnd: 600 };
    const t = solver.halfLife(mech.value.model, options, "A");
    expect(t.ok && t.value! / (Math.LN2 / k)).toBeCloseTo(1, 6);
    const conv = solver.convertBarrier(steps[0], 298.15);
    expect(conv.ok && conv.value.eaRelation).toBe("Ea = ΔH‡ + RT");
  });

  it("a reversible step without thermochemistry is a typed error, not a throw", () => {
    const r = solver.buildMechanism([{ id: "A" }, { id: "B" }], [
      { id: "r", reactants: [{ species: "A", coef: 1 }], products: [{ species: "B", coef: 1 }], reversible: true, barrier: { form: "dG", dG: 80e3, Tref: 298.15, standardState: "1M" } },
    ]);
    expect(!r.ok && r.error.code).toBe("MISSING_THERMO");
  });
});
