/** Small mechanism documents and ensemble requests for the ensemble tests (illustrative values). */
import type { EnsembleSpec } from "../../app/ensembles/ensemble-spec";
import { EnsembleSpecSchema } from "../../app/ensembles/ensemble-spec";
import { validateMechanismDocument, type MechanismDocument } from "../../solver/exchange-format";

type Step = Record<string, unknown>;

export function documentOf(steps: Step[], species = ["A", "B", "C"]): MechanismDocument {
  const v = validateMechanismDocument({ format: "saddlebook.mechanism", version: 1, about: { name: "ensemble check", illustrative: true }, species: species.map((id) => ({ id })), steps });
  if (!v.ok) throw new Error(v.error.message);
  return v.value;
}

/** A → B with ΔG‡ = dG kJ/mol (T-independent reference at 298.15 K), σ and method as given. */
export function firstOrderStep(id: string, from: string, to: string, dG: number, extra: Step = {}): Step {
  return {
    id,
    reactants: [{ species: from, coef: 1 }],
    products: [{ species: to, coef: 1 }],
    reversible: false,
    barrier: { form: "dG", dG, unit: "kJ/mol", T: 298.15, standardState: "1M" },
    ...extra,
  };
}

export function specOf(s: Partial<Record<keyof EnsembleSpec, unknown>>): EnsembleSpec {
  return EnsembleSpecSchema.parse({
    mechanismId: 1,
    conditions: { temperature: { value: 298.15, unit: "K" }, initial: { A: { value: 1, unit: "mol/L" } }, endTime: { value: 20, unit: "s" } },
    solver: { rtol: 1e-9, atol: 1e-14 },
    mode: "uncertainty",
    observables: { reactant: "A", products: ["B"], times: [{ value: 10, unit: "s" }] },
    ...s,
  });
}
