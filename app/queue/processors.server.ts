/**
 * The processor registry: what a compute-queue worker does with each kind of job (jobs.ts).
 *
 * A processor gets the job's data and a context: the database, the BullMQ job (for
 * `updateProgress`), `runInThread(kind, input, { shouldStop })` to run CPU-bound work in a
 * compute thread of app/compute/simulate-worker.mjs (shouldStop is polled a few times a second
 * and raises the thread's stop flag), and a Redis client. Its result is the job's return value;
 * a throw is retried (BullMQ's UnrecoverableError is not). `giveUp` runs once when a job has
 * failed for the last time.
 *
 * To add a kind: a zod schema in jobs.ts, a thread kind in simulate-worker.mjs if it computes,
 * and an entry here.
 */
import type { Job } from "bullmq";
import type { Redis } from "ioredis";
import type { Knex } from "knex";
import type { ComputeJob, JobKind } from "./jobs";
import type { MemberOutcome } from "../ensembles/ensemble-task";
import {
  ensembleProgress,
  failEnsemble,
  finishEnsembleIfComplete,
  getEnsembleWork,
  isEnsembleCancelRequested,
  recordMemberOutcomes,
} from "../../db/access/ensembles.server";

export type ThreadRun = (kind: string, input: unknown, hooks?: { shouldStop?: () => Promise<boolean> }) => Promise<unknown>;

export interface JobContext {
  db: Knex;
  job: Job;
  runInThread: ThreadRun;
  redis: () => Redis;
}

export interface Processor<D> {
  run(data: D, ctx: JobContext): Promise<unknown>;
  giveUp?(data: D, db: Knex, reason: string): Promise<void>;
}

/** Redis keys the probe job writes: a hash of index → attempts started, and of index → value. */
export function probeKeys(key: string): { runs: string; done: string; stop: string } {
  return { runs: `probe:${key}:runs`, done: `probe:${key}:done`, stop: `probe:${key}:stop` };
}

const probe: Processor<Extract<ComputeJob, { kind: "probe" }>> = {
  async run(data, ctx) {
    const redis = ctx.redis();
    const keys = probeKeys(data.key);
    await redis.hincrby(keys.runs, String(data.index), 1);
    const out = (await ctx.runInThread("queue-probe", { spinMs: data.spinMs }, { shouldStop: async () => (await redis.exists(keys.stop)) === 1 })) as { stopped: boolean };
    if (!out.stopped) await redis.hset(keys.done, String(data.index), String(data.index * data.index));
    return { stopped: out.stopped };
  },
};

/**
 * Members [from, to) of an ensemble: skipped when it was cancelled (or has ended); otherwise
 * computed in a compute thread that stops between members once the ensemble is cancelled; the
 * outcomes computed (all, or those before the stop) recorded by member index, so a retried chunk
 * overwrites rather than adds; then the ensemble summarized if this was its last chunk.
 */
const ensembleChunk: Processor<Extract<ComputeJob, { kind: "ensemble-chunk" }>> = {
  async run(d, ctx) {
    const cancelled = () => isEnsembleCancelRequested(ctx.db, d.ensembleId);
    if (await cancelled()) return { recorded: 0, finished: false };
    const input = await getEnsembleWork(ctx.db, d.ensembleId, d.from, d.to);
    const outcomes = (await ctx.runInThread("ensemble-chunk", input, { shouldStop: cancelled })) as MemberOutcome[];
    await recordMemberOutcomes(ctx.db, d.ensembleId, outcomes);
    // Summarize only once all are recorded (a cheap count first; the last chunk to record sees them all).
    const p = await ensembleProgress(ctx.db, d.ensembleId);
    const finished = !!p && p.done >= p.total && (await finishEnsembleIfComplete(ctx.db, d.ensembleId));
    return { recorded: outcomes.length, finished };
  },
  async giveUp(d, db, reason) {
    await failEnsemble(db, d.ensembleId, `Members ${d.from + 1} to ${d.to} could not be computed after several attempts (${reason}); the members recorded before are kept.`);
  },
};

export const processors: { [K in JobKind]: Processor<Extract<ComputeJob, { kind: K }>> } = {
  "ensemble-chunk": ensembleChunk,
  probe,
};

export function processorFor(data: ComputeJob): Processor<ComputeJob> {
  return processors[data.kind] as Processor<ComputeJob>;
}
