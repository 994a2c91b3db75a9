/**
 * /mechanisms/:id/workbench — the mechanism as a graph, the rate table and the free-energy
 * profile at a chosen temperature (K or °C), and runs: conditions with presets saved on the
 * mechanism, run in the worker pool with live progress and cancel, results one click away.
 * ?version=N works on an earlier version.
 */
import { useCallback, useEffect, useMemo, useRef, useState } from "react";
import { data, Link, useFetcher, useRevalidator, useRouteLoaderData } from "react-router";
import type { Route } from "./+types/mechanisms.$id.workbench";
import { requireUser } from "~/auth/current-user.server";
import { assertCsrf } from "~/auth/csrf.server";
import { Forbidden, can } from "~/auth/policy.server";
import { MechanismGraph, type Positions } from "~/components/workbench/MechanismGraph";
import { orphanSpecies } from "~/components/workbench/graph-layout";
import { RateTable } from "~/components/workbench/RateTable";
import { EnergyProfile } from "~/components/workbench/EnergyProfile";
import { ConditionsForm, buildRequest, defaultDraft, type ConditionsDraft } from "~/components/workbench/ConditionsForm";
import { CautionNote } from "~/components/workbench/CautionNote";
import { freeEnergyProfile, stepNumbers } from "~/components/workbench/step-rates";
import { cycleSummary, defaultCycle } from "~/components/workbench/cycle-summary";
import { CyclePanel } from "~/components/workbench/CyclePanel";
import { namesOf, type Names } from "~/components/names";
import { describeBarrier, describeThermo } from "~/components/barrier-text";
import { duration, num } from "~/components/workbench/format";
import { downloadSvg, downloadSvgAsPng } from "~/components/plots/svg-export";
import { HIGH_CONCENTRATION_MOL_L, toEngineConditions } from "~/compute/run-request";
import { emptyMechanismDocument, loadMechanismDocument } from "~/compute/mechanism-source.server";
import { RunCreateSchema, cancelRun, readableRun, startRun } from "~/compute/run-api.server";
import { PositionsSchema, PresetSchema, layoutPositions, presetsOf, saveLayout, savePreset } from "~/compute/workbench-state.server";
import { getDb } from "../../db/client.server";
import { getMechanism, getMechanismRow, owned } from "../../db/access/mechanisms.server";
import { applyGraphEdit, graphEditFailure } from "~/compute/graph-edit.server";
import { AddStepControl, StepEditPanel, type EntryInfo } from "~/components/workbench/GraphEditing";
import { listRuns } from "../../db/access/runs.server";
import { listEnsembles } from "../../db/access/ensembles.server";
import { NotFoundError } from "../../db/access/library-errors";
import { useLeaveGuard } from "~/components/LeaveGuard";

export function meta({ data }: Route.MetaArgs): Route.MetaDescriptors {
  return [{ title: `Workbench · ${data?.name ?? "Mechanism"} · Saddlebook` }];
}

async function mechanismRow(user: Parameters<typeof getMechanismRow>[1], id: number) {
  try {
    return await getMechanismRow(getDb(), user, id);
  } catch (e) {
    if (e instanceof NotFoundError) throw new Response("There is no mechanism with this number that you can see.", { status: 404 });
    throw e;
  }
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const id = Number(params.id);
  if (!Number.isInteger(id) || id <= 0) throw new Response("Not found", { status: 404 });
  const row = await mechanismRow(user, id);
  const v = Number(new URL(request.url).searchParams.get("version") ?? "") || undefined;
  // A mechanism with no steps yet has no exchange-format document (it needs a step): the page
  // opens on an empty state that says to add one.
  const loaded = (await emptyMechanismDocument(getDb(), row, v)) ?? (await loadMechanismDocument(getDb(), user, id, v));
  if (!loaded.ok) throw new Response(loaded.message, { status: loaded.status });
  const runs = await listRuns(getDb(), user, { mechanismId: id, limit: 20 });
  const ensembles = await listEnsembles(getDb(), user, { mechanismId: id, limit: 20 });
  const canWrite = can(user, { do: "mechanism.write", object: owned(row) });
  // Which steps are pinned library versions (and which have a newer approved one), for the side panel.
  const detail = await getMechanism(getDb(), user, id, loaded.version);
  const entries: Record<string, EntryInfo> = Object.fromEntries(
    detail.resolved.steps.map((s) => [s.key, { kind: s.kind, stepId: s.stepId ?? null, versionNumber: s.versionNumber ?? null, status: s.status ?? null, update: loaded.version === row.current_version ? (detail.updates[s.key]?.number ?? null) : null }]),
  );
  const editable = canWrite && loaded.version === row.current_version;
  const allSpecies: Array<{ id: number; label: string; formula: string | null }> = editable ? await getDb()("species").select("id", "label", "formula").orderBy("label").limit(3000) : [];
  return {
    id,
    name: row.name,
    version: loaded.version,
    latest: row.current_version,
    doc: loaded.document,
    positions: layoutPositions(row.layout),
    presets: presetsOf(row.condition_presets),
    canWrite,
    editable,
    entries,
    allSpecies,
    canRun: can(user, { do: "run.create", object: owned(row) }),
    runs: runs.map((r) => ({ id: r.id, name: r.name, status: r.status, version: r.mechanismVersion, createdAt: r.createdAt.toISOString() })),
    ensembles: ensembles.map((e) => ({ id: e.id, name: e.name, status: e.status, version: e.mechanismVersion })),
  };
}

