/**
 * /data/:id — one measured dataset: its points on a plot and in a table, overlay on a run, and
 * the barrier fit: choose a finished run as the model (its mechanism snapshot and initial
 * concentrations, at the dataset's temperature), tick the steps whose barriers move, fit. The
 * result (?fit=<id>) shows each barrier entered → fitted with its standard error, the residuals
 * and the fit statistics.
 */
import { useMemo, useState } from "react";
import { Form, Link, redirect, useNavigation } from "react-router";
import type { Route } from "./+types/data.$id";
import { requireUser } from "~/auth/current-user.server";
import { assertCsrf } from "~/auth/csrf.server";
import { can, type Actor } from "~/auth/policy.server";
import { CsrfInput } from "~/components/CsrfInput";
import { ConcentrationPlot, type PlotSeries } from "~/components/plots/ConcentrationPlot";
import { ResultsTable } from "~/components/plots/ResultsTable";
import { seriesColour } from "~/components/plots/palette";
import { num } from "~/components/workbench/format";
import { toEngineConditions } from "~/compute/run-request";
import { getComputeService } from "~/compute/pool.server";
import { readableRun } from "~/compute/run-api.server";
import { getDb } from "../../db/client.server";
import { datasetAsOwned, datasetInSI, getDataset, type DatasetRecord } from "../../db/access/datasets.server";
import { listRuns, runAsOwned } from "../../db/access/runs.server";
import { createFit, getFit, getFitSnapshot, listFitsForDataset } from "../../db/access/fits.server";
import { nameKeyOf, namer, type NameKey, type NamedDocument, type Names } from "~/components/names";
import { StepName } from "~/components/StepName";
import { saveFitAsStepVersions, type SaveOutcome } from "~/compute/fit-save.server";
import { unitText } from "~/components/units-text";
import { stepNumbers } from "~/components/workbench/step-rates";
import { formatNumber } from "~/components/format";

export function meta({ data }: Route.MetaArgs): Route.MetaDescriptors {
  return [{ title: `${data?.dataset?.name ?? "Dataset"} · Saddlebook` }];
}

async function readable(actor: Actor, idParam: string | undefined): Promise<DatasetRecord> {
  const id = Number(idParam);
  const d = Number.isInteger(id) && id > 0 ? await getDataset(getDb(), id) : null;
  if (!d || !can(actor, { do: "dataset.read", object: datasetAsOwned(d) })) throw new Response("There is no dataset with this number that you can see.", { status: 404 });
  return d;
}

