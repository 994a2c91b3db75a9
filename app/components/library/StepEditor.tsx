/**
 * The step editor: one barrier form with unit selectors, live derived values (k at T and
 * the other forms, computed in the browser by the solver) while typing, an element and
 * charge balance warning, and zod checks before the form is sent (the server checks again).
 * What the user typed stays in the form on any error.
 */
import { useMemo, useState } from "react";
import { Form, useFetcher, useNavigation } from "react-router";
import { CsrfInput } from "../CsrfInput";
import { buildStepInput, previewDocument, type StepFormState } from "./step-form";
import { balanceOf } from "./balance";
import { stepToEngine } from "../../../solver/exchange-format";
import { convertBarrier } from "../../../solver/rates";
import { ENERGY_CHOICES, ENTROPY_CHOICES, energyIn, entropyIn, sig, unitLabel } from "./format";
import { SOURCE_TYPES } from "./step-schema";
import { describeThermo, thermalReferenceWarning } from "../barrier-text";
import { barrierWarning } from "../step-guards";
import { useLeaveGuard } from "../LeaveGuard";

export interface EditorSpecies {
  id: number;
  label: string;
  formula: string | null;
}

interface Props {
  species: EditorSpecies[];
  initial: StepFormState;
  serverErrors?: { message: string; fields: Record<string, string> } | null;
  submitLabel: string;
  baseVersion?: number;
}

function FieldError({ errors, name }: { errors: Record<string, string>; name: string }) {
  return errors[name] ? (
    <p className="mt-0.5 text-xs text-brick-700" role="alert">
      {errors[name]}
    </p>
  ) : null;
}

