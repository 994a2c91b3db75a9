/**
 * REST handlers for ensembles:
 *   POST /api/v1/ensembles                 EnsembleSpec (ensemble-spec.ts) → 202 {ensemble}
 *   GET  /api/v1/ensembles                 ensembles the caller may read; ?mechanismId, ?limit
 *   GET  /api/v1/ensembles/:id             status, progress (members done/total), summary when done
 *   POST /api/v1/ensembles/:id/cancel      stop a queued or running ensemble
 *   GET  /api/v1/ensembles/:id/members.csv one row per member (parameters and observables)
 *   GET  /api/v1/ensembles/:id/summary.csv distributions per observable and time
 * Authorization as for runs (policy run.create, run.read, run.cancel). Every error is
 * {"error":{"code","message","fields"}}.
 */
import { z } from "zod";
import type { Knex } from "knex";
import { apiError } from "~/api/errors.server";
import { invalidBody, jsonResponse, readJsonBody, zodFields } from "~/api/json-request.server";
import { readQuery } from "~/api/query.server";
import { can, type Actor } from "~/auth/policy.server";
import { prepareRun } from "~/compute/run-api.server";
import { nameKeyOf, namer, type NameKey, type NamedDocument } from "~/components/names";
import type { MechanismDocument } from "../../solver/exchange-format";
import {
  createEnsemble,
  ensembleAsOwned,
  ensembleProgress,
  getEnsemble,
  listEnsembleMembers,
  listEnsembles,
  type EnsembleRecord,
} from "../../db/access/ensembles.server";
import { EnsembleSpecSchema, type EnsembleSpec } from "./ensemble-spec";
import { observablesOf, planEnsemble, resolveEnsemble } from "./ensemble-plan";
import { observableLabel, parameterLabel } from "./ensemble-labels";
import { membersCsv, summaryCsv } from "./ensemble-csv";
import { cancelEnsembleWork, submitEnsemble } from "./submit.server";

/** Labels of an ensemble's observables and sampled parameters, by key (names, never ids). */
function labels(spec: EnsembleSpec, key: NameKey) {
  const n = namer(key);
  const observables = Object.fromEntries(observablesOf(spec).map((o) => [o.key, observableLabel(o, n)]));
  const parameters: Record<string, string> = { T: parameterLabel("T", n) };
  for (const id of Object.keys(key.steps)) parameters[id] = parameterLabel(id, n);
  return { observables, parameters };
}

export function ensembleJson(e: EnsembleRecord, done: number) {
  const base = `/api/v1/ensembles/${e.id}`;
  const key = nameKeyOf(e.snapshot as NamedDocument | null);
  const out: Record<string, unknown> = {
    id: e.id,
    name: e.name,
    owner: { id: e.ownerId, name: e.ownerName ?? null },
    mode: e.mode,
    status: e.status,
    reason: e.statusReason,
    progress: { done, total: e.total, fraction: e.total > 0 ? done / e.total : 0, cancelRequested: e.cancelRequested },
    mechanism: { id: e.mechanismId, version: e.mechanismVersion, snapshotHash: e.snapshotHash },
    spec: e.spec,
    labels: labels(e.spec, key),
    createdAt: e.createdAt,
    startedAt: e.startedAt,
    finishedAt: e.finishedAt,
    links: { self: base, cancel: `${base}/cancel`, membersCsv: `${base}/members.csv`, summaryCsv: `${base}/summary.csv`, page: `/ensembles/${e.id}` },
  };
  if (e.status === "done") out.summary = e.summary;
  return out;
}

/** Validates, plans and stores the ensemble, then starts it. */
export async function startEnsemble(db: Knex, actor: Actor, spec: EnsembleSpec): Promise<{ ok: true; id: number } | { ok: false; response: Response }> {
  if (!can(actor, { do: "run.create", object: { ownerId: actor.id, visibility: "private" } })) {
    return { ok: false, response: apiError(403, "forbidden", "Your role does not allow starting ensembles (authors and above may).") };
  }
  const prep = await prepareRun(db, actor, { mechanismId: spec.mechanismId, mechanismVersion: spec.mechanismVersion, conditions: spec.conditions, solver: spec.solver });
  if (!prep.ok) return prep;
  const doc = prep.value.snapshot as MechanismDocument;
  const members = planEnsemble(spec, doc);
  if (!members.ok) {
    const e = members.error;
    return { ok: false, response: apiError(422, e.code.toLowerCase(), namer(nameKeyOf(doc)).text(e.message), { [e.path ?? "spec"]: e.message }) };
  }
  const id = await createEnsemble(db, {
    ownerId: actor.id,
    name: spec.name || `${doc.about.name} — ${spec.mode === "sweep" ? "sweep" : "uncertainty"}`,
    mechanismId: prep.value.mechanismId,
    mechanismVersion: prep.value.mechanismVersion,
    snapshot: doc,
    spec,
    members: members.value,
  });
  await submitEnsemble(db, id);
  return { ok: true, id };
}

