/**
 * The ensemble part of the "New ensemble" form: sweep or uncertainty settings and the
 * observables. Species and steps are offered by name; σ and shifts in kJ/mol; times with a unit.
 */
import type { AxisDraft, AxisUnit, EnsembleDraft } from "./ensemble-draft";
import { defaultAxis } from "./ensemble-draft";

export interface EnsembleFormMechanism {
  species: { id: string; name: string }[];
  /** sigma: kJ/mol stored with the step, or null; method: the step's method (group) or null */
  steps: { id: string; name: string; sigma: number | null; method: string | null }[];
  groups: string[];
}

const UNITS: Record<string, AxisUnit[]> = { temperature: ["°C", "K"], initial: ["mol/L", "mmol/L", "umol/L"], barrier: ["kJ/mol", "kcal/mol"] };
const unitText = (u: AxisUnit) => (u === "umol/L" ? "µmol/L" : u);

export function EnsembleForm({ draft, onChange, errors, mechanism }: { draft: EnsembleDraft; onChange: (d: EnsembleDraft) => void; errors: Record<string, string>; mechanism: EnsembleFormMechanism }) {
  const set = <K extends keyof EnsembleDraft>(k: K, v: EnsembleDraft[K]) => onChange({ ...draft, [k]: v });
  const err = (k: string) => (errors[k] ? <p className="mt-0.5 text-xs text-brick-700" role="alert">{errors[k]}</p> : null);
  const cls = (k: string) => `field num ${errors[k] ? "field-error" : ""}`;
  const setAxis = (i: number, a: Partial<AxisDraft>) => set("axes", draft.axes.map((x, j) => (j === i ? { ...x, ...a } : x)));
  const speciesName = (id: string) => mechanism.species.find((s) => s.id === id)?.name ?? id;

  return (
    <fieldset className="space-y-4" aria-label="Ensemble">
      <div className="flex flex-wrap gap-3 text-sm" role="radiogroup" aria-label="Kind of ensemble">
        <label className="inline-flex items-center gap-1">
          <input type="radio" name="ensemble-mode" checked={draft.mode === "uncertainty"} onChange={() => set("mode", "uncertainty")} />
          Uncertainty of the barriers
        </label>
        <label className="inline-flex items-center gap-1">
          <input type="radio" name="ensemble-mode" checked={draft.mode === "sweep"} onChange={() => set("mode", "sweep")} />
          Parameter sweep
        </label>
      </div>

      {draft.mode === "uncertainty" ? (
        <div className="space-y-3">
          <div className="grid grid-cols-3 gap-2">
            <label className="block">
              <span className="label">Samples</span>
              <input aria-label="Samples" className={cls("samples")} value={draft.samples} onChange={(e) => set("samples", e.target.value)} inputMode="numeric" />
              {err("samples")}
            </label>
            <label className="block">
              <span className="label">Sampling</span>
              <select aria-label="Sampling" className="field" value={draft.sampler} onChange={(e) => set("sampler", e.target.value as EnsembleDraft["sampler"])}>
                <option value="latin-hypercube">Latin hypercube</option>
                <option value="monte-carlo">Monte Carlo</option>
              </select>
            </label>
            <label className="block">
              <span className="label">Seed</span>
              <input aria-label="Seed" className={cls("seed")} value={draft.seed} onChange={(e) => set("seed", e.target.value)} inputMode="numeric" />
              {err("seed")}
            </label>
          </div>
          <label className="block">
            <span className="label">σ of barriers without a stored uncertainty (kJ/mol)</span>
            <input aria-label="Default uncertainty" className={cls("defaultSigma")} value={draft.defaultSigma} onChange={(e) => set("defaultSigma", e.target.value)} inputMode="decimal" />
            {err("defaultSigma")}
          </label>
          <div>
            <span className="label">σ of each barrier (kJ/mol; empty keeps the stored value or the default above)</span>
            <div className="max-h-56 space-y-1 overflow-auto pr-1">
              {mechanism.steps.map((s) => (
                <div key={s.id} className="grid grid-cols-[minmax(0,1fr)_6rem] items-center gap-2">
                  <span className="truncate text-sm" title={s.method ? `${s.name} — ${s.method}` : s.name}>
                    {s.name}
                    {s.method && <span className="text-ink-500"> · {s.method}</span>}
                  </span>
                  <input
                    aria-label={`Uncertainty of ${s.name}`}
                    className={cls(`sigma.${s.id}`)}
                    placeholder={s.sigma !== null ? `${s.sigma} stored` : draft.defaultSigma}
                    value={draft.sigma[s.id] ?? ""}
                    onChange={(e) => set("sigma", { ...draft.sigma, [s.id]: e.target.value })}
                    inputMode="decimal"
                  />
                  {err(`sigma.${s.id}`)}
                </div>
              ))}
            </div>
          </div>
          {mechanism.groups.length > 0 && (
            <div>
              <span className="label">Correlation ρ of errors within a method (0 independent … 1 shared)</span>
              {mechanism.groups.map((g) => (
                <div key={g} className="grid grid-cols-[minmax(0,1fr)_6rem] items-center gap-2">
                  <span className="truncate text-sm">{g}</span>
                  <input aria-label={`Correlation within ${g}`} className={cls(`correlation.${g}`)} value={draft.correlation[g] ?? ""} onChange={(e) => set("correlation", { ...draft.correlation, [g]: e.target.value })} inputMode="decimal" />
                  {err(`correlation.${g}`)}
                </div>
              ))}
            </div>
          )}
          <label className="block">
            <span className="label">σ of the temperature (K; isothermal only, empty for none)</span>
            <input aria-label="Temperature uncertainty" className={cls("sigmaT")} value={draft.sigmaT} onChange={(e) => set("sigmaT", e.target.value)} inputMode="decimal" />
            {err("sigmaT")}
          </label>
        </div>
      ) : (
        <div className="space-y-3">
          {draft.axes.map((a, i) => {
            const kind = a.parameter.split(":")[0];
            return (
              <div key={i} className="space-y-2 rounded border border-ink-200 p-2">
                <label className="block">
                  <span className="label">{i === 0 ? "Sweep" : "and"}</span>
                  <select aria-label={`Sweep parameter ${i + 1}`} className={cls(`axis${i}.parameter`)} value={a.parameter} onChange={(e) => setAxis(i, defaultAxis(e.target.value))}>
                    <option value="temperature">Temperature</option>
                    {mechanism.species.map((s) => (
                      <option key={s.id} value={`initial:${s.id}`}>
                        Initial concentration of {s.name}
                      </option>
                    ))}
                    {mechanism.steps.map((s) => (
                      <option key={s.id} value={`barrier:${s.id}`}>
                        Barrier shift of {s.name}
                      </option>
                    ))}
                  </select>
                  {err(`axis${i}.parameter`)}
                </label>
                <div className="grid grid-cols-5 gap-2">
                  {(["from", "to", "points"] as const).map((f) => (
                    <label key={f} className="block">
                      <span className="label">{f}</span>
                      <input aria-label={`Sweep ${i + 1} ${f}`} className={cls(`axis${i}.${f}`)} value={a[f]} onChange={(e) => setAxis(i, { [f]: e.target.value })} inputMode="decimal" />
                      {err(`axis${i}.${f}`)}
                    </label>
                  ))}
                  <label className="block">
                    <span className="label">unit</span>
                    <select aria-label={`Sweep ${i + 1} unit`} className="field" value={a.unit} onChange={(e) => setAxis(i, { unit: e.target.value as AxisUnit })}>
                      {(UNITS[kind] ?? []).map((u) => (
                        <option key={u} value={u}>
                          {unitText(u)}
                        </option>
                      ))}
                    </select>
                  </label>
                  <label className="block">
                    <span className="label">grid</span>
                    <select aria-label={`Sweep ${i + 1} grid`} className="field" value={a.grid} onChange={(e) => setAxis(i, { grid: e.target.value as AxisDraft["grid"] })}>
                      <option value="linear">linear</option>
                      <option value="log">log</option>
                    </select>
                  </label>
                </div>
              </div>
            );
          })}
          {draft.axes.length === 1 ? (
            <button type="button" className="btn-quiet" onClick={() => set("axes", [...draft.axes, defaultAxis(mechanism.species[0] ? `initial:${mechanism.species[0].id}` : "temperature")])}>
              Add a second parameter
            </button>
          ) : (
            <button type="button" className="btn-quiet" onClick={() => set("axes", draft.axes.slice(0, 1))}>
              Remove the second parameter
            </button>
          )}
        </div>
      )}

      <div className="space-y-2">
        <h3 className="font-semibold">Observables</h3>
        <label className="block">
          <span className="label">Conversion of (yields refer to its initial concentration)</span>
          <select aria-label="Reactant" className={cls("reactant")} value={draft.reactant} onChange={(e) => set("reactant", e.target.value)}>
            {mechanism.species.map((s) => (
              <option key={s.id} value={s.id}>
                {s.name}
              </option>
            ))}
          </select>
          {err("reactant")}
        </label>
        <div>
          <span className="label">Yields of</span>
          <div className="flex flex-wrap gap-x-3 text-sm">
            {mechanism.species
              .filter((s) => s.id !== draft.reactant)
              .map((s) => (
                <label key={s.id} className="inline-flex items-center gap-1">
                  <input
                    type="checkbox"
                    aria-label={`Yield of ${s.name}`}
                    checked={draft.products.includes(s.id)}
                    onChange={(e) => set("products", e.target.checked ? [...draft.products, s.id] : draft.products.filter((p) => p !== s.id))}
                  />
                  {s.name}
                </label>
              ))}
          </div>
          {err("products")}
        </div>
        <div className="grid grid-cols-2 gap-2">
          {(["selFirst", "selSecond"] as const).map((k, i) => (
            <label key={k} className="block">
              <span className="label">{i === 0 ? "Selectivity of" : "over"}</span>
              <select aria-label={i === 0 ? "Selectivity product" : "Selectivity other product"} className={cls("selectivity")} value={draft[k]} onChange={(e) => set(k, e.target.value)}>
                <option value="">—</option>
                {mechanism.species.map((s) => (
                  <option key={s.id} value={s.id}>
                    {s.name}
                  </option>
                ))}
              </select>
            </label>
          ))}
        </div>
        {draft.selFirst && draft.selSecond && (
          <p className="text-xs text-ink-600">
            Selectivity = {speciesName(draft.selFirst)}/({speciesName(draft.selFirst)} + {speciesName(draft.selSecond)})
          </p>
        )}
        {err("selectivity")}
        <div className="grid grid-cols-3 gap-2">
          <label className="col-span-2 block">
            <span className="label">At times (comma-separated)</span>
            <input aria-label="Times" className={cls("times")} value={draft.times} onChange={(e) => set("times", e.target.value)} placeholder="e.g. 10, 30, 60" />
            {err("times")}
          </label>
          <label className="block">
            <span className="label">unit</span>
            <select aria-label="Time unit" className="field" value={draft.timeUnit} onChange={(e) => set("timeUnit", e.target.value as EnsembleDraft["timeUnit"])}>
              <option>s</option>
              <option>min</option>
              <option>h</option>
            </select>
          </label>
        </div>
      </div>
    </fieldset>
  );
}
