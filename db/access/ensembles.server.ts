/**
 * Ensembles: create (queued, with every member planned), hand out work by member index, record
 * outcomes (idempotent), progress, cancel, finish (summary in one transaction), fail, read, list.
 *
 * Units: a member's T in K, initial concentrations in mol/L, barrier shifts in J/mol; the
 * observables are fractions (app/ensembles/ensemble-plan.ts).
 */
import type { Knex } from "knex";
import type { Actor, OwnedObject } from "../../app/auth/policy.server";
import type { EnsembleMember, EnsembleSummary, MemberResult } from "../../solver/ensemble";
import type { EnsembleSpec } from "../../app/ensembles/ensemble-spec";
import type { EnsembleChunkInput, MemberOutcome } from "../../app/ensembles/ensemble-task";
import { summarizeEnsemble } from "../../app/ensembles/ensemble-plan";
import type { MechanismDocument } from "../../solver/exchange-format";
import { currentServerProcess, snapshotHash } from "./runs.server";

export type EnsembleStatus = "queued" | "running" | "done" | "failed" | "cancelled";

export interface EnsembleRecord {
  id: number;
  ownerId: number;
  ownerName?: string;
  name: string;
  visibility: OwnedObject["visibility"];
  groupId: number | null;
  mechanismId: number | null;
  mechanismVersion: number | null;
  snapshotHash: string;
  snapshot?: unknown;
  spec: EnsembleSpec;
  mode: "sweep" | "uncertainty";
  total: number;
  status: EnsembleStatus;
  statusReason: string | null;
  cancelRequested: boolean;
  summary: EnsembleSummary | null;
  createdAt: Date;
  startedAt: Date | null;
  finishedAt: Date | null;
}

export interface NewEnsemble {
  ownerId: number;
  name?: string;
  mechanismId: number | null;
  mechanismVersion: number | null;
  snapshot: MechanismDocument;
  spec: EnsembleSpec;
  members: EnsembleMember[];
  visibility?: OwnedObject["visibility"];
  groupId?: number | null;
}

function json<T>(v: unknown): T {
  if (v === null || v === undefined) return null as T;
  return (typeof v === "string" ? JSON.parse(v) : v) as T;
}

const COLUMNS = [
  "e.id", "e.owner_id", "e.name", "e.visibility", "e.group_id", "e.mechanism_id", "e.mechanism_version", "e.snapshot_hash", "e.spec", "e.mode",
  "e.total_members", "e.status", "e.status_reason", "e.cancel_requested_at", "e.created_at", "e.started_at", "e.finished_at",
];

function toRecord(row: Record<string, any>): EnsembleRecord {
  return {
    id: row.id,
    ownerId: row.owner_id,
    ownerName: row.owner_name ?? undefined,
    name: row.name,
    visibility: row.visibility,
    groupId: row.group_id,
    mechanismId: row.mechanism_id,
    mechanismVersion: row.mechanism_version,
    snapshotHash: row.snapshot_hash,
    snapshot: row.snapshot === undefined ? undefined : json(row.snapshot),
    spec: json(row.spec),
    mode: row.mode,
    total: row.total_members,
    status: row.status,
    statusReason: row.status_reason,
    cancelRequested: row.cancel_requested_at != null,
    summary: row.summary === undefined ? null : json(row.summary),
    createdAt: row.created_at,
    startedAt: row.started_at,
    finishedAt: row.finished_at,
  };
}

/** Members are inserted in batches of this many rows. */
const INSERT_BATCH = 500;

/** The ensemble (queued) and all its planned members, in one transaction; returns its id. */
export async function createEnsemble(db: Knex, e: NewEnsemble): Promise<number> {
  return db.transaction(async (trx) => {
    const [id] = await trx("ensembles").insert({
      owner_id: e.ownerId,
      name: (e.name ?? "").slice(0, 300),
      visibility: e.visibility ?? "private",
      group_id: e.groupId ?? null,
      mechanism_id: e.mechanismId,
      mechanism_version: e.mechanismVersion,
      snapshot_hash: snapshotHash(e.snapshot),
      snapshot: JSON.stringify(e.snapshot),
      spec: JSON.stringify(e.spec),
      mode: e.spec.mode,
      total_members: e.members.length,
      status: "queued",
      server_process: currentServerProcess(),
    });
    for (let i = 0; i < e.members.length; i += INSERT_BATCH) {
      await trx("ensemble_members").insert(
        e.members.slice(i, i + INSERT_BATCH).map((m) => ({ ensemble_id: id, member_index: m.index, params: JSON.stringify({ T: m.T, initial: m.initial, shifts: m.shifts }) })),
      );
    }
    return id;
  });
}

