// The compute API's per-user rate limit: the request over the limit gets 429 with
// Retry-After and the API error body; other users and later windows are unaffected.
import { describe, expect, it } from "vitest";
import { computeRateLimit } from "../../app/security/compute-limit.server";

describe("compute rate limit", () => {
  it("refuses the request over the per-minute limit and names the limit", async () => {
    process.env.COMPUTE_SIMULATIONS_PER_MINUTE = "3";
    const t0 = 1_000_000;
    for (let i = 0; i < 3; i++) expect(await computeRateLimit(7, "simulate", t0 + i)).toBeNull();
    const refused = await computeRateLimit(7, "simulate", t0 + 10);
    expect(refused?.status).toBe(429);
    expect(Number(refused?.headers.get("retry-after"))).toBeGreaterThan(0);
    const body = (await refused!.json()) as { error: { code: string; message: string } };
    expect(body.error.code).toBe("rate_limited");
    expect(body.error.message).toContain("at most 3 per minute");
    // Another user, and the same user a minute later, are served.
    expect(await computeRateLimit(8, "simulate", t0 + 20)).toBeNull();
    expect(await computeRateLimit(7, "simulate", t0 + 61_000)).toBeNull();
    delete process.env.COMPUTE_SIMULATIONS_PER_MINUTE;
  });
});
