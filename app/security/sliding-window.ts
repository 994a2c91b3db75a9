/**
 * Sliding one-minute request windows, keyed by a string (e.g. "simulate:42"). Pure bookkeeping
 * with no I/O: the compute rate limit counts here in a single process, and the production
 * server's supervising process counts here for all of its workers (scripts/serve.ts), so a
 * user's limit holds across the whole server however requests are spread.
 */
export const WINDOW_MS = 60_000;

export interface WindowVerdict {
  allowed: boolean;
  /** When refused: ms until the oldest counted request leaves the window. */
  retryMs: number;
}

export class SlidingWindows {
  private readonly seen = new Map<string, number[]>();
  private lastSweep = 0;

  /** Counts one request under `key` at time `now` (ms) unless `limit` requests are already in the window. */
  hit(key: string, limit: number, now: number): WindowVerdict {
    this.sweep(now);
    const times = this.seen.get(key) ?? [];
    let drop = 0;
    while (drop < times.length && times[drop]! <= now - WINDOW_MS) drop++;
    if (drop) times.splice(0, drop);
    if (times.length >= limit) {
      this.seen.set(key, times);
      return { allowed: false, retryMs: times[0]! + WINDOW_MS - now };
    }
    times.push(now);
    this.seen.set(key, times);
    return { allowed: true, retryMs: 0 };
  }

  /** Forgets keys whose last request left the window (at most once a minute). */
  private sweep(now: number) {
    if (now - this.lastSweep < WINDOW_MS) return;
    this.lastSweep = now;
    for (const [key, times] of this.seen) if (!times.length || times[times.length - 1]! <= now - WINDOW_MS) this.seen.delete(key);
  }
}

/** The message a server worker sends to its supervisor to count one request, and the answer. */
export const WINDOW_REQUEST = "saddlebook.window.hit";
export const WINDOW_ANSWER = "saddlebook.window.verdict";
export interface WindowRequest {
  type: typeof WINDOW_REQUEST;
  id: number;
  key: string;
  limit: number;
  now: number;
}
export interface WindowAnswer {
  type: typeof WINDOW_ANSWER;
  id: number;
  verdict: WindowVerdict;
}
