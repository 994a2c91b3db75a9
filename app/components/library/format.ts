/** Number formatting for the library pages: significant figures, units beside numbers. */
import { ENERGY_FACTORS, ENTROPY_FACTORS, type EnergyUnit, type EntropyUnit } from "../../../solver/units";

export const ENERGY_CHOICES: Array<{ id: EnergyUnit; label: string }> = [
  { id: "kJ/mol", label: "kJ/mol" },
  { id: "kcal/mol", label: "kcal/mol" },
  { id: "eV", label: "eV" },
];
export const ENTROPY_CHOICES: Array<{ id: EntropyUnit; label: string }> = [
  { id: "J/(mol K)", label: "J/(mol·K)" },
  { id: "cal/(mol K)", label: "cal/(mol·K)" },
];

export function sig(v: number | null | undefined, digits = 4): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return "—";
  if (v === 0) return "0";
  const a = Math.abs(v);
  if (a >= 1e-3 && a < 1e5) return Number(v.toPrecision(digits)).toString();
  const [m, e] = v.toExponential(digits - 1).split("e");
  return `${Number(m)}×10${superscript(Number(e))}`;
}

const SUP: Record<string, string> = { "-": "⁻", "0": "⁰", "1": "¹", "2": "²", "3": "³", "4": "⁴", "5": "⁵", "6": "⁶", "7": "⁷", "8": "⁸", "9": "⁹" };
export function superscript(n: number): string {
  return String(n)
    .split("")
    .map((c) => SUP[c] ?? c)
    .join("");
}

/** J/mol → display unit. */
export const energyIn = (jPerMol: number | null | undefined, unit: EnergyUnit) => (jPerMol == null ? null : jPerMol / ENERGY_FACTORS[unit]);
export const entropyIn = (si: number | null | undefined, unit: EntropyUnit) => (si == null ? null : si / ENTROPY_FACTORS[unit]);
export const unitLabel = (u: string) => u.replace("(mol K)", "(mol·K)");

/** K → display, with the unit. */
export function temperatureText(K: number | null | undefined, unit: "K" | "C" = "K"): string {
  if (K == null) return "—";
  return unit === "C" ? `${sig(K - 273.15, 5)} °C` : `${sig(K, 5)} K`;
}