/** A form field holding JSON (written by the page's own script), or `unreadable` when it is not JSON. */
const unreadable = Symbol("unreadable");
function jsonField(form: FormData, name: string, absent: string): unknown {
  try {
    return JSON.parse(String(form.get(name) ?? absent));
  } catch {
    return unreadable;
  }
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const form = await request.formData();
  await assertCsrf(request, form);
  const db = getDb();
  const id = Number(params.id);
  if (!Number.isInteger(id) || id <= 0) throw new Response("Not found", { status: 404 });
  const intent = String(form.get("intent"));
  const refuse = (error: string) => data({ intent, error }, { status: 400 });
  if (intent === "graph-edit") {
    try {
      const raw = jsonField(form, "payload", "");
      const r = await applyGraphEdit(db, user, id, raw === unreadable ? null : raw);
      return { intent, ok: true as const, version: r.version };
    } catch (e) {
      return graphEditFailure(e);
    }
  }
  try {
    if (intent === "layout") {
      const positions = jsonField(form, "positions", "{}");
      if (positions === unreadable) return refuse("The layout could not be read: it is not JSON.");
      const p = PositionsSchema.safeParse(positions);
      if (!p.success) return refuse(`The layout could not be read: ${p.error.issues[0].message}`);
      await saveLayout(db, user, id, p.data);
      return { intent, ok: true };
    }
    if (intent === "preset") {
      const draft = jsonField(form, "draft", "{}");
      if (draft === unreadable) return refuse("The preset's conditions could not be read: they are not JSON.");
      const p = PresetSchema.safeParse({ name: form.get("name"), draft });
      if (!p.success) return refuse(p.error.issues[0].message);
      await savePreset(db, user, id, p.data);
      return { intent, ok: true };
    }
    if (intent === "run") {
      const req = jsonField(form, "request", "{}");
      if (req === unreadable || req === null || typeof req !== "object" || Array.isArray(req)) return refuse("The run request could not be read: it is not a JSON object.");
      const body = RunCreateSchema.safeParse({ ...req, mechanismId: id, mechanismVersion: Number(form.get("version")) || undefined, name: String(form.get("name") ?? "") || undefined });
      if (!body.success) return refuse(body.error.issues[0].message);
      const started = await startRun(db, user, body.data);
      if (!started.ok) return { intent, error: ((await started.response.json()) as { error: { message: string } }).error.message };
      return { intent, runId: started.id };
    }
    if (intent === "cancel") {
      const r = await readableRun(db, user, String(form.get("runId")));
      if (!r.ok) return { intent, error: "No such run." };
      const c = await cancelRun(db, user, r.run);
      return c.ok ? { intent, ok: true } : { intent, error: ((await c.response.json()) as { error: { message: string } }).error.message };
    }
  } catch (e) {
    if (e instanceof Response) throw e;
    if (e instanceof Forbidden) return { intent, error: e.message };
    throw e;
  }
  return { intent, error: "Unknown request." };
}

type RunState = { id: number; status: string; progress: number; tEnd: number; reason: string | null; analysis?: { species: Record<string, { t50?: number | null; initial: number }> } };

export default function Workbench(props: Route.ComponentProps) {
  // Separate components, so adding the first step mounts the full workbench afresh.
  return props.loaderData.doc.steps.length === 0 ? <EmptyWorkbench {...props} /> : <WorkbenchWithSteps {...props} />;
}

