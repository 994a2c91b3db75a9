/**
 * REST handlers for stored runs:
 *   POST /api/v1/runs              {"mechanism": <exchange-format document>} or {"mechanismId", "mechanismVersion"?},
 *                                  "conditions" (as /api/v1/simulate), "solver"?, "analysis"?, "name"?  → 202 {run}
 *   GET  /api/v1/runs              runs the caller may read (newest first); ?mechanismId, ?limit (1–500, default 100)
 *   GET  /api/v1/runs/:id          status, progress (simulated time reached, s), analysis and statistics when done;
 *                                  ?series=1 adds times (s), temperatures (K) and concentrations (mol/L)
 *   POST /api/v1/runs/:id/cancel   stop a queued or running run
 *   GET  /api/v1/runs/:id/results.csv
 * Every error is {"error":{"code","message","fields"}}.
 */
import { z } from "zod";
import type { Knex } from "knex";
import { apiError } from "~/api/errors.server";
import { invalidBody, jsonResponse, readJsonBody, zodFields } from "~/api/json-request.server";
import { readQuery } from "~/api/query.server";
import { can, type Actor } from "~/auth/policy.server";
import { MechanismDocumentSchema, documentToEngine, validateMechanismDocument, type MechanismDocument } from "../../solver/exchange-format";
import { compileMechanism } from "../../solver/index";
import { createRun, getRun, getRunSeries, listRuns, requestCancel, runAsOwned, runReadAction, type RunRecord, type RunSeries } from "../../db/access/runs.server";
import { AnalysisRequestSchema, ConditionsSchema, RUN_MAX_VALUES, SolverSettingsSchema, resolveSolver, toEngineConditions } from "./run-request";
import { getComputeService } from "./pool.server";
import { nameKeyOf, namer, type NameKey, type NamedDocument } from "~/components/names";
import { resultsCsv } from "~/components/plots/results-csv";
import { loadMechanismDocument } from "./mechanism-source.server";

export const RunCreateSchema = z
  .strictObject({
    name: z.string().max(300).optional(),
    mechanism: MechanismDocumentSchema.optional(),
    mechanismId: z.int().positive().optional(),
    mechanismVersion: z.int().positive().optional(),
    conditions: ConditionsSchema,
    solver: SolverSettingsSchema.optional(),
    analysis: AnalysisRequestSchema.optional(),
  })
  .superRefine((b, ctx) => {
    if ((b.mechanism === undefined) === (b.mechanismId === undefined)) {
      ctx.addIssue({ code: "custom", path: ["mechanism"], message: 'Give either "mechanism" (an exchange-format document) or "mechanismId", not both or neither.' });
    }
  });
export type RunCreate = z.infer<typeof RunCreateSchema>;

export function runJson(r: RunRecord, opts: { series?: RunSeries | null } = {}) {
  const base = `/api/v1/runs/${r.id}`;
  const out: Record<string, unknown> = {
    id: r.id,
    name: r.name,
    owner: { id: r.ownerId, name: r.ownerName ?? null },
    status: r.status,
    failureCode: r.failureCode,
    reason: r.statusReason,
    progress: {
      time: { value: r.progressTime, unit: "s" },
      endTime: { value: r.tEnd, unit: "s" },
      fraction: r.tEnd > 0 ? Math.min(1, r.progressTime / r.tEnd) : 0,
      cancelRequested: r.cancelRequested,
    },
    mechanism: { id: r.mechanismId, version: r.mechanismVersion, snapshotHash: r.snapshotHash },
    conditions: r.conditions,
    solver: r.solver,
    createdAt: r.createdAt,
    startedAt: r.startedAt,
    finishedAt: r.finishedAt,
    links: { self: base, cancel: `${base}/cancel`, csv: `${base}/results.csv`, page: `/runs/${r.id}` },
  };
  if (r.status === "done") {
    out.analysis = r.analysis;
    out.statistics = r.statistics;
    out.warnings = r.warnings;
    out.species = r.speciesIds;
    out.points = r.points;
  }
  if (opts.series) {
    const s = opts.series;
    const conc: Record<string, Float64Array> = {};
    s.speciesIds.forEach((id, i) => (conc[id] = s.conc[i]));
    out.series = { times: { unit: "s", values: s.times }, temperatures: { unit: "K", values: s.temperatures }, concentrations: { unit: "mol/L", species: conc } };
  }
  return out;
}

