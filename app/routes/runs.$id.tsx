/**
 * /runs/:id — one run: progress while it runs (with cancel), then the concentration plot, the
 * values table with CSV, the analysis summary, the conditions and the snapshot it ran on.
 * ?overlay=<dataset id> draws a measured dataset over the curves.
 */
import { useEffect, useMemo } from "react";
import { Form, Link, redirect, useNavigation, useRevalidator } from "react-router";
import type { Route } from "./+types/runs.$id";
import { requireUser } from "~/auth/current-user.server";
import { assertCsrf } from "~/auth/csrf.server";
import { can } from "~/auth/policy.server";
import { CsrfInput } from "~/components/CsrfInput";
import { ConcentrationPlot, type PlotSeries } from "~/components/plots/ConcentrationPlot";
import { ResultsTable } from "~/components/plots/ResultsTable";
import { RunSummary } from "~/components/workbench/RunSummary";
import { CautionNote } from "~/components/workbench/CautionNote";
import { duration, num } from "~/components/workbench/format";
import { HIGH_CONCENTRATION_MOL_L, describeTemperature } from "~/compute/run-request";
import { cancelRun, readableRun, runNameKey } from "~/compute/run-api.server";
import { namer } from "~/components/names";
import { StepName } from "~/components/StepName";
import { getDb } from "../../db/client.server";
import { createRun, getRunSeries, runAsOwned } from "../../db/access/runs.server";
import { datasetOverlay, type OverlaySeries } from "~/compute/dataset-overlay.server";
import { listDatasets } from "../../db/access/datasets.server";
import { StatusBadge } from "~/components/workbench/StatusBadge";
import { unitText } from "~/components/units-text";

