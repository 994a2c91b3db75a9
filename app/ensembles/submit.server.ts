/**
 * Starts the computation of a created ensemble. This version works in the background of the
 * server process itself: chunks of members, one after another, yielding to the event loop
 * between chunks so pages and the API stay responsive; a cancelled ensemble stops at the next
 * chunk. The signature is what a queue-backed version keeps.
 */
import type { Knex } from "knex";
import { setImmediate as nextTurn } from "node:timers/promises";
import { ensembleProgress, failEnsemble, finishEnsembleIfComplete, getEnsembleWork, isEnsembleCancelRequested, recordMemberOutcomes } from "../../db/access/ensembles.server";
import { runEnsembleChunk } from "./ensemble-task";

/** Members per chunk in the background of the server process (small: each chunk blocks the event loop). */
export const IN_PROCESS_CHUNK = 4;

async function work(db: Knex, id: number): Promise<void> {
  const p = await ensembleProgress(db, id);
  if (!p) return;
  for (let from = 0; from < p.total; from += IN_PROCESS_CHUNK) {
    if (await isEnsembleCancelRequested(db, id)) return;
    const input = await getEnsembleWork(db, id, from, Math.min(from + IN_PROCESS_CHUNK, p.total));
    const outcomes = runEnsembleChunk(input, {});
    await recordMemberOutcomes(db, id, outcomes);
    await nextTurn();
  }
  await finishEnsembleIfComplete(db, id);
}

/** Runs the ensemble in the background; resolves once it is handed over, not when it ends. */
export async function submitEnsemble(db: Knex, id: number): Promise<void> {
  void work(db, id).catch(async (e: unknown) => {
    await failEnsemble(db, id, `The ensemble stopped unexpectedly: ${(e as Error).message}`).catch(() => undefined);
  });
}
