/**
 * Simulation runs: create (queued), claim (running), progress, finish (done, in one transaction
 * with results, analysis and statistics), fail, cancel, read, list.
 *
 * Units: progress_time and t_end in s; results as in app/compute/run-task.ts packResults
 * (times s, temperatures K, concentrations mol/L).
 */
import type { Knex } from "knex";
import { createHash } from "node:crypto";
import type { Actor, OwnedObject } from "../../app/auth/policy.server";
import { packResults, unpackResults, type FailureCode, type RunAnalysis, type RunOutput, type RunStatistics } from "../../app/compute/run-task";
import type { AnalysisRequest, Conditions, ResolvedSolverSettings } from "../../app/compute/run-request";

export type RunStatus = "queued" | "running" | "done" | "failed" | "cancelled";

export interface RunRecord {
  id: number;
  ownerId: number;
  ownerName?: string;
  name: string;
  visibility: OwnedObject["visibility"];
  groupId: number | null;
  mechanismId: number | null;
  mechanismVersion: number | null;
  /** The run's mechanism as the policy sees it (its group share opens the run to the group); null without one. */
  mechanismAccess: OwnedObject | null;
  snapshotHash: string;
  snapshot: unknown;
  conditions: Conditions;
  solver: ResolvedSolverSettings;
  analysisRequest: AnalysisRequest | null;
  status: RunStatus;
  failureCode: FailureCode | "interrupted" | null;
  statusReason: string | null;
  tEnd: number;
  progressTime: number;
  cancelRequested: boolean;
  speciesIds: string[] | null;
  points: number | null;
  analysis: RunAnalysis | null;
  statistics: RunStatistics | null;
  warnings: string[] | null;
  createdAt: Date;
  startedAt: Date | null;
  finishedAt: Date | null;
}

export interface RunSeries {
  speciesIds: string[];
  times: Float64Array;
  temperatures: Float64Array;
  conc: Float64Array[];
}

/** sha256 of the JSON text of a snapshot. */
export function snapshotHash(snapshot: unknown): string {
  return createHash("sha256").update(JSON.stringify(snapshot)).digest("hex");
}

function json<T>(v: unknown): T {
  if (v === null || v === undefined) return null as T;
  return (typeof v === "string" ? JSON.parse(v) : v) as T;
}

const LIST_COLUMNS = [
  "r.id", "r.owner_id", "r.name", "r.visibility", "r.group_id", "r.mechanism_id", "r.mechanism_version", "r.snapshot_hash",
  "r.conditions", "r.solver_options", "r.analysis_request", "r.status", "r.failure_code", "r.status_reason", "r.t_end", "r.progress_time",
  "r.cancel_requested_at", "r.result_species", "r.result_points", "r.statistics", "r.warnings", "r.created_at", "r.started_at", "r.finished_at",
  "m.owner_id as mechanism_owner_id", "m.visibility as mechanism_visibility", "m.group_id as mechanism_group_id",
];

function toRecord(row: Record<string, any>): RunRecord {
  return {
    id: row.id,
    ownerId: row.owner_id,
    ownerName: row.owner_name ?? undefined,
    name: row.name,
    visibility: row.visibility,
    groupId: row.group_id,
    mechanismId: row.mechanism_id,
    mechanismVersion: row.mechanism_version,
    mechanismAccess: row.mechanism_owner_id == null ? null : { ownerId: row.mechanism_owner_id, visibility: row.mechanism_visibility, groupId: row.mechanism_group_id },
    snapshotHash: row.snapshot_hash,
    snapshot: row.snapshot === undefined ? undefined : json(row.snapshot),
    conditions: json(row.conditions),
    solver: json(row.solver_options),
    analysisRequest: json(row.analysis_request),
    status: row.status,
    failureCode: row.failure_code,
    statusReason: row.status_reason,
    tEnd: row.t_end,
    progressTime: row.progress_time,
    cancelRequested: row.cancel_requested_at != null,
    speciesIds: json(row.result_species),
    points: row.result_points,
    analysis: row.analysis === undefined ? null : json(row.analysis),
    statistics: json(row.statistics),
    warnings: json(row.warnings),
    createdAt: row.created_at,
    startedAt: row.started_at,
    finishedAt: row.finished_at,
  };
}

