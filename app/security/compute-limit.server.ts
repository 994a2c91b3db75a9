/**
 * Rate limits on the compute API (rates and simulate), per user, in this server process:
 * a sliding one-minute window. Defaults: 600 rate requests and 120 simulations per user
 * per minute; COMPUTE_RATES_PER_MINUTE and COMPUTE_SIMULATIONS_PER_MINUTE change them.
 * A refusal is a 429 with Retry-After and the API's error body.
 */
import { apiError } from "~/api/errors.server";

export type ComputeKind = "rates" | "simulate";

function limitFor(kind: ComputeKind): number {
  const raw = kind === "rates" ? process.env.COMPUTE_RATES_PER_MINUTE : process.env.COMPUTE_SIMULATIONS_PER_MINUTE;
  const n = Number(raw);
  if (raw && Number.isInteger(n) && n > 0) return n;
  return kind === "rates" ? 600 : 120;
}

const WINDOW_MS = 60_000;
const seen = new Map<string, number[]>();
let lastSweep = 0;

function sweep(now: number) {
  if (now - lastSweep < WINDOW_MS) return;
  lastSweep = now;
  for (const [key, times] of seen) if (!times.length || times[times.length - 1]! <= now - WINDOW_MS) seen.delete(key);
}

/** Counts one request; returns a 429 response when the user is over the limit, else null. */
export function computeRateLimit(userId: number, kind: ComputeKind, now = Date.now()): Response | null {
  sweep(now);
  const key = `${kind}:${userId}`;
  const times = (seen.get(key) ?? []).filter((t) => t > now - WINDOW_MS);
  const limit = limitFor(kind);
  if (times.length >= limit) {
    const retry = Math.max(1, Math.ceil((times[0]! + WINDOW_MS - now) / 1000));
    seen.set(key, times);
    return apiError(
      429,
      "rate_limited",
      `Too many ${kind === "rates" ? "rate-constant requests" : "simulations"}: at most ${limit} per minute per user; try again in ${retry} s.`,
      undefined,
      { "Retry-After": String(retry) },
    );
  }
  times.push(now);
  seen.set(key, times);
  return null;
}
