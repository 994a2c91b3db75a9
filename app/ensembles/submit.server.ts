/**
 * Starts and stops the computation of a created ensemble on the compute queue (app/queue/):
 * its members go out as chunk jobs of CHUNK_SIZE members, taken by whichever workers share the
 * queue's Redis (the app server's own, `npm run worker` processes); the chunk that records the
 * last member summarizes it. Progress is the members recorded (ensembleProgress).
 */
import type { Knex } from "knex";
import type { Queue } from "bullmq";
import { ensembleProgress, failEnsemble, requestEnsembleCancel, type EnsembleStatus } from "../../db/access/ensembles.server";
import { chunkJobId, chunkRanges } from "../queue/jobs";
import { computeQueue, enqueue, removeWaiting } from "../queue/queue.server";

/** Longest wait for the queue's Redis to take the jobs, ms. */
const ENQUEUE_TIMEOUT_MS = 10_000;

function withTimeout<T>(p: Promise<T>, ms: number, what: string): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  return Promise.race([p, new Promise<never>((_, reject) => (timer = setTimeout(() => reject(new Error(what)), ms)))]).finally(() => clearTimeout(timer));
}

/**
 * Queues the ensemble's chunks; resolves once they are queued, not when it ends. Queuing it
 * twice adds nothing (one job id per chunk). When the queue cannot be reached the ensemble
 * ends failed with that reason, so it never waits for nothing.
 */
export async function submitEnsemble(db: Knex, id: number, queue?: Queue): Promise<void> {
  const p = await ensembleProgress(db, id);
  if (!p || (p.status !== "queued" && p.status !== "running")) return;
  const jobs = chunkRanges(p.total).map((r) => ({ data: { kind: "ensemble-chunk" as const, ensembleId: id, from: r.from, to: r.to }, jobId: chunkJobId(id, r.from) }));
  try {
    await withTimeout(enqueue(jobs, queue ?? computeQueue()), ENQUEUE_TIMEOUT_MS, "Redis did not answer in time");
  } catch (e) {
    await failEnsemble(db, id, `The compute queue could not take the ensemble (${(e as Error).message}); try again later.`);
  }
}

/**
 * Cancels the ensemble (it ends "cancelled" at once, members recorded so far kept), takes its
 * chunks not yet started off the queue, and lets running chunks stop at their next member.
 * Returns the status after, or null when there is no such ensemble.
 */
export async function cancelEnsembleWork(db: Knex, id: number, queue?: Queue): Promise<EnsembleStatus | null> {
  const status = await requestEnsembleCancel(db, id);
  if (status === "cancelled") {
    // Best effort: a chunk left in the queue is skipped by the worker that takes it.
    await withTimeout(
      removeWaiting((d) => d.kind === "ensemble-chunk" && d.ensembleId === id, queue ?? computeQueue()),
      ENQUEUE_TIMEOUT_MS,
      "Redis did not answer in time",
    ).catch(() => 0);
  }
  return status;
}
