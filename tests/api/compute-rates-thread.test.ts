/**
 * The rates API computes in a compute thread (app/compute/api-pool.server.ts) and caps its
 * answer: a request whose answer would pass 8 MiB is refused with 413 and a count that fits,
 * instead of building 100 MB of JSON on the thread that answers pages.
 */
import { afterAll, describe, expect, it, vi } from "vitest";
import { action } from "../../app/routes/api.v1.rates";
import { closeApiPool } from "../../app/compute/api-pool.server";
import { answerRates, RATES_INLINE_PAIRS, RATES_MAX_RESPONSE_BYTES, requestedPairs } from "../../app/api/compute-rates.server";

vi.mock("~/auth/api-auth.server", () => import("../support/api-auth-stand-in"));
afterAll(() => closeApiPool());

type Args = Parameters<typeof action>[0];

const step = (i: number) => ({
  id: `s${i}`,
  reactants: [{ species: "A", coef: 1 }],
  products: [{ species: "B", coef: 1 }],
  reversible: false,
  barrier: { form: "dG", dG: 80 + (i % 7), unit: "kJ/mol", T: 298.15, standardState: "1M" },
});
const temperatures = (n: number) => ({ values: Array.from({ length: n }, (_, j) => 250 + j * 0.1), unit: "K" });
const post = (body: unknown) => new Request("http://localhost/api/v1/rates", { method: "POST", body: JSON.stringify(body) });

describe("rates API in a compute thread", () => {
  it("answers a request from the thread with the same numbers as on this thread", async () => {
    // 20 × 20 = 400 rate constants: more than are answered inline, so a thread computes them.
    const body = { steps: Array.from({ length: 20 }, (_, i) => step(i)), temperatures: temperatures(20) };
    expect(requestedPairs(body)).toBeGreaterThan(RATES_INLINE_PAIRS);
    const res = await action({ request: post(body), params: {}, context: {} } as unknown as Args);
    expect(res.status).toBe(200);
    const direct = answerRates(body, JSON.stringify(body));
    expect(await res.json()).toEqual(await direct.json());
  });

  it("refuses with 413 an answer over 8 MiB (100 steps × 1000 temperatures), naming how many fit", async () => {
    const body = { steps: Array.from({ length: 100 }, (_, i) => step(i)), temperatures: temperatures(1000) };
    const res = await action({ request: post(body), params: {}, context: {} } as unknown as Args);
    expect(res.status).toBe(413);
    const json = (await res.json()) as { error: { code: string; message: string } };
    expect(json.error.code).toBe("response_too_large");
    const fit = Number(json.error.message.match(/about (\d+) rate constants/)?.[1]);
    expect(fit).toBeGreaterThan(1000);
    expect(fit).toBeLessThan(100_000);
  }, 60_000);

  it("answers every size up to the cap, and the answer stays under it", () => {
    const body = { steps: [step(0)], temperatures: temperatures(1000) };
    const res = answerRates(body, JSON.stringify(body), 200_000);
    expect(res.status).toBe(413);
    const ok = answerRates(body, JSON.stringify(body), RATES_MAX_RESPONSE_BYTES);
    expect(ok.status).toBe(200);
  });

  it("keeps this thread free while a large request computes", async () => {
    const body = { steps: Array.from({ length: 40 }, (_, i) => step(i)), temperatures: temperatures(200) };
    const events: string[] = [];
    const answer = (action({ request: post(body), params: {}, context: {} } as unknown as Args) as Promise<Response>).then((r) => (events.push("answer"), r));
    setTimeout(() => events.push("timer"), 1);
    const res = await answer;
    expect(res.status).toBe(200);
    expect(events[0]).toBe("timer");
  }, 60_000);
});
