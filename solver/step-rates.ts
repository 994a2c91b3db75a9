/**
 * The bridge from elementary steps with barriers (types.ts StepKinetics) to a simulation:
 * compiles each step's forward law and, for reversible steps, the reverse law by detailed
 * balance, and returns the rate-constant functions k(T) that simulate() consumes, plus the
 * compiled mass-action model.
 *
 * Units: T in K; rate constants in (mol/L)^(1−m)·s⁻¹ with m the molecularity of the side
 * that reacts (reactants forward, products in reverse).
 */
import { compileStep, lnRateCompiled, type RateLaw } from "./barrier-forms.ts";
import { compileThermo, reverseLaw } from "./detailed-balance.ts";
import { fail, ok } from "./input-checks.ts";
import { compileMechanism, type CompiledModel } from "./model.ts";
import type { StepRateFunctions } from "./simulate.ts";
import type { Result, Species, StepKinetics } from "./types.ts";

/** k(T) in (mol/L)^(1−m)·s⁻¹ from a compiled law; overflow gives Infinity, which simulate() refuses. */
function lawFunction(law: RateLaw): (T: number) => number {
  return (T: number) => Math.exp(lnRateCompiled(law, T));
}

/**
 * Rate-constant functions for each step, in step order: kf from the barrier, kr = kf/K_c
 * for reversible steps (needs step.thermo). Errors carry the path "steps[i]…".
 */
export function stepRateFunctions(steps: StepKinetics[]): Result<StepRateFunctions[]> {
  if (!Array.isArray(steps) || steps.length === 0) return fail("EMPTY_INPUT", "The mechanism has no steps.", "steps");
  const out: StepRateFunctions[] = [];
  for (let i = 0; i < steps.length; i++) {
    const path = `steps[${i}]`;
    const fwd = compileStep(steps[i], path);
    if (!fwd.ok) return fwd;
    const fns: StepRateFunctions = { kf: lawFunction(fwd.value) };
    if (steps[i].reversible) {
      const th = compileThermo(steps[i], path);
      if (!th.ok) return th;
      fns.kr = lawFunction(reverseLaw(fwd.value, th.value));
    }
    out.push(fns);
  }
  return ok(out);
}

export interface KineticMechanism {
  model: CompiledModel;
  /** In step order, as simulate() expects them. */
  rateConstants: StepRateFunctions[];
}

/**
 * Compile species and steps into a mass-action model with rate-constant functions.
 * Errors from the stoichiometry carry "reactions[i]…" paths, errors from barriers "steps[i]…".
 */
export function buildMechanism(species: Species[], steps: StepKinetics[]): Result<KineticMechanism> {
  const model = compileMechanism({ species, reactions: steps });
  if (!model.ok) return model;
  const rates = stepRateFunctions(steps);
  if (!rates.ok) return rates;
  return ok({ model: model.value, rateConstants: rates.value });
}