export interface PreparedRun {
  snapshot: MechanismDocument;
  mechanismId: number | null;
  mechanismVersion: number | null;
  tEnd: number;
}

/** Validates the snapshot and conditions the way the worker will, so mistakes come back at once (422). */
export async function prepareRun(db: Knex, actor: Actor, body: RunCreate): Promise<{ ok: true; value: PreparedRun } | { ok: false; response: Response }> {
  let snapshot: MechanismDocument;
  let mechanismId: number | null = null;
  let mechanismVersion: number | null = null;
  if (body.mechanism) {
    const doc = validateMechanismDocument(body.mechanism);
    if (!doc.ok) {
      const fields: Record<string, string> = {};
      for (const iss of doc.error.issues) fields[`mechanism.${iss.path}`] ??= iss.message;
      return { ok: false, response: apiError(422, "invalid_mechanism", `mechanism.${doc.error.message}`, fields) };
    }
    snapshot = doc.value;
  } else {
    const loaded = await loadMechanismDocument(db, actor, body.mechanismId!, body.mechanismVersion);
    if (!loaded.ok) return { ok: false, response: apiError(loaded.status, loaded.code, loaded.message, { mechanismId: loaded.message }) };
    snapshot = loaded.document;
    mechanismId = body.mechanismId!;
    mechanismVersion = loaded.version;
  }
  const eng = documentToEngine(snapshot);
  if (!eng.ok) return { ok: false, response: apiError(422, eng.error.code.toLowerCase(), eng.error.message, { [`mechanism.${eng.error.path ?? ""}`]: eng.error.message }) };
  const model = compileMechanism(eng.value.mechanism);
  if (!model.ok) return { ok: false, response: apiError(422, model.error.code.toLowerCase(), model.error.message, { [`mechanism.${(model.error.path ?? "").replace(/^reactions\[/, "steps[")}`]: model.error.message }) };
  const cond = toEngineConditions(body.conditions, model.value.speciesIds);
  if (!cond.ok) return { ok: false, response: apiError(422, cond.error.code.toLowerCase(), cond.error.message, { [cond.error.path ?? "conditions"]: cond.error.message }) };
  const values = cond.value.points * model.value.nSpecies;
  if (values > RUN_MAX_VALUES) {
    return {
      ok: false,
      response: apiError(413, "too_many_values", `The output would hold ${values} values; the limit is ${RUN_MAX_VALUES} (points × species).`, {
        "conditions.output.points": `points × species must not exceed ${RUN_MAX_VALUES}`,
      }),
    };
  }
  return { ok: true, value: { snapshot, mechanismId, mechanismVersion, tEnd: cond.value.tEnd } };
}

/** Creates the run and hands it to the pool. */
export async function startRun(db: Knex, actor: Actor, body: RunCreate): Promise<{ ok: true; id: number } | { ok: false; response: Response }> {
  if (!can(actor, { do: "run.create", object: { ownerId: actor.id, visibility: "private" } })) {
    return { ok: false, response: apiError(403, "forbidden", "Your role does not allow starting runs (authors and above may).") };
  }
  const prep = await prepareRun(db, actor, body);
  if (!prep.ok) return prep;
  const p = prep.value;
  const pool = getComputeService(db);
  await pool.ready;
  const id = await createRun(db, {
    ownerId: actor.id,
    name: body.name ?? `${p.snapshot.about.name}`,
    mechanismId: p.mechanismId,
    mechanismVersion: p.mechanismVersion,
    snapshot: p.snapshot,
    conditions: body.conditions,
    solver: resolveSolver(body.solver),
    analysisRequest: body.analysis ?? null,
    tEnd: p.tEnd,
  });
  void pool.submit(id);
  return { ok: true, id };
}

export async function handleCreateRun(db: Knex, actor: Actor, request: Request): Promise<Response> {
  const body = await readJsonBody(request);
  if (!body.ok) return body.response;
  const parsed = RunCreateSchema.safeParse(body.value);
  if (!parsed.success) return invalidBody(zodFields(parsed.error, body.text));
  const started = await startRun(db, actor, parsed.data);
  if (!started.ok) return started.response;
  const run = await getRun(db, started.id);
  return jsonResponse({ run: runJson(run!) }, { status: 202, headers: { Location: `/api/v1/runs/${started.id}` } });
}

