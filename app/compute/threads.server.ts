/**
 * How many compute threads each pool of this server process may use (the stored runs' pool and
 * the simulate API's pool each get this many): COMPUTE_THREADS, set by the production server's
 * supervisor from the machine's cores and its worker count (scripts/serve.ts), else the cores
 * left after one, 1–4.
 */
import { availableParallelism } from "node:os";

export function computeThreads(): number {
  const fromEnv = Number(process.env.COMPUTE_THREADS);
  return Number.isInteger(fromEnv) && fromEnv > 0 ? fromEnv : Math.max(1, Math.min(4, availableParallelism() - 1));
}
