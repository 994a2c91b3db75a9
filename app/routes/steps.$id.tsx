/** A library step: reaction, every barrier form, k(T) over the validity range (table and plot), provenance, history, review, comments, where used. */
import { Form, Link, data, redirect, useActionData, useNavigation } from "react-router";
import type { Route } from "./+types/steps.$id";
import { requireUser } from "~/auth/current-user.server";
import { assertCsrf } from "~/auth/csrf.server";
import { CsrfInput } from "~/components/CsrfInput";
import { getDb } from "../../db/client.server";
import { addStepComment, getStep, getStepVersion, proposeStep, restoreStepVersion, reactionText } from "../../db/access/steps.server";
import { flatten } from "../../db/access/mechanism-diff";
import { actionFailure, loaderFailure, routeId } from "~/components/library/route-helpers.server";
import { notifyProposal } from "~/api/library-mail.server";
import { reviewAndNotify } from "~/api/review-mail.server";
import { convertBarrier, rateConstant } from "../../solver/rates";
import { balanceOf } from "~/components/library/balance";
import { speciesIdOfKey, type StepStatus } from "~/components/library/step-schema";
import { StatusBadge } from "~/components/library/StatusBadge";
import { energyIn, entropyIn, sig, temperatureText, unitLabel } from "~/components/library/format";
import { barrierRows, describeThermo } from "~/components/barrier-text";
import type { EnergyUnit, EntropyUnit } from "../../solver/units";
import { thermalReferenceWarning } from "~/components/barrier-text";
import { RestoreVersionButton } from "~/components/library/RestoreVersionButton";
import { fieldText, fieldValueText } from "~/components/field-text";

