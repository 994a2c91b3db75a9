/**
 * Compute threads for the stateless simulate API: each request's simulation runs in a worker
 * thread (piscina), so a long one never holds up the pages and API calls this server process
 * answers meanwhile. A pool of its own, apart from the stored runs' pool (pool.server.ts), so
 * a queue of long stored runs never delays an API answer.
 *
 * Threads: COMPUTE_THREADS (see pool.server.ts), default the cores left after one, 1–4.
 * At most MAX_QUEUE simulations wait for a thread; beyond that the answer is 503 with
 * Retry-After. When the client goes away a shared flag stops the engine at its next step; a
 * thread that overruns the simulate API's wall-time cap by more than GRACE_MS is terminated.
 */
import { Piscina } from "piscina";
import { availableParallelism } from "node:os";
import { pathToFileURL } from "node:url";
import { apiError } from "../api/errors.server";
import { defaultWorkerFile } from "./pool.server";

/** Simulations that may wait for a thread, per server process. */
export const MAX_QUEUE = 256;
const GRACE_MS = 15_000;

interface WireResponse {
  status: number;
  headers: [string, string][];
  body: string;
}

let pool: Piscina | undefined;

function threads(): number {
  const fromEnv = Number(process.env.COMPUTE_THREADS);
  return Number.isInteger(fromEnv) && fromEnv > 0 ? fromEnv : Math.max(1, Math.min(4, availableParallelism() - 1));
}

function apiPool(): Piscina {
  pool ??= new Piscina({
    filename: pathToFileURL(defaultWorkerFile()).href,
    minThreads: 1,
    maxThreads: threads(),
    maxQueue: MAX_QUEUE,
    idleTimeout: 300_000,
    resourceLimits: { maxOldGenerationSizeMb: 2048 },
  });
  return pool;
}

/**
 * Answers a simulate API body (already read and parsed) in a compute thread.
 * @param maxWallMs the API's wall-time cap, ms (the engine stops itself there; the thread is
 *   terminated GRACE_MS later if it has not)
 */
export async function simulateInThread(value: unknown, text: string, signal: AbortSignal, maxWallMs: number): Promise<Response> {
  const control = new SharedArrayBuffer(4);
  const flag = new Int32Array(control);
  const raise = () => Atomics.store(flag, 0, 1);
  if (signal.aborted) raise();
  signal.addEventListener("abort", raise, { once: true });
  const watchdog = new AbortController();
  const timer = setTimeout(() => watchdog.abort(new Error("overrun")), maxWallMs + GRACE_MS);
  try {
    const out = (await apiPool().run({ kind: "simulate-api", input: { value, text }, control, progress: new SharedArrayBuffer(16) }, { signal: watchdog.signal })) as WireResponse;
    return new Response(out.body, { status: out.status, headers: out.headers });
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    if (/queue is at limit/i.test(message)) {
      return apiError(503, "busy", `The simulation service is busy (${MAX_QUEUE} simulations waiting); try again shortly.`, undefined, { "Retry-After": "5" });
    }
    if (watchdog.signal.aborted) {
      return apiError(503, "simulation_stopped", `The simulation did not stop at its wall-time budget of ${maxWallMs} ms and its thread was stopped; try a shorter end time or looser tolerances.`);
    }
    return apiError(500, "simulation_failed", `The simulation thread stopped unexpectedly (${message}); nothing was stored.`);
  } finally {
    clearTimeout(timer);
    signal.removeEventListener("abort", raise);
  }
}

/** Stops the threads (tests). */
export async function closeApiPool(): Promise<void> {
  const p = pool;
  pool = undefined;
  await p?.destroy();
}
