// The compute limit's one-minute windows (app/security/sliding-window.ts): a key is refused
// once `limit` requests are inside the last 60 s, with the time until the oldest leaves; other
// keys and later requests are unaffected; forgotten keys start afresh.
import { describe, expect, it } from "vitest";
import { SlidingWindows, WINDOW_MS } from "../../app/security/sliding-window";

describe("sliding one-minute windows", () => {
  it("counts per key and refuses the request over the limit with the wait", () => {
    const w = new SlidingWindows();
    const t0 = 5_000_000;
    expect(w.hit("simulate:1", 2, t0).allowed).toBe(true);
    expect(w.hit("simulate:1", 2, t0 + 1000).allowed).toBe(true);
    const refused = w.hit("simulate:1", 2, t0 + 2000);
    expect(refused).toEqual({ allowed: false, retryMs: WINDOW_MS - 2000 });
    // another key has its own window
    expect(w.hit("simulate:2", 2, t0 + 2000).allowed).toBe(true);
    // a refusal is not counted: once the oldest leaves, one more fits
    expect(w.hit("simulate:1", 2, t0 + WINDOW_MS + 1).allowed).toBe(true);
    expect(w.hit("simulate:1", 2, t0 + WINDOW_MS + 2).allowed).toBe(false);
  });

  it("forgets idle keys and starts them afresh", () => {
    const w = new SlidingWindows();
    expect(w.hit("rates:9", 1, 0).allowed).toBe(true);
    expect(w.hit("rates:9", 1, 10).allowed).toBe(false);
    // two minutes later (the sweep runs at most once a minute) the key is empty again
    expect(w.hit("rates:9", 1, 2 * WINDOW_MS).allowed).toBe(true);
  });
});
