/**
 * A step's barrier as entered, in words and units for the screens (never the document's field
 * names): "ΔG‡ 92.1 kJ/mol at 298.15 K, standard state 1 mol/L". Pure.
 */
import type { DocumentBarrier } from "../../solver/exchange-format";
import { standardStateText, unitText } from "./units-text";

/** Rows [what, value with unit] of a barrier. */
export function barrierRows(b: DocumentBarrier): Array<[string, string]> {
  const e = (v: number | undefined, u: string | undefined) => (v === undefined ? null : `${v} ${unitText(u ?? "")}`.trim());
  const rows: Array<[string, string | null]> = [];
  const rate = (r: { concentration: string; time: string }) => `in ${unitText(r.concentration)} and ${r.time} (order from the molecularity)`;
  switch (b.form) {
    case "dG":
      rows.push(["ΔG‡", e(b.dG, b.unit)], ["at T", `${b.T} K`], ["ΔH‡", e(b.dH, b.unit)], ["standard state", standardStateText(b.standardState)]);
      break;
    case "dHdS":
      rows.push(["ΔH‡", e(b.dH, b.unit)], ["ΔS‡", e(b.dS, b.entropyUnit)], ["standard state", standardStateText(b.standardState)]);
      break;
    case "thermal":
      rows.push(["Ea", e(b.Ea, b.unit)], ["ΔS‡", e(b.dS, b.entropyUnit)], ["Δn‡", String(b.dn)], ["Ea and ΔS‡ at T", `${b.T ?? 298.15} K`], ["standard state", standardStateText(b.standardState)]);
      break;
    case "arrhenius":
      rows.push(["A", `${b.A} ${rate(b.rateUnit)}`], ["Ea", e(b.Ea, b.unit)], ["n", b.n === undefined ? null : String(b.n)], ["T₀ of (T/T₀)ⁿ", b.T === undefined ? null : `${b.T} K`]);
      break;
    case "measured":
      rows.push(["k", `${b.k} ${rate(b.rateUnit)}`], ["at T", `${b.T} K`], ["Ea", e(b.Ea, b.unit)]);
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
