/**
 * Helpers the solver tests share to write small mechanisms and run them.
 * Units: concentrations mol/L, time s, temperature K, rate constants (mol/L)^(1−m) s⁻¹.
 */
import { compileMechanism, type MechanismInput } from "../../solver/model.ts";
import { simulate, type SimulateOptions } from "../../solver/simulate.ts";

/** Species list from ids. */
export const sp = (...ids: string[]) => ids.map((id) => ({ id }));

/** One elementary step from [species, coefficient] pairs. */
export const rx = (id: string, r: [string, number][], p: [string, number][], reversible = false) => ({
  id,
  reactants: r.map(([species, coef]) => ({ species, coef })),
  products: p.map(([species, coef]) => ({ species, coef })),
  reversible,
});

/** A rate constant that does not depend on temperature. */
export const k = (v: number) => () => v;

/** Compiles a mechanism; throws on an error (tests only). */
export function model(m: MechanismInput) {
  const r = compileMechanism(m);
  if (!r.ok) throw new Error(r.error.message);
  return r.value;
}

export type RunOptions = Partial<SimulateOptions> & Pick<SimulateOptions, "rateConstants" | "initial" | "tEnd">;

/**
 * A simulate() that throws on an error, with `defaults` under the caller's options and, below
 * them, isothermal 298.15 K, rtol 1e-9 and atol 1e-14 mol/L.
 */
export function runWith(defaults: Partial<SimulateOptions> = {}) {
  return (m: ReturnType<typeof model>, o: RunOptions) => {
    const r = simulate(m, { temperature: { kind: "isothermal", T: 298.15 }, rtol: 1e-9, atol: 1e-14, ...defaults, ...o });
    if (!r.ok) throw new Error(r.error.message);
    return r.value;
  };
}

/** simulate() with the defaults of runWith and the engine's own choice of integrator. */
export const run = runWith();
