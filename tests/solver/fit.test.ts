/**
 * Fitting barriers to concentration–time data.
 * Sources: data generated from known barriers through the analytic first-order solution
 * A(t) = A₀·exp(−kt) and the Bateman solution for A → B → C (H. Bateman, Proc. Cambridge
 * Philos. Soc. 15, 423 (1910)) with seeded Gaussian noise; the fit must recover the known
 * barriers within their standard errors. Cross-check: the npm package ml-levenberg-marquardt
 * fitted to the same data with the analytic model. Eyring k ∝ exp(−ΔG‡/RT) (textbook) for the
 * barrier-shift relation of every barrier form.
 */
import { describe, expect, it } from "vitest";
import { levenbergMarquardt } from "ml-levenberg-marquardt";
import { R_GAS } from "../../solver/constants.ts";
import { reverseRateConstant } from "../../solver/detailed-balance.ts";
import { fitBarriers, shiftBarrier, type FitExperiment } from "../../solver/fit.ts";
import { compileMechanism } from "../../solver/model.ts";
import { rateConstant } from "../../solver/rates.ts";
import { buildMechanism } from "../../solver/step-rates.ts";
import type { Barrier, Result, StepKinetics } from "../../solver/types.ts";

function get<T>(r: Result<T>): T {
  if (!r.ok) throw new Error(`${r.error.code}: ${r.error.message} (${r.error.path})`);
  return r.value;
}
function normals(seed: number): () => number {
  let s = seed >>> 0;
  const u = () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) + 0.5) / 4294967296;
  return () => Math.sqrt(-2 * Math.log(u())) * Math.cos(2 * Math.PI * u());
}
const T = 298.15;
const times = Array.from({ length: 25 }, (_, i) => 10 * (i + 1)); // s

