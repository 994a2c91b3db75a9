/**
 * Editing from the workbench graph: "Add step" opens an inline library search (pin a step at
 * its shown version) or a new local step; clicking a step node opens a side panel to change
 * its barrier (form, value, units), the reversible flag and the reaction free energy, with k at
 * the workbench temperature recomputed in the browser while typing. Pinned library steps show
 * their version and offer a local edit or the newer approved version. Every save is a new
 * mechanism version with a message; a stale save (409) shows the newer change and keeps input.
 *
 * Units: energies as chosen (kJ/mol, kcal/mol, eV, J/mol); ΔS‡ in J/(mol·K); A in (mol/L)^(1−m)·s⁻¹;
 * T in K; k in (mol/L)^(1−m)·s⁻¹.
 */
import { useEffect, useMemo, useState, type FormEvent } from "react";
import { useFetcher, useParams } from "react-router";
import { CsrfInput } from "../CsrfInput";
import { StepSchema, type DocumentBarrier, type DocumentStep, type MechanismDocument } from "../../../solver/exchange-format";
import { stepNumbers } from "./step-rates";
import { num } from "./format";
import { GraphEditFormSchema, firstIssue, type GraphEdit } from "./graph-edit-schema";
import type { LibrarySearchHit } from "../library/search-hit";
import { namesOf } from "../names";
import { describeBarrier } from "../barrier-text";
import { standardStateText } from "../units-text";
import { StepTermsEditor, emptyTerms, termsOf, type TermsDraft } from "../StepTermsEditor";
import { termsBalance } from "../step-guards";
import { ReactionEnergyFields, freshReactionEnergy, reactionEnergyDraftOf, thermoOfDraft, type ReactionEnergyDraft } from "../ReactionEnergyFields";

export interface EntryInfo {
  kind: "library" | "local";
  stepId: number | null;
  versionNumber: number | null;
  status: string | null;
  /** newer approved library version number on offer, if any */
  update: number | null;
}

type Answer = { intent: string; ok: true; version: number } | { intent: string; ok: false; message: string; conflict?: { version: number; author: string | null; message: string; at: string } };

const ENERGY_UNITS = ["kJ/mol", "kcal/mol", "eV", "J/mol"] as const;
type EnergyUnit = (typeof ENERGY_UNITS)[number];
const parseNum = (s: string) => (s.trim() === "" ? NaN : Number(s.trim().replace(",", ".")));

// ------------------------------------------------------------ barrier draft

type StandardState = "1M" | "1bar" | "1atm";

export interface BarrierDraft {
  form: "dG" | "dHdS" | "arrhenius";
  v1: string;
  v2: string;
  unit: EnergyUnit;
  T: string;
  /** standard state of ΔG‡ or ΔH‡/ΔS‡: kept from the step being edited, shown and editable */
  standardState: StandardState;
  /** set when the step's barrier could not be edited in its own form and was converted: says what was converted to what */
  rebased?: string;
}

export const freshBarrier = (): BarrierDraft => ({ form: "dG", v1: "", v2: "", unit: "kJ/mol", T: "298.15", standardState: "1M" });

/**
 * The panel's draft of a saved barrier: in its own form, units and standard state where the
 * panel can edit that form; otherwise converted to ΔG‡ at the workbench temperature in 1 mol/L,
 * with `rebased` saying so (never silently).
 */
export function draftOf(b: DocumentBarrier | undefined, fallbackDG: number | null, T: number | null): BarrierDraft {
  const unit = (b && "unit" in b && ENERGY_UNITS.includes(b.unit as EnergyUnit) ? b.unit : "kJ/mol") as EnergyUnit;
  const own = b && "unit" in b && b.unit === unit;
  if (b?.form === "dG" && own) return { form: "dG", v1: String(b.dG), v2: "", unit, T: String(b.T), standardState: b.standardState };
  if (b?.form === "dHdS" && own && b.entropyUnit === "J/(mol K)") return { form: "dHdS", v1: String(b.dH), v2: String(b.dS), unit, T: "", standardState: b.standardState };
  if (b?.form === "arrhenius" && own && b.rateUnit.concentration === "mol/L" && b.rateUnit.time === "s" && !b.n) return { form: "arrhenius", v1: String(b.A), v2: String(b.Ea), unit, T: "", standardState: "1M" };
  const Tw = T ? Number(T.toFixed(2)) : 298.15;
  const v = fallbackDG === null ? "" : String(Number((fallbackDG / 1000).toPrecision(5)));
  return {
    form: "dG",
    v1: v,
    v2: "",
    unit: "kJ/mol",
    T: String(Tw),
    standardState: "1M",
    rebased: b
      ? `Entered as ${describeBarrier(b)}. This panel cannot edit that form, so it shows the barrier converted to ΔG‡ at ${Tw} K in the 1 mol/L standard state${v ? ` (${v} kJ/mol)` : ""}; saving stores this converted form instead of the original, and its temperature dependence may differ.`
      : undefined,
  };
}

