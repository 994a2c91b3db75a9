/**
 * /ensembles/:id — one ensemble: a progress bar (members done of total, polled from the API
 * about once a second) with Cancel while it computes; when done, per observable a band plot
 * (median, 25–75 % and 5–95 % against time) and histograms at the chosen times, the sensitivity
 * table (which barriers drive the spread, by step name) and the CSV downloads.
 */
import { useEffect, useMemo, useState } from "react";
import { Form, Link, useNavigation, useRevalidator } from "react-router";
import type { Route } from "./+types/ensembles.$id";
import { requireUser } from "~/auth/current-user.server";
import { assertCsrf } from "~/auth/csrf.server";
import { can } from "~/auth/policy.server";
import { CsrfInput } from "~/components/CsrfInput";
import { StatusBadge } from "~/components/workbench/StatusBadge";
import { BandPlot } from "~/components/ensembles/BandPlot";
import { Histogram } from "~/components/ensembles/Histogram";
import { EnsembleCaution } from "~/components/ensembles/EnsembleCaution";
import { formatNumber } from "~/components/format";
import { nameKeyOf, namer, type NamedDocument } from "~/components/names";
import { describeTemperature } from "~/compute/run-request";
import { cancelEnsemble, readableEnsemble } from "~/ensembles/ensemble-api.server";
import { resolveEnsemble } from "~/ensembles/ensemble-plan";
import { observableLabel, parameterLabel, timeLabel } from "~/ensembles/ensemble-labels";
import type { MechanismDocument } from "../../solver/exchange-format";
import { ensembleAsOwned, ensembleProgress } from "../../db/access/ensembles.server";
import { getDb } from "../../db/client.server";