/** One ensemble with its snapshot and summary, or null. */
export async function getEnsemble(db: Knex, id: number): Promise<EnsembleRecord | null> {
  const row = await db("ensembles as e")
    .leftJoin("users as u", "u.id", "e.owner_id")
    .select([...COLUMNS, "e.snapshot", "e.summary", "u.name as owner_name"])
    .where("e.id", id)
    .first();
  return row ? toRecord(row) : null;
}

/** Ensembles the actor may read, newest first (without snapshot and summary). */
export async function listEnsembles(db: Knex, actor: Actor | null, opts: { mechanismId?: number; limit?: number } = {}): Promise<EnsembleRecord[]> {
  const q = db("ensembles as e").leftJoin("users as u", "u.id", "e.owner_id").select([...COLUMNS, "u.name as owner_name"]);
  q.where((w) => {
    w.where("e.visibility", "public");
    if (actor) {
      w.orWhere("e.owner_id", actor.id);
      if (actor.role === "admin") w.orWhereRaw("1 = 1");
      if (actor.groupIds.length) w.orWhere((g) => g.where("e.visibility", "group").whereIn("e.group_id", actor.groupIds));
    }
  });
  if (opts.mechanismId !== undefined) q.andWhere("e.mechanism_id", opts.mechanismId);
  const rows = await q.orderBy("e.id", "desc").limit(Math.min(opts.limit ?? 100, 500));
  return rows.map(toRecord);
}

function memberOf(index: number, params: unknown): EnsembleMember {
  const p = json<{ T: number | null; initial: Record<string, number>; shifts: Record<string, number> }>(params);
  return { index, T: p.T, initial: p.initial ?? {}, shifts: p.shifts ?? {} };
}

/** The work of members fromIndex ≤ index < toIndex: snapshot, request and the members' parameters. */
export async function getEnsembleWork(db: Knex, id: number, fromIndex: number, toIndex: number): Promise<EnsembleChunkInput> {
  const e = await db("ensembles").select("snapshot", "spec").where({ id }).first();
  if (!e) throw new Error(`There is no ensemble ${id}.`);
  const rows = await db("ensemble_members")
    .select("member_index", "params")
    .where({ ensemble_id: id })
    .andWhere("member_index", ">=", fromIndex)
    .andWhere("member_index", "<", toIndex)
    .orderBy("member_index");
  return { snapshot: json(e.snapshot), spec: json(e.spec), members: rows.map((r) => memberOf(r.member_index, r.params)) };
}

/**
 * Stores outcomes by member index (overwriting an earlier record of the same member, so a retried
 * chunk never counts twice) and marks a queued ensemble running.
 */
export async function recordMemberOutcomes(db: Knex, id: number, outcomes: MemberOutcome[]): Promise<void> {
  if (outcomes.length === 0) return;
  await db.transaction(async (trx) => {
    for (const o of outcomes) {
      await trx("ensemble_members")
        .where({ ensemble_id: id, member_index: o.index })
        .update({ ok: o.ok, outcome: o.ok ? JSON.stringify(o.values ?? {}) : null, error: o.ok ? null : (o.error ?? "failed").slice(0, 2000), recorded_at: trx.fn.now(3) });
    }
    await trx("ensembles").where({ id, status: "queued" }).update({ status: "running", started_at: trx.fn.now(3) });
  });
}

export interface EnsembleProgress {
  done: number;
  total: number;
  status: EnsembleStatus;
}

export async function ensembleProgress(db: Knex, id: number): Promise<EnsembleProgress | null> {
  const e = await db("ensembles").select("status", "total_members").where({ id }).first();
  if (!e) return null;
  const [{ n }] = await db("ensemble_members").where({ ensemble_id: id }).whereNotNull("recorded_at").count({ n: "*" });
  return { done: Number(n), total: e.total_members, status: e.status };
}

