/**
 * Editing a mechanism in the browser: add library steps (pinned to the version shown),
 * add local steps and species, reorder, remove, set visibility, and save with a change
 * message. The save carries the version it was based on; a stale save is refused by the
 * server with the newer change shown, and the edits here stay in place.
 */
import { useEffect, useMemo, useState } from "react";
import { Form, useFetcher, useNavigation } from "react-router";
import { CsrfInput } from "../CsrfInput";
import type { DocumentStep } from "../../../solver/exchange-format";
import { rateAt } from "../../../db/access/mechanism-diff";
import { sig } from "../library/format";
import type { LibrarySearchHit } from "../library/search-hit";
import { entryAsInput, speciesKey } from "../library/step-schema";
import { StepTermsEditor, emptyTerms, termsOf, type TermsDraft } from "../StepTermsEditor";
import { termsBalance } from "../step-guards";
import { stepNumbers } from "../workbench/step-rates";
import { reactionText } from "../names";
import { useLeaveGuard } from "../LeaveGuard";
import { ReactionEnergyFields, freshReactionEnergy, thermoOfDraft, type ReactionEnergyDraft } from "../ReactionEnergyFields";

export interface EditorEntry {
  key: string;
  kind: "library" | "local";
  stepVersionId?: number;
  versionNumber?: number;
  label: string;
  reaction: string;
  step?: DocumentStep;
  fromStepVersionId?: number;
}
export interface EditorSpeciesEntry {
  key: string;
  speciesId: number;
  label: string;
  formula: string | null;
}

interface Props {
  name: string;
  description: string;
  visibility: "private" | "group" | "public";
  species: EditorSpeciesEntry[];
  entries: EditorEntry[];
  allSpecies: Array<{ id: number; label: string; formula: string | null }>;
  baseVersion: number;
  canGroup: boolean;
  /** Address of the mechanism's page, to open the newer version beside the edits. */
  pageUrl: string;
  error?: { message: string; conflict?: { version: number; author: string | null; message: string; at: string } } | null;
}