export interface NewRun {
  ownerId: number;
  name?: string;
  mechanismId?: number | null;
  mechanismVersion?: number | null;
  snapshot: unknown;
  conditions: Conditions;
  solver: ResolvedSolverSettings;
  analysisRequest?: AnalysisRequest | null;
  /** s */
  tEnd: number;
  visibility?: OwnedObject["visibility"];
  groupId?: number | null;
}

/**
 * The server worker process this process is, as named by its supervisor (scripts/serve.ts sets
 * SADDLEBOOK_SERVER_PROCESS for each worker it starts); null outside such a server.
 */
export function currentServerProcess(): string | null {
  return process.env.SADDLEBOOK_SERVER_PROCESS || null;
}

export async function createRun(db: Knex, r: NewRun): Promise<number> {
  const [id] = await db("runs").insert({
    owner_id: r.ownerId,
    name: (r.name ?? "").slice(0, 300),
    visibility: r.visibility ?? "private",
    group_id: r.groupId ?? null,
    mechanism_id: r.mechanismId ?? null,
    mechanism_version: r.mechanismVersion ?? null,
    snapshot_hash: snapshotHash(r.snapshot),
    snapshot: JSON.stringify(r.snapshot),
    conditions: JSON.stringify(r.conditions),
    solver_options: JSON.stringify(r.solver),
    analysis_request: r.analysisRequest ? JSON.stringify(r.analysisRequest) : null,
    t_end: r.tEnd,
    status: "queued",
    server_process: currentServerProcess(),
  });
  return id;
}

/** One run without its result block; `snapshot` and `analysis` included. */
export async function getRun(db: Knex, id: number): Promise<RunRecord | null> {
  const row = await db("runs as r")
    .leftJoin("users as u", "u.id", "r.owner_id")
    .leftJoin("mechanisms as m", "m.id", "r.mechanism_id")
    .select([...LIST_COLUMNS, "r.snapshot", "r.analysis", "u.name as owner_name"])
    .where("r.id", id)
    .first();
  return row ? toRecord(row) : null;
}

/** The stored concentration series of a finished run, or null. */
export async function getRunSeries(db: Knex, id: number): Promise<RunSeries | null> {
  const row = await db("runs").select("results", "result_species", "result_points", "status").where({ id }).first();
  if (!row || row.status !== "done" || !row.results) return null;
  const species = json<string[]>(row.result_species);
  const data = unpackResults(row.results as Uint8Array, row.result_points, species.length);
  return { speciesIds: species, ...data };
}

/** Runs the actor may read (policy "run.read": their own, shared with them, or of a mechanism shared with their group), newest first. */
export async function listRuns(db: Knex, actor: Actor | null, opts: { mechanismId?: number; limit?: number; mine?: boolean } = {}): Promise<RunRecord[]> {
  const q = db("runs as r").leftJoin("users as u", "u.id", "r.owner_id").leftJoin("mechanisms as m", "m.id", "r.mechanism_id").select([...LIST_COLUMNS, "u.name as owner_name"]);
  q.where((w) => {
    w.where("r.visibility", "public");
    if (actor) {
      w.orWhere("r.owner_id", actor.id);
      if (actor.role === "admin") w.orWhereRaw("1 = 1");
      if (actor.groupIds.length) {
        w.orWhere((g) => g.where("r.visibility", "group").whereIn("r.group_id", actor.groupIds));
        w.orWhere((g) => g.where("m.visibility", "group").whereIn("m.group_id", actor.groupIds));
      }
    }
  });
  if (opts.mine && actor) q.andWhere("r.owner_id", actor.id);
  if (opts.mechanismId !== undefined) q.andWhere("r.mechanism_id", opts.mechanismId);
  const rows = await q.orderBy("r.id", "desc").limit(Math.min(opts.limit ?? 100, 500));
  return rows.map(toRecord);
}

/** queued → running; false when the run is no longer queued (e.g. cancelled first). */
export async function claimRun(db: Knex, id: number): Promise<boolean> {
  const n = await db("runs").where({ id, status: "queued" }).update({ status: "running", started_at: db.fn.now(3) });
  return n === 1;
}

export async function updateProgress(db: Knex, id: number, tReached: number): Promise<void> {
  await db("runs").where({ id, status: "running" }).andWhere("progress_time", "<", tReached).update({ progress_time: tReached });
}

/**
 * running → done with the results, analysis and statistics, in one transaction. Returns false
 * (and writes nothing) when the run is no longer running — a cancellation won the race.
 */