export function meta({ data }: Route.MetaArgs): Route.MetaDescriptors {
  return [{ title: `${data?.ensemble ? `Ensemble #${data.ensemble.id}` : "Ensemble"} · Saddlebook` }];
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const db = getDb();
  const r = await readableEnsemble(db, user, params.id);
  if (!r.ok) throw new Response("There is no ensemble with this number that you can see.", { status: 404 });
  const e = r.ensemble;
  const doc = e.snapshot as MechanismDocument;
  const names = nameKeyOf(doc as NamedDocument);
  const n = namer(names);
  const resolved = resolveEnsemble(e.spec, doc);
  const p = await ensembleProgress(db, e.id);
  const observables = resolved.ok ? resolved.value.observables.map((o) => ({ key: o.key, label: observableLabel(o, n) })) : [];
  const s = e.status === "done" ? e.summary : null;
  return {
    ensemble: {
      id: e.id,
      name: e.name,
      owner: e.ownerName ?? "",
      mode: e.mode,
      status: e.status,
      reason: e.statusReason,
      done: p?.done ?? 0,
      total: e.total,
      canCancel: can(user, { do: "run.cancel", object: ensembleAsOwned(e) }),
      mechanismId: e.mechanismId,
      mechanismVersion: e.mechanismVersion,
      mechanismName: doc?.about?.name ?? "",
      temperature: describeTemperature(e.spec.conditions),
      heating: !!e.spec.conditions.program,
      createdAt: e.createdAt.toISOString(),
      finishedAt: e.finishedAt?.toISOString() ?? null,
    },
    observables,
    summary: s
      ? {
          times: s.times,
          chosen: s.chosen,
          members: s.members,
          logX: e.spec.conditions.output?.grid !== "linear",
          series: Object.fromEntries(s.observables.map((o) => [o.key, { series: o.series, histograms: o.histograms }])),
          sensitivity: s.sensitivity.map((x) => ({ observable: x.observable, time: s.times[x.timeIndex], ranking: x.ranking.slice(0, 8).map((r) => ({ label: parameterLabel(r.parameter, n), rho: r.rankCorrelation })) })),
        }
      : null,
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const form = await request.formData();
  await assertCsrf(request, form);
  const db = getDb();
  const r = await readableEnsemble(db, user, params.id);
  if (!r.ok) throw new Response("There is no ensemble with this number that you can see.", { status: 404 });
  if (String(form.get("intent")) !== "cancel") return { message: "Unknown request." };
  const c = await cancelEnsemble(db, user, r.ensemble);
  if (!c.ok) return { message: ((await c.response.json()) as { error: { message: string } }).error.message };
  return { message: null };
}

export default function EnsemblePage({ loaderData, actionData }: Route.ComponentProps) {
  const { ensemble: e, observables, summary } = loaderData;
  const active = e.status === "queued" || e.status === "running";
  const [live, setLive] = useState({ done: e.done, status: e.status });
  useEffect(() => setLive({ done: e.done, status: e.status }), [e.done, e.status]);
  const revalidator = useRevalidator();
  const nav = useNavigation();

  // While it computes, read the progress from the API about once a second; reload the page's data when it ends.
  useEffect(() => {
    if (!active) return;
    let stop = false;
    const t = setInterval(async () => {
      try {
        const res = await fetch(`/api/v1/ensembles/${e.id}`, { headers: { Accept: "application/json" } });
        if (!res.ok || stop) return;
        const j = (await res.json()) as { ensemble: { status: string; progress: { done: number } } };
        setLive({ done: j.ensemble.progress.done, status: j.ensemble.status as typeof e.status });
        if (!["queued", "running"].includes(j.ensemble.status) && revalidator.state === "idle") void revalidator.revalidate();
      } catch {
        /* the next tick tries again */
      }
    }, 1000);
    return () => ((stop = true), clearInterval(t));
  }, [active, e.id, revalidator]);

  const fraction = e.total > 0 ? live.done / e.total : 0;
  const labelOf = useMemo(() => Object.fromEntries(observables.map((o) => [o.key, o.label])), [observables]);

  return (
    <div className="space-y-4">
      <header className="flex flex-wrap items-center gap-3">
        <h1 className="text-2xl font-semibold tracking-tight">
          Ensemble #{e.id} <span className="text-ink-600">{e.name}</span>
        </h1>
        <StatusBadge status={live.status} />
      </header>
      <p className="text-sm text-ink-700">
        {e.mode === "sweep" ? "Parameter sweep" : "Uncertainty of the barriers"} · {e.total} members · {e.temperature}
        {e.mechanismId && (
          <>
            {" "}
            ·{" "}
            <Link className="link" to={`/mechanisms/${e.mechanismId}/workbench`}>
              {e.mechanismName}
            </Link>{" "}
            version {e.mechanismVersion}
          </>
        )}
      </p>

      {(active || live.status === "cancelled") && (
        <section className="panel space-y-2" aria-label="Progress">
          <div className="flex items-center gap-3">
            <div className="h-3 flex-1 overflow-hidden rounded bg-ink-100" role="progressbar" aria-label="Members computed" aria-valuemin={0} aria-valuemax={e.total} aria-valuenow={live.done} data-testid="ensemble-progress">
              <div className="h-full bg-copper-500 transition-all" style={{ width: `${Math.round(fraction * 100)}%` }} />
            </div>
            <span className="num text-sm" data-testid="ensemble-progress-text">
              {live.done} of {e.total} members
            </span>
          </div>
          {active && e.canCancel && (
            <Form method="post">
              <CsrfInput />
              <button name="intent" value="cancel" className="btn-quiet" disabled={nav.state !== "idle"}>
                Cancel
              </button>
            </Form>
          )}
          {live.status === "cancelled" && <p className="text-sm text-ink-700">Cancelled: {live.done} of {e.total} members were computed; no statistics are drawn from a cancelled ensemble.</p>}
        </section>
      )}
      {actionData?.message && (
        <p role="alert" className="rounded border border-brick-500 bg-brick-100 p-2 text-sm text-brick-700">
          {actionData.message}
        </p>
      )}
      {e.reason && live.status !== "cancelled" && <p className="text-sm text-ink-700" data-testid="ensemble-reason">{e.reason}</p>}

      {summary && (
        <>
          <EnsembleCaution heating={e.heating} />
          <section className="panel space-y-3" aria-label="Distributions">
            <h2 className="font-semibold">Distributions</h2>
            <p className="text-sm text-ink-700">
              {summary.members.ok} of {summary.members.total} members simulated.
            </p>
            {observables.map((o) => {
              const s = summary.series[o.key];
              if (!s) return null;
              return (
                <div key={o.key} className="space-y-2 border-t border-ink-100 pt-2">
                  <BandPlot title={o.label} times={summary.times} series={s.series} logX={summary.logX} testId="band-plot" />
                  <div className="flex flex-wrap gap-3">
                    {s.histograms.map((h) => {
                      const d = s.series[h.timeIndex];
                      return (
                        <div key={h.timeIndex}>
                          <Histogram title={`${o.label} at ${timeLabel(summary.times[h.timeIndex])}`} bins={h.bins} testId="histogram" />
                          {d && (
                            <p className="num text-xs text-ink-700">
                              mean {formatNumber(d.mean, 3)} · sd {formatNumber(d.sd, 3)} · 5–95 % {formatNumber(d.p5, 3)}–{formatNumber(d.p95, 3)}
                            </p>
                          )}
                        </div>
                      );
                    })}
                  </div>
                </div>
              );
            })}
          </section>
          {summary.sensitivity.length > 0 && (
            <section className="panel space-y-2" aria-label="Sensitivity">
              <h2 className="font-semibold">What drives the spread</h2>
              <p className="text-sm text-ink-700">
                Spearman rank correlation of each sampled barrier (and the temperature, when it varied) with the observable across the members; −1 or +1: it alone orders the outcome, 0: no monotone influence. A raised barrier usually lowers
                conversion (negative).
              </p>
              <div className="overflow-x-auto">
                <table className="w-full text-sm" data-testid="sensitivity-table">
                  <thead>
                    <tr className="text-left">
                      <th className="pr-3">Observable</th>
                      <th className="pr-3">Time</th>
                      <th className="pr-3">Parameter</th>
                      <th className="text-right">Rank correlation</th>
                    </tr>
                  </thead>
                  <tbody>
                    {summary.sensitivity.flatMap((x) =>
                      x.ranking.slice(0, 5).map((r, i) => (
                        <tr key={`${x.observable}-${x.time}-${i}`} className={i === 0 ? "border-t border-ink-200" : ""}>
                          <td className="pr-3">{i === 0 ? labelOf[x.observable] : ""}</td>
                          <td className="pr-3">{i === 0 ? timeLabel(x.time) : ""}</td>
                          <td className="pr-3">{r.label}</td>
                          <td className="num text-right">{formatNumber(r.rho, 3)}</td>
                        </tr>
                      )),
                    )}
                  </tbody>
                </table>
              </div>
            </section>
          )}
          <section className="panel flex flex-wrap gap-3" aria-label="Downloads">
            <a className="btn-quiet" href={`/api/v1/ensembles/${e.id}/members.csv`} download>
              Members (CSV)
            </a>
            <a className="btn-quiet" href={`/api/v1/ensembles/${e.id}/summary.csv`} download>
              Summary (CSV)
            </a>
          </section>
        </>
      )}
    </div>
  );
}
