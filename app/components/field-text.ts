/**
 * The fields of a step document as a kineticist reads them, for the lists of changes between
 * versions: "barrier.dG" → "ΔG‡", "reactants[1].species" → "reactant 2", with values in the
 * screens' spelling (species by name, units and standard states as written, one number format).
 * Pure.
 */
import { formatNumber } from "./format";
import { standardStateText, unitText } from "./units-text";

const FIELDS: Record<string, string> = {
  label: "label",
  status: "status",
  reversible: "reversible",
  kappa: "κ",
  reportStandardState: "standard state of derived values",
  "barrier.form": "barrier form",
  "barrier.dG": "ΔG‡",
  "barrier.dH": "ΔH‡",
  "barrier.dS": "ΔS‡",
  "barrier.Ea": "Ea",
  "barrier.A": "A",
  "barrier.k": "k",
  "barrier.n": "n",
  "barrier.dn": "Δn‡",
  "barrier.T": "reference temperature (K)",
  "barrier.unit": "energy unit",
  "barrier.entropyUnit": "entropy unit",
  "barrier.standardState": "standard state",
  "barrier.rateUnit.concentration": "concentration unit of A or k",
  "barrier.rateUnit.time": "time unit of A or k",
  "reactionThermo.form": "reaction thermochemistry",
  "reactionThermo.dG": "ΔG°rxn",
  "reactionThermo.dH": "ΔH°rxn",
  "reactionThermo.dS": "ΔS°rxn",
  "reactionThermo.T": "reference temperature of ΔG°rxn (K)",
  "reactionThermo.unit": "energy unit of the reaction",
  "reactionThermo.entropyUnit": "entropy unit of the reaction",
  "reactionThermo.standardState": "standard state of the reaction",
  "imaginaryFrequency.value": "|ν‡| (cm⁻¹)",
  "imaginaryFrequency.unit": "unit of |ν‡|",
  "validRange.Tmin": "valid from (K)",
  "validRange.Tmax": "valid to (K)",
  "uncertainty.value": "uncertainty",
  "uncertainty.unit": "unit of the uncertainty",
};

/** A field path of a step document in words. */
export function fieldText(path: string): string {
  if (FIELDS[path]) return FIELDS[path];
  const term = /^(reactants|products)\[(\d+)\]\.(species|coef)$/.exec(path);
  if (term) return `${term[1] === "reactants" ? "reactant" : "product"} ${Number(term[2]) + 1}${term[3] === "coef" ? " coefficient" : ""}`;
  const prov = /^provenance\.(\w+)$/.exec(path);
  if (prov) return `provenance: ${prov[1] === "doi" ? "DOI" : prov[1]}`;
  const tag = /^tags\[(\d+)\]$/.exec(path);
  if (tag) return `tag ${Number(tag[1]) + 1}`;
  return path;
}

/** A field's value as shown: species by name, units and standard states as written, numbers in the one format. */
export function fieldValueText(path: string, value: unknown, speciesName: (key: string) => string = (k) => k): string {
  if (value === null || value === undefined) return "—";
  if (typeof value === "number") return formatNumber(value, 6);
  if (typeof value === "boolean") return value ? "yes" : "no";
  const v = String(value);
  if (/\.species$/.test(path)) return speciesName(v);
  if (/standardState$/i.test(path)) return standardStateText(v);
  if (/(unit|Unit|concentration)$/.test(path)) return unitText(v);
  return v;
}