export function barrierOf(d: BarrierDraft): DocumentBarrier {
  if (d.form === "dG") return { form: "dG", dG: parseNum(d.v1), unit: d.unit, T: parseNum(d.T), standardState: d.standardState };
  if (d.form === "dHdS") return { form: "dHdS", dH: parseNum(d.v1), dS: parseNum(d.v2), unit: d.unit, entropyUnit: "J/(mol K)", standardState: d.standardState };
  return { form: "arrhenius", A: parseNum(d.v1), rateUnit: { concentration: "mol/L", time: "s" }, Ea: parseNum(d.v2), unit: d.unit };
}

function BarrierFields({ d, onChange, prefix }: { d: BarrierDraft; onChange: (d: BarrierDraft) => void; prefix: string }) {
  const labels = { dG: ["ΔG‡", ""], dHdS: ["ΔH‡", "ΔS‡ (J/(mol·K))"], arrhenius: ["A ((mol/L)^(1−m)·s⁻¹)", "Ea"] }[d.form];
  return (
    <div className="grid grid-cols-2 gap-2">
      <label className="block">
        <span className="label">Barrier form</span>
        <select className="field" aria-label={`${prefix} barrier form`} value={d.form} onChange={(e) => onChange({ ...d, form: e.target.value as BarrierDraft["form"], v1: "", v2: "" })}>
          <option value="dG">ΔG‡ at T</option>
          <option value="dHdS">ΔH‡ and ΔS‡</option>
          <option value="arrhenius">Arrhenius A, Ea</option>
        </select>
      </label>
      <label className="block">
        <span className="label">Energy unit</span>
        <select className="field" aria-label={`${prefix} energy unit`} value={d.unit} onChange={(e) => onChange({ ...d, unit: e.target.value as EnergyUnit })}>
          {ENERGY_UNITS.map((u) => (
            <option key={u}>{u}</option>
          ))}
        </select>
      </label>
      <label className="block">
        <span className="label">{labels[0]}</span>
        <input className="field num" aria-label={`${prefix} ${labels[0]}`} inputMode="decimal" value={d.v1} onChange={(e) => onChange({ ...d, v1: e.target.value })} />
      </label>
      {d.form !== "arrhenius" && (
        <label className="block">
          <span className="label">Standard state</span>
          <select className="field" aria-label={`${prefix} standard state`} value={d.standardState} onChange={(e) => onChange({ ...d, standardState: e.target.value as StandardState })}>
            <option value="1M">1 mol/L (solution)</option>
            <option value="1bar">1 bar (gas)</option>
            <option value="1atm">1 atm (gas)</option>
          </select>
        </label>
      )}
      {d.form === "dG" ? (
        <label className="block">
          <span className="label">reference temperature (K)</span>
          <input className="field num" aria-label={`${prefix} barrier T in K`} inputMode="decimal" value={d.T} onChange={(e) => onChange({ ...d, T: e.target.value })} />
        </label>
      ) : (
        <label className="block">
          <span className="label">{labels[1]}</span>
          <input className="field num" aria-label={`${prefix} ${labels[1]}`} inputMode="decimal" value={d.v2} onChange={(e) => onChange({ ...d, v2: e.target.value })} />
        </label>
      )}
    </div>
  );
}

