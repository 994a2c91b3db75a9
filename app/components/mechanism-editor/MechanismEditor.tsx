/**
 * Editing a mechanism in the browser: add library steps (pinned to the version shown),
 * add local steps and species, reorder, remove, set visibility, and save with a change
 * message. The save carries the version it was based on; a stale save is refused by the
 * server with the newer change shown, and the edits here stay in place.
 */
import { useEffect, useMemo, useState } from "react";
import { Form, useNavigation } from "react-router";
import { CsrfInput } from "../CsrfInput";
import type { DocumentStep } from "../../../solver/exchange-format";
import { rateAt } from "../../../db/access/mechanism-diff";
import { sig } from "../library/format";
import type { LibrarySearchHit } from "../library/search-hit";
import { entryAsInput } from "../library/step-schema";

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
  const labelOf = useMemo(() => new Map(p.allSpecies.map((s) => [`s${s.id}`, s.label])), [p.allSpecies]);

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

  // New local step.
  const [ls, setLs] = useState({ label: "", r1: "", r2: "", p1: "", p2: "", dG: "", unit: "kJ/mol", T: "298.15" });
  const [lsError, setLsError] = useState("");
  const addLocal = () => {
    const dG = Number(ls.dG.replace(",", "."));
    const T = Number(ls.T.replace(",", "."));
    const reactants = [ls.r1, ls.r2].filter(Boolean);
    const products = [ls.p1, ls.p2].filter(Boolean);
    if (!reactants.length || !products.length) return setLsError("Choose at least one reactant and one product.");
    if (!ls.dG.trim() || !Number.isFinite(dG)) return setLsError("ΔG‡ must be a number.");
    if (!(T > 0)) return setLsError("T must be above 0 K.");
    const count = (ids: string[]) => Object.entries(ids.reduce<Record<string, number>>((m, id) => ((m[id] = (m[id] ?? 0) + 1), m), {})).map(([id, coef]) => ({ species: `s${id}`, coef }));
    let n = entries.length + 1;
    while (entries.some((e) => e.key === `local-${n}`)) n++;
    const key = `local-${n}`;
    const step: DocumentStep = {
      id: key,
      ...(ls.label.trim() ? { label: ls.label.trim() } : {}),
      reactants: count(reactants),
      products: count(products),
      reversible: false,
      barrier: { form: "dG", dG, unit: ls.unit as "kJ/mol", T, standardState: "1M" },
      provenance: { source: "estimated" },
    };
    const text = (ts: DocumentStep["reactants"]) => ts.map((t) => `${t.coef > 1 ? t.coef + " " : ""}${labelOf.get(t.species) ?? t.species}`).join(" + ");
    setEntries([...entries, { key, kind: "local", label: ls.label.trim() || `${text(step.reactants)} → ${text(step.products)}`, reaction: `${text(step.reactants)} → ${text(step.products)}`, step }]);
    const newSpecies = [...reactants, ...products].filter((id) => !species.some((s) => s.speciesId === Number(id)));
    if (newSpecies.length) setSpecies([...species, ...[...new Set(newSpecies)].map((id) => ({ key: `s${id}`, speciesId: Number(id), label: labelOf.get(`s${id}`) ?? id, formula: null }))]);
    setLs({ ...ls, label: "", dG: "" });
    setLsError("");
  };

  const move = (i: number, d: -1 | 1) => {
    const j = i + d;
    if (j < 0 || j >= entries.length) return;
    const copy = [...entries];
    [copy[i], copy[j]] = [copy[j], copy[i]];
    setEntries(copy);
  };

  const [spPick, setSpPick] = useState("");
  const payload = JSON.stringify({
    name,
    description: description || undefined,
    visibility,
    species: species.map((s) => ({ key: s.key, speciesId: s.speciesId })),
    steps: entries.map(entryAsInput),
    message,
    baseVersion: p.baseVersion,
  });
  const localSpeciesOptions = p.allSpecies.map((s) => (
    <option key={s.id} value={s.id}>
      {s.label}
      {s.formula ? ` (${s.formula})` : ""}
    </option>
  ));

  return (
    <div className="space-y-4" data-testid="mechanism-editor">
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
          <div className="mt-2 grid grid-cols-2 gap-2">
            <input className="field col-span-2" placeholder="Label (optional)" aria-label="Local step label" value={ls.label} onChange={(e) => setLs({ ...ls, label: e.target.value })} />
            {(["r1", "r2", "p1", "p2"] as const).map((k) => (
              <select key={k} className="field" aria-label={{ r1: "Reactant 1", r2: "Reactant 2", p1: "Product 1", p2: "Product 2" }[k]} value={ls[k]} onChange={(e) => setLs({ ...ls, [k]: e.target.value })}>
                <option value="">{{ r1: "Reactant 1", r2: "Reactant 2 (optional)", p1: "Product 1", p2: "Product 2 (optional)" }[k]}</option>
                {localSpeciesOptions}
              </select>
            ))}
            <input className="field num" placeholder="ΔG‡" aria-label="Local step ΔG‡" inputMode="decimal" value={ls.dG} onChange={(e) => setLs({ ...ls, dG: e.target.value })} />
            <div className="flex gap-1">
              <select className="field" aria-label="Local step energy unit" value={ls.unit} onChange={(e) => setLs({ ...ls, unit: e.target.value })}>
                <option value="kJ/mol">kJ/mol</option>
                <option value="kcal/mol">kcal/mol</option>
                <option value="eV">eV</option>
              </select>
              <input className="field num w-24" aria-label="Local step T in K" value={ls.T} onChange={(e) => setLs({ ...ls, T: e.target.value })} />
              <span className="self-center">K</span>
            </div>
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

      <Form method="post" className="panel flex flex-wrap items-end gap-2">
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