const FIT_BUDGET_MS = 60_000;

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const d = await readable(user, params.id);
  const db = getDb();
  const si = datasetInSI(d);
  const species = Object.values(d.mapping.species);
  const runs = (await listRuns(db, user, { limit: 60 })).filter((r) => r.status === "done");
  const candidates = [];
  // Species and step names: from the fit's snapshot first, then from the candidate runs' snapshots.
  const names: NameKey = { species: {}, steps: {} };
  const learn = (doc: unknown) => {
    const k = nameKeyOf(doc as NamedDocument | null);
    names.species = { ...k.species, ...names.species };
    names.steps = { ...k.steps, ...names.steps };
  };
  const fitId = Number(new URL(request.url).searchParams.get("fit") ?? "");
  const fit = Number.isInteger(fitId) && fitId > 0 ? await getFit(db, fitId) : null;
  const fitMine = fit && fit.ownerId === user.id && fit.datasetIds.includes(d.id) ? fit : null;
  if (fitMine) learn(await getFitSnapshot(db, fitMine.id));
  for (const r of runs.slice(0, 30)) {
    const full = await readableRun(db, user, String(r.id));
    if (!full.ok) continue;
    const snap = full.run.snapshot as NamedDocument;
    learn(snap);
    const ids = (snap.species ?? []).map((s) => s.id);
    candidates.push({ id: r.id, name: r.name, steps: (snap.steps ?? []).map((s) => s.id), matches: species.filter((s) => ids.includes(s)).length });
  }
  return {
    names,
    dataset: {
      id: d.id,
      name: d.name,
      notes: d.notes,
      owner: d.ownerName ?? "",
      temperatureK: d.temperatureK,
      timeUnit: d.timeUnit,
      concentrationUnit: d.concentrationUnit,
      mapping: d.mapping,
      rowCount: d.rowCount,
      sourceFilename: d.sourceFilename,
      createdAt: d.createdAt.toISOString(),
    },
    series: si.series,
    runs: candidates,
    fits: await listFitsForDataset(db, d.id, user.id),
    fit: fitMine,
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const form = await request.formData();
  await assertCsrf(request, form);
  const d = await readable(user, params.id);
  const db = getDb();
  if (form.get("intent") === "save-fit") {
    const fit = await getFit(db, Number(form.get("fitId")));
    if (!fit || fit.ownerId !== user.id || !fit.datasetIds.includes(d.id)) return { message: "There is no such fit of yours on this dataset." };
    return { message: null, saved: await saveFitAsStepVersions(db, user, fit, d.name) };
  }
  const r = await readableRun(db, user, String(form.get("runId") ?? ""));
  if (!r.ok) return { message: "Choose a finished run as the model." };
  const run = r.run;
  if (run.status !== "done") return { message: `Run #${run.id} has not finished.` };
  if (!can(user, { do: "run.create", object: runAsOwned(run) })) return { message: "Your role does not allow fitting (authors and above may)." };
  const stepIds = form.getAll("step").map(String).filter(Boolean);
  if (stepIds.length === 0) return { message: "Tick at least one step whose barrier is to be fitted." };
  const snap = run.snapshot as { species: { id: string }[] };
  const speciesIds = snap.species.map((s) => s.id);
  const cond = toEngineConditions(run.conditions, speciesIds);
  if (!cond.ok) return { message: cond.error.message };
  const si = datasetInSI(d);
  const missing = si.series.filter((s) => !speciesIds.includes(s.species)).map((s) => s.species);
  const observations = si.series.filter((s) => speciesIds.includes(s.species) && s.times.length > 0);
  if (observations.length === 0) return { message: `None of the dataset's species (${si.series.map((s) => s.species).join(", ")}) is in run #${run.id}'s mechanism.` };
  const out = await getComputeService(db).fit({
    snapshot: run.snapshot,
    experiments: [{ id: d.name, temperatureK: d.temperatureK, initial: cond.value.initial, observations }],
    stepIds,
    maxWallMs: FIT_BUDGET_MS,
  });
  if (!out.ok) return { message: `The fit did not succeed: ${out.message}` };
  const fitId = await createFit(db, { ownerId: user.id, mechanismId: run.mechanismId, mechanismVersion: run.mechanismVersion, snapshot: run.snapshot, datasetIds: [d.id], stepIds, output: out.value, runId: run.id });
  return redirect(`/data/${d.id}?fit=${fitId}${missing.length ? `&ignored=${encodeURIComponent(missing.join(","))}` : ""}`);
}