function EmptyWorkbench({ loaderData: L }: Route.ComponentProps) {
  const [dirty, setDirty] = useState(false);
  const leave = useLeaveGuard(dirty);
  return (
    <div className="space-y-4">
      {leave.dialog}
      <header className="flex flex-wrap items-center gap-3">
        <h1 className="text-2xl font-semibold tracking-tight">
          {L.name} <span className="text-base font-normal text-ink-500">version {L.version}</span>
        </h1>
        <Link to={`/mechanisms/${L.id}`} className="btn-quiet ml-auto">
          Mechanism page
        </Link>
      </header>
      <section className="panel space-y-3" data-testid="workbench-empty">
        <h2 className="font-semibold">No steps yet</h2>
        <p className="text-sm text-ink-700">
          This mechanism has no elementary steps, so there is nothing to draw, compute or simulate yet. Add a step to start
          {L.editable ? ": from the shared library, or a local step of your own." : "; only the owner can add steps (fork it to make your own copy)."}
        </p>
        {L.editable && <AddStepControl doc={L.doc} allSpecies={L.allSpecies} baseVersion={L.version} T={298.15} onDirty={setDirty} />}
      </section>
    </div>
  );
}

function WorkbenchWithSteps({ loaderData }: Route.ComponentProps) {
  const L = loaderData;
  const [Tvalue, setTvalue] = useState("25");
  const [Tunit, setTunit] = useState<"K" | "°C">("°C");
  const T = (() => {
    const v = Number(Tvalue);
    if (!Number.isFinite(v)) return null;
    const K = Tunit === "K" ? v : v + 273.15;
    return K > 0 ? K : null;
  })();
  const numbers = useMemo(() => (T ? stepNumbers(L.doc, T) : []), [L.doc, T]);
  const names = useMemo(() => namesOf(L.doc), [L.doc]);
  const orphans = useMemo(() => orphanSpecies(L.doc), [L.doc]);
  // Unsaved input in the graph's forms (new step, step panel) makes leaving the page ask first.
  const [dirty, setDirty] = useState({ add: false, panel: false });
  const addDirty = useCallback((d: boolean) => setDirty((x) => (x.add === d ? x : { ...x, add: d })), []);
  const panelDirty = useCallback((d: boolean) => setDirty((x) => (x.panel === d ? x : { ...x, panel: d })), []);
  const [draft, setDraft] = useState<ConditionsDraft>(() => defaultDraft(L.doc.species.map((s) => s.id)));
  // The conditions form counts as unsaved once it differs from what was last run or saved as a preset.
  const [settledDraft, setSettledDraft] = useState<string>(() => JSON.stringify(defaultDraft(L.doc.species.map((s) => s.id))));
  const conditionsDirty = JSON.stringify(draft) !== settledDraft;
  const leave = useLeaveGuard(dirty.add || dirty.panel || conditionsDirty);
  const [selected, setSelected] = useState<string | null>(null);
  // The pathway starts as the mechanism's catalytic cycle when it has one, else its first steps.
  const [pathway, setPathway] = useState<string[]>(() => defaultCycle(L.doc) ?? L.doc.steps.slice(0, Math.min(4, L.doc.steps.length)).map((s) => s.id));
  const profile = useMemo(() => freeEnergyProfile(L.doc, numbers, pathway), [L.doc, numbers, pathway]);
  const cycle = useMemo(() => (T && pathway.length ? cycleSummary(L.doc, numbers, pathway, T) : null), [L.doc, numbers, pathway, T]);
  const unknownLevels = [...new Set(profile.flatMap((p) => (p.unknown ? [p.unknown] : [])))];
  const profileRef = useRef<SVGSVGElement>(null);
  const layoutFetcher = useFetcher();
  const presetFetcher = useFetcher();
  const runFetcher = useFetcher<{ intent: string; runId?: number; error?: string }>();
  const cancelFetcher = useFetcher();
  const revalidator = useRevalidator();
  const saved = useMemo(() => L.positions as Positions, [L.positions]);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [presetName, setPresetName] = useState("");
  const [run, setRun] = useState<RunState | null>(null);
  const csrfToken = (useRouteLoaderData("root") as { csrf?: string } | undefined)?.csrf ?? "";

  const savePositions = useCallback(
    (p: Positions) => {
      if (!L.canWrite) return;
      layoutFetcher.submit({ intent: "layout", positions: JSON.stringify(p), csrf: csrfToken }, { method: "post" });
    },
    [L.canWrite, layoutFetcher, csrfToken],
  );

  // Follow the started run through the API until it ends.
  const runId = runFetcher.data?.runId;
  useEffect(() => {
    if (!runId) return;
    let stop = false;
    const poll = async () => {
      const res = await fetch(`/api/v1/runs/${runId}`, { headers: { Accept: "application/json" } });
      if (!res.ok || stop) return;
      const r = ((await res.json()) as { run: { id: number; status: string; progress: { time: { value: number }; endTime: { value: number } }; reason: string | null; analysis?: RunState["analysis"] } }).run;
      setRun({ id: r.id, status: r.status, progress: r.progress.time.value, tEnd: r.progress.endTime.value, reason: r.reason, analysis: r.analysis });
      if (["queued", "running"].includes(r.status)) setTimeout(() => void poll(), 400);
      else void revalidator.revalidate();
    };
    void poll();
    return () => {
      stop = true;
    };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [runId]);

  const built = buildRequest(draft);
  const heating = draft.mode !== "isothermal";
  const engineCond = built.ok ? toEngineConditions(built.conditions, L.doc.species.map((s) => s.id)) : null;
  const concentrated = !!(engineCond?.ok && engineCond.value.maxInitial >= HIGH_CONCENTRATION_MOL_L);

  function startRunClick() {
    if (!built.ok) return setErrors(built.errors);
    setErrors({});
    setRun(null);
    setSettledDraft(JSON.stringify(draft));
    runFetcher.submit({ intent: "run", version: String(L.version), request: JSON.stringify({ conditions: built.conditions, solver: built.solver }), csrf: csrfToken }, { method: "post" });
  }

  const active = run && (run.status === "queued" || run.status === "running");
  return (
    <div className="space-y-4">
      {leave.dialog}
      <header className="flex flex-wrap items-center gap-3">
        <h1 className="text-2xl font-semibold tracking-tight">
          {L.name} <span className="text-base font-normal text-ink-500">version {L.version}{L.version !== L.latest ? ` (latest ${L.latest})` : ""}</span>
        </h1>
        <Link to={`/mechanisms/${L.id}`} className="btn-quiet ml-auto">
          Mechanism page
        </Link>
      </header>

      <section className="panel flex flex-wrap items-end gap-3">
        <label className="block">
          <span className="label">Temperature</span>
          <input aria-label="Workbench temperature" className={`field num w-28 ${T ? "" : "field-error"}`} value={Tvalue} onChange={(e) => setTvalue(e.target.value)} inputMode="decimal" />
        </label>
        <label className="block">
          <span className="label">unit</span>
          <select aria-label="Workbench temperature unit" className="field" value={Tunit} onChange={(e) => setTunit(e.target.value as "K" | "°C")}>
            <option>K</option>
            <option>°C</option>
          </select>
        </label>
        <input type="range" min={200} max={500} step={1} value={T ?? 298} aria-label="Temperature slider (K)" onChange={(e) => (setTunit("K"), setTvalue(e.target.value))} className="w-56" />
        <span className="num text-sm text-ink-600">{T ? `${num(T, 5)} K = ${num(T - 273.15, 5)} °C` : "Give a temperature above 0 K."}</span>
      </section>

      <section className="grid gap-4 xl:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <div className="panel">
          <div className="mb-2 flex items-center gap-2">
            <h2 className="font-semibold">Graph</h2>
            {L.editable && <AddStepControl doc={L.doc} allSpecies={L.allSpecies} baseVersion={L.version} T={T} onDirty={addDirty} />}
          </div>
          <MechanismGraph doc={L.doc} numbers={numbers} saved={saved} selected={selected} onSelect={setSelected} onPositions={L.canWrite ? savePositions : undefined} />
          <p className="mt-1 text-xs text-ink-500">
            Step nodes show ΔG‡ (1 mol/L) and k at the temperature above. {L.canWrite ? "Drag nodes to arrange; positions are saved with the mechanism." : "Only the owner's arrangement is saved."}
          </p>
          {orphans.length > 0 && (
            <p className="mt-1 rounded bg-amber-note px-2 py-1 text-xs text-ink-800" data-testid="orphan-species">
              Not used by any step, so not drawn: {orphans.map((id) => names.speciesWithFormula(id)).join(", ")}. They stay in the mechanism's species (they can still be given an
              initial concentration); remove them on the mechanism page if they are no longer wanted.
            </p>
          )}
          {selected && L.editable && L.entries[selected] && (
            <StepEditPanel key={`${selected}@${L.version}`} id={selected} doc={L.doc} entry={L.entries[selected]} T={T} baseVersion={L.version} onClose={() => setSelected(null)} onDirty={panelDirty} />
          )}
          {selected && !(L.editable && L.entries[selected]) && <StepPanel id={selected} doc={L.doc} names={names} numbers={numbers} onClose={() => setSelected(null)} mechanismId={L.id} />}
        </div>
        <div className="panel space-y-3">
          <h2 className="font-semibold">Run</h2>
          <ConditionsForm draft={draft} onChange={setDraft} errors={errors} labels={Object.fromEntries(L.doc.species.map((s) => [s.id, names.speciesWithFormula(s.id)]))} presets={L.presets.map((p) => ({ name: p.name, draft: { ...defaultDraft(L.doc.species.map((s) => s.id)), ...(p.draft as Partial<ConditionsDraft>) } }))} />
          <CautionNote heating={heating} concentrated={concentrated} />
          <div className="flex flex-wrap gap-2">
            <button type="button" className="btn-primary" onClick={startRunClick} disabled={!L.canRun || runFetcher.state !== "idle" || !!active}>
              {runFetcher.state !== "idle" ? "Starting…" : "Run"}
            </button>
            {L.canWrite && (
              <span className="inline-flex gap-1">
                <input aria-label="Preset name" className="field w-40 py-1" placeholder="preset name" value={presetName} onChange={(e) => setPresetName(e.target.value)} />
                <button
                  type="button"
                  className="btn-quiet"
                  disabled={!presetName.trim()}
                  onClick={() => {
                    setSettledDraft(JSON.stringify(draft));
                    presetFetcher.submit({ intent: "preset", name: presetName, draft: JSON.stringify(draft), csrf: csrfToken }, { method: "post" });
                  }}
                >
                  Save as preset
                </button>
              </span>
            )}
          </div>
          {runFetcher.data?.error && <p role="alert" className="text-sm text-brick-700">{runFetcher.data.error}</p>}
          {run && (
            <div className="space-y-1 text-sm" data-testid="workbench-run">
              <div className="flex items-center gap-2">
                <span>
                  Run #{run.id}: <strong data-testid="workbench-run-status">{run.status}</strong> — t = {num(run.progress)} s of {num(run.tEnd)} s
                </span>
                {active && (
                  <button type="button" className="btn-quiet ml-auto py-0.5" onClick={() => cancelFetcher.submit({ intent: "cancel", runId: String(run.id), csrf: csrfToken }, { method: "post" })}>
                    Cancel
                  </button>
                )}
              </div>
              <div className="h-2 rounded bg-ink-100" role="progressbar" aria-valuenow={Math.round((run.progress / run.tEnd) * 100)}>
                <div className="h-2 rounded bg-copper-500" style={{ width: `${Math.min(100, (run.progress / run.tEnd) * 100)}%` }} />
              </div>
              {run.reason && <p className="text-brick-700">{names.text(run.reason)}</p>}
              {run.status === "done" && (
                <p>
                  {Object.entries(run.analysis?.species ?? {})
                    .filter(([, s]) => s.initial > 0)
                    .map(([id, s]) => `t½(${names.species(id)}) ${duration(s.t50)}`)
                    .join(", ")}{" "}
                  <Link className="font-medium underline" to={`/runs/${run.id}`}>
                    Open the results
                  </Link>
                </p>
              )}
            </div>
          )}
          {L.runs.length > 0 && (
            <div className="text-xs text-ink-500">
              Earlier runs:{" "}
              {L.runs.map((r) => (
                <Link key={r.id} to={`/runs/${r.id}`} className="mr-2 underline">
                  #{r.id} ({r.status}, v{r.version})
                </Link>
              ))}
            </div>
          )}
          <div className="flex flex-wrap items-center gap-2 text-xs text-ink-500">
            <Link to={`/mechanisms/${L.id}/ensembles/new`} className="btn-quiet py-0.5" data-testid="new-ensemble">
              New ensemble
            </Link>
            {L.ensembles.length > 0 && <span>Ensembles:</span>}
            {L.ensembles.map((e) => (
              <Link key={e.id} to={`/ensembles/${e.id}`} className="underline">
                #{e.id} {e.name} ({e.status}, v{e.version})
              </Link>
            ))}
          </div>
        </div>
      </section>

      <section className="panel">
        <h2 className="mb-2 font-semibold">Rate constants at {T ? `${num(T, 5)} K` : "—"}</h2>
        <RateTable numbers={numbers} onSelect={setSelected} />
      </section>

      <section className="panel space-y-2">
        <h2 className="font-semibold">Free-energy profile</h2>
        <p className="text-xs text-ink-500">
          Tick the steps of a pathway in order (each taken forward); a mechanism's catalytic cycle is ticked to begin with. Levels are the species present, in kJ/mol relative
          to the first, at the temperature above in the 1 mol/L standard state; intermediates need the step's reaction free energy (ΔG°rxn).
        </p>
        <div className="flex flex-wrap gap-2 text-sm">
          {L.doc.steps.slice(0, 200).map((s) => {
            const at = pathway.indexOf(s.id);
            return (
              <label key={s.id} className="inline-flex items-center gap-1">
                <input type="checkbox" checked={at >= 0} onChange={() => setPathway(at >= 0 ? pathway.filter((x) => x !== s.id) : [...pathway, s.id])} aria-label={`Pathway step ${names.step(s.id)}`} />
                {at >= 0 && <span className="num text-xs text-copper-700">{at + 1}.</span>}
                {names.step(s.id)}
              </label>
            );
          })}
        </div>
        {T && pathway.length > 0 && <EnergyProfile ref={profileRef} points={profile} T={T} />}
        {unknownLevels.length > 0 && (
          <p className="text-xs text-brick-700" role="status" data-testid="profile-unknown">
            Levels marked ? are unknown: {unknownLevels.join("; ")}.
          </p>
        )}
        {T && cycle && <CyclePanel summary={cycle} T={T} />}
        <div className="flex gap-2">
          <button type="button" className="btn-quiet" onClick={() => profileRef.current && downloadSvg(profileRef.current, "saddlebook-profile.svg")}>
            SVG
          </button>
          <button type="button" className="btn-quiet" onClick={() => profileRef.current && void downloadSvgAsPng(profileRef.current, "saddlebook-profile.png")}>
            PNG
          </button>
        </div>
      </section>
    </div>
  );
}

