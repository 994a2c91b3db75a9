/**
 * Compute threads for the stateless compute API (simulate and rates): each request's work runs in
 * a worker thread (piscina), so a long one never holds up the pages and API calls this server
 * process answers meanwhile. A pool of its own, apart from the stored runs' pool (pool.server.ts),
 * so a queue of long stored runs never delays an API answer.
 *
 * Threads: computeThreads() (threads.server.ts). At most MAX_QUEUE simulations wait for a
 * thread, and none longer than MAX_WAIT_MS; beyond either the answer is 503 with Retry-After.
 * When the client goes away a shared flag stops the engine at its next step; a thread that
 * overruns the simulate API's wall-time cap by more than GRACE_MS, counted from when it started
 * the simulation, is terminated.
 */
import { Piscina } from "piscina";
import { pathToFileURL } from "node:url";
import { apiError } from "../api/errors.server";
import { defaultWorkerFile } from "./pool.server";
import { computeThreads } from "./threads.server";

/** Simulations that may wait for a thread, per server process. */
export const MAX_QUEUE = 64;
/** Longest wait for a thread, ms. */
export const MAX_WAIT_MS = 20_000;
const GRACE_MS = 15_000;
const TICK_MS = 200;

interface WireResponse {
  status: number;
  headers: [string, string][];
  body: string;
}

let pool: Piscina | undefined;

function apiPool(): Piscina {
  pool ??= new Piscina({
    filename: pathToFileURL(defaultWorkerFile()).href,
    minThreads: 1,
    maxThreads: computeThreads(),
    maxQueue: MAX_QUEUE,
    idleTimeout: 300_000,
    resourceLimits: { maxOldGenerationSizeMb: 2048 },
  });
  return pool;
}

const busy = (why: string) => apiError(503, "busy", `The compute service is busy (${why}); try again shortly.`, undefined, { "Retry-After": "5" });

/** What the compute API answers in a thread: the task kind and the words for its messages. */
const TASKS = {
  simulate: { kind: "simulate-api", work: "simulation", plural: "simulations", advice: "try a shorter end time or looser tolerances", stopped: "simulation_stopped", failed: "simulation_failed" },
  rates: { kind: "rates-api", work: "rate calculation", plural: "requests", advice: "ask for fewer steps or temperatures", stopped: "computation_stopped", failed: "computation_failed" },
} as const;

/**
 * Answers a simulate API body (already read, and known to parse as JSON) in a compute thread.
 * @param maxWallMs the API's wall-time cap, ms (the engine stops itself there; the thread is
 *   terminated GRACE_MS after that, counted from the start of the simulation, if it has not)
 */
export function simulateInThread(text: string, signal: AbortSignal, maxWallMs: number): Promise<Response> {
  return answerInThread(TASKS.simulate, text, signal, maxWallMs);
}

/** Answers a rates API body (already read, and known to parse as JSON) in a compute thread. */
export function ratesInThread(text: string, signal: AbortSignal, maxWallMs: number): Promise<Response> {
  return answerInThread(TASKS.rates, text, signal, maxWallMs);
}

async function answerInThread(task: (typeof TASKS)[keyof typeof TASKS], text: string, signal: AbortSignal, maxWallMs: number): Promise<Response> {
  const control = new SharedArrayBuffer(4);
  const flag = new Int32Array(control);
  const progress = new SharedArrayBuffer(16);
  const started = new Float64Array(progress); // [1] = 1 once a thread has taken the task
  const raise = () => Atomics.store(flag, 0, 1);
  if (signal.aborted) raise();
  signal.addEventListener("abort", raise, { once: true });
  const watchdog = new AbortController();
  let why: "wait" | "overrun" | null = null;
  const queuedAt = Date.now();
  let startedAt = 0;
  const timer = setInterval(() => {
    const now = Date.now();
    if (!startedAt && started[1] === 1) startedAt = now;
    if (!startedAt && now - queuedAt > MAX_WAIT_MS) (why = "wait"), watchdog.abort();
    else if (startedAt && now - startedAt > maxWallMs + GRACE_MS) (why = "overrun"), watchdog.abort();
  }, TICK_MS);
  timer.unref();
  try {
    // Only the text crosses to the thread (parsed again there): copying a parsed value between
    // threads recurses through it, and a deeply nested body would overflow that copy.
    const out = (await apiPool().run({ kind: task.kind, input: { text }, control, progress }, { signal: watchdog.signal })) as WireResponse;
    return new Response(out.body, { status: out.status, headers: out.headers });
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    if (/queue is at limit/i.test(message)) return busy(`${MAX_QUEUE} ${task.plural} waiting`);
    if (why === "wait") return busy(`no compute thread became free within ${MAX_WAIT_MS / 1000} s`);
    if (why === "overrun") {
      return apiError(503, task.stopped, `The ${task.work} did not stop at its wall-time budget of ${maxWallMs} ms and its thread was stopped; ${task.advice}.`);
    }
    console.error(`${task.kind}: the compute thread stopped unexpectedly: ${message}`);
    return apiError(500, task.failed, `The ${task.work}'s compute thread stopped unexpectedly; try again.`);
  } finally {
    clearInterval(timer);
    signal.removeEventListener("abort", raise);
  }
}

/** Stops the threads (tests). */
export async function closeApiPool(): Promise<void> {
  const p = pool;
  pool = undefined;
  await p?.destroy();
}
