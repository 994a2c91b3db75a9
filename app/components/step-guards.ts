/**
 * Chemistry guards shared by every step form (library editor, mechanism editor, workbench):
 * a barrier below zero or a rate constant above the transition-state ceiling k_BT/h warns, and
 * the element and charge balance of a step whose species are chosen by key is checked from
 * their formulas (../library/balance.ts). Warnings inform; they never block a save, so sources,
 * sinks and lumped steps stay possible. Pure.
 *
 * Units: T in K; ΔG‡ in J/mol (1 mol/L standard state); k in (mol/L)^(1−m)·s⁻¹.
 */
import { H_PLANCK, K_B } from "../../solver/constants";
import { balanceOf, type BalanceResult } from "./library/balance";
import { formatNumber } from "./format";

/**
 * k_BT/h in s⁻¹ at T (K): the Eyring rate constant of a barrier of zero with κ = 1, in any
 * molecularity when concentrations are in mol/L and the standard state is 1 mol/L (Eyring–
 * Polanyi, common practice). A larger k means ΔG‡ < 0 or κ > 1.
 */
export function eyringCeiling(T: number): number {
  return (K_B * T) / H_PLANCK;
}

/** One sentence when ΔG‡ (J/mol, 1 mol/L) is negative or k_fwd exceeds k_BT/h at T; null otherwise. */
export function barrierWarning(n: { dG: number | null; kf: number | null; kfUnit?: string }, T: number): string | null {
  const parts: string[] = [];
  if (n.dG !== null && n.dG < 0) parts.push(`ΔG‡ is negative (${formatNumber(n.dG / 1000, 3)} kJ/mol at ${formatNumber(T, 5)} K, 1 mol/L)`);
  const ceiling = eyringCeiling(T);
  if (n.kf !== null && n.kf > ceiling) parts.push(`k_fwd = ${formatNumber(n.kf, 3)}${n.kfUnit ? ` ${n.kfUnit}` : ""} is above k_BT/h = ${formatNumber(ceiling, 3)} ${n.kfUnit || "s⁻¹"}, the transition-state limit (with c° = 1 mol/L for more than one molecule)`);
  if (!parts.length) return null;
  return `${parts.join("; ")}. Check the sign of the barrier, its unit and its standard state.`;
}

/** A species as the local forms know it: name and formula (null when none). */
export interface GuardSpecies {
  label: string;
  formula: string | null | undefined;
}

/**
 * Element and charge balance of terms whose species are given by key; null until both sides
 * have a species. Unknown keys count as species without formula.
 */
export function termsBalance(
  reactants: ReadonlyArray<{ species: string; coef: number }>,
  products: ReadonlyArray<{ species: string; coef: number }>,
  speciesOf: (key: string) => GuardSpecies | undefined,
): BalanceResult | null {
  const side = (ts: ReadonlyArray<{ species: string; coef: number }>) =>
    ts.filter((t) => t.species).map((t) => ({ species: speciesOf(t.species) ?? { label: t.species, formula: null }, coef: t.coef }));
  const r = side(reactants);
  const p = side(products);
  return r.length && p.length ? balanceOf(r, p) : null;
}
