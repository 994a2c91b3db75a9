/**
 * Reactants and products of a local step: any number of rows (up to the format's limits), each a
 * coefficient and a species, with the element and charge balance shown under them as a warning
 * (never a block: sources, sinks and lumped steps stay possible). Used by the mechanism editor and
 * the workbench's "new local step".
 */
import type { BalanceResult } from "./library/balance";

export interface TermDraft {
  /** species key ("" until chosen) */
  species: string;
  /** as typed */
  coef: string;
}
export interface TermsDraft {
  reactants: TermDraft[];
  products: TermDraft[];
}

/** Rows the exchange format allows per side (solver/exchange-format.ts StepSchema). */
export const MAX_TERMS = { reactants: 3, products: 10 } as const;

export const emptyTerms = (): TermsDraft => ({ reactants: [{ species: "", coef: "1" }], products: [{ species: "", coef: "1" }] });

/** Chosen rows as stoichiometric terms; rows with the same species are added up. Coefficients that are not positive numbers stay NaN for the schema to refuse. */
export function termsOf(rows: TermDraft[]): Array<{ species: string; coef: number }> {
  const m = new Map<string, number>();
  for (const r of rows) {
    if (!r.species) continue;
    const c = r.coef.trim() === "" ? 1 : Number(r.coef.trim().replace(",", "."));
    m.set(r.species, (m.get(r.species) ?? 0) + c);
  }
  return [...m].map(([species, coef]) => ({ species, coef }));
}

export function StepTermsEditor({
  value,
  onChange,
  options,
  label,
  balance,
}: {
  value: TermsDraft;
  onChange: (v: TermsDraft) => void;
  options: Array<{ value: string; text: string }>;
  /** Accessible name of a row's species select, e.g. (side, 0) → "Reactant 1". */
  label: (side: "reactants" | "products", i: number) => string;
  balance: BalanceResult | null;
}) {
  const side = (k: "reactants" | "products") => {
    const rows = value[k];
    const set = (next: TermDraft[]) => onChange({ ...value, [k]: next });
    return (
      <fieldset className="space-y-1">
        <legend className="label">{k === "reactants" ? "Reactants" : "Products"}</legend>
        {rows.map((r, i) => (
          <div key={i} className="flex gap-1">
            <input
              className="field num w-14"
              aria-label={`${label(k, i)} coefficient`}
              inputMode="decimal"
              value={r.coef}
              onChange={(e) => set(rows.map((x, j) => (j === i ? { ...x, coef: e.target.value } : x)))}
            />
            <select className="field" aria-label={label(k, i)} value={r.species} onChange={(e) => set(rows.map((x, j) => (j === i ? { ...x, species: e.target.value } : x)))}>
              <option value="">{i === 0 ? "— species —" : "— species (optional) —"}</option>
              {options.map((o) => (
                <option key={o.value} value={o.value}>
                  {o.text}
                </option>
              ))}
            </select>
            <button type="button" className="btn-quiet px-2" aria-label={`Remove ${label(k, i)}`} disabled={rows.length <= 1} onClick={() => set(rows.filter((_, j) => j !== i))}>
              ×
            </button>
          </div>
        ))}
        {rows.length < MAX_TERMS[k] && (
          <button type="button" className="text-xs text-copper-700 hover:underline" onClick={() => set([...rows, { species: "", coef: "1" }])}>
            + add {k === "reactants" ? "reactant" : "product"}
          </button>
        )}
      </fieldset>
    );
  };
  return (
    <div className="space-y-1">
      <div className="grid grid-cols-2 gap-2">
        {side("reactants")}
        {side("products")}
      </div>
      {balance && (
        <p className={`text-xs ${balance.state === "unbalanced" ? "text-brick-700" : "text-ink-600"}`} role={balance.state === "unbalanced" ? "alert" : "status"} data-testid="local-balance">
          {balance.message}
          {balance.state === "unbalanced" ? " It can still be added (e.g. a lumped step or a source); check it is meant." : ""}
        </p>
      )}
    </div>
  );
}