export function StepEditor({ species, initial, serverErrors, submitLabel, baseVersion }: Props) {
  const [f, setF] = useState<StepFormState>(initial);
  const [T, setT] = useState(initial.tu === "C" ? "25" : "298.15");
  const [touched, setTouched] = useState(false);
  const busy = useNavigation().state === "submitting";
  const leave = useLeaveGuard(JSON.stringify(f) !== JSON.stringify(initial));
  const set = <K extends keyof StepFormState>(k: K, v: StepFormState[K]) => setF((s) => ({ ...s, [k]: v }));
  const built = useMemo(() => buildStepInput(f), [f]);
  const errors = { ...(touched ? built.errors : {}), ...(serverErrors?.fields ?? {}) };
  const byId = useMemo(() => new Map(species.map((s) => [String(s.id), s])), [species]);

  const live = useMemo(() => {
    if (!built.input) return null;
    const TK = Number(T) + (f.tu === "C" ? 273.15 : 0);
    if (!(TK > 0)) return { error: "Choose a temperature above absolute zero." };
    const e = stepToEngine(previewDocument(built.input));
    if (!e.ok) return { error: e.error.message };
    const c = convertBarrier({ ...e.value, targetStandardState: "1M" }, TK);
    if (!c.ok) return { error: c.error.message };
    return { value: c.value, TK };
  }, [built.input, T, f.tu]);

  const thermalNote = live && "value" in live && live.TK && built.input ? thermalReferenceWarning(built.input.barrier, live.TK) : null;
  const barrierNote = live && "value" in live && live.value && live.TK ? barrierWarning({ dG: live.value.dG, kf: live.value.k, kfUnit: live.value.units }, live.TK) : null;

  const balance = useMemo(() => {
    const side = (ts: StepFormState["reactants"]) =>
      ts.filter((t) => byId.has(t.speciesId)).map((t) => ({ species: { label: byId.get(t.speciesId)!.label, formula: byId.get(t.speciesId)!.formula }, coef: Number(t.coef) || 1 }));
    const r = side(f.reactants);
    const p = side(f.products);
    return r.length || p.length ? balanceOf(r, p) : null;
  }, [f.reactants, f.products, byId]);

  const speciesFetcher = useFetcher<{ ok: boolean; message: string }>();

  const sideEditor = (side: "reactants" | "products", title: string, max: number) => (
    <fieldset>
      <legend className="label">{title}</legend>
      {f[side].map((t, i) => (
        <div key={i} className="mb-1 flex gap-1">
          <input
            aria-label={`${title} ${i + 1} coefficient`}
            className="field num w-14"
            value={t.coef}
            onChange={(e) => set(side, f[side].map((x, j) => (j === i ? { ...x, coef: e.target.value } : x)))}
          />
          <select
            aria-label={`${title} ${i + 1} species`}
            name={`${side}-${i}`}
            className="field"
            value={t.speciesId}
            onChange={(e) => set(side, f[side].map((x, j) => (j === i ? { ...x, speciesId: e.target.value } : x)))}
          >
            <option value="">— species —</option>
            {species.map((s) => (
              <option key={s.id} value={s.id}>
                {s.label}
                {s.formula ? ` (${s.formula})` : ""}
              </option>
            ))}
          </select>
          <button type="button" className="btn-quiet" aria-label="Remove" onClick={() => set(side, f[side].filter((_, j) => j !== i))} disabled={f[side].length <= 1}>
            ×
          </button>
        </div>
      ))}
      {f[side].length < max && (
        <button type="button" className="text-xs text-copper-700 hover:underline" onClick={() => set(side, [...f[side], { speciesId: "", coef: "1" }])}>
          + add {side === "reactants" ? "reactant" : "product"}
        </button>
      )}
      <FieldError errors={errors} name={side} />
    </fieldset>
  );

  const numField = (k: keyof StepFormState, label: string, errKey: string, unit?: string) => (
    <div>
      <label className="label" htmlFor={`f-${String(k)}`}>
        {label}
        {unit ? ` (${unitLabel(unit)})` : ""}
      </label>
      <input
        id={`f-${String(k)}`}
        name={String(k)}
        className={`field num ${errors[errKey] ? "field-error" : ""}`}
        inputMode="decimal"
        value={f[k] as string}
        onChange={(e) => set(k, e.target.value as never)}
      />
      <FieldError errors={errors} name={errKey} />
    </div>
  );
  const tUnit = f.tu === "C" ? "°C" : "K";
  const eu = f.eu;
  const su = f.su;

  return (
    <div className="grid gap-4 lg:grid-cols-3">
      {leave.dialog}
      <Form
        method="post"
        className="space-y-4 lg:col-span-2"
        onSubmit={(e) => {
          setTouched(true);
          if (!built.input) e.preventDefault();
          else leave.allowLeaving();
        }}
      >
        <CsrfInput />
        <input type="hidden" name="intent" value="save" />
        <input type="hidden" name="payload" value={built.input ? JSON.stringify(baseVersion ? { ...built.input, baseVersion } : built.input) : ""} />
        {serverErrors?.message && (
          <p className="rounded bg-brick-100 px-3 py-2 text-sm text-brick-700" role="alert">
            {serverErrors.message}
          </p>
        )}
        {touched && !built.input && (
          <p className="rounded bg-brick-100 px-3 py-2 text-sm text-brick-700" role="alert">
            Some fields need attention: {Object.entries(built.errors).slice(0, 3).map(([k, v]) => `${k}: ${v}`).join("; ")}
          </p>
        )}
        <section className="panel space-y-3">
          <div>
            <label className="label" htmlFor="f-label">
              Label
            </label>
            <input id="f-label" name="label" className="field" value={f.label} onChange={(e) => set("label", e.target.value)} maxLength={500} />
          </div>
          <div className="grid gap-3 md:grid-cols-2">
            {sideEditor("reactants", "Reactants", 3)}
            {sideEditor("products", "Products", 10)}
          </div>
          <p className="text-xs text-ink-600">
            Coefficients may be fractional (a reactant's coefficient is its order in the rate law). Leave the reactants empty for a zero-order source (k in mol L⁻¹ s⁻¹) or the
            products empty for a sink; both are irreversible and reported as open to the surroundings.
          </p>
          {balance && (
            <p className={`text-sm ${balance.state === "unbalanced" ? "text-brick-700" : "text-ink-600"}`} role={balance.state === "unbalanced" ? "alert" : "status"} data-testid="balance">
              {balance.message}
              {balance.state === "unbalanced" ? " You can still save it as a draft." : ""}
            </p>
          )}
          <label className="flex items-center gap-2 text-sm">
            <input type="checkbox" checked={f.reversible} onChange={(e) => set("reversible", e.target.checked)} /> Reversible (reverse rate from detailed balance)
          </label>
          <div className="grid gap-3 md:grid-cols-4" data-testid="reaction-energy-fields">
            {numField("rxnDG", f.reversible ? "ΔG°rxn" : "ΔG°rxn (optional)", "reactionThermo.dG", eu)}
            {numField("rxnDH", "ΔH°rxn (optional)", "reactionThermo.dH", eu)}
            {numField("rxnT", "temperature of ΔG°rxn", "reactionThermo.T", tUnit)}
            <div>
              <label className="label" htmlFor="f-rxnSS">
                Standard state of ΔG°rxn
              </label>
              <StandardStateSelect id="f-rxnSS" value={f.rxnSS} onChange={(v) => set("rxnSS", v)} />
            </div>
          </div>
          <p className="text-xs text-ink-600">
            The reaction free energy places the step's products on the free-energy profile and, for a reversible step, gives k_rev by detailed balance.
            {f.rxnKept && !f.rxnDG.trim() ? ` Stored: ${describeThermo(f.rxnKept)} — kept unless you type a ΔG°rxn.` : ""}
          </p>
        </section>
        <section className="panel space-y-3">
          <div className="grid gap-3 md:grid-cols-4">
            <div>
              <label className="label" htmlFor="f-form">
                Barrier form
              </label>
              <select id="f-form" className="field" value={f.form} onChange={(e) => set("form", e.target.value as StepFormState["form"])}>
                <option value="dG">ΔG‡ at a reference temperature</option>
                <option value="dHdS">ΔH‡ and ΔS‡</option>
                <option value="thermal">Ea, ΔS‡, Δn‡</option>
                <option value="arrhenius">Arrhenius A, Ea</option>
                <option value="measured">Measured k at T</option>
              </select>
            </div>
            <div>
              <label className="label" htmlFor="f-eu">
                Energy unit
              </label>
              <select id="f-eu" className="field" value={f.eu} onChange={(e) => set("eu", e.target.value as StepFormState["eu"])}>
                {ENERGY_CHOICES.map((u) => (
                  <option key={u.id} value={u.id}>
                    {u.label}
                  </option>
                ))}
              </select>
            </div>
            <div>
              <label className="label" htmlFor="f-su">
                Entropy unit
              </label>
              <select id="f-su" className="field" value={f.su} onChange={(e) => set("su", e.target.value as StepFormState["su"])}>
                {ENTROPY_CHOICES.map((u) => (
                  <option key={u.id} value={u.id}>
                    {u.label}
                  </option>
                ))}
              </select>
            </div>
            <div>
              <label className="label" htmlFor="f-tu">
                Temperature unit
              </label>
              <select id="f-tu" className="field" value={f.tu} onChange={(e) => set("tu", e.target.value as StepFormState["tu"])}>
                <option value="K">K</option>
                <option value="C">°C</option>
              </select>
            </div>
          </div>
          <div className="grid gap-3 md:grid-cols-4">
            {f.form === "dG" && (
              <>
                {numField("dG", "ΔG‡", "barrier.dG", eu)}
                {numField("Tref", "reference temperature of ΔG‡", "barrier.T", tUnit)}
                {numField("dH", "ΔH‡ (optional)", "barrier.dH", eu)}
              </>
            )}
            {f.form === "dHdS" && (
              <>
                {numField("dH", "ΔH‡", "barrier.dH", eu)}
                {numField("dS", "ΔS‡", "barrier.dS", su)}
              </>
            )}
            {f.form === "thermal" && (
              <>
                {numField("Ea", "Ea", "barrier.Ea", eu)}
                {numField("dS", "ΔS‡", "barrier.dS", su)}
                {numField("dn", "Δn‡ = 1 − m (0, −1, −2)", "barrier.dn")}
                {numField("Tref", "reference temperature of Ea and ΔS‡ (required)", "barrier.T", tUnit)}
              </>
            )}
            {f.form === "arrhenius" && (
              <>
                {numField("A", "A", "barrier.A", "(mol/L)^(1−m) s⁻¹")}
                {numField("Ea", "Ea", "barrier.Ea", eu)}
                {numField("n", "n (optional)", "barrier.n")}
                {numField("Tref", "reference temperature T₀ of (T/T₀)ⁿ", "barrier.T", tUnit)}
              </>
            )}
            {f.form === "measured" && (
              <>
                {numField("k", "k", "barrier.k", "(mol/L)^(1−m) s⁻¹")}
                {numField("Tref", "reference temperature (k measured at)", "barrier.T", tUnit)}
                {numField("Ea", "Ea (optional)", "barrier.Ea", eu)}
              </>
            )}
            {["dG", "dHdS", "thermal"].includes(f.form) && (
              <div>
                <label className="label" htmlFor="f-ss">
                  Standard state
                </label>
                <StandardStateSelect id="f-ss" value={f.standardState} onChange={(v) => set("standardState", v)} />
              </div>
            )}
          </div>
          <div className="grid gap-3 md:grid-cols-5">
            {numField("kappa", "κ (optional)", "kappa")}
            {numField("imag", "|ν‡| (optional)", "imaginaryFrequency", "cm-1")}
            {numField("tmin", "Valid from", "validRange.Tmin", tUnit)}
            {numField("tmax", "Valid to", "validRange.Tmax", tUnit)}
            {numField("unc", "Uncertainty ±", "uncertainty.value", eu)}
          </div>
        </section>
        <section className="panel grid gap-3 md:grid-cols-3">
          <div>
            <label className="label" htmlFor="f-source">
              Source
            </label>
            <select id="f-source" className="field" value={f.source} onChange={(e) => set("source", e.target.value as StepFormState["source"])}>
              {SOURCE_TYPES.map((s) => (
                <option key={s} value={s}>
                  {s}
                </option>
              ))}
            </select>
          </div>
          {(["method", "citation", "doi", "solvent", "tags"] as const).map((k) => (
            <div key={k}>
              <label className="label" htmlFor={`f-${k}`}>
                {k === "doi" ? "DOI" : k === "tags" ? "Tags (comma-separated)" : k}
              </label>
              <input id={`f-${k}`} className="field" value={f[k]} onChange={(e) => set(k, e.target.value)} />
              <FieldError errors={errors} name={`provenance.${k}`} />
            </div>
          ))}
          <div className="md:col-span-3">
            <label className="label" htmlFor="f-notes">
              Notes
            </label>
            <textarea id="f-notes" className="field" value={f.notes} onChange={(e) => set("notes", e.target.value)} />
          </div>
          <div className="md:col-span-3">
            <label className="label" htmlFor="f-message">
              What changed (for the history)
            </label>
            <input id="f-message" className="field" value={f.message} onChange={(e) => set("message", e.target.value)} />
          </div>
        </section>
        <button className="btn-primary" disabled={busy}>
          {busy ? "Saving…" : submitLabel}
        </button>
      </Form>
      <aside className="space-y-4">
        <section className="panel text-sm" aria-live="polite" data-testid="live-derived">
          <h2 className="font-semibold">Derived while you type</h2>
          <div className="mt-2 flex items-center gap-1">
            <label htmlFor="live-T" className="text-xs text-ink-600">
              evaluate at T =
            </label>
            <input id="live-T" className="field num w-24" value={T} onChange={(e) => setT(e.target.value)} inputMode="decimal" />
            <span>{tUnit}</span>
          </div>
          {!live && <p className="mt-2 text-ink-600">Fill in the barrier to see k and the other forms.</p>}
          {live && "error" in live && <p className="mt-2 text-brick-700">{live.error}</p>}
          {live && "value" in live && live.value && (
            <dl className="mt-2 grid grid-cols-2 gap-1">
              <dt>k</dt>
              <dd className="num" data-testid="live-k">
                {sig(live.value.k)} {live.value.units}
              </dd>
              <dt>ΔG‡ (1 M)</dt>
              <dd className="num">
                {sig(energyIn(live.value.dG, eu))} {eu}
              </dd>
              <dt>ΔH‡</dt>
              <dd className="num">
                {sig(energyIn(live.value.dH, eu))} {eu}
              </dd>
              <dt>ΔS‡</dt>
              <dd className="num">
                {sig(entropyIn(live.value.dS, su))} {unitLabel(su)}
              </dd>
              <dt>Ea</dt>
              <dd className="num">
                {sig(energyIn(live.value.Ea, eu))} {eu}
              </dd>
              <dt>A</dt>
              <dd className="num">
                {sig(live.value.A)} {live.value.units}
              </dd>
            </dl>
          )}
          {barrierNote && (
            <p className="mt-2 text-xs text-brick-700" role="status" data-testid="barrier-warning">
              {barrierNote}
            </p>
          )}
          {thermalNote && (
            <p className="mt-2 text-xs text-brick-700" role="status" data-testid="thermal-reference-warning">
              {thermalNote}
            </p>
          )}
          {live && "value" in live && live.value && live.value.standardStateShift !== 0 && (
            <p className="mt-2 text-xs text-ink-600">Standard-state shift to 1 mol/L: {sig(energyIn(live.value.standardStateShift, eu))} {eu}.</p>
          )}
        </section>
        <section className="panel text-sm">
          <h2 className="font-semibold">New species</h2>
          <speciesFetcher.Form method="post" className="mt-2 space-y-2">
            <CsrfInput />
            <input type="hidden" name="intent" value="species" />
            <input name="label" className="field" placeholder="Label, e.g. benzyl alcohol" aria-label="Species label" required />
            <input name="formula" className="field" placeholder="Formula, e.g. C7H8O or NH4+" aria-label="Species formula" />
            <button className="btn-quiet">Add species</button>
            {speciesFetcher.data && <p className={`text-xs ${speciesFetcher.data.ok ? "text-moss-700" : "text-brick-700"}`}>{speciesFetcher.data.message}</p>}
          </speciesFetcher.Form>
        </section>
      </aside>
    </div>
  );
}

function StandardStateSelect({ id, value, onChange }: { id: string; value: StepFormState["standardState"]; onChange: (v: StepFormState["standardState"]) => void }) {
  return (
    <select id={id} className="field" value={value} onChange={(e) => onChange(e.target.value as StepFormState["standardState"])}>
      <option value="1M">1 mol/L (solution)</option>
      <option value="1bar">1 bar (gas)</option>
      <option value="1atm">1 atm (gas)</option>
    </select>
  );
}
