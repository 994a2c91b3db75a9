/** Number formatting for the library pages: significant figures, units beside numbers. */
import { ENERGY_FACTORS, ENTROPY_FACTORS, type EnergyUnit, type EntropyUnit } from "../../../solver/units";
import { formatNumber } from "../format";
import { unitText } from "../units-text";

export const ENERGY_CHOICES: Array<{ id: EnergyUnit; label: string }> = [
  { id: "kJ/mol", label: "kJ/mol" },
  { id: "kcal/mol", label: "kcal/mol" },
  { id: "eV", label: "eV" },
];
export const ENTROPY_CHOICES: Array<{ id: EntropyUnit; label: string }> = [
  { id: "J/(mol K)", label: unitText("J/(mol K)") },
  { id: "cal/(mol K)", label: unitText("cal/(mol K)") },
];

/** Significant figures in the one number format of every page (../format.ts). */
export const sig = formatNumber;

/** J/mol → display unit. */
export const energyIn = (jPerMol: number | null | undefined, unit: EnergyUnit) => (jPerMol == null ? null : jPerMol / ENERGY_FACTORS[unit]);
export const entropyIn = (si: number | null | undefined, unit: EntropyUnit) => (si == null ? null : si / ENTROPY_FACTORS[unit]);
export const unitLabel = unitText;

/** K → display, with the unit. */
export function temperatureText(K: number | null | undefined, unit: "K" | "C" = "K"): string {
  if (K == null) return "—";
  return unit === "C" ? `${sig(K - 273.15, 5)} °C` : `${sig(K, 5)} K`;
}