export async function readableRun(db: Knex, actor: Actor | null, idParam: string | undefined): Promise<{ ok: true; run: RunRecord } | { ok: false; response: Response }> {
  const id = Number(idParam);
  if (!Number.isInteger(id) || id <= 0) return { ok: false, response: apiError(404, "not_found", "There is no run with this id.") };
  const run = await getRun(db, id);
  if (!run || !can(actor, runReadAction(run))) return { ok: false, response: apiError(404, "not_found", `There is no run ${id} that you can see.`) };
  return { ok: true, run };
}

export async function handleGetRun(db: Knex, actor: Actor | null, idParam: string | undefined, request: Request): Promise<Response> {
  const r = await readableRun(db, actor, idParam);
  if (!r.ok) return r.response;
  const wantSeries = new URL(request.url).searchParams.get("series");
  const series = wantSeries && wantSeries !== "0" && r.run.status === "done" ? await getRunSeries(db, r.run.id) : null;
  return jsonResponse({ run: runJson(r.run, { series }) });
}

export const RunListParams = z.strictObject({
  mechanismId: z.coerce.number().int().positive().optional().meta({ description: "Only runs of this mechanism." }),
  limit: z.coerce.number().int().min(1).max(500).optional().meta({ description: "At most this many runs, newest first (1–500, default 100)." }),
});

export async function handleListRuns(db: Knex, actor: Actor, request: Request): Promise<Response> {
  const q = readQuery(RunListParams, new URL(request.url));
  if (!q.ok) return q.response;
  const runs = await listRuns(db, actor, { mechanismId: q.value.mechanismId, limit: q.value.limit ?? 100 });
  return jsonResponse({ runs: runs.map((r) => runJson(r)) });
}

export async function cancelRun(db: Knex, actor: Actor, run: RunRecord): Promise<{ ok: true; status: string } | { ok: false; response: Response }> {
  if (!can(actor, { do: "run.cancel", object: runAsOwned(run) })) return { ok: false, response: apiError(403, "forbidden", "Only the owner of a run can cancel it.") };
  if (run.status !== "queued" && run.status !== "running") {
    return { ok: false, response: apiError(409, "not_running", `Run ${run.id} has already ended (${run.status}); there is nothing to cancel.`) };
  }
  const status = await requestCancel(db, run.id);
  getComputeService(db).cancel(run.id);
  return { ok: true, status: status ?? run.status };
}

export async function handleCancelRun(db: Knex, actor: Actor, idParam: string | undefined): Promise<Response> {
  const r = await readableRun(db, actor, idParam);
  if (!r.ok) return r.response;
  const c = await cancelRun(db, actor, r.run);
  if (!c.ok) return c.response;
  const run = await getRun(db, r.run.id);
  return jsonResponse({ run: runJson(run!) }, { status: 202 });
}

/**
 * CSV of a finished run: time (s), T (K), one column per species (mol/L) headed by the species'
 * name, with a key from names to the mechanism's ids (layout in app/components/plots/results-csv.ts).
 */
export function seriesCsv(s: RunSeries, names: NameKey, title: string): string {
  const n = namer(names);
  const formula = (id: string) => names.species[id]?.[1] || undefined;
  return resultsCsv({
    title,
    columns: s.speciesIds.map((id) => ({ name: n.species(id), unit: "mol/L", id, formula: formula(id) })),
    rows: (function* () {
      for (let k = 0; k < s.times.length; k++) yield [s.times[k], s.temperatures[k], ...s.conc.map((c) => c[k])];
    })(),
  });
}

/** The name key of a run's snapshot (species and step names by id). */
export function runNameKey(run: Pick<RunRecord, "snapshot">): NameKey {
  return nameKeyOf(run.snapshot as NamedDocument | null);
}

export async function handleRunCsv(db: Knex, actor: Actor | null, idParam: string | undefined): Promise<Response> {
  const r = await readableRun(db, actor, idParam);
  if (!r.ok) return r.response;
  if (r.run.status !== "done") return apiError(409, "not_done", `Run ${r.run.id} has no results (${r.run.status}).`);
  const s = await getRunSeries(db, r.run.id);
  if (!s) return apiError(409, "not_done", `Run ${r.run.id} has no results.`);
  return new Response(seriesCsv(s, runNameKey(r.run), `Saddlebook run #${r.run.id}: ${r.run.name}`), {
    headers: { "Content-Type": "text/csv; charset=utf-8", "Content-Disposition": `attachment; filename="saddlebook-run-${r.run.id}.csv"`, "Cache-Control": "no-store" },
  });
}