export async function finishRun(db: Knex, id: number, out: RunOutput): Promise<boolean> {
  const block = packResults(out);
  return db.transaction(async (trx) => {
    const row = await trx("runs").select("status", "cancel_requested_at", "t_end").where({ id }).forUpdate().first();
    if (!row || row.status !== "running" || row.cancel_requested_at) return false;
    await trx("runs")
      .where({ id })
      .update({
        status: "done",
        results: Buffer.from(block.buffer, block.byteOffset, block.byteLength),
        result_species: JSON.stringify(out.speciesIds),
        result_points: out.times.length,
        analysis: JSON.stringify(out.analysis),
        statistics: JSON.stringify(out.statistics),
        warnings: JSON.stringify(out.warnings),
        progress_time: row.t_end,
        finished_at: trx.fn.now(3),
      });
    return true;
  });
}

/** queued|running → failed or cancelled with a reason; results stay empty. */
export async function endRunWithoutResults(db: Knex, id: number, status: "failed" | "cancelled", code: string, reason: string): Promise<boolean> {
  const n = await db("runs")
    .whereIn("status", ["queued", "running"])
    .andWhere({ id })
    .update({ status, failure_code: code, status_reason: reason.slice(0, 5000), finished_at: db.fn.now(3), results: null, analysis: null, statistics: null });
  return n === 1;
}

/**
 * Ask a run to stop. A queued run is cancelled at once; a running one is flagged (the worker
 * stops at its next step and the run becomes cancelled). Returns the status after the request.
 */
export async function requestCancel(db: Knex, id: number): Promise<RunStatus | null> {
  return db.transaction(async (trx) => {
    const row = await trx("runs").select("status").where({ id }).forUpdate().first();
    if (!row) return null;
    if (row.status === "queued") {
      await trx("runs").where({ id }).update({ status: "cancelled", failure_code: "cancelled", status_reason: "Cancelled before it started.", cancel_requested_at: trx.fn.now(3), finished_at: trx.fn.now(3) });
      return "cancelled";
    }
    if (row.status === "running") await trx("runs").where({ id }).update({ cancel_requested_at: trx.fn.now(3) });
    return row.status as RunStatus;
  });
}

export async function isCancelRequested(db: Knex, id: number): Promise<boolean> {
  const row = await db("runs").select("cancel_requested_at").where({ id }).first();
  return !!row?.cancel_requested_at;
}

const INTERRUPTED = { status: "failed", failure_code: "interrupted", status_reason: "The server restarted while the run was in progress; start it again." } as const;

/** The queued and running runs of one server worker process that stopped: failed, with the reason. */
export async function failRunsOfServerProcess(db: Knex, serverProcess: string): Promise<number> {
  return db("runs")
    .where({ server_process: serverProcess })
    .whereIn("status", ["queued", "running"])
    .update({ ...INTERRUPTED, status_reason: "The server process running it stopped while the run was in progress; start it again.", finished_at: db.fn.now(3) });
}

/**
 * Queued and running runs not made by the current production server (whose worker names all
 * start with `ownPrefix`): left by an earlier server, so failed, with the reason.
 */
export async function failRunsOfOtherServers(db: Knex, ownPrefix: string): Promise<number> {
  return db("runs")
    .whereIn("status", ["queued", "running"])
    .andWhere((w) => w.whereNull("server_process").orWhereRaw("LEFT(server_process, ?) <> ?", [ownPrefix.length, ownPrefix]))
    .update({ ...INTERRUPTED, finished_at: db.fn.now(3) });
}

/** Runs left queued or running by a server that stopped: failed, with the reason. */
export async function failInterruptedRuns(db: Knex, olderThan: Date): Promise<number> {
  return db("runs")
    .whereIn("status", ["queued", "running"])
    .andWhere("created_at", "<", olderThan)
    .update({ ...INTERRUPTED, finished_at: db.fn.now(3) });
}

export function runAsOwned(r: Pick<RunRecord, "ownerId" | "visibility" | "groupId">): OwnedObject {
  return { ownerId: r.ownerId, visibility: r.visibility, groupId: r.groupId };
}

/** The policy question "may this actor read this run?" for a stored run. */
export function runReadAction(r: Pick<RunRecord, "ownerId" | "visibility" | "groupId" | "mechanismAccess">): { do: "run.read"; object: OwnedObject; mechanism: OwnedObject | null } {
  return { do: "run.read", object: runAsOwned(r), mechanism: r.mechanismAccess };
}