function StepPanel({
  id,
  doc,
  names,
  numbers,
  onClose,
  mechanismId,
}: {
  id: string;
  doc: Route.ComponentProps["loaderData"]["doc"];
  names: Names;
  numbers: ReturnType<typeof stepNumbers>;
  onClose: () => void;
  mechanismId: number;
}) {
  const st = doc.steps.find((s) => s.id === id);
  const n = numbers.find((x) => x.id === id);
  if (!st || !n) return null;
  return (
    <aside className="mt-3 rounded-md border border-copper-300 bg-copper-50 p-3 text-sm" aria-label="Step details" data-testid="step-panel">
      <div className="flex items-center">
        <h3 className="font-semibold">{names.step(id)}</h3>
        <button type="button" className="btn-quiet ml-auto py-0" onClick={onClose}>
          Close
        </button>
      </div>
      <p className="mt-1">{names.reaction(id)}</p>
      <dl className="mt-1 grid grid-cols-[auto_1fr] gap-x-3">
        <dt>barrier</dt>
        <dd className="num">{describeBarrier(st.barrier)}</dd>
        <dt>reaction free energy</dt>
        <dd className="num">{st.reactionThermo ? describeThermo(st.reactionThermo) : "not given"}</dd>
        <dt>k_fwd</dt>
        <dd className="num">
          {num(n.kf)} {n.kfUnit}
        </dd>
        {st.reversible && (
          <>
            <dt>k_rev</dt>
            <dd className="num">{n.kr === null ? "needs ΔG°rxn" : `${num(n.kr)} ${n.krUnit}`}</dd>
          </>
        )}
        {st.provenance && (
          <>
            <dt>source</dt>
            <dd>
              {st.provenance.source}
              {st.provenance.method ? `, ${st.provenance.method}` : ""}
              {st.provenance.citation ? `, ${st.provenance.citation}` : ""}
            </dd>
          </>
        )}
      </dl>
      <Link to={`/mechanisms/${mechanismId}`} className="mt-2 inline-block underline">
        Edit the step in the mechanism editor
      </Link>
    </aside>
  );
}
