/**
 * A step's barrier as entered, in words and units for the screens (never the document's field
 * names): "ΔG‡ 92.1 kJ/mol at 298.15 K, standard state 1 mol/L". Pure.
 */
import type { DocumentBarrier, DocumentReactionThermo } from "../../solver/exchange-format";
import { standardStateText, unitText } from "./units-text";
import { formatNumber } from "./format";

/** Rows [what, value with unit] of a barrier. */
export function barrierRows(b: DocumentBarrier): Array<[string, string]> {
  const e = (v: number | undefined, u: string | undefined) => (v === undefined ? null : `${v} ${unitText(u ?? "")}`.trim());
  const rows: Array<[string, string | null]> = [];
  const rate = (r: { concentration: string; time: string }) => `in ${unitText(r.concentration)} and ${r.time} (order from the molecularity)`;
  switch (b.form) {
    case "dG":
      rows.push(["ΔG‡", e(b.dG, b.unit)], ["reference temperature", `${b.T} K`], ["ΔH‡", e(b.dH, b.unit)], ["standard state", standardStateText(b.standardState)]);
      break;
    case "dHdS":
      rows.push(["ΔH‡", e(b.dH, b.unit)], ["ΔS‡", e(b.dS, b.entropyUnit)], ["standard state", standardStateText(b.standardState)]);
      break;
    case "thermal":
      rows.push(["Ea", e(b.Ea, b.unit)], ["ΔS‡", e(b.dS, b.entropyUnit)], ["Δn‡", String(b.dn)], ["reference temperature of Ea and ΔS‡", `${b.T} K`], ["standard state", standardStateText(b.standardState)]);
      break;
    case "arrhenius":
      rows.push(["A", `${b.A} ${rate(b.rateUnit)}`], ["Ea", e(b.Ea, b.unit)], ["n", b.n === undefined ? null : String(b.n)], ["reference temperature T₀ of (T/T₀)ⁿ", b.T === undefined ? null : `${b.T} K`]);
      break;
    case "measured":
      rows.push(["k", `${b.k} ${rate(b.rateUnit)}`], ["reference temperature (k measured at)", `${b.T} K`], ["Ea", e(b.Ea, b.unit)]);
      break;
  }
  return rows.filter((r): r is [string, string] => r[1] !== null);
}

/** The barrier on one line: "ΔG‡ 92.1 kJ/mol, at T 298.15 K, standard state 1 mol/L". */
export function describeBarrier(b: DocumentBarrier): string {
  return barrierRows(b)
    .map(([k, v]) => `${k} ${v}`)
    .join(", ");
}

/** A step's reaction thermochemistry on one line: "ΔG°rxn −45 kJ/mol at 298.15 K, standard state 1 mol/L". */
export function describeThermo(t: DocumentReactionThermo): string {
  const e = (v: number, u: string) => `${v} ${unitText(u)}`;
  const ss = `standard state ${standardStateText(t.standardState)}`;
  if (t.form === "dG") return [`ΔG°rxn ${e(t.dG, t.unit)} at ${t.T} K`, t.dH === undefined ? null : `ΔH°rxn ${e(t.dH, t.unit)}`, ss].filter(Boolean).join(", ");
  return `ΔH°rxn ${e(t.dH, t.unit)}, ΔS°rxn ${e(t.dS, t.entropyUnit)}, ${ss}`;
}

/** How far (K) from its reference temperature a thermal-form barrier may be used before the screens warn. */
export const THERMAL_REFERENCE_SPAN_K = 50;

/**
 * A warning when a thermal-form barrier (Ea and ΔS‡ determined at a reference temperature) is
 * used more than 50 K from that temperature, where taking ΔH‡ and ΔS‡ as constant is a
 * growing extrapolation; null otherwise. T in K.
 */
export function thermalReferenceWarning(b: DocumentBarrier, T: number): string | null {
  if (b.form !== "thermal") return null;
  const Tref = b.T;
  if (!(Math.abs(T - Tref) > THERMAL_REFERENCE_SPAN_K)) return null;
  return `Ea and ΔS‡ refer to ${formatNumber(Tref, 5)} K; at ${formatNumber(T, 5)} K, ${formatNumber(Math.abs(T - Tref), 3)} K away, ΔH‡ and ΔS‡ are taken as constant, which is an extrapolation.`;
}
