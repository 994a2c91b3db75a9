/**
 * Seeded random elementary steps with every barrier form, for the rate-constant benchmark
 * and the batch tests. Values are illustrative, not chemistry.
 */
import type { Barrier, StandardState, StepKinetics } from "../solver/types.ts";

export { seededUniform } from "../solver/random.ts";
import { seededUniform } from "../solver/random.ts";

const STATES: StandardState[] = ["1M", "1bar", "1atm"];

/** `count` steps with random molecularity 1–3, random barrier forms, κ and frequencies. */
export function randomSteps(count: number, seed = 12345): StepKinetics[] {
  const u = seededUniform(seed);
  const pick = <T,>(xs: T[]) => xs[Math.floor(u() * xs.length)];
  const steps: StepKinetics[] = [];
  for (let i = 0; i < count; i++) {
    const m = 1 + Math.floor(u() * 3);
    const reactants = m === 1 ? [{ species: "A", coef: 1 }] : m === 2 ? [{ species: "A", coef: 1 }, { species: "B", coef: 1 }] : [{ species: "A", coef: 2 }, { species: "B", coef: 1 }];
    const state = pick(STATES);
    const dH = 40e3 + u() * 80e3;
    const dS = -100 + u() * 120;
    let barrier: Barrier;
    switch (Math.floor(u() * 6)) {
      case 0:
        barrier = { form: "dG", dG: 50e3 + u() * 60e3, Tref: 298.15, standardState: state };
        break;
      case 1:
        barrier = { form: "dG", dG: dH - 298.15 * dS, dH, Tref: 298.15, standardState: state };
        break;
      case 2:
        barrier = { form: "dHdS", dH, dS, standardState: state };
        break;
      case 3:
        barrier = { form: "thermal", Ea: dH + m * 8.314 * 298.15, dS, dn: 1 - m, standardState: state, Tref: 298.15 };
        break;
      case 4:
        barrier = { form: "arrhenius", A: Math.pow(10, 6 + u() * 8), Ea: dH, n: u() < 0.5 ? 0 : u() * 2, Tref: 298 };
        break;
      default:
        barrier = u() < 0.5 ? { form: "measured", k: Math.pow(10, -4 + u() * 8), T: 298.15 } : { form: "measured", k: Math.pow(10, -4 + u() * 8), T: 298.15, Ea: dH };
    }
    const step: StepKinetics = {
      id: `s${i}`,
      reactants,
      products: [{ species: "P", coef: 1 }],
      reversible: false,
      barrier,
    };
    if (u() < 0.3) step.kappa = 0.5 + u();
    if (u() < 0.3) step.imagFreq = 200 + u() * 1500;
    steps.push(step);
  }
  return steps;
}

/** `count` temperatures evenly spaced from lo to hi (K). */
export function temperatureGrid(count: number, lo = 250, hi = 450): Float64Array {
  const T = new Float64Array(count);
  for (let j = 0; j < count; j++) T[j] = count === 1 ? lo : lo + ((hi - lo) * j) / (count - 1);
  return T;
}