describe("fitBarriers", () => {
  it("A → B: recovers a known barrier shift from noisy data within its SE, and agrees with ml-levenberg-marquardt", () => {
    const m = get(compileMechanism({ species: [{ id: "A" }, { id: "B" }], reactions: [{ id: "r", reactants: [{ species: "A", coef: 1 }], products: [{ species: "B", coef: 1 }], reversible: false }] }));
    const kGuess = 0.02; // s⁻¹
    const trueShift = 2500; // J/mol: true k = kGuess·exp(−2500/RT) ≈ 0.00729 s⁻¹
    const kTrue = kGuess * Math.exp(-trueShift / (R_GAS * T));
    const z = normals(11);
    const sigma = 0.005;
    const values = times.map((t) => Math.exp(-kTrue * t) + sigma * z());
    const exps: FitExperiment[] = [{ temperature: { kind: "isothermal", T }, initial: { A: 1 }, observations: [{ species: "A", times, values }] }];
    const fit = get(fitBarriers(m, [{ kf: () => kGuess }], exps, [{ stepId: "r" }]));
    const p = fit.parameters[0];
    expect(fit.converged).toBe(true);
    expect(Math.abs(p.shift - trueShift)).toBeLessThan(2 * p.se);
    expect(p.se).toBeGreaterThan(5);
    expect(p.se).toBeLessThan(200);
    expect(fit.ssr).toBeLessThan(fit.ssrInitial);
    expect(fit.residuals[0][0].length).toBe(times.length);
    // s² ≈ σ²: the residual scatter is the noise we added
    expect(Math.sqrt(fit.ssr / fit.dof) / sigma).toBeGreaterThan(0.6);
    expect(Math.sqrt(fit.ssr / fit.dof) / sigma).toBeLessThan(1.4);

    // the same least-squares problem solved by ml-levenberg-marquardt on the analytic model
    const lm = levenbergMarquardt(
      { x: times, y: values },
      ([d]) => (t) => Math.exp(-kGuess * Math.exp(-d / (R_GAS * T)) * t),
      { initialValues: [0], damping: 1e-2, gradientDifference: 1, maxIterations: 500, errorTolerance: 1e-14 },
    );
    expect(Math.abs(lm.parameterValues[0] - p.shift)).toBeLessThan(0.05 * p.se);
  });

  it("A → B → C at two temperatures: recovers both barriers of a barrier-form mechanism", () => {
    const steps = (dG1: number, dG2: number): StepKinetics[] => [
      { id: "s1", reactants: [{ species: "A", coef: 1 }], products: [{ species: "B", coef: 1 }], reversible: false, barrier: { form: "dHdS", dH: dG1 + 298.15 * 20, dS: 20, standardState: "1M" } },
      { id: "s2", reactants: [{ species: "B", coef: 1 }], products: [{ species: "C", coef: 1 }], reversible: false, barrier: { form: "dHdS", dH: dG2 + 298.15 * 20, dS: 20, standardState: "1M" } },
    ];
    const species = [{ id: "A" }, { id: "B" }, { id: "C" }];
    const truth = get(buildMechanism(species, steps(88e3, 90e3)));
    const guess = get(buildMechanism(species, steps(86e3, 91e3)));
    const z = normals(5);
    const sigma = 0.004;
    const exps: FitExperiment[] = [298.15, 318.15].map((TK) => {
      const k1 = truth.rateConstants[0].kf(TK), k2 = truth.rateConstants[1].kf(TK);
      const ts = Array.from({ length: 30 }, (_, i) => ((i + 1) * 4) / (k1 + k2) / 10);
      const A = ts.map((t) => Math.exp(-k1 * t));
      const B = ts.map((t) => (k1 / (k2 - k1)) * (Math.exp(-k1 * t) - Math.exp(-k2 * t)));
      return {
        id: `${TK} K`,
        temperature: { kind: "isothermal" as const, T: TK },
        initial: { A: 1 },
        observations: [
          { species: "A", times: ts, values: A.map((v) => v + sigma * z()) },
          { species: "B", times: ts, values: B.map((v) => v + sigma * z()) },
        ],
      };
    });
    const fit = get(fitBarriers(guess.model, guess.rateConstants, exps, [{ stepId: "s1" }, { stepId: "s2" }]));
    const [p1, p2] = fit.parameters;
    expect(Math.abs(p1.shift - 2000)).toBeLessThan(3 * p1.se);
    expect(Math.abs(p2.shift + 1000)).toBeLessThan(3 * p2.se);
    expect(p1.se).toBeLessThan(100);
    expect(fit.correlation[0][0]).toBeCloseTo(1, 12);
    // written back into the steps, the fitted barriers are the true ones within SE
    const fitted = get(shiftBarrier(steps(86e3, 91e3)[0], p1.shift));
    const dHfit = (fitted.barrier as { dH: number }).dH;
    expect(Math.abs(dHfit - (88e3 + 298.15 * 20))).toBeLessThan(3 * p1.se);
  });

  it("bad requests are typed errors", () => {
    const m = get(compileMechanism({ species: [{ id: "A" }, { id: "B" }], reactions: [{ id: "r", reactants: [{ species: "A", coef: 1 }], products: [{ species: "B", coef: 1 }], reversible: false }] }));
    const ex: FitExperiment = { temperature: { kind: "isothermal", T }, initial: { A: 1 }, observations: [{ species: "A", times: [1, 2, 3], values: [0.9, 0.8, 0.7] }] };
    const code = (r: Result<unknown>) => (r.ok ? "ok" : r.error.code);
    expect(code(fitBarriers(m, [{ kf: () => 0.1 }], [ex], [{ stepId: "x" }]))).toBe("UNKNOWN_STEP");
    expect(code(fitBarriers(m, [{ kf: () => 0.1 }], [ex], []))).toBe("EMPTY_INPUT");
    expect(code(fitBarriers(m, [{ kf: () => 0.1 }], [{ ...ex, observations: [{ species: "Q", times: [1], values: [1] }] }], [{ stepId: "r" }]))).toBe("UNKNOWN_SPECIES");
    expect(code(fitBarriers(m, [{ kf: () => 0.1 }], [{ ...ex, observations: [{ species: "A", times: [1, 2], values: [1] }] }], [{ stepId: "r" }]))).toBe("BAD_DATA");
    expect(code(fitBarriers(m, [{ kf: () => 0.1 }], [{ ...ex, observations: [{ species: "A", times: [1], values: [1] }] }], [{ stepId: "r" }]))).toBe("TOO_FEW_POINTS");
    expect(code(fitBarriers(m, [{ kf: () => 0.1 }], [ex], [{ stepId: "r", lower: 5, upper: 1 }]))).toBe("BAD_BOUNDS");
    const ac = new AbortController();
    ac.abort();
    expect(code(fitBarriers(m, [{ kf: () => 0.1 }], [ex], [{ stepId: "r" }], { signal: ac.signal }))).toBe("CANCELLED");
  });
});

describe("shiftBarrier", () => {
  const forms: Barrier[] = [
    { form: "dG", dG: 80e3, Tref: 298.15, standardState: "1M" },
    { form: "dG", dG: 80e3, dH: 70e3, Tref: 298.15, standardState: "1bar" },
    { form: "dHdS", dH: 70e3, dS: -30, standardState: "1M" },
    { form: "thermal", Ea: 75e3, dS: -30, dn: 0, standardState: "1M", Tref: 298.15 },
    { form: "arrhenius", A: 1e12, Ea: 75e3, n: 0.5, Tref: 298 },
    { form: "measured", k: 3e-3, T: 310 },
    { form: "measured", k: 3e-3, T: 310, Ea: 60e3 },
  ];
  it("multiplies k (and k_rev) by exp(−δ/RT) at every temperature, in every barrier form", () => {
    const delta = 4200;
    for (const barrier of forms) {
      const step: StepKinetics = { id: "s", reactants: [{ species: "A", coef: 1 }], products: [{ species: "B", coef: 1 }], reversible: true, barrier, thermo: { form: "dG", dG: -5e3, Tref: 298.15, standardState: "1M" } };
      const shifted = get(shiftBarrier(step, delta));
      for (const TK of [310, 350]) {
        const ratio = get(rateConstant(shifted, TK)).k / get(rateConstant(step, TK)).k;
        expect(ratio / Math.exp(-delta / (R_GAS * TK))).toBeCloseTo(1, 10);
        const rr = get(reverseRateConstant(shifted, TK)).kRev / get(reverseRateConstant(step, TK)).kRev;
        expect(rr / Math.exp(-delta / (R_GAS * TK))).toBeCloseTo(1, 10);
      }
    }
  });
});