/** k at T for a draft step, computed in the browser with the engine. */
function LiveK({ doc, step, T }: { doc: MechanismDocument; step: DocumentStep | null; T: number | null }) {
  const n = useMemo(() => (step && T ? stepNumbers({ ...doc, steps: [step] }, T)[0] : null), [doc, step, T]);
  if (!T) return <p className="text-xs text-ink-600">Give a workbench temperature to see k.</p>;
  if (!n) return <p className="text-xs text-ink-600">k appears once the barrier is complete.</p>;
  if (n.problem || n.kf === null) return <p className="text-xs text-brick-700">{n.problem ?? "k cannot be computed from these values."}</p>;
  return (
    <p className="num text-xs" data-testid="live-k">
      at {num(T, 5)} K: k_fwd = {num(n.kf, 4)} {n.kfUnit}
      {n.dG !== null ? ` · ΔG‡ = ${num(n.dG / 1000, 4)} kJ/mol (1 mol/L)` : ""}
      {n.kr !== null ? ` · k_rev = ${num(n.kr, 4)} ${n.krUnit}` : ""} <span className="text-ink-500">(transition-state theory, Eyring relation)</span>
      {n.caution && (
        <span className="block text-brick-700" role="status" data-testid="live-caution">
          {n.caution}
        </span>
      )}
    </p>
  );
}

// ------------------------------------------------------------ save form