export async function handleCreateEnsemble(db: Knex, actor: Actor, request: Request): Promise<Response> {
  const body = await readJsonBody(request);
  if (!body.ok) return body.response;
  const parsed = EnsembleSpecSchema.safeParse(body.value);
  if (!parsed.success) return invalidBody(zodFields(parsed.error, body.text));
  const started = await startEnsemble(db, actor, parsed.data);
  if (!started.ok) return started.response;
  const e = (await getEnsemble(db, started.id))!;
  return jsonResponse({ ensemble: ensembleJson(e, 0) }, { status: 202, headers: { Location: `/api/v1/ensembles/${started.id}` } });
}

export async function readableEnsemble(db: Knex, actor: Actor | null, idParam: string | undefined): Promise<{ ok: true; ensemble: EnsembleRecord } | { ok: false; response: Response }> {
  const id = Number(idParam);
  if (!Number.isInteger(id) || id <= 0) return { ok: false, response: apiError(404, "not_found", "There is no ensemble with this id.") };
  const e = await getEnsemble(db, id);
  if (!e || !can(actor, { do: "run.read", object: ensembleAsOwned(e) })) return { ok: false, response: apiError(404, "not_found", `There is no ensemble ${id} that you can see.`) };
  return { ok: true, ensemble: e };
}

export async function handleGetEnsemble(db: Knex, actor: Actor | null, idParam: string | undefined): Promise<Response> {
  const r = await readableEnsemble(db, actor, idParam);
  if (!r.ok) return r.response;
  const p = await ensembleProgress(db, r.ensemble.id);
  return jsonResponse({ ensemble: ensembleJson(r.ensemble, p?.done ?? 0) });
}

export const EnsembleListParams = z.strictObject({
  mechanismId: z.coerce.number().int().positive().optional().meta({ description: "Only ensembles of this mechanism." }),
  limit: z.coerce.number().int().min(1).max(500).optional().meta({ description: "At most this many, newest first (1–500, default 100)." }),
});

export async function handleListEnsembles(db: Knex, actor: Actor, request: Request): Promise<Response> {
  const q = readQuery(EnsembleListParams, new URL(request.url));
  if (!q.ok) return q.response;
  const list = await listEnsembles(db, actor, { mechanismId: q.value.mechanismId, limit: q.value.limit ?? 100 });
  const brief = (e: EnsembleRecord) => {
    const { spec: _spec, labels: _labels, progress: _progress, ...rest } = ensembleJson(e, 0);
    return { ...rest, members: e.total };
  };
  return jsonResponse({ ensembles: list.map(brief) });
}

export async function cancelEnsemble(db: Knex, actor: Actor, e: EnsembleRecord): Promise<{ ok: true } | { ok: false; response: Response }> {
  if (!can(actor, { do: "run.cancel", object: ensembleAsOwned(e) })) return { ok: false, response: apiError(403, "forbidden", "Only the owner of an ensemble can cancel it.") };
  if (e.status !== "queued" && e.status !== "running") return { ok: false, response: apiError(409, "not_running", `Ensemble ${e.id} has already ended (${e.status}); there is nothing to cancel.`) };
  await cancelEnsembleWork(db, e.id);
  return { ok: true };
}

export async function handleCancelEnsemble(db: Knex, actor: Actor, idParam: string | undefined): Promise<Response> {
  const r = await readableEnsemble(db, actor, idParam);
  if (!r.ok) return r.response;
  const c = await cancelEnsemble(db, actor, r.ensemble);
  if (!c.ok) return c.response;
  const e = (await getEnsemble(db, r.ensemble.id))!;
  const p = await ensembleProgress(db, e.id);
  return jsonResponse({ ensemble: ensembleJson(e, p?.done ?? 0) }, { status: 202 });
}

const csvResponse = (text: string, file: string) =>
  new Response(text, { headers: { "Content-Type": "text/csv; charset=utf-8", "Content-Disposition": `attachment; filename="${file}"`, "Cache-Control": "no-store" } });

export async function handleEnsembleCsv(db: Knex, actor: Actor | null, idParam: string | undefined, which: "members" | "summary"): Promise<Response> {
  const r = await readableEnsemble(db, actor, idParam);
  if (!r.ok) return r.response;
  const e = r.ensemble;
  const doc = e.snapshot as MechanismDocument;
  const resolved = resolveEnsemble(e.spec, doc);
  if (!resolved.ok) return apiError(422, resolved.error.code.toLowerCase(), resolved.error.message);
  const names = namer(nameKeyOf(doc));
  const title = `Saddlebook ensemble #${e.id}: ${e.name}`;
  if (which === "summary") {
    if (e.status !== "done" || !e.summary) return apiError(409, "not_done", `Ensemble ${e.id} has no summary (${e.status}).`);
    return csvResponse(summaryCsv({ title, names, observables: resolved.value.observables, summary: e.summary }), `saddlebook-ensemble-${e.id}-summary.csv`);
  }
  const rows = await listEnsembleMembers(db, e.id);
  const text = membersCsv({ title, names, stepOrder: doc.steps.map((s) => s.id), observables: resolved.value.observables, times: resolved.value.times, chosen: resolved.value.chosen, rows });
  return csvResponse(text, `saddlebook-ensemble-${e.id}-members.csv`);
}