export function MechanismEditor(p: Props) {
  const [name, setName] = useState(p.name);
  const [description, setDescription] = useState(p.description);
  const [visibility, setVisibility] = useState(p.visibility);
  const [species, setSpecies] = useState(p.species);
  const [entries, setEntries] = useState(p.entries);
  const [message, setMessage] = useState("");
  const [q, setQ] = useState("");
  const [hits, setHits] = useState<LibrarySearchHit[]>([]);
  const [searchNote, setSearchNote] = useState("");
  const busy = useNavigation().state === "submitting";
  const byKey = useMemo(() => new Map(p.allSpecies.map((s) => [speciesKey(s.id), s])), [p.allSpecies]);

  useEffect(() => {
    const text = q.trim();
    if (text.length < 2) {
      setHits([]);
      return;
    }
    const ctl = new AbortController();
    const t = setTimeout(async () => {
      try {
        const r = await fetch(`/api/v1/steps?q=${encodeURIComponent(text)}&limit=10`, { signal: ctl.signal, headers: { Accept: "application/json" } });
        const body = await r.json();
        if (!r.ok) return setSearchNote(body?.error?.message ?? "Search failed.");
        setHits(body.items);
        setSearchNote(body.items.length ? "" : "No library steps match.");
      } catch {
        /* aborted */
      }
    }, 200);
    return () => {
      clearTimeout(t);
      ctl.abort();
    };
  }, [q]);

  const addLibrary = (h: LibrarySearchHit) => {
    if (entries.some((e) => e.key === `L${h.id}`)) return setSearchNote(`"${h.label}" is already in the mechanism.`);
    setEntries([...entries, { key: `L${h.id}`, kind: "library", stepVersionId: h.versionId, versionNumber: h.version, label: h.label, reaction: h.reaction }]);
  };

  // New local step: any number of reactants and products, balance and barrier checked as typed; the form starts afresh after each add.
  const freshLocal = { label: "", dG: "", unit: "kJ/mol", T: "298.15", standardState: "1M" as "1M" | "1bar" | "1atm" };
  const [ls, setLs] = useState(freshLocal);
  const [terms, setTerms] = useState<TermsDraft>(emptyTerms);
  const [lsError, setLsError] = useState("");
  const [rxn, setRxn] = useState<ReactionEnergyDraft>(freshReactionEnergy);
  const rxnRead = thermoOfDraft(rxn);
  const nameOfKey = (k: string) => byKey.get(k)?.label ?? species.find((s) => s.key === k)?.label ?? k;
  const reactants = termsOf(terms.reactants);
  const products = termsOf(terms.products);
  const localBalance = termsBalance(reactants, products, (k) => byKey.get(k));
  const dGValue = Number(ls.dG.replace(",", "."));
  const TValue = Number(ls.T.replace(",", "."));
  const localStep: DocumentStep | null =
    reactants.length && products.length && ls.dG.trim() && Number.isFinite(dGValue) && TValue > 0
      ? {
          id: "local",
          ...(ls.label.trim() ? { label: ls.label.trim() } : {}),
          reactants,
          products,
          reversible: false,
          barrier: { form: "dG", dG: dGValue, unit: ls.unit as "kJ/mol", T: TValue, standardState: ls.standardState },
          ...(rxnRead.thermo ? { reactionThermo: rxnRead.thermo } : {}),
          provenance: { source: "estimated" },
        }
      : null;
  const localCaution = localStep
    ? stepNumbers({ format: "saddlebook.mechanism", version: 1, about: { name: "draft" }, species: [], steps: [localStep] }, TValue)[0]?.caution ?? null
    : null;
  const addLocal = () => {
    if (!reactants.length || !products.length) return setLsError("Choose at least one reactant and one product.");
    if ([...reactants, ...products].some((t) => !(t.coef > 0))) return setLsError("Coefficients must be positive numbers.");
    if (!ls.dG.trim() || !Number.isFinite(dGValue)) return setLsError("ΔG‡ must be a number.");
    if (!(TValue > 0)) return setLsError("T must be above 0 K.");
    if (rxnRead.error) return setLsError(rxnRead.error);
    let n = entries.length + 1;
    while (entries.some((e) => e.key === `local-${n}`)) n++;
    const key = `local-${n}`;
    const step: DocumentStep = { ...localStep!, id: key };
    const reaction = reactionText(step, nameOfKey);
    setEntries([...entries, { key, kind: "local", label: ls.label.trim() || reaction, reaction, step }]);
    const newKeys = [...new Set([...reactants, ...products].map((t) => t.species))].filter((k) => !species.some((s) => s.key === k));
    if (newKeys.length) setSpecies([...species, ...newKeys.flatMap((k) => (byKey.has(k) ? [{ key: k, speciesId: byKey.get(k)!.id, label: byKey.get(k)!.label, formula: byKey.get(k)!.formula }] : []))]);
    setLs(freshLocal);
    setRxn(freshReactionEnergy());
    setTerms(emptyTerms());
    setLsError("");
  };

  // A species new to the registry, created from here (intent=species on the mechanism page) and added to the mechanism.
  const speciesFetcher = useFetcher<{ ok: boolean; message: string; species?: { id: number; label: string; formula: string | null } }>();
  const created = speciesFetcher.data?.ok ? speciesFetcher.data.species : undefined;
  useEffect(() => {
    if (created) setSpecies((list) => (list.some((x) => x.speciesId === created.id) ? list : [...list, { key: speciesKey(created.id), speciesId: created.id, label: created.label, formula: created.formula }]));
  }, [created]);

  const move = (i: number, d: -1 | 1) => {
    const j = i + d;
    if (j < 0 || j >= entries.length) return;
    const copy = [...entries];
    [copy[i], copy[j]] = [copy[j], copy[i]];
    setEntries(copy);
  };

  const [spPick, setSpPick] = useState("");
  // Unsaved: any change to the mechanism, a typed change message, or a local step half typed.
  const dirty =
    name !== p.name ||
    description !== p.description ||
    visibility !== p.visibility ||
    message.trim() !== "" ||
    JSON.stringify(species.map((s) => s.key)) !== JSON.stringify(p.species.map((s) => s.key)) ||
    JSON.stringify(entries) !== JSON.stringify(p.entries) ||
    JSON.stringify(ls) !== JSON.stringify(freshLocal) ||
    rxn.dG.trim() !== "" ||
    JSON.stringify(terms) !== JSON.stringify(emptyTerms());
  const leave = useLeaveGuard(dirty);
  const payload = JSON.stringify({
    name,
    description: description || undefined,
    visibility,
    species: species.map((s) => ({ key: s.key, speciesId: s.speciesId })),
    steps: entries.map(entryAsInput),
    message,
    baseVersion: p.baseVersion,
  });
  const speciesChoices = p.allSpecies.map((s) => ({ value: speciesKey(s.id), text: `${s.label}${s.formula ? ` (${s.formula})` : ""}` }));
  const localSpeciesOptions = speciesChoices.map((o) => (
    <option key={o.value} value={o.value.slice(1)}>
      {o.text}
    </option>
  ));

  return (
    <div className="space-y-4" data-testid="mechanism-editor">
      {leave.dialog}
      {p.error && (
        <div className="rounded bg-brick-100 px-3 py-2 text-sm text-brick-700" role="alert">
          <p>{p.error.message}</p>
          {p.error.conflict && (
            <p className="mt-1">
              Newer version: v{p.error.conflict.version} by {p.error.conflict.author ?? "someone"} at {p.error.conflict.at.slice(0, 16).replace("T", " ")} UTC — “{p.error.conflict.message}”. Your edits are still here;{" "}
              <a className="underline" href={p.pageUrl} target="_blank" rel="noreferrer">
                open the newer version in a new tab
              </a>{" "}
              to compare.
            </p>
          )}
        </div>
      )}
      <section className="panel grid gap-3 md:grid-cols-3">
        <div className="md:col-span-2">
          <label className="label" htmlFor="m-name">
            Name
          </label>
          <input id="m-name" className="field" value={name} onChange={(e) => setName(e.target.value)} maxLength={300} />
        </div>
        <div>
          <label className="label" htmlFor="m-vis">
            Visibility
          </label>
          <select id="m-vis" className="field" value={visibility} onChange={(e) => setVisibility(e.target.value as Props["visibility"])}>
            <option value="private">Private (only you)</option>
            {p.canGroup && <option value="group">Group</option>}
            <option value="public">Public (everyone signed in and the API)</option>
          </select>
        </div>
        <div className="md:col-span-3">
          <label className="label" htmlFor="m-desc">
            Description
          </label>
          <textarea id="m-desc" className="field" value={description} onChange={(e) => setDescription(e.target.value)} />
        </div>
      </section>

      <section className="panel">
        <h2 className="font-semibold">Steps ({entries.length})</h2>
        <table className="mt-2 w-full text-sm">
          <tbody>
            {entries.map((e, i) => (
              <tr key={e.key} className="border-t border-ink-100" data-testid="editor-step">
                <td className="num w-8 py-1 text-ink-500">{i + 1}</td>
                <td>
                  <div className="font-medium">{e.label}</div>
                  <div className="text-xs text-ink-600">{e.reaction}</div>
                </td>
                <td className="text-xs">{e.kind === "library" ? `library, pinned v${e.versionNumber ?? "?"}` : "local"}</td>
                <td className="text-xs">{e.step ? `k(298.15 K) = ${sig(rateAt(e.step, 298.15).k)} ${rateAt(e.step, 298.15).unit}` : ""}</td>
                <td className="whitespace-nowrap text-right">
                  <button type="button" className="btn-quiet px-2" aria-label="Move up" onClick={() => move(i, -1)}>
                    ↑
                  </button>
                  <button type="button" className="btn-quiet px-2" aria-label="Move down" onClick={() => move(i, 1)}>
                    ↓
                  </button>
                  <button type="button" className="btn-quiet px-2" aria-label={`Remove ${e.label}`} onClick={() => setEntries(entries.filter((_, j) => j !== i))}>
                    Remove
                  </button>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </section>

      <div className="grid gap-4 md:grid-cols-2">
        <section className="panel text-sm">
          <h2 className="font-semibold">Add from the library (pinned to its version)</h2>
          <input className="field mt-2" type="search" placeholder="Search the library" aria-label="Search the library" value={q} onChange={(e) => setQ(e.target.value)} />
          {searchNote && <p className="mt-1 text-xs text-ink-600">{searchNote}</p>}
          <ul className="mt-2 space-y-1">
            {hits.map((h) => (
              <li key={h.id} className="flex items-center gap-2">
                <button type="button" className="btn-quiet px-2 py-0.5 text-xs" onClick={() => addLibrary(h)} aria-label={`Add ${h.label}`}>
                  Add
                </button>
                <span>
                  {h.label} <span className="text-xs text-ink-500">v{h.version} · {h.status}</span>
                </span>
              </li>
            ))}
          </ul>
        </section>
        <section className="panel text-sm">
          <h2 className="font-semibold">New local step</h2>
          <div className="mt-2 space-y-2">
            <input className="field" placeholder="Label (optional)" aria-label="Local step label" value={ls.label} onChange={(e) => setLs({ ...ls, label: e.target.value })} />
            <StepTermsEditor value={terms} onChange={setTerms} options={speciesChoices} label={(k, i) => `${k === "reactants" ? "Reactant" : "Product"} ${i + 1}`} balance={localBalance} />
            <div className="flex flex-wrap gap-1">
              <input className="field num w-24" placeholder="ΔG‡" aria-label="Local step ΔG‡" inputMode="decimal" value={ls.dG} onChange={(e) => setLs({ ...ls, dG: e.target.value })} />
              <select className="field w-auto" aria-label="Local step energy unit" value={ls.unit} onChange={(e) => setLs({ ...ls, unit: e.target.value })}>
                <option value="kJ/mol">kJ/mol</option>
                <option value="kcal/mol">kcal/mol</option>
                <option value="eV">eV</option>
              </select>
              <span className="self-center">at</span>
              <input className="field num w-24" aria-label="Local step T in K" value={ls.T} onChange={(e) => setLs({ ...ls, T: e.target.value })} />
              <span className="self-center">K (reference temperature),</span>
              <select className="field w-auto" aria-label="Local step standard state" value={ls.standardState} onChange={(e) => setLs({ ...ls, standardState: e.target.value as typeof ls.standardState })}>
                <option value="1M">1 mol/L (solution)</option>
                <option value="1bar">1 bar (gas)</option>
                <option value="1atm">1 atm (gas)</option>
              </select>
            </div>
            <ReactionEnergyFields d={rxn} onChange={setRxn} prefix="Local step" />
            {localCaution && (
              <p className="text-xs text-brick-700" role="status" data-testid="local-caution">
                {localCaution}
              </p>
            )}
          </div>
          {lsError && (
            <p className="mt-1 text-xs text-brick-700" role="alert">
              {lsError}
            </p>
          )}
          <button type="button" className="btn-quiet mt-2" onClick={addLocal}>
            Add local step
          </button>
        </section>
      </div>

      <section className="panel text-sm">
        <h2 className="font-semibold">Species ({species.length})</h2>
        <p className="mt-1">{species.map((s) => s.label).join(" · ") || "None yet: steps bring their species with them."}</p>
        <speciesFetcher.Form method="post" className="mt-2 flex flex-wrap gap-2" aria-label="New species">
          <CsrfInput />
          <input type="hidden" name="intent" value="species" />
          <input name="label" className="field max-w-56" placeholder="New species, e.g. benzyl alcohol" aria-label="New species label" required maxLength={500} />
          <input name="formula" className="field max-w-40" placeholder="Formula, e.g. C7H8O" aria-label="New species formula" maxLength={500} />
          <button className="btn-quiet" disabled={speciesFetcher.state !== "idle"}>
            Create species
          </button>
          {speciesFetcher.data && speciesFetcher.state === "idle" && (
            <span className={`self-center text-xs ${speciesFetcher.data.ok ? "text-moss-700" : "text-brick-700"}`} role="status">
              {speciesFetcher.data.message}
            </span>
          )}
        </speciesFetcher.Form>
        <div className="mt-2 flex gap-2">
          <select className="field max-w-md" aria-label="Species to add" value={spPick} onChange={(e) => setSpPick(e.target.value)}>
            <option value="">— add a species —</option>
            {localSpeciesOptions}
          </select>
          <button
            type="button"
            className="btn-quiet"
            onClick={() => {
              const s = p.allSpecies.find((x) => String(x.id) === spPick);
              if (s && !species.some((x) => x.speciesId === s.id)) setSpecies([...species, { key: `s${s.id}`, speciesId: s.id, label: s.label, formula: s.formula }]);
              setSpPick("");
            }}
          >
            Add species
          </button>
        </div>
      </section>

      <Form method="post" className="panel flex flex-wrap items-end gap-2" onSubmit={leave.allowLeaving}>
        <CsrfInput />
        <input type="hidden" name="intent" value="save" />
        <input type="hidden" name="payload" value={payload} />
        <div className="grow">
          <label className="label" htmlFor="m-message">
            What changed
          </label>
          <input id="m-message" name="message-visible" className="field" value={message} onChange={(e) => setMessage(e.target.value)} required maxLength={1000} placeholder="e.g. added the hydrolysis step" />
        </div>
        <button className="btn-primary" disabled={busy}>
          {busy ? "Saving…" : `Save as version ${p.baseVersion + 1}`}
        </button>
      </Form>
    </div>
  );
}
