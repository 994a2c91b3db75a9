/**
 * Bad input, systematically (property-based, fast-check): the compute API's body handlers
 * get random JSON, malformed text, huge and non-finite numbers, deep nesting, long strings,
 * unicode and HTML/SQL text, and mutations of valid bodies. Every answer is either a 200
 * with finite numbers only, or a 4xx with the API's error body; nothing throws, nothing 5xx.
 * The simulate bodies go through the route itself (body read here, simulation in a compute
 * thread), as in the served app.
 */
import { afterAll, describe, expect, it, vi } from "vitest";
import fc from "fast-check";
import { handleRates } from "../../app/api/compute-rates.server";
import { action as simulateAction } from "../../app/routes/api.v1.simulate";
import { closeApiPool } from "../../app/compute/api-pool.server";
import { mutate, nasty } from "../support/fuzz";

vi.mock("~/auth/api-auth.server", () => import("../support/api-auth-stand-in"));
// The per-user simulation limit is not under test here.
process.env.COMPUTE_SIMULATIONS_PER_MINUTE = "100000000";
afterAll(() => closeApiPool());
const simulateRoute = (request: Request) =>
  simulateAction({ request, params: {}, context: {} } as unknown as Parameters<typeof simulateAction>[0]) as Promise<Response>;

// A fixed seed keeps CI reproducible; change it locally to explore further inputs.
fc.configureGlobal({ seed: 20261202 });

type Handler = (r: Request) => Promise<Response>;
let tried = 0;
const statuses: Record<number, number> = {};
afterAll(() => {
  const fives = Object.entries(statuses).filter(([s]) => Number(s) >= 500).reduce((n, [, c]) => n + c, 0);
  console.log(`[compute-fuzz] bad inputs tried: ${tried}, 5xx: ${fives}, statuses ${JSON.stringify(statuses)}`);
});

async function call(handler: Handler, body: string): Promise<{ status: number; json: any; text: string }> {
  tried++;
  const res = await handler(new Request("http://127.0.0.1/api/v1/x", { method: "POST", headers: { "Content-Type": "application/json" }, body }));
  statuses[res.status] = (statuses[res.status] ?? 0) + 1;
  const text = await res.text();
  return { status: res.status, json: JSON.parse(text), text };
}

function expectSane(r: { status: number; json: any; text: string }) {
  expect(r.status === 200 || (r.status >= 400 && r.status < 500), `status ${r.status}: ${r.text.slice(0, 200)}`).toBe(true);
  // A 200 carries finite numbers only (an error message may quote the bad value as text).
  if (r.status === 200) expect(r.text).not.toMatch(/\bNaN\b|\bInfinity\b/);
  if (r.status !== 200) {
    expect(Object.keys(r.json)).toEqual(["error"]);
    expect(typeof r.json.error.code).toBe("string");
    expect(r.json.error.message.length).toBeGreaterThan(0);
  }
}

const validRates = {
  steps: [
    { id: "s1", reactants: [{ species: "A", coef: 1 }], products: [{ species: "B", coef: 1 }], reversible: false, barrier: { form: "dG", dG: 80, unit: "kJ/mol", T: 298.15, standardState: "1M" } },
    { id: "s2", reactants: [{ species: "A", coef: 1 }, { species: "B", coef: 1 }], products: [{ species: "C", coef: 1 }], reversible: false, barrier: { form: "arrhenius", A: 1e9, Ea: 40, unit: "kJ/mol", rateUnit: { concentration: "mol/L", time: "s" } } },
  ],
  temperatures: { values: [280, 298.15, 350], unit: "K" },
};

const validSimulate = {
  mechanism: {
    format: "saddlebook.mechanism",
    version: 1,
    about: { name: "fuzz base (illustrative)" },
    species: [{ id: "A" }, { id: "B" }],
    steps: [{ id: "s1", reactants: [{ species: "A", coef: 1 }], products: [{ species: "B", coef: 1 }], reversible: false, barrier: { form: "dG", dG: 80, unit: "kJ/mol", T: 298.15, standardState: "1M" } }],
  },
  conditions: { temperature: { value: 25, unit: "°C" }, initial: { A: { value: 100, unit: "mmol/L" } }, endTime: { value: 1, unit: "min" }, output: { grid: "linear", points: 11 } },
  solver: { wallTimeMs: 500 },
};

describe("compute API bodies under bad input", () => {
  it("the valid bases are accepted (so mutations test the validators, not a broken base)", async () => {
    expect((await call(handleRates, JSON.stringify(validRates))).status).toBe(200);
    expect((await call(simulateRoute, JSON.stringify(validSimulate))).status).toBe(200);
  });

  it("random JSON values", async () => {
    await fc.assert(
      fc.asyncProperty(fc.jsonValue({ maxDepth: 4 }), async (v) => {
        expectSane(await call(handleRates, JSON.stringify(v)));
        expectSane(await call(simulateRoute, JSON.stringify(v)));
      }),
      { numRuns: 150 },
    );
  });

  it("malformed text", async () => {
    await fc.assert(
      fc.asyncProperty(fc.string({ maxLength: 200 }), async (s) => {
        const r = await call(handleRates, s);
        expectSane(r);
        expect(r.status).not.toBe(200);
      }),
      { numRuns: 150 },
    );
  });

  it("mutations of a valid rates body", async () => {
    await fc.assert(
      fc.asyncProperty(fc.array(fc.nat(), { maxLength: 6 }), nasty, async (path, replacement) => {
        expectSane(await call(handleRates, JSON.stringify(mutate(validRates, path, replacement))));
      }),
      { numRuns: 300 },
    );
  });

  it("mutations of a valid simulate body", async () => {
    await fc.assert(
      fc.asyncProperty(fc.array(fc.nat(), { maxLength: 7 }), nasty, async (path, replacement) => {
        const body = mutate(validSimulate, path, replacement) as any;
        // Keep each case short: the wall-time budget itself is tested elsewhere.
        if (body && typeof body === "object" && !Array.isArray(body)) body.solver = { wallTimeMs: 300 };
        expectSane(await call(simulateRoute, JSON.stringify(body)));
      }),
      { numRuns: 200 },
    );
  });

  it("deep nesting and oversized bodies", async () => {
    const deep = "[".repeat(100_000) + "]".repeat(100_000);
    expectSane(await call(handleRates, deep));
    const deepObj = '{"a":'.repeat(20_000) + "1" + "}".repeat(20_000);
    expectSane(await call(simulateRoute, deepObj));
    const big = JSON.stringify({ ...validRates, pad: "x".repeat(2_000_000) });
    const r = await call(handleRates, big);
    expect(r.status).toBe(413);
    expect(r.json.error.message).toMatch(/1 MB|1048576|1 048 576|1,048,576/);
  });

  it("tried a stated number of bad inputs", () => {
    // 2 + 300 + 150 + 300 + 200 + 3 calls above: reported in the hardening figures.
    expect(tried).toBeGreaterThanOrEqual(950);
  });
});