export default function DatasetPage({ loaderData, actionData }: Route.ComponentProps) {
  const { dataset: d, series, runs, fit, fits } = loaderData;
  const names = useMemo(() => namer(loaderData.names), [loaderData.names]);
  const nav = useNavigation();
  const plot = useMemo<PlotSeries[]>(() => series.map((s) => ({ key: s.species, label: `${names.species(s.species)} (measured)`, times: s.times, values: s.values, markers: true })), [series, names]);
  const tableSeries = useMemo(
    () => series.map((s) => ({ key: s.species, label: names.species(s.species), id: s.species, formula: loaderData.names.species[s.species]?.[1] || undefined, times: s.times, values: s.values })),
    [series, names, loaderData.names],
  );
  return (
    <div className="space-y-4">
      <header className="flex flex-wrap items-center gap-3">
        <h1 className="text-2xl font-semibold tracking-tight">{d.name}</h1>
        <Link to="/data" className="btn-quiet ml-auto">
          All datasets
        </Link>
      </header>
      <section className="panel grid gap-x-6 gap-y-1 text-sm sm:grid-cols-2">
        <div>
          <span className="text-ink-500">Temperature:</span> <span className="num">{num(d.temperatureK, 6)} K</span> ({num(d.temperatureK - 273.15, 5)} °C)
        </div>
        <div>
          <span className="text-ink-500">Columns:</span> time “{d.mapping.time}” in {d.timeUnit};{" "}
          {Object.entries(d.mapping.species)
            .map(([c, s]) => (c === names.species(s) ? c : `“${c}” → ${names.species(s)}`))
            .join(", ")}{" "}
          in {unitText(d.concentrationUnit)}
        </div>
        <div>
          <span className="text-ink-500">Rows:</span> <span className="num">{d.rowCount}</span>
          {d.sourceFilename && <> from {d.sourceFilename}</>}
        </div>
        <div>
          <span className="text-ink-500">Uploaded by</span> {d.owner}, {d.createdAt.slice(0, 16).replace("T", " ")} UTC
        </div>
        {d.notes && <div className="sm:col-span-2">{d.notes}</div>}
      </section>
      <section className="panel">
        <ConcentrationPlot series={plot} testId="dataset-plot" filename={`saddlebook-dataset-${d.id}.png`} />
        <p className="mt-1 text-xs text-ink-500">Shown in s and mol/L (converted from the file's units).</p>
      </section>

      <section className="panel space-y-3">
        <h2 className="font-semibold">Overlay on a run, or fit barriers</h2>
        {runs.length === 0 ? (
          <p className="text-sm text-ink-600">No finished runs yet: run the mechanism first, then overlay or fit.</p>
        ) : (
          <>
            <ul className="flex flex-wrap gap-2 text-sm">
              {runs.map((r) => (
                <li key={r.id}>
                  <Link className="btn-quiet py-0.5" to={`/runs/${r.id}?overlay=${d.id}`}>
                    Overlay on #{r.id} {r.name}
                  </Link>
                </li>
              ))}
            </ul>
            <Form method="post" className="space-y-2" aria-label="Fit barriers">
              <CsrfInput />
              <p className="text-sm text-ink-600">
                Fit: the model is a run's mechanism snapshot with the run's initial concentrations, at this dataset's temperature. The chosen steps' barriers move together with every form they are entered in.
              </p>
              <FitChooser runs={runs} names={names} />
              <button className="btn-primary" disabled={nav.state !== "idle"}>
                {nav.state !== "idle" ? "Fitting…" : "Fit the ticked barriers"}
              </button>
              {actionData?.message && (
                <p role="alert" className="text-sm text-brick-700" data-testid="fit-error">
                  {actionData.message}
                </p>
              )}
            </Form>
          </>
        )}
        {fits.length > 0 && (
          <p className="text-xs text-ink-500">
            Earlier fits:{" "}
            {fits.map((f) => (
              <Link key={f.id} to={`?fit=${f.id}`} className="mr-2 underline">
                #{f.id} ({f.steps.map(names.step).join(", ")})
              </Link>
            ))}
          </p>
        )}
      </section>

      {fit && <FitResult fit={fit} names={names} T={d.temperatureK} saved={(actionData as { saved?: SaveOutcome[] } | undefined)?.saved ?? null} />}

      <section className="panel">
        <h2 className="mb-2 font-semibold">Values</h2>
        <ResultsTable series={tableSeries} filename={`saddlebook-dataset-${d.id}.csv`} title={`Saddlebook dataset “${d.name}” at ${num(d.temperatureK, 6)} K (converted to s and mol/L)`} />
      </section>
    </div>
  );
}

function FitChooser({ runs, names }: { runs: { id: number; name: string; steps: string[]; matches: number }[]; names: Names }) {
  const best = [...runs].sort((a, b) => b.matches - a.matches)[0];
  // Only the steps of the chosen run's mechanism are offered.
  const [runId, setRunId] = useState<number | undefined>(best?.id);
  const chosen = runs.find((r) => r.id === runId) ?? best;
  return (
    <div className="space-y-2">
      <label className="block max-w-xl">
        <span className="label">Model run</span>
        <select name="runId" className="field" value={runId} onChange={(e) => setRunId(Number(e.target.value))} aria-label="Model run">
          {runs.map((r) => (
            <option key={r.id} value={r.id}>
              #{r.id} {r.name} ({r.matches} of the dataset's species)
            </option>
          ))}
        </select>
      </label>
      <fieldset>
        <legend className="label">Steps to fit (of the selected run's mechanism)</legend>
        <div className="flex flex-wrap gap-3 text-sm">
          {(chosen?.steps ?? []).slice(0, 200).map((s) => (
            <label key={s} className="inline-flex items-center gap-1">
              <input type="checkbox" name="step" value={s} aria-label={`Fit step ${names.step(s)}`} /> <StepName names={names} id={s} />
            </label>
          ))}
        </div>
      </fieldset>
    </div>
  );
}

function FitResult({ fit, saved, names, T }: { fit: NonNullable<Route.ComponentProps["loaderData"]["fit"]>; saved: SaveOutcome[] | null; names: Names; T: number }) {
  // k_fwd of each fitted step at the experiment's temperature, with its units
  const kAt = (st: (typeof fit.fitted)[number]["fittedStep"]) => stepNumbers({ format: "saddlebook.mechanism", version: 1, about: { name: "fit" }, species: [], steps: [st] }, T)[0];
  const s = fit.statistics;
  const resid = useMemo<PlotSeries[]>(
    () =>
      fit.residuals.flatMap((r, i) => [
        { key: `${r.species}:resid`, label: `${names.species(r.species)} model − measured`, times: r.times, values: r.residual, markers: true, colour: seriesColour(i) },
      ]),
    [fit, names],
  );
  const overlay = useMemo<PlotSeries[]>(
    () =>
      fit.residuals.flatMap((r, i) => [
        { key: `${r.species}:m`, label: `${names.species(r.species)} measured`, times: r.times, values: r.measured, markers: true, colour: seriesColour(i) },
        { key: `${r.species}:f`, label: `${names.species(r.species)} fitted model`, times: r.times, values: r.model, colour: seriesColour(i) },
      ]),
    [fit, names],
  );
  return (
    <section className="panel space-y-3" data-testid="fit-result">
      <h2 className="font-semibold">Fit #{fit.id}</h2>
      <table className="w-full text-sm">
        <thead className="text-left text-xs text-ink-500">
          <tr>
            <th className="py-1">Step</th>
            <th>Barrier entered</th>
            <th>Fitted</th>
            <th>Shift ± SE</th>
            <th>{Math.round(s.confidence * 100)} % interval</th>
            <th>Fitted k_fwd at {num(T, 6)} K</th>
          </tr>
        </thead>
        <tbody>
          {fit.fitted.map((p) => (
            <tr key={p.stepId} className="border-t border-ink-100" data-testid={`fit-row-${p.stepId}`}>
              <td className="py-1">
                <StepName names={names} id={p.stepId} />
              </td>
              <td className="num">
                {p.before.label} = {num(p.before.value, 6)} {p.before.unit === "k" ? "" : p.before.unit}
              </td>
              <td className="num" data-testid={`fit-after-${p.stepId}`}>
                {p.after.label} = {num(p.after.value, 6)} {p.after.unit === "k" ? "" : p.after.unit}
              </td>
              <td className="num" data-testid={`fit-shift-${p.stepId}`} data-shift={p.shift} data-se={p.se}>
                {num(p.shift / 1000, 4)} ± {num(p.se / 1000, 2)} kJ/mol
              </td>
              <td className="num">± {num(p.ci / 1000, 2)} kJ/mol</td>
              <td className="num" data-testid={`fit-k-${p.stepId}`}>
                {(() => {
                  const k = kAt(p.fittedStep);
                  return k && k.kf !== null ? `k_fwd = ${formatNumber(k.kf, 3)} ${k.kfUnit} at ${num(T, 6)} K` : (k?.problem ?? "—");
                })()}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      {fit.fitted.some((p) => p.atBound) && <p className="text-sm text-brick-700">A shift ended on its bound (±60 kJ/mol); its standard error is not meaningful.</p>}
      <p className="text-xs text-ink-500">
        Least squares in mol/L (Levenberg–Marquardt); SE from s²(JᵀJ)⁻¹ with s² = SSR/(n − p). SSR {num(s.ssr, 3)} (start {num(s.ssrInitial, 3)}), n = {s.n}, {s.dof} degrees of freedom,{" "}
        {s.iterations} iterations, {s.simulations} simulations, {s.converged ? "converged" : "not converged"} ({s.stopReason}), {num(s.wallMs, 3)} ms.
        {fit.statistics.runId && <> Model: run #{fit.statistics.runId}.</>}
      </p>
      {fit.mechanismId !== null && (
        <Form method="post" className="flex flex-wrap items-center gap-2">
          <CsrfInput />
          <input type="hidden" name="fitId" value={fit.id} />
          <button className="btn-quiet" name="intent" value="save-fit">
            Save as new step versions
          </button>
          <span className="text-xs text-ink-500">Library steps of mechanism {fit.mechanismId} v{fit.mechanismVersion} get a new version with the fitted barrier, its SE as uncertainty and this dataset as provenance.</span>
        </Form>
      )}
      {saved && (
        <ul className="text-sm" data-testid="fit-saved">
          {saved.map((o) => (
            <li key={o.stepId} className={o.saved ? "text-moss-700" : "text-brick-700"}>
              {names.step(o.stepId)}: {names.text(o.message)}
              {o.libraryStepId && (
                <>
                  {" "}
                  <Link className="underline" to={`/steps/${o.libraryStepId}`}>
                    open
                  </Link>
                </>
              )}
            </li>
          ))}
        </ul>
      )}
      <div className="grid gap-4 lg:grid-cols-2">
        <ConcentrationPlot series={overlay} title="Measured and fitted" testId="fit-plot" />
        <ConcentrationPlot series={resid} title="Residuals (mol/L)" testId="residual-plot" />
      </div>
    </section>
  );
}