export function meta({ data }: Route.MetaArgs): Route.MetaDescriptors {
  return [{ title: `${data?.label ?? "Step"} · Saddlebook` }];
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const id = routeId(params.id);
  const vParam = new URL(request.url).searchParams.get("v");
  const db = getDb();
  let d;
  try {
    d = await getStep(db, user, id, vParam ? routeId(vParam) : undefined);
  } catch (e) {
    loaderFailure(e);
  }
  const v = d.version;
  const eu = (["kJ/mol", "kcal/mol", "eV"].includes(v.energy_unit) ? v.energy_unit : "kJ/mol") as EnergyUnit;
  const su = (v.entropy_unit === "cal/(mol K)" ? "cal/(mol K)" : "J/(mol K)") as EntropyUnit;
  const tu: "K" | "C" = v.temperature_unit === "C" ? "C" : "K";
  const kin = { ...v.kinetics, targetStandardState: "1M" as const };
  const d298 = convertBarrier(kin, 298.15);
  const lo = v.t_min ?? 273.15;
  const hi = v.t_max ?? 373.15;
  const temps = Array.from({ length: 9 }, (_, i) => lo + ((hi - lo) * i) / 8);
  const kT = temps.map((T) => {
    const r = rateConstant(v.kinetics, T);
    return { T, k: r.ok ? r.value.k : null, unit: r.ok ? r.value.units : "", extrapolated: r.ok ? r.value.extrapolated : false, farFromReference: !!thermalReferenceWarning(v.content.barrier, T) };
  });
  const term = (t: { species: string; coef: number }) => {
    const s = d.species.get(speciesIdOfKey(t.species) ?? -1);
    return { species: { label: s?.label ?? t.species, formula: s?.formula }, coef: t.coef };
  };
  const balance = balanceOf(v.content.reactants.map(term), v.content.products.map(term));
  // Differences from the previous version the user may see.
  let changes: Array<{ path: string; old: unknown; new: unknown }> = [];
  const prevNumber = d.versions.find((x) => x.number < v.number)?.number;
  if (prevNumber) {
    const prev = await getStepVersion(db, user, id, prevNumber);
    const a = flatten({ ...prev.content, id: undefined });
    const b = flatten({ ...v.content, id: undefined });
    for (const p of new Set([...a.keys(), ...b.keys()])) if (p !== "id" && a.get(p) !== b.get(p)) changes.push({ path: p, old: a.get(p) ?? null, new: b.get(p) ?? null });
    if (prev.status !== v.status) changes = [{ path: "status", old: prev.status, new: v.status }, ...changes];
    // Species by name, never by key (the earlier version may name species this one no longer has).
    const keys = changes.filter((c) => /\.species$/.test(c.path)).flatMap((c) => [c.old, c.new]).filter((x): x is string => typeof x === "string");
    const ids = [...new Set(keys.map((k) => speciesIdOfKey(k)).filter((n): n is number => n !== null))];
    const labels = new Map<number, string>(ids.length ? (await db("species").whereIn("id", ids).select("id", "label")).map((r: { id: number; label: string }) => [r.id, r.label]) : []);
    const name = (k: unknown) => (typeof k === "string" ? (labels.get(speciesIdOfKey(k) ?? -1) ?? k) : k);
    changes = changes.map((c) => (/\.species$/.test(c.path) ? { ...c, old: name(c.old), new: name(c.new) } : c));
  }
  return {
    id,
    label: v.label,
    reaction: reactionText(v.content, d.species),
    status: v.status as StepStatus,
    version: v.number,
    isCurrent: v.id === d.step.current_version_id || v.id === d.step.public_version_id,
    owner: d.step.owner_name,
    content: v.content,
    units: { eu, su, tu },
    derived: d298.ok
      ? {
          k: d298.value.k,
          kUnit: d298.value.units,
          dG: energyIn(d298.value.dG, eu),
          dH: energyIn(d298.value.dH, eu),
          dS: entropyIn(d298.value.dS, su),
          Ea: energyIn(d298.value.Ea, eu),
          A: d298.value.A,
          relations: d298.value.relations,
          notes: d298.value.notes,
        }
      : null,
    derivedError: d298.ok ? null : d298.error.message,
    thermalNote: thermalReferenceWarning(v.content.barrier, 298.15),
    kT,
    range: v.t_min ? { lo: v.t_min, hi: v.t_max } : null,
    uncertainty: energyIn(v.uncertainty, eu),
    provenance: v.content.provenance ?? null,
    tags: v.tags ?? [],
    replacedBy: v.replaced_by_step_id,
    balance,
    versions: d.versions,
    currentNumber: d.step.current_version_number,
    changes,
    prevNumber: prevNumber ?? null,
    reviews: d.reviews,
    comments: d.comments,
    whereUsed: d.whereUsed,
    may: { edit: d.canEdit, propose: d.canPropose, review: d.canReview, deprecate: d.canDeprecate, comment: true },
    illustrative: v.illustrative,
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const form = await request.formData();
  await assertCsrf(request, form);
  const id = routeId(params.id);
  const db = getDb();
  const intent = String(form.get("intent") ?? "");
  try {
    if (intent === "restore") {
      // An earlier version back as a new one (policy "step.edit", checked in the data layer).
      const r = await restoreStepVersion(db, user, id, Number(form.get("version")), Number(form.get("baseVersion")) || undefined);
      return redirect(`/steps/${id}?restored=${r.version}`);
    }
    if (intent === "comment") await addStepComment(db, user, id, { body: String(form.get("body") ?? "") });
    else if (intent === "propose") {
      await proposeStep(db, user, id, String(form.get("comment") ?? "") || undefined);
      await notifyProposal(db, id).catch(() => {});
    } else if (intent === "approve" || intent === "request_changes" || intent === "deprecate") {
      const rep = String(form.get("replacementStepId") ?? "").trim();
      await reviewAndNotify(
        db,
        user,
        id,
        {
          action: intent,
          comment: String(form.get("comment") ?? "") || undefined,
          ...(intent === "deprecate" && rep ? { replacementStepId: Number(rep) } : {}),
        },
        request,
      );
    } else return { ok: false as const, message: "Unknown action.", fields: {} };
    return { ok: true as const, intent, message: intent === "comment" ? "Comment added." : "Done.", fields: {} };
  } catch (e) {
    // The intent goes back with the error, so the page shows it beside the button that caused it.
    const failure = actionFailure(e);
    return data({ ...failure.data, intent }, failure.init ?? undefined);
  }
}

function KPlot({ points }: { points: Array<{ T: number; k: number | null }> }) {
  const pts = points.filter((p) => p.k && p.k > 0) as Array<{ T: number; k: number }>;
  if (pts.length < 2) return null;
  const xs = pts.map((p) => 1000 / p.T);
  const ys = pts.map((p) => Math.log10(p.k));
  const [x0, x1] = [Math.min(...xs), Math.max(...xs)];
  const [y0, y1] = [Math.min(...ys), Math.max(...ys)];
  const W = 320, H = 180, P = 36;
  const sx = (x: number) => P + ((x - x0) / (x1 - x0 || 1)) * (W - 2 * P);
  const sy = (y: number) => H - P + ((y0 - y) / (y1 - y0 || 1)) * (H - 2 * P);
  return (
    <svg viewBox={`0 0 ${W} ${H}`} className="w-full max-w-sm" role="img" aria-label="Arrhenius plot of log10 k against 1000/T">
      <rect x={P} y={P / 2} width={W - 2 * P} height={H - 1.5 * P} fill="none" stroke="#c6d2dc" />
      <polyline fill="none" stroke="#a65a2b" strokeWidth={2} points={xs.map((x, i) => `${sx(x)},${sy(ys[i])}`).join(" ")} />
      {xs.map((x, i) => (
        <circle key={i} cx={sx(x)} cy={sy(ys[i])} r={2.5} fill="#223040" />
      ))}
      <text x={W / 2} y={H - 6} fontSize={10} textAnchor="middle" fill="#3b5063">
        1000/T (K⁻¹): {x0.toFixed(2)} – {x1.toFixed(2)}
      </text>
      <text x={10} y={H / 2} fontSize={10} fill="#3b5063" transform={`rotate(-90 10 ${H / 2})`} textAnchor="middle">
        log₁₀ k: {y0.toFixed(1)} – {y1.toFixed(1)}
      </text>
    </svg>
  );
}

const REVIEW_INTENTS: string[] = ["approve", "request_changes", "deprecate"];

export default function StepPage({ loaderData: d }: Route.ComponentProps) {
  const result = useActionData<typeof action>();
  const busy = useNavigation().state === "submitting";
  const reviewError = result && !result.ok && "intent" in result && REVIEW_INTENTS.includes(String(result.intent)) ? [result.message, ...Object.values(result.fields ?? {})].join(" ") : null;
  const { eu, su, tu } = d.units;
  const b = d.content.barrier;
  return (
    <div className="space-y-4">
      <div>
        <p className="text-sm text-ink-600">
          <Link to="/library" className="hover:underline">
            Library
          </Link>{" "}
          › step {d.id}
        </p>
        <h1 className="mt-1 text-2xl font-semibold tracking-tight">{d.label}</h1>
        <p className="mt-1 text-lg">{d.reaction}</p>
        <p className="mt-1 flex flex-wrap items-center gap-2 text-sm text-ink-700">
          <StatusBadge status={d.status} /> version {d.version} · owner {d.owner}
          {d.illustrative && <span className="rounded bg-amber-note px-1.5 text-xs">illustrative</span>}
          {d.may.edit && (
            <Link to={`/steps/${d.id}/edit`} className="btn-quiet ml-2">
              Edit (new version)
            </Link>
          )}
        </p>
        {d.replacedBy && (
          <p className="mt-2 text-sm text-brick-700">
            Deprecated; replaced by{" "}
            <Link to={`/steps/${d.replacedBy}`} className="underline">
              step {d.replacedBy}
            </Link>
            .
          </p>
        )}
        <p className={`mt-2 text-sm ${d.balance.state === "unbalanced" ? "text-brick-700" : "text-ink-600"}`} role={d.balance.state === "unbalanced" ? "alert" : undefined}>
          {d.balance.message}
        </p>
      </div>
      {result && !reviewError && (
        <p className={`text-sm ${result.ok ? "text-moss-700" : "text-brick-700"}`} role="status">
          {result.message}
        </p>
      )}
      <div className="grid gap-4 md:grid-cols-2">
        <section className="panel">
          <h2 className="font-semibold">Barrier as entered</h2>
          <dl className="mt-2 grid grid-cols-2 gap-1 text-sm">
            <dt>Form</dt>
            <dd>{{ dG: "ΔG‡ at T", dHdS: "ΔH‡ and ΔS‡", thermal: "Ea, ΔS‡, Δn‡", arrhenius: "Arrhenius A, Ea", measured: "measured k" }[b.form]}</dd>
            {barrierRows(b).map(([k, v]) => (
              <div key={k} className="contents">
                <dt>{k}</dt>
                <dd className="num">{v}</dd>
              </div>
            ))}
            <dt>reaction free energy</dt>
            <dd className="num" data-testid="step-reaction-energy">{d.content.reactionThermo ? describeThermo(d.content.reactionThermo) : "not given"}</dd>
            {d.content.kappa !== undefined && (
              <>
                <dt>κ</dt>
                <dd className="num">{d.content.kappa}</dd>
              </>
            )}
            {d.content.imaginaryFrequency && (
              <>
                <dt>|ν‡|</dt>
                <dd className="num">{d.content.imaginaryFrequency.value} cm⁻¹ (Wigner correction)</dd>
              </>
            )}
            <dt>Uncertainty</dt>
            <dd className="num">{d.uncertainty !== null ? `± ${sig(d.uncertainty, 3)} ${eu}` : "—"}</dd>
          </dl>
        </section>
        <section className="panel">
          <h2 className="font-semibold">Every form at 298.15 K (1 mol/L standard state)</h2>
          {d.thermalNote && (
            <p className="mt-1 text-xs text-brick-700" data-testid="thermal-reference-warning">
              {d.thermalNote}
            </p>
          )}
          {d.derived ? (
            <dl className="mt-2 grid grid-cols-2 gap-1 text-sm">
              <dt>k</dt>
              <dd className="num">
                {sig(d.derived.k)} {d.derived.kUnit}
              </dd>
              <dt>ΔG‡</dt>
              <dd className="num">
                {sig(d.derived.dG)} {eu}
              </dd>
              <dt>ΔH‡</dt>
              <dd className="num">
                {sig(d.derived.dH)} {eu}
              </dd>
              <dt>ΔS‡</dt>
              <dd className="num">
                {sig(d.derived.dS)} {unitLabel(su)}
              </dd>
              <dt>Ea</dt>
              <dd className="num">
                {sig(d.derived.Ea)} {eu}
              </dd>
              <dt>A</dt>
              <dd className="num">
                {sig(d.derived.A)} {d.derived.kUnit}
              </dd>
            </dl>
          ) : (
            <p className="text-sm text-brick-700">{d.derivedError}</p>
          )}
          {d.derived && (
            <details className="mt-2 text-xs text-ink-600">
              <summary>Relations used</summary>
              <ul className="mt-1 list-disc pl-4">
                {[...d.derived.relations, ...d.derived.notes].map((r) => (
                  <li key={r}>{r}</li>
                ))}
              </ul>
            </details>
          )}
        </section>
      </div>
      <section className="panel">
        <h2 className="font-semibold">k(T) {d.range ? `over the validity range ${temperatureText(d.range.lo, tu)} – ${temperatureText(d.range.hi, tu)}` : "(no validity range given; 273–373 K shown)"}</h2>
        <div className="mt-2 grid gap-4 md:grid-cols-2">
          <table className="text-sm">
            <thead>
              <tr className="text-left text-xs text-ink-600">
                <th className="pr-4">T</th>
                <th>k</th>
              </tr>
            </thead>
            <tbody>
              {d.kT.map((r) => (
                <tr key={r.T}>
                  <td className="num pr-4">{temperatureText(r.T, tu)}</td>
                  <td className="num">
                    {sig(r.k)} {r.unit}
                    {r.extrapolated ? " *" : ""}
                    {r.farFromReference ? " †" : ""}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
          <KPlot points={d.kT} />
        </div>
        <p className="mt-2 text-xs text-ink-600">
          * ΔG‡ held constant away from its reference temperature.
          {d.kT.some((r) => r.farFromReference) && " † More than 50 K from the reference temperature of Ea and ΔS‡ (thermal form): ΔH‡ and ΔS‡ taken as constant, an extrapolation."} Predictions are estimates: where k feeds a thermal-hazard or scale-up decision, calorimetry and the site's process-safety review decide, and local codes and licensed practice govern.
        </p>
      </section>
      <div className="grid gap-4 md:grid-cols-2">
        <section className="panel text-sm">
          <h2 className="font-semibold">Provenance</h2>
          {d.provenance ? (
            <dl className="mt-2 grid grid-cols-3 gap-1">
              {Object.entries(d.provenance).map(([k, v]) => (
                <div key={k} className="contents">
                  <dt className="text-ink-600">{k}</dt>
                  <dd className="col-span-2 break-words">{k === "doi" ? <span className="font-mono">{String(v)}</span> : String(v)}</dd>
                </div>
              ))}
            </dl>
          ) : (
            <p>—</p>
          )}
          {d.tags.length > 0 && <p className="mt-2">Tags: {d.tags.join(", ")}</p>}
        </section>
        <section className="panel text-sm">
          <h2 className="font-semibold">Where it is used</h2>
          {d.whereUsed.length === 0 ? (
            <p className="mt-1 text-ink-600">In no mechanism you can see.</p>
          ) : (
            <ul className="mt-1">
              {d.whereUsed.map((m) => (
                <li key={m.id}>
                  <Link to={`/mechanisms/${m.id}`} className="text-copper-700 hover:underline">
                    {m.name}
                  </Link>{" "}
                  ({m.owner}, pinned v{m.pinnedVersion})
                </li>
              ))}
            </ul>
          )}
        </section>
      </div>
      <section className="panel text-sm">
        <h2 className="font-semibold">Version history</h2>
        <ul className="mt-1">
          {d.versions.map((v) => (
            <li key={v.id}>
              <Link to={`/steps/${d.id}?v=${v.number}`} className={v.number === d.version ? "font-semibold" : "text-copper-700 hover:underline"}>
                v{v.number}
              </Link>{" "}
              <StatusBadge status={v.status} /> {v.message} — {v.author ?? "?"}, {new Date(v.created_at).toISOString().slice(0, 16).replace("T", " ")} UTC
              {d.may.edit && v.number !== d.currentNumber && (
                <RestoreVersionButton version={v.number} current={d.currentNumber} disabled={busy} label={`Restore version ${v.number} as version ${d.currentNumber + 1}`} />
              )}
            </li>
          ))}
        </ul>
        {d.prevNumber && (
          <div className="mt-3">
            <h3 className="font-medium">
              Changes from v{d.prevNumber} to v{d.version}
            </h3>
            {d.changes.length === 0 ? (
              <p className="text-ink-600">No field changed.</p>
            ) : (
              <table className="mt-1 text-xs">
                <tbody>
                  {d.changes.map((c) => (
                    <tr key={c.path}>
                      <td className="pr-4">{fieldText(c.path)}</td>
                      <td className="num pr-4 text-brick-700">{fieldValueText(c.path, c.old)}</td>
                      <td className="num text-moss-700">{fieldValueText(c.path, c.new)}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            )}
          </div>
        )}
      </section>
      {(d.may.propose || d.may.review || d.may.deprecate) && d.isCurrent && (
        <section className="panel text-sm">
          <h2 className="font-semibold">Curation</h2>
          {d.may.propose && (
            <Form method="post" className="mt-2 flex flex-wrap items-end gap-2">
              <CsrfInput />
              <input type="hidden" name="intent" value="propose" />
              <input name="comment" className="field max-w-md" placeholder="Note for the curators (optional)" />
              <button className="btn-primary" disabled={busy}>
                Propose for the library
              </button>
            </Form>
          )}
          {(d.may.review || d.may.deprecate) && (
            <Form method="post" className="mt-2 grid gap-2 md:grid-cols-3">
              <CsrfInput />
              <textarea name="comment" className="field md:col-span-3" placeholder="Review comment (required to request changes)" />
              <div className="flex flex-wrap gap-2 md:col-span-3">
                {d.may.review && (
                  <>
                    <button className="btn-primary" name="intent" value="approve" disabled={busy}>
                      Approve
                    </button>
                    <button className="btn-quiet" name="intent" value="request_changes" disabled={busy}>
                      Request changes
                    </button>
                  </>
                )}
                {d.may.deprecate && (
                  <>
                    <input name="replacementStepId" className="field w-40" placeholder="Replacement step id" inputMode="numeric" />
                    <button className="btn-quiet" name="intent" value="deprecate" disabled={busy}>
                      Deprecate
                    </button>
                  </>
                )}
              </div>
              {reviewError && (
                <p className="text-brick-700 md:col-span-3" role="alert" data-testid="review-error">
                  {reviewError}
                </p>
              )}
            </Form>
          )}
        </section>
      )}
      <section className="panel text-sm">
        <h2 className="font-semibold">Reviews and comments</h2>
        <ul className="mt-1 space-y-1">
          {d.reviews.map((r, i) => (
            <li key={`r${i}`}>
              <span className="font-medium">{r.actor}</span> {r.action.replace("_", " ")} (v{r.version}){r.comment ? `: ${r.comment}` : ""}
            </li>
          ))}
          {d.comments.map((c) => (
            <li key={c.id}>
              <span className="font-medium">{c.author}</span>: {c.body}
            </li>
          ))}
        </ul>
        <Form method="post" className="mt-2 flex gap-2">
          <CsrfInput />
          <input type="hidden" name="intent" value="comment" />
          <input name="body" className="field" placeholder="Add a comment" aria-label="Comment" />
          <button className="btn-quiet" disabled={busy}>
            Comment
          </button>
        </Form>
      </section>
    </div>
  );
}
