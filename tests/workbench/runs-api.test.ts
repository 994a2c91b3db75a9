/**
 * Stored runs through the REST API on a real database and the real worker pool: start, poll,
 * results and CSV; cancel; a run over its wall-time budget reports so and stores nothing; a
 * worker that crashes marks its run failed.
 *
 * Reference: A → B first order, [A] = [A]₀·exp(−kt), so t½ = ln 2 / k, t90 = ln 10 / k,
 * t99 = ln 100 / k (integrated rate law, any physical chemistry text, e.g. Atkins); k from the
 * Eyring equation k = (k_B T/h)·exp(−ΔG‡/RT) with CODATA 2018 constants.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { apiCaller } from "../support/api-auth-stand-in";
import { freshDatabase, type TestDatabase } from "../support/db";
import { firstOrder, robertson } from "./fixtures/mechanisms";

vi.mock("~/auth/api-auth.server", () => import("../support/api-auth-stand-in"));
const auth = apiCaller;

const KB = 1.380649e-23, H = 6.62607015e-34, R = KB * 6.02214076e23; // CODATA 2018 exact

let t: TestDatabase;
let staleId = 0;
let runs: typeof import("../../app/routes/api.v1.runs");
let one: typeof import("../../app/routes/api.v1.runs.$id");
let cancel: typeof import("../../app/routes/api.v1.runs.$id.cancel");
let csv: typeof import("../../app/routes/api.v1.runs.$id.results-csv");

beforeAll(async () => {
  t = await freshDatabase();
  process.env.DATABASE_URL = t.url;
  const [uid] = await t.db("users").insert({ email: "runner@example.test", name: "Run tester", role: "author" });
  Object.assign(auth, { userId: uid, email: "runner@example.test", name: "Run tester" });
  // a run left "running" by an earlier server process, an hour ago
  const { createRun } = await import("../../db/access/runs.server");
  const { resolveSolver } = await import("../../app/compute/run-request");
  staleId = await createRun(t.db, {
    ownerId: uid,
    snapshot: firstOrder(),
    conditions: { temperature: { value: 300, unit: "K" }, initial: { A: { value: 1, unit: "mol/L" } }, endTime: { value: 10, unit: "s" } },
    solver: resolveSolver({}),
    tEnd: 10,
  });
  await t.db("runs").where({ id: staleId }).update({ status: "running", created_at: t.db.raw("NOW(3) - INTERVAL 1 HOUR") });
  runs = await import("../../app/routes/api.v1.runs");
  one = await import("../../app/routes/api.v1.runs.$id");
  cancel = await import("../../app/routes/api.v1.runs.$id.cancel");
  csv = await import("../../app/routes/api.v1.runs.$id.results-csv");
});

afterAll(async () => {
  const { getComputeService } = await import("../../app/compute/pool.server");
  const { getDb } = await import("../../db/client.server");
  await getComputeService(getDb()).destroy();
  await getDb().destroy();
  await t?.drop();
});

const args = (request: Request, params: Record<string, string> = {}) => ({ request, params, context: {} }) as never;

async function start(body: unknown) {
  const res = (await runs.action(args(new Request("http://localhost/api/v1/runs", { method: "POST", headers: { "Content-Type": "application/json" }, body: JSON.stringify(body) })))) as Response;
  return { status: res.status, json: (await res.json()) as any };
}

async function get(id: number, q = "") {
  const res = (await one.loader(args(new Request(`http://localhost/api/v1/runs/${id}${q}`), { id: String(id) }))) as Response;
  return { status: res.status, json: (await res.json()) as any };
}

async function waitFor(id: number, pred: (run: any) => boolean, ms = 25_000) {
  const until = Date.now() + ms;
  for (;;) {
    const r = await get(id);
    if (pred(r.json.run)) return r.json.run;
    if (Date.now() > until) throw new Error(`run ${id} stuck at ${JSON.stringify(r.json.run.status)}`);
    await new Promise((res) => setTimeout(res, 100));
  }
}
const ended = (r: any) => ["done", "failed", "cancelled"].includes(r.status);

describe("POST /api/v1/runs → poll → results", () => {
  it("runs A → B and reports half-life and conversion times matching the integrated rate law", async () => {
    const dG = 85; // kJ/mol
    const k = ((KB * 298.15) / H) * Math.exp((-dG * 1e3) / (R * 298.15));
    const tEnd = 10 / k;
    const r = await start({
      mechanism: firstOrder(dG),
      conditions: { temperature: { value: 25, unit: "°C" }, initial: { A: { value: 100, unit: "mmol/L" } }, endTime: { value: tEnd, unit: "s" }, output: { grid: "log", points: 300 } },
      solver: { rtol: 1e-8, atol: 1e-14 },
    });
    expect(r.status).toBe(202);
    expect(["queued", "running", "done"]).toContain(r.json.run.status);
    const run = await waitFor(r.json.run.id, ended);
    expect(run.status).toBe("done");
    expect(run.progress.fraction).toBe(1);
    const A = run.analysis.species.A;
    expect(A.initial).toBeCloseTo(0.1, 12);
    expect(A.t50 / (Math.LN2 / k)).toBeCloseTo(1, 5);
    expect(A.t90 / (Math.LN10 / k)).toBeCloseTo(1, 5);
    expect(A.t99 / (Math.log(100) / k)).toBeCloseTo(1, 5);
    expect(run.analysis.reactant).toBe("A");
    expect(run.analysis.products).toEqual(["B"]);
    expect(run.analysis.yields.yields.B).toBeCloseTo(1 - Math.exp(-10), 5);
    expect(run.analysis.massBalance.maxDrift).toBeLessThan(1e-6);
    // r_B = k[A]₀e^(−kt), so ∂ln r/∂ln k = 1 − kt, which is 1 − ln 2 at t½ (where the run evaluates it).
    expect(run.analysis.rateControl.time / (Math.LN2 / k)).toBeCloseTo(1, 5);
    expect(run.analysis.rateControl.degree.ab).toBeCloseTo(1 - Math.LN2, 3);
    expect(run.statistics.accepted).toBeGreaterThan(0);
    expect(run.mechanism.snapshotHash).toMatch(/^[0-9a-f]{64}$/);

    const withSeries = await get(run.id, "?series=1");
    const s = withSeries.json.run.series;
    expect(s.times.values.length).toBe(300);
    const kk = s.times.values.length - 1;
    expect(s.concentrations.species.A[kk]).toBeCloseTo(0.1 * Math.exp(-10), 9);

    const c = (await csv.loader(args(new Request(`http://localhost/api/v1/runs/${run.id}/results.csv`), { id: String(run.id) }))) as Response;
    expect(c.headers.get("content-type")).toMatch(/text\/csv/);
    const all = (await c.text()).trim().split("\n");
    // Names and units in the header (the fixture's species are named by their ids), the key in comments.
    expect(all.filter((l) => l.startsWith("#"))).toContain("# A (mol/L) = A (id A, formula C2H4O)");
    const lines = all.filter((l) => !l.startsWith("#"));
    expect(lines[0]).toBe("time (s),T (K),A (mol/L),B (mol/L)");
    expect(lines.length).toBe(301);
  });

  it("marks a run left running by an earlier server process as failed, with the reason", async () => {
    const stale = await get(staleId);
    expect(stale.json.run.status).toBe("failed");
    expect(stale.json.run.failureCode).toBe("interrupted");
    expect(stale.json.run.reason).toMatch(/restarted/);
  });

  it("refuses a bad body with field errors and a run for an unknown species with 422", async () => {
    const bad = await start({ mechanism: firstOrder(), conditions: { temperature: { value: 300, unit: "K" }, initial: {}, endTime: { value: -1, unit: "s" } } });
    expect(bad.status).toBe(400);
    expect(bad.json.error.fields["conditions.endTime.value"]).toBeDefined();
    const unknown = await start({ mechanism: firstOrder(), conditions: { temperature: { value: 300, unit: "K" }, initial: { Z: { value: 1, unit: "mol/L" } }, endTime: { value: 1, unit: "s" } } });
    expect(unknown.status).toBe(422);
    expect(unknown.json.error.fields["conditions.initial.Z"]).toMatch(/not in the mechanism/);
    const count = await t.db("runs").count({ n: "*" }).first();
    expect(Number(count!.n)).toBe(2); // the stale run and the first run: nothing stored for refused requests
  });

  it("answers 404 for a run that does not exist and 401 without a user", async () => {
    expect((await get(999999)).status).toBe(404);
    const saved = auth.userId;
    auth.userId = 0;
    const res = await runs.loader(args(new Request("http://localhost/api/v1/runs"))).catch((e: Response) => e);
    expect((res as Response).status).toBe(401);
    auth.userId = saved;
  });
});

describe("runs of stored mechanisms", () => {
  it("runs a mechanism by id and version from its stored snapshot; another user's private mechanism is not found", async () => {
    const { importMechanism } = await import("../../db/access/mechanisms.server");
    const actor = { id: auth.userId, role: "author" as const, groupIds: [], adminGroupIds: [] };
    const { id: mid, version } = await importMechanism(t.db, actor, firstOrder(85, "stored A to B"), { visibility: "private" });
    const r = await start({
      mechanismId: mid,
      mechanismVersion: version,
      conditions: { program: { kind: "ramp", from: { value: 20, unit: "°C" }, to: { value: 60, unit: "°C" }, rate: { value: 2, unit: "K/min" } }, initial: { A: { value: 3, unit: "mol/L" } }, endTime: { value: 1, unit: "h" } },
    });
    expect(r.status).toBe(202);
    const run = await waitFor(r.json.run.id, ended);
    expect(run.status).toBe("done");
    expect(run.mechanism).toMatchObject({ id: mid, version });
    // a heating program and 3 mol/L: the results page shows the process-safety note
    expect(run.analysis.heating).toBe(true);
    expect(run.analysis.maxInitial).toBe(3);
    expect(run.conditions.program.kind).toBe("ramp");

    const [other] = await t.db("users").insert({ email: "other@example.test", name: "Other", role: "author" });
    const theirs = await importMechanism(t.db, { id: other, role: "author", groupIds: [], adminGroupIds: [] }, firstOrder(80, "private of another"), { visibility: "private" });
    const refused = await start({ mechanismId: theirs.id, conditions: { temperature: { value: 300, unit: "K" }, initial: { A: { value: 1, unit: "mol/L" } }, endTime: { value: 1, unit: "s" } } });
    expect(refused.status).toBe(404);
    const noVersion = await start({ mechanismId: mid, mechanismVersion: 99, conditions: { temperature: { value: 300, unit: "K" }, initial: { A: { value: 1, unit: "mol/L" } }, endTime: { value: 1, unit: "s" } } });
    expect(noVersion.status).toBe(422);
  });
});

describe("cancel, budget, crash", () => {
  const slow = (wallTimeMs: number) => ({
    mechanism: robertson(),
    conditions: { temperature: { value: 298.15, unit: "K" }, initial: { A: { value: 1, unit: "mol/L" } }, endTime: { value: 1e5, unit: "s" }, output: { grid: "log", points: 100 } },
    solver: { method: "nonstiff", maxSteps: 2_000_000, wallTimeMs },
  });

  it("cancels a running run: status cancelled, progress below the end, no results stored", async () => {
    const r = await start(slow(30_000));
    const id = r.json.run.id;
    await waitFor(id, (run) => run.status === "running" && run.progress.time.value > 0);
    const c = (await cancel.action(args(new Request(`http://localhost/api/v1/runs/${id}/cancel`, { method: "POST" }), { id: String(id) }))) as Response;
    expect(c.status).toBe(202);
    const run = await waitFor(id, ended, 10_000);
    expect(run.status).toBe("cancelled");
    expect(run.progress.time.value).toBeLessThan(1e5);
    const row = await t.db("runs").where({ id }).first();
    expect(row.results).toBeNull();
    expect(row.analysis).toBeNull();
    // cancelling again is a conflict, not a change
    const again = (await cancel.action(args(new Request(`http://localhost/api/v1/runs/${id}/cancel`, { method: "POST" }), { id: String(id) }))) as Response;
    expect(again.status).toBe(409);
  });

  it("a run over its wall-time budget fails with the reason and stores nothing", async () => {
    const r = await start(slow(400));
    const run = await waitFor(r.json.run.id, ended);
    expect(run.status).toBe("failed");
    expect(run.failureCode).toBe("budget");
    expect(run.reason).toMatch(/budget/i);
    const row = await t.db("runs").where({ id: run.id }).first();
    expect(row.results).toBeNull();
    expect(row.analysis).toBeNull();
    expect(row.statistics).toBeNull();
    expect(row.result_points).toBeNull();
  });

  it("a crashed worker marks its run failed with the reason", async () => {
    const { ComputeService } = await import("../../app/compute/pool.server");
    const { createRun, getRun } = await import("../../db/access/runs.server");
    const { resolveSolver } = await import("../../app/compute/run-request");
    const svc = new ComputeService(t.db, { workerFile: new URL("./fixtures/crash-worker.mjs", import.meta.url).pathname, maxThreads: 1 });
    const id = await createRun(t.db, {
      ownerId: auth.userId,
      snapshot: firstOrder(),
      conditions: { temperature: { value: 300, unit: "K" }, initial: { A: { value: 1, unit: "mol/L" } }, endTime: { value: 10, unit: "s" } },
      solver: resolveSolver({}),
      tEnd: 10,
    });
    await svc.submit(id);
    await svc.destroy();
    const run = await getRun(t.db, id);
    expect(run!.status).toBe("failed");
    expect(run!.failureCode).toBe("crash");
    expect(run!.statusReason).toMatch(/worker stopped unexpectedly/);
  });
});
