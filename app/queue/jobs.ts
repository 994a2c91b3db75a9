/**
 * The kinds of job the compute queue carries (plain data, stored in Redis as JSON).
 *
 * - `ensemble-chunk`: members [from, to) of a stored ensemble (indices inclusive-exclusive);
 *   chunks of CHUNK_SIZE members, so a killed worker loses at most one chunk's work, which
 *   another worker redoes.
 * - `probe`: a small stand-in job for checking the queue itself (tests, `npm run worker
 *   -- --probe`): spins a compute thread for `spinMs` and writes `value` under `key`/`index`
 *   in Redis.
 *
 * A new kind: add its schema here and its processor to app/queue/processors.server.ts.
 */
import { z } from "zod";

export const CHUNK_SIZE = 20;

export const ensembleChunkJob = z.object({
  kind: z.literal("ensemble-chunk"),
  ensembleId: z.number().int().positive(),
  from: z.number().int().nonnegative(),
  to: z.number().int().positive(),
});

export const probeJob = z.object({
  kind: z.literal("probe"),
  key: z.string().min(1).max(100),
  index: z.number().int().nonnegative(),
  spinMs: z.number().int().nonnegative().max(60_000),
});

export const computeJob = z.discriminatedUnion("kind", [ensembleChunkJob, probeJob]);
export type ComputeJob = z.infer<typeof computeJob>;
export type JobKind = ComputeJob["kind"];

/** The job id of a chunk: the same chunk enqueued twice is one job. */
export function chunkJobId(ensembleId: number, from: number): string {
  return `ensemble-${ensembleId}-${from}`;
}

/** [from, to) ranges of `size` members covering `total`. */
export function chunkRanges(total: number, size = CHUNK_SIZE): Array<{ from: number; to: number }> {
  const out: Array<{ from: number; to: number }> = [];
  for (let from = 0; from < total; from += size) out.push({ from, to: Math.min(total, from + size) });
  return out;
}
