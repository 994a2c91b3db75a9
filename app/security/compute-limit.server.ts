/**
 * Rate limits on the compute API, per user, over the whole server: a sliding one-minute
 * window. Rates and activation parameters (regression) share one limit, simulate has its own. Defaults: 600 rate requests and 120 simulations per user
 * per minute; COMPUTE_RATES_PER_MINUTE and COMPUTE_SIMULATIONS_PER_MINUTE change them.
 * A refusal is a 429 with Retry-After and the API's error body.
 *
 * In a worker of the production server (scripts/serve.ts) the count is kept by the supervising
 * process, asked over the worker's IPC channel, so the limit does not multiply with the number
 * of workers; if the supervisor does not answer within a second the worker counts on its own.
 * Elsewhere (tests, the development server) the count is kept in this process.
 */
import cluster from "node:cluster";
import { apiError } from "~/api/errors.server";
import { SlidingWindows, WINDOW_ANSWER, WINDOW_REQUEST, type WindowAnswer, type WindowRequest, type WindowVerdict } from "./sliding-window";

export type ComputeKind = "rates" | "simulate";

function limitFor(kind: ComputeKind): number {
  const raw = kind === "rates" ? process.env.COMPUTE_RATES_PER_MINUTE : process.env.COMPUTE_SIMULATIONS_PER_MINUTE;
  const n = Number(raw);
  if (raw && Number.isInteger(n) && n > 0) return n;
  return kind === "rates" ? 600 : 120;
}

const local = new SlidingWindows();
const pending = new Map<number, (v: WindowVerdict) => void>();
let nextId = 1;
let listening = false;

function askSupervisor(key: string, limit: number, now: number): Promise<WindowVerdict> {
  if (!listening) {
    listening = true;
    process.on("message", (msg: unknown) => {
      const m = msg as Partial<WindowAnswer> | null;
      if (m && m.type === WINDOW_ANSWER && typeof m.id === "number" && m.verdict) {
        pending.get(m.id)?.(m.verdict);
        pending.delete(m.id);
      }
    });
  }
  return new Promise((resolve) => {
    const id = nextId++;
    const timer = setTimeout(() => {
      pending.delete(id);
      resolve(local.hit(key, limit, now));
    }, 1000);
    timer.unref();
    pending.set(id, (v) => {
      clearTimeout(timer);
      resolve(v);
    });
    const req: WindowRequest = { type: WINDOW_REQUEST, id, key, limit, now };
    const countHere = () => {
      if (!pending.delete(id)) return;
      clearTimeout(timer);
      resolve(local.hit(key, limit, now));
    };
    try {
      // The channel can close under us (the supervisor stopping): count here instead.
      process.send!(req, undefined, undefined, (err) => {
        if (err) countHere();
      });
    } catch {
      countHere();
    }
  });
}

/** Counts one request; resolves to a 429 response when the user is over the limit, else null. */
export async function computeRateLimit(userId: number, kind: ComputeKind, now = Date.now()): Promise<Response | null> {
  const key = `${kind}:${userId}`;
  const limit = limitFor(kind);
  const verdict = cluster.isWorker && process.send && process.connected ? await askSupervisor(key, limit, now) : local.hit(key, limit, now);
  if (verdict.allowed) return null;
  const retry = Math.max(1, Math.ceil(verdict.retryMs / 1000));
  return apiError(
    429,
    "rate_limited",
    `Too many ${kind === "rates" ? "rate-constant requests" : "simulations"}: at most ${limit} per minute per user; try again in ${retry} s.`,
    undefined,
    { "Retry-After": String(retry) },
  );
}