/**
 * Stop an ensemble: a queued or running one becomes cancelled at once (chunks check
 * isEnsembleCancelRequested and stop; members already recorded are kept). Returns the status after.
 */
export async function requestEnsembleCancel(db: Knex, id: number): Promise<EnsembleStatus | null> {
  return db.transaction(async (trx) => {
    const row = await trx("ensembles").select("status").where({ id }).forUpdate().first();
    if (!row) return null;
    if (row.status !== "queued" && row.status !== "running") return row.status;
    await trx("ensembles")
      .where({ id })
      .update({ status: "cancelled", status_reason: row.status === "queued" ? "Cancelled before it started." : "Cancelled while running.", cancel_requested_at: trx.fn.now(3), finished_at: trx.fn.now(3) });
    return "cancelled";
  });
}

export async function isEnsembleCancelRequested(db: Knex, id: number): Promise<boolean> {
  const row = await db("ensembles").select("cancel_requested_at", "status").where({ id }).first();
  return !row || !!row.cancel_requested_at || row.status === "cancelled" || row.status === "failed";
}

/**
 * When every member is recorded: the summary and status "done" in one transaction. Returns true
 * when this call finished it; false when members are missing or it had already ended (so a second
 * call changes nothing).
 */
export async function finishEnsembleIfComplete(db: Knex, id: number): Promise<boolean> {
  return db.transaction(async (trx) => {
    const e = await trx("ensembles").select("status", "total_members", "spec", "snapshot").where({ id }).forUpdate().first();
    if (!e || (e.status !== "queued" && e.status !== "running")) return false;
    const rows = await trx("ensemble_members").select("member_index", "params", "ok", "outcome").where({ ensemble_id: id }).whereNotNull("recorded_at");
    if (rows.length < e.total_members) return false;
    const results: MemberResult[] = rows
      .filter((r) => !!r.ok)
      .map((r) => {
        const m = memberOf(r.member_index, r.params);
        return { index: m.index, shifts: m.shifts, T: m.T, values: json<Record<string, number>>(r.outcome) ?? {} };
      });
    const s = summarizeEnsemble(json(e.spec), json(e.snapshot), results, e.total_members);
    if (!s.ok) {
      await trx("ensembles").where({ id }).update({ status: "failed", status_reason: s.error.message.slice(0, 5000), finished_at: trx.fn.now(3) });
      return true;
    }
    const failed = e.total_members - results.length;
    await trx("ensembles")
      .where({ id })
      .update({
        status: results.length === 0 ? "failed" : "done",
        status_reason: results.length === 0 ? "No member could be simulated." : failed > 0 ? `${failed} of ${e.total_members} members could not be simulated; the statistics use the others.` : null,
        summary: JSON.stringify(s.value),
        finished_at: trx.fn.now(3),
      });
    return true;
  });
}

/** queued|running → failed with the reason. */
export async function failEnsemble(db: Knex, id: number, reason: string): Promise<boolean> {
  const n = await db("ensembles").whereIn("status", ["queued", "running"]).andWhere({ id }).update({ status: "failed", status_reason: reason.slice(0, 5000), finished_at: db.fn.now(3) });
  return n === 1;
}

export interface MemberRow {
  index: number;
  member: EnsembleMember;
  ok: boolean | null;
  values: Record<string, number> | null;
  error: string | null;
}

/** Every member with its parameters and outcome, in index order (for the CSV). */
export async function listEnsembleMembers(db: Knex, id: number): Promise<MemberRow[]> {
  const rows = await db("ensemble_members").select("member_index", "params", "ok", "outcome", "error").where({ ensemble_id: id }).orderBy("member_index");
  return rows.map((r) => ({ index: r.member_index, member: memberOf(r.member_index, r.params), ok: r.ok == null ? null : !!r.ok, values: json(r.outcome), error: r.error }));
}

export function ensembleAsOwned(e: Pick<EnsembleRecord, "ownerId" | "visibility" | "groupId">): OwnedObject {
  return { ownerId: e.ownerId, visibility: e.visibility, groupId: e.groupId };
}