function SaveEdit({
  edit,
  baseVersion,
  defaultMessage,
  label,
  validate,
  onSaved,
}: {
  edit: GraphEdit | null;
  baseVersion: number;
  defaultMessage: string;
  label: string;
  validate?: () => string | null;
  /** called once for each save the server accepted */
  onSaved?: () => void;
}) {
  const fetcher = useFetcher<Answer>();
  const savedVersion = fetcher.state === "idle" && fetcher.data?.ok ? fetcher.data.version : null;
  useEffect(() => {
    if (savedVersion !== null) onSaved?.();
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [savedVersion]);
  const mechanismId = useParams().id;
  const [message, setMessage] = useState(defaultMessage);
  const [error, setError] = useState("");
  const payload = JSON.stringify({ edit, message, baseVersion });
  const onSubmit = (e: FormEvent) => {
    const pre = validate?.() ?? null;
    const p = pre ? null : GraphEditFormSchema.safeParse({ edit, message, baseVersion });
    const problem = pre ?? (p && !p.success ? firstIssue(p.error) : null);
    if (problem) {
      e.preventDefault();
      setError(problem);
    } else setError("");
  };
  const a = fetcher.data;
  return (
    <fetcher.Form method="post" className="mt-2 space-y-1" onSubmit={onSubmit}>
      <CsrfInput />
      <input type="hidden" name="intent" value="graph-edit" />
      <input type="hidden" name="payload" value={payload} />
      <label className="block">
        <span className="label">What changed</span>
        <input className="field" aria-label={`${label} message`} value={message} onChange={(e) => setMessage(e.target.value)} maxLength={1000} />
      </label>
      <button className="btn-primary" disabled={fetcher.state !== "idle"}>
        {fetcher.state !== "idle" ? "Saving…" : `${label} (version ${baseVersion + 1})`}
      </button>
      {error && (
        <p role="alert" className="text-xs text-brick-700">
          {error}
        </p>
      )}
      {a && !a.ok && fetcher.state === "idle" && (
        <div role="alert" className="rounded bg-brick-100 px-2 py-1 text-xs text-brick-700">
          <p>{a.message}</p>
          {a.conflict && (
            <p className="mt-1">
              Newer version: v{a.conflict.version} by {a.conflict.author ?? "someone"} at {a.conflict.at.slice(0, 16).replace("T", " ")} UTC — “{a.conflict.message}”. Your input is still here;{" "}
              <a className="underline" href={`/mechanisms/${mechanismId}/workbench`} target="_blank" rel="noreferrer">
                open the newer version in a new tab
              </a>{" "}
              to compare, then reload to apply it again.
            </p>
          )}
        </div>
      )}
      {a && a.ok && fetcher.state === "idle" && (
        <p className="text-xs text-moss-700" role="status">
          Saved as version {a.version}.
        </p>
      )}
    </fetcher.Form>
  );
}

// ------------------------------------------------------------ add a step


/** Tells the page whether a form part holds unsaved input (for its leave guard); false again when it unmounts. */
function useReportDirty(dirty: boolean, onDirty?: (dirty: boolean) => void) {
  useEffect(() => {
    onDirty?.(dirty);
  }, [dirty, onDirty]);
  useEffect(() => () => onDirty?.(false), [onDirty]);
}

export function AddStepControl({
  doc,
  allSpecies,
  baseVersion,
  T,
  onDirty,
}: {
  doc: MechanismDocument;
  allSpecies: Array<{ id: number; label: string; formula: string | null }>;
  baseVersion: number;
  T: number | null;
  onDirty?: (dirty: boolean) => void;
}) {
  const [open, setOpen] = useState(false);
  const [mode, setMode] = useState<"library" | "local">("library");
  const [q, setQ] = useState("");
  const search = useFetcher<{ items?: LibrarySearchHit[]; error?: { message: string } }>();
  const [pick, setPick] = useState<LibrarySearchHit | null>(null);
  useEffect(() => {
    const text = q.trim();
    if (text.length < 2) return;
    const t = setTimeout(() => search.load(`/api/v1/steps?q=${encodeURIComponent(text)}&limit=10`), 200);
    return () => clearTimeout(t);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [q]);

  // Species choices: the mechanism's own, then the registry's (new to the mechanism) as s<id>.
  const inDoc = new Set(doc.species.map((s) => s.id));
  const names = namesOf(doc);
  const options = [
    ...doc.species.map((s) => ({ value: s.id, text: names.speciesWithFormula(s.id) })),
    ...allSpecies.filter((s) => !inDoc.has(`s${s.id}`)).map((s) => ({ value: `s${s.id}`, text: `${s.label}${s.formula ? ` (${s.formula})` : ""} — new to this mechanism` })),
  ];
  const [localLabel, setLocalLabel] = useState("");
  const [terms, setTerms] = useState<TermsDraft>(emptyTerms);
  const [barrier, setBarrier] = useState<BarrierDraft>(freshBarrier);
  const [rxn, setRxn] = useState<ReactionEnergyDraft>(freshReactionEnergy);
  const rxnRead = thermoOfDraft(rxn);
  const localStep = useMemo<DocumentStep | null>(() => {
    let n = doc.steps.length + 1;
    while (doc.steps.some((s) => s.id === `local-${n}`)) n++;
    const rt = thermoOfDraft(rxn).thermo;
    return { id: `local-${n}`, ...(localLabel.trim() ? { label: localLabel.trim() } : {}), reactants: termsOf(terms.reactants), products: termsOf(terms.products), reversible: false, barrier: barrierOf(barrier), ...(rt ? { reactionThermo: rt } : {}), provenance: { source: "estimated" } };
  }, [doc.steps, localLabel, terms, barrier, rxn]);
  const localValid = localStep && StepSchema.safeParse(localStep).success ? localStep : null;
  // Balance from formulas: the mechanism's species, then the registry's.
  const formulaOf = useMemo(() => {
    const m = new Map<string, { label: string; formula: string | null | undefined }>();
    for (const s of allSpecies) m.set(`s${s.id}`, { label: s.label, formula: s.formula });
    for (const s of doc.species) m.set(s.id, { label: s.label ?? s.id, formula: s.formula });
    return m;
  }, [doc.species, allSpecies]);
  const localBalance = localStep ? termsBalance(localStep.reactants, localStep.products, (k) => formulaOf.get(k)) : null;
  useReportDirty(localLabel.trim() !== "" || JSON.stringify(terms) !== JSON.stringify(emptyTerms()) || JSON.stringify(barrier) !== JSON.stringify(freshBarrier()) || rxn.dG.trim() !== "", onDirty);
  const resetLocal = () => {
    setLocalLabel("");
    setTerms(emptyTerms());
    setBarrier(freshBarrier());
    setRxn(freshReactionEnergy());
  };

  if (!open)
    return (
      <button type="button" className="btn-quiet ml-auto py-0.5" onClick={() => setOpen(true)}>
        + Add step
      </button>
    );
  return (
    <div className="absolute z-10 mt-8 w-[28rem] max-w-[90vw] rounded-md border border-copper-300 bg-white p-3 text-sm shadow-lg" data-testid="add-step" role="dialog" aria-label="Add a step">
      <div className="flex items-center gap-2">
        <button type="button" className={mode === "library" ? "btn-primary py-0.5" : "btn-quiet py-0.5"} onClick={() => setMode("library")}>
          From the library
        </button>
        <button type="button" className={mode === "local" ? "btn-primary py-0.5" : "btn-quiet py-0.5"} onClick={() => setMode("local")}>
          New local step
        </button>
        <button type="button" className="btn-quiet ml-auto py-0.5" onClick={() => setOpen(false)}>
          Close
        </button>
      </div>
      {mode === "library" ? (
        <div className="mt-2">
          <input className="field" type="search" aria-label="Search library steps" placeholder="Search the library (label, species, tag)" value={q} onChange={(e) => (setQ(e.target.value), setPick(null))} />
          {search.data?.error && <p className="mt-1 text-xs text-brick-700">{search.data.error.message}</p>}
          {q.trim().length >= 2 && search.state === "idle" && search.data?.items?.length === 0 && <p className="mt-1 text-xs text-ink-600">No library steps match.</p>}
          <ul className="mt-2 max-h-48 space-y-1 overflow-auto">
            {q.trim().length >= 2 &&
              (search.data?.items ?? []).map((h) => (
                <li key={h.id}>
                  <button type="button" className={`w-full rounded px-2 py-1 text-left hover:bg-copper-50 ${pick?.id === h.id ? "bg-copper-100" : ""}`} onClick={() => setPick(h)} aria-label={`Pick ${h.label}`}>
                    <span className="font-medium">{h.label}</span> <span className="text-xs text-ink-500">v{h.version} · {h.status}</span>
                    <div className="text-xs text-ink-600">{h.reaction}</div>
                  </button>
                </li>
              ))}
          </ul>
          {pick && (
            <div className="mt-2 rounded bg-ink-50 p-2">
              <p>
                Pin <strong>{pick.label}</strong> at library version {pick.version}
                {pick.k !== null ? ` (k = ${num(pick.k, 3)} ${pick.kUnit} at 298.15 K)` : ""}.
              </p>
              <SaveEdit key={pick.versionId} edit={{ op: "add-library", stepVersionId: pick.versionId }} baseVersion={baseVersion} defaultMessage={`Added library step "${pick.label}" (v${pick.version}) from the graph.`} label="Add step" />
            </div>
          )}
        </div>
      ) : (
        <div className="mt-2 space-y-2">
          <input className="field" aria-label="New step label" placeholder="Label (optional)" value={localLabel} onChange={(e) => setLocalLabel(e.target.value)} />
          <StepTermsEditor value={terms} onChange={setTerms} options={options} label={(k, i) => `New step ${k === "reactants" ? "reactant" : "product"} ${i + 1}`} balance={localBalance} />
          <BarrierFields d={barrier} onChange={setBarrier} prefix="New step" />
          <ReactionEnergyFields d={rxn} onChange={setRxn} prefix="New step" />
          <LiveK doc={doc} step={localValid} T={T} />
          <SaveEdit
            edit={localStep ? { op: "add-local", step: localStep } : null}
            baseVersion={baseVersion}
            defaultMessage="Added a local step from the graph."
            label="Add step"
            validate={() => rxnRead.error ?? (!localStep?.reactants.length || !localStep.products.length ? "Choose at least one reactant and one product." : null)}
            onSaved={resetLocal}
          />
        </div>
      )}
    </div>
  );
}

// ------------------------------------------------------------ side panel

export function StepEditPanel({
  id,
  doc,
  entry,
  T,
  baseVersion,
  onClose,
  onDirty,
}: {
  id: string;
  doc: MechanismDocument;
  entry: EntryInfo;
  T: number | null;
  baseVersion: number;
  onClose: () => void;
  onDirty?: (dirty: boolean) => void;
}) {
  const st = doc.steps.find((s) => s.id === id);
  const here = useMemo(() => (st && T ? stepNumbers({ ...doc, steps: [st] }, T)[0] : null), [doc, st, T]);
  const [editing, setEditing] = useState(entry.kind === "local");
  const [barrier, setBarrier] = useState<BarrierDraft>(() => draftOf(st?.barrier, here?.dG ?? null, T));
  const [reversible, setReversible] = useState(!!st?.reversible);
  const thermo = st?.reactionThermo;
  const [rxn, setRxn] = useState<ReactionEnergyDraft>(() => reactionEnergyDraftOf(thermo));
  const rxnRead = thermoOfDraft(rxn, thermo);
  const draft = useMemo<DocumentStep | null>(() => {
    if (!st) return null;
    const { reactionThermo: _old, ...rest } = st;
    const rt = thermoOfDraft(rxn, thermo).thermo;
    return { ...rest, barrier: barrierOf(barrier), reversible, ...(rt ? { reactionThermo: rt } : {}) };
  }, [st, thermo, barrier, reversible, rxn]);
  const valid = draft && !rxnRead.error && StepSchema.safeParse(draft).success ? draft : null;
  // Unsaved: anything changed since the panel opened (it opens afresh on each saved version).
  const [opened] = useState(() => JSON.stringify({ barrier, reversible, rxn }));
  useReportDirty(JSON.stringify({ barrier, reversible, rxn }) !== opened, onDirty);
  if (!st) return null;
  const names = namesOf(doc);
  const name = names.step(id);
  return (
    <aside className="mt-3 space-y-2 rounded-md border border-copper-300 bg-copper-50 p-3 text-sm" aria-label="Edit step" data-testid="step-edit-panel">
      <div className="flex items-center">
        <h3 className="font-semibold">{name}</h3>
        <button type="button" className="btn-quiet ml-auto py-0" onClick={onClose}>
          Close
        </button>
      </div>
      <p className="num">
        {names.reaction(id)}
      </p>
      {here && here.kf !== null && (
        <p className="num text-xs text-ink-700">
          Saved: k_fwd = {num(here.kf, 4)} {here.kfUnit} at {num(T, 5)} K ({st.barrier.form} form)
        </p>
      )}
      {entry.kind === "library" && (
        <div className="rounded bg-white p-2 text-xs">
          <p>
            Library step pinned at version <strong>{entry.versionNumber}</strong>
            {entry.status ? ` (${entry.status})` : ""}.{" "}
            {entry.stepId && (
              <a className="underline" href={`/steps/${entry.stepId}?v=${entry.versionNumber}`}>
                Open in the library
              </a>
            )}
          </p>
          {entry.update !== null && (
            <div className="mt-1">
              <p>A newer approved version v{entry.update} exists.</p>
              <SaveEdit edit={{ op: "use-update", key: id }} baseVersion={baseVersion} defaultMessage={`Updated "${name}" to library version ${entry.update}.`} label={`Use newer approved version v${entry.update}`} />
            </div>
          )}
          {!editing && (
            <button type="button" className="btn-quiet mt-1 py-0.5" onClick={() => setEditing(true)}>
              Replace with local edit
            </button>
          )}
        </div>
      )}
      {editing && (
        <div className="space-y-2">
          {entry.kind === "library" && <p className="text-xs text-ink-600">Saving turns this entry into a local step that records library version {entry.versionNumber} as its origin.</p>}
          {barrier.rebased && (
            <p className="rounded bg-amber-note px-2 py-1 text-xs" role="status" data-testid="barrier-rebased">
              {barrier.rebased}
            </p>
          )}
          {st.barrier.form !== "arrhenius" && st.barrier.form !== "measured" && barrier.form !== "arrhenius" && !barrier.rebased && st.barrier.standardState !== barrier.standardState && (
            <p className="text-xs text-brick-700" role="status" data-testid="standard-state-changed">
              Standard state changed from {standardStateText(st.barrier.standardState)} to {standardStateText(barrier.standardState)}: the same number now means a different barrier for a step of more than one molecule.
            </p>
          )}
          <BarrierFields d={barrier} onChange={setBarrier} prefix="Step" />
          <label className="inline-flex items-center gap-2">
            <input type="checkbox" checked={reversible} onChange={(e) => setReversible(e.target.checked)} aria-label="Reversible" /> Reversible (k_rev by detailed balance)
          </label>
          <ReactionEnergyFields d={rxn} onChange={setRxn} prefix="Step" kept={thermo} />
          <LiveK doc={doc} step={valid} T={T} />
          <SaveEdit
            edit={draft ? { op: "set-step", key: id, step: draft } : null}
            baseVersion={baseVersion}
            defaultMessage={`Changed the kinetics of "${name}" in the workbench.`}
            label="Save step"
            validate={() => rxnRead.error ?? (reversible && !draft?.reactionThermo ? "A reversible step needs the reaction free energy." : null)}
          />
        </div>
      )}
      <p className="text-xs text-ink-600">Rate constants are model estimates; for heating or scale-up, calorimetry and the site's process-safety review decide, and local codes and licensed practice govern.</p>
    </aside>
  );
}
