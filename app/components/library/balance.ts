/**
 * Element and charge balance of a step from its species' formulas (solver/formula.ts),
 * as one warning sentence for forms and pages. An unbalanced step is still savable as a
 * draft: the warning informs, it does not block.
 */
import { checkElementBalance } from "../../../solver/formula";

export interface BalanceSpecies {
  label: string;
  formula: string | null | undefined;
}

export interface BalanceResult {
  /** "balanced", "unbalanced" or "unknown" (some formula missing or unreadable). */
  state: "balanced" | "unbalanced" | "unknown";
  message: string;
}

export function balanceOf(reactants: Array<{ species: BalanceSpecies; coef: number }>, products: Array<{ species: BalanceSpecies; coef: number }>): BalanceResult {
  if (reactants.length === 0 || products.length === 0) {
    const what = reactants.length === 0 ? "a zero-order source: matter enters the mechanism" : "a sink: matter leaves the mechanism";
    return { state: "unbalanced", message: `Not balanced by design, ${what}.` };
  }
  const missing = [...reactants, ...products].filter((t) => !t.species.formula).map((t) => t.species.label);
  if (missing.length > 0) {
    return { state: "unknown", message: `Balance not checked: no formula for ${[...new Set(missing)].join(", ")}.` };
  }
  const r = checkElementBalance(
    reactants.map((t) => ({ formula: t.species.formula!, coef: t.coef })),
    products.map((t) => ({ formula: t.species.formula!, coef: t.coef })),
  );
  if (!r.ok) return { state: "unknown", message: `Balance not checked: ${r.error.message}` };
  if (r.value.balanced) return { state: "balanced", message: "Elements and charge balance." };
  const parts = Object.entries(r.value.elementExcess).map(([el, n]) => `${el} ${n > 0 ? "+" : "−"}${Math.abs(n)}`);
  if (r.value.chargeExcess !== 0) parts.push(`charge ${r.value.chargeExcess > 0 ? "+" : "−"}${Math.abs(r.value.chargeExcess)}`);
  return { state: "unbalanced", message: `Not balanced (products − reactants): ${parts.join(", ")}.` };
}