export function meta({ data }: Route.MetaArgs): Route.MetaDescriptors {
  return [{ title: `${data?.run ? `Run #${data.run.id}` : "Run"} · Saddlebook` }];
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const db = getDb();
  const r = await readableRun(db, user, params.id);
  if (!r.ok) throw new Response("There is no run with this number that you can see.", { status: 404 });
  const run = r.run;
  const s = run.status === "done" ? await getRunSeries(db, run.id) : null;
  const url = new URL(request.url);
  const overlayId = Number(url.searchParams.get("overlay") ?? "");
  const overlay: OverlaySeries[] | null = Number.isInteger(overlayId) && overlayId > 0 ? await datasetOverlay(db, user, overlayId) : null;
  const datasets = run.status === "done" ? (await listDatasets(db, user, { limit: 100 })).map((d) => ({ id: d.id, name: d.name, T: d.temperatureK })) : [];
  return {
    names: runNameKey(run),
    datasets,
    overlayId: overlay ? overlayId : null,
    run: {
      id: run.id,
      name: run.name,
      owner: run.ownerName ?? "",
      canCancel: can(user, { do: "run.cancel", object: runAsOwned(run) }),
      canRerun: can(user, { do: "run.create", object: { ownerId: user.id, visibility: "private" } }),
      status: run.status,
      failureCode: run.failureCode,
      reason: run.statusReason,
      progress: run.progressTime,
      tEnd: run.tEnd,
      cancelRequested: run.cancelRequested,
      conditions: run.conditions,
      temperature: describeTemperature(run.conditions),
      solver: run.solver,
      mechanismId: run.mechanismId,
      mechanismVersion: run.mechanismVersion,
      snapshotHash: run.snapshotHash,
      snapshotName: (run.snapshot as { about?: { name?: string } })?.about?.name ?? "",
      createdAt: run.createdAt.toISOString(),
      finishedAt: run.finishedAt?.toISOString() ?? null,
      analysis: run.status === "done" ? run.analysis : null,
      statistics: run.status === "done" ? run.statistics : null,
      warnings: run.warnings,
    },
    series: s ? { speciesIds: s.speciesIds, times: Array.from(s.times), temperatures: Array.from(s.temperatures), conc: s.conc.map((c) => Array.from(c)) } : null,
    overlay,
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const form = await request.formData();
  await assertCsrf(request, form);
  const db = getDb();
  const r = await readableRun(db, user, params.id);
  if (!r.ok) throw new Response("There is no run with this number that you can see.", { status: 404 });
  const intent = String(form.get("intent"));
  if (intent === "cancel") {
    const c = await cancelRun(db, user, r.run);
    if (!c.ok) return { message: ((await c.response.json()) as { error: { message: string } }).error.message };
    return { message: null };
  }
  if (intent === "rerun") {
    // Same snapshot, conditions and settings: the run is reproduced from what was stored.
    const { getComputeService } = await import("~/compute/pool.server");
    if (!can(user, { do: "run.create", object: { ownerId: user.id, visibility: "private" } })) return { message: "Your role does not allow starting runs." };
    const pool = getComputeService(db);
    await pool.ready;
    const id = await createRun(db, {
      ownerId: user.id,
      name: `${r.run.name} (repeat of #${r.run.id})`.slice(0, 300),
      mechanismId: r.run.mechanismId,
      mechanismVersion: r.run.mechanismVersion,
      snapshot: r.run.snapshot,
      conditions: r.run.conditions,
      solver: r.run.solver,
      analysisRequest: r.run.analysisRequest,
      tEnd: r.run.tEnd,
    });
    void pool.submit(id);
    return redirect(`/runs/${id}`);
  }
  return { message: "Unknown request." };
}

export default function RunPage({ loaderData, actionData }: Route.ComponentProps) {
  const { run, series, overlay, datasets, overlayId } = loaderData;
  const names = useMemo(() => namer(loaderData.names), [loaderData.names]);
  const active = run.status === "queued" || run.status === "running";
  const revalidator = useRevalidator();
  const nav = useNavigation();
  useEffect(() => {
    if (!active) return;
    const t = setInterval(() => {
      if (revalidator.state === "idle") void revalidator.revalidate();
    }, 600);
    return () => clearInterval(t);
  }, [active, revalidator]);

  const plotSeries = useMemo<PlotSeries[]>(() => {
    if (!series) return [];
    const out: PlotSeries[] = series.speciesIds.map((id, i) => ({ key: id, label: names.species(id), times: series.times, values: series.conc[i] }));
    if (overlay) {
      for (const o of overlay) {
        const i = series.speciesIds.indexOf(o.species);
        out.push({ key: `data:${o.species}`, label: `${names.species(o.species)} (measured)`, times: o.times, values: o.values, markers: true, colour: i >= 0 ? undefined : "#172230" });
      }
    }
    return out;
  }, [series, overlay, names]);
  const tableSeries = useMemo(
    () => (series ? series.speciesIds.map((id, i) => ({ key: id, label: names.species(id), id, formula: loaderData.names.species[id]?.[1] || undefined, times: series.times, values: series.conc[i] })) : []),
    [series, names, loaderData.names],
  );
  const fraction = run.tEnd > 0 ? Math.min(1, run.progress / run.tEnd) : 0;
  const a = run.analysis;

  return (
    <div className="space-y-4">
      <header className="flex flex-wrap items-center gap-3">
        <h1 className="text-2xl font-semibold tracking-tight">
          Run #{run.id} <span className="text-ink-600">{run.name}</span>
        </h1>
        <StatusBadge status={run.status} fraction={fraction} />
        <div className="ml-auto flex gap-2">
          {run.canRerun && !active && (
            <Form method="post">
              <CsrfInput />
              <button className="btn-quiet" name="intent" value="rerun">
                Run again
              </button>
            </Form>
          )}
          <Link className="btn-quiet" to="/runs">
            All runs
          </Link>
        </div>
      </header>

      <section className="panel grid gap-x-6 gap-y-1 text-sm sm:grid-cols-2" aria-label="Conditions">
        <div>
          <span className="text-ink-500">Temperature:</span> {run.temperature}
        </div>
        <div>
          <span className="text-ink-500">End time:</span> <span className="num">{duration(run.tEnd)}</span> ({num(run.tEnd)} s)
        </div>
        <div>
          <span className="text-ink-500">Initial:</span>{" "}
          {Object.entries(run.conditions.initial)
            .map(([id, q]) => `${names.species(id)} ${q.value} ${unitText(q.unit)}`)
            .join(", ")}
        </div>
        <div>
          <span className="text-ink-500">Solver:</span> {run.solver.method}, rtol {num(run.solver.rtol, 3)}, atol {num(run.solver.atol, 3)} mol/L, budget {run.solver.wallTimeMs / 1000} s
        </div>
        <div className="sm:col-span-2 text-xs text-ink-500">
          Snapshot “{run.snapshotName}” sha256 <span className="num">{run.snapshotHash.slice(0, 16)}…</span>
          {run.mechanismId && (
            <>
              {" "}
              · <Link to={`/mechanisms/${run.mechanismId}`}>mechanism {run.mechanismId}</Link> version {run.mechanismVersion} (
              <Link to={`/mechanisms/${run.mechanismId}/workbench?version=${run.mechanismVersion}`}>workbench</Link>)
            </>
          )}{" "}
          · by {run.owner} · started {run.createdAt.slice(0, 19).replace("T", " ")} UTC
        </div>
      </section>

      {active && (
        <section className="panel space-y-2" aria-label="Progress">
          <div className="flex items-center gap-3 text-sm">
            <span>
              {run.status === "queued" ? "Waiting for a free worker…" : "Simulating…"} t = <span className="num" data-testid="progress-time">{num(run.progress)}</span> s of{" "}
              <span className="num">{num(run.tEnd)}</span> s
            </span>
            {run.canCancel && (
              <Form method="post" className="ml-auto">
                <CsrfInput />
                <button className="btn-quiet" name="intent" value="cancel" disabled={run.cancelRequested || nav.state !== "idle"}>
                  {run.cancelRequested ? "Stopping…" : "Cancel run"}
                </button>
              </Form>
            )}
          </div>
          <div className="h-2 rounded bg-ink-100" role="progressbar" aria-valuemin={0} aria-valuemax={100} aria-valuenow={Math.round(fraction * 100)}>
            <div className="h-2 rounded bg-copper-500 transition-all" style={{ width: `${fraction * 100}%` }} />
          </div>
          <p className="text-xs text-ink-500">Progress is the simulated time reached; stiff runs often cover early times slowly and late times quickly.</p>
        </section>
      )}
      {actionData?.message && <p className="text-sm text-brick-700">{actionData.message}</p>}

      {(run.status === "failed" || run.status === "cancelled") && (
        <section role="alert" className={`panel text-sm ${run.status === "failed" ? "border-brick-500 text-brick-700" : "text-ink-700"}`} data-testid="run-reason">
          <p className="font-semibold">{run.status === "failed" ? (run.failureCode === "budget" ? "Stopped: over the time budget" : "The run failed") : "Cancelled"}</p>
          <p className="mt-1">{run.reason ? names.text(run.reason) : null}</p>
        </section>
      )}

      {run.status === "done" && a && series && (
        <>
          <CautionNote heating={a.heating} concentrated={a.maxInitial >= HIGH_CONCENTRATION_MOL_L} />
          <section className="panel">
            <ConcentrationPlot series={plotSeries} defaultLogX={run.conditions.output?.grid !== "linear"} filename={`saddlebook-run-${run.id}.png`} />
            {overlay && <p className="mt-1 text-xs text-ink-500">Points: measured dataset (concentrations converted to mol/L, times to s).</p>}
            {datasets.length > 0 && (
              <Form method="get" className="mt-2 flex flex-wrap items-center gap-2 text-sm">
                <label htmlFor="overlay">Overlay measured data:</label>
                <select id="overlay" name="overlay" className="field w-auto py-0.5" defaultValue={overlayId ?? ""}>
                  <option value="">none</option>
                  {datasets.map((d) => (
                    <option key={d.id} value={d.id}>
                      {d.name} ({num(d.T, 5)} K)
                    </option>
                  ))}
                </select>
                <button className="btn-quiet py-0.5">Show</button>
              </Form>
            )}
          </section>
          <RunSummary analysis={a} statistics={run.statistics!} warnings={run.warnings} names={names} />
          <section className="panel">
            <h2 className="mb-2 font-semibold">Values</h2>
            <ResultsTable
              series={tableSeries}
              temperatures={{ times: series.times, values: series.temperatures }}
              filename={`saddlebook-run-${run.id}.csv`}
              title={`Saddlebook run #${run.id}: ${run.name}`}
            />
          </section>
          <section className="panel text-sm">
            <h2 className="font-semibold">Rate constants at {num(a.T0, 5)} K</h2>
            <table className="mt-2 w-full">
              <thead className="text-left text-xs text-ink-500">
                <tr>
                  <th className="py-1">Step</th>
                  <th>k_fwd</th>
                  <th>k_rev</th>
                </tr>
              </thead>
              <tbody>
                {a.rateConstants.map((k) => (
                  <tr key={k.step} className="border-t border-ink-100">
                    <td className="py-0.5">
                      <StepName names={names} id={k.step} />
                    </td>
                    <td className="num">
                      {num(k.kf)} {k.kfUnit}
                    </td>
                    <td className="num">{k.kr === null ? "—" : `${num(k.kr)} ${k.krUnit}`}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </section>
        </>
      )}
    </div>
  );
}
