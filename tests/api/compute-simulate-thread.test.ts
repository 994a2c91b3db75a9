/**
 * The simulate API computes in a compute thread (app/compute/api-pool.server.ts): while a long
 * simulation runs, this thread stays free to answer others; when the client goes away the
 * simulation stops at its next step instead of running to its wall-time budget.
 */
import { afterAll, describe, expect, it, vi } from "vitest";
import { action } from "../../app/routes/api.v1.simulate";
import { closeApiPool } from "../../app/compute/api-pool.server";

vi.mock("~/auth/api-auth.server", () => import("../support/api-auth-stand-in"));
afterAll(() => closeApiPool());

type Args = Parameters<typeof action>[0];

/** A → B with k ≈ 2·10⁹ s⁻¹ over a day through the non-stiff method: millions of tiny steps. */
const slowBody = {
  mechanism: {
    format: "saddlebook.mechanism",
    version: 1,
    about: { name: "fast step, non-stiff method (test)" },
    species: [{ id: "A" }, { id: "B" }],
    steps: [{ id: "ab", reactants: [{ species: "A", coef: 1 }], products: [{ species: "B", coef: 1 }], reversible: false, barrier: { form: "dG", dG: 20, unit: "kJ/mol", T: 298.15, standardState: "1M" } }],
  },
  conditions: { temperature: { value: 298.15, unit: "K" }, initial: { A: { value: 1, unit: "mol/L" } }, endTime: { value: 1, unit: "d" } },
  solver: { method: "nonstiff", rtol: 1e-9, atol: 1e-14, maxSteps: 1000000, wallTimeMs: 8000 },
};

describe("simulate API in a compute thread", () => {
  it("leaves this thread free and stops when the client goes away", async () => {
    // warm the thread up (it loads the engine once)
    const warm = new Request("http://localhost/api/v1/simulate", { method: "POST", body: JSON.stringify({ ...slowBody, solver: { ...slowBody.solver, wallTimeMs: 50 } }) });
    await action({ request: warm, params: {}, context: {} } as unknown as Args);

    const client = new AbortController();
    const request = new Request("http://localhost/api/v1/simulate", { method: "POST", body: JSON.stringify(slowBody), signal: client.signal });
    const events: string[] = [];
    const answer = (action({ request, params: {}, context: {} } as unknown as Args) as Promise<Response>).then((r) => (events.push("answer"), r));
    // This thread stays free while the simulation runs: its timers fire before the answer.
    setTimeout(() => events.push("timer"), 50);
    setTimeout(() => {
      events.push("client leaves");
      client.abort();
    }, 400);
    const res = await answer;
    expect(events).toEqual(["timer", "client leaves", "answer"]);
    // Stopped because the client left (not at its 8 s budget, which would be budget_time).
    expect(res.status).toBe(422);
    const json = (await res.json()) as { error: { code: string; message: string } };
    expect(json.error.code).toBe("cancelled");
    expect(json.error.message).toMatch(/cancelled/);
  }, 30_000);
});
