/**
 * The production server's worker processes (scripts/serve.ts): the compute API's per-user limit
 * holds for the whole server however connections are spread over the workers; and when a worker
 * dies, the server keeps answering, a fresh worker takes its place, and the dead worker's
 * unfinished runs are marked failed with the reason while another worker's runs are untouched.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { request as httpRequest } from "node:http";
import { freshDatabase, type TestDatabase } from "../support/db";
import { childrenOf } from "../support/processes";
import { seedDemo } from "../../db/seeds/index";
import { createApiToken } from "../../db/access/tokens.server";
import { createRun } from "../../db/access/runs.server";
import { resolveSolver } from "../../app/compute/run-request";
import { startAppServer, type AppServer } from "../../scripts/app-server";
import { freePort } from "../../scripts/ports";

/** The server's workers and their names, found under the process the harness started. */
function workers(app: AppServer): Array<{ pid: number; name: string }> {
  const out: Array<{ pid: number; name: string }> = [];
  const visit = (pid: number, depth: number) => {
    for (const c of childrenOf(pid)) {
      try {
        const env = readFileSync(`/proc/${c}/environ`, "utf8").split("\0");
        const name = env.find((e) => e.startsWith("SADDLEBOOK_SERVER_PROCESS="))?.split("=")[1];
        if (name) out.push({ pid: c, name });
      } catch {
        /* gone meanwhile */
      }
      if (depth < 3) visit(c, depth + 1);
    }
  };
  visit(app.child.pid!, 0);
  return out;
}

/** One POST on a connection of its own (so the server's connection spreading applies). */
function postOnNewConnection(url: string, headers: Record<string, string>, body: string): Promise<number> {
  return new Promise((resolve, reject) => {
    const req = httpRequest(url, { method: "POST", agent: false, headers: { ...headers, "Content-Length": String(Buffer.byteLength(body)) } }, (res) => {
      res.resume();
      res.on("end", () => resolve(res.statusCode ?? 0));
    });
    req.on("error", reject);
    req.end(body);
  });
}

// Needs the production build, which npm test makes before the suites run.
describe.skipIf(!process.env.APP_URL)("the production server's worker processes", () => {
  let t: TestDatabase;
  let app: AppServer | undefined;
  let token: string;
  let authorId: number;
  let leftOver: number[] = [];
  const conditions = { temperature: { value: 300, unit: "K" }, initial: { A: { value: 1, unit: "mol/L" } }, endTime: { value: 10, unit: "s" } };
  const snapshot = { format: "saddlebook.mechanism", version: 1, species: [{ id: "A" }, { id: "B" }], steps: [] };
  /** A run marked running, made as if by the named server process (null: none). */
  const runOf = async (serverProcess: string | null) => {
    if (serverProcess) process.env.SADDLEBOOK_SERVER_PROCESS = serverProcess;
    try {
      const id = await createRun(t.db, { ownerId: authorId, snapshot, conditions: conditions as never, solver: resolveSolver({}), tEnd: 10 });
      await t.db("runs").where({ id }).update({ status: "running" });
      return id;
    } finally {
      delete process.env.SADDLEBOOK_SERVER_PROCESS;
    }
  };

  beforeAll(async () => {
    t = await freshDatabase();
    await seedDemo(t.db);
    authorId = (await t.db("users").where({ email: "author@saddlebook.test" }).first("id")).id;
    token = (await createApiToken(t.db, authorId, "worker test")).token;
    // Runs left by an earlier server: one from a worker of it, one from a single-process server.
    leftOver = [await runOf("0badc0de.3"), await runOf(null)];
    app = await startAppServer({
      port: await freePort(),
      quiet: true,
      env: { DATABASE_URL: t.url, SESSION_SECRET: "worker-test-secret-worker-test", WEB_CONCURRENCY: "2", COMPUTE_RATES_PER_MINUTE: "4", NODE_CLUSTER_SCHED_POLICY: "rr" },
    });
    const deadline = Date.now() + 20_000;
    while (workers(app).length < 2 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 200));
  }, 180_000);

  afterAll(async () => {
    await app?.stop();
    await t?.drop();
  });

  it("starts the configured number of workers", () => {
    expect(workers(app!).length).toBe(2);
  });

  it("fails the runs an earlier server left unfinished", async () => {
    const rows = await t.db("runs").whereIn("id", leftOver).select("status", "failure_code");
    expect(rows).toEqual([
      { status: "failed", failure_code: "interrupted" },
      { status: "failed", failure_code: "interrupted" },
    ]);
  });

  it("keeps one compute limit for the whole server", async () => {
    const body = JSON.stringify({
      steps: [{ id: "s1", reactants: [{ species: "A", coef: 1 }], products: [{ species: "B", coef: 1 }], reversible: false, barrier: { form: "dG", dG: 80, unit: "kJ/mol", T: 298.15, standardState: "1M" } }],
      temperatures: { values: [298.15], unit: "K" },
    });
    const headers = { Authorization: `Bearer ${token}`, "Content-Type": "application/json" };
    const statuses: number[] = [];
    for (let i = 0; i < 8; i++) statuses.push(await postOnNewConnection(app!.url + "/api/v1/rates", headers, body));
    // 4 per minute for the server, not 4 per worker (8 would then pass). Connections go to the
    // workers in turn (round-robin scheduling, set above), so both workers answered some.
    expect(statuses.filter((s) => s === 200).length).toBe(4);
    expect(statuses.filter((s) => s === 429).length).toBe(4);
  }, 60_000);

  it("replaces a worker that dies and fails only that worker's unfinished runs", async () => {
    const [victim, survivor] = workers(app!);
    const victimRun = await runOf(victim!.name);
    const survivorRun = await runOf(survivor!.name);

    process.kill(victim!.pid, "SIGKILL");
    // The server keeps answering throughout.
    for (let i = 0; i < 10; i++) expect((await fetch(app!.url + "/api/v1/health")).status).toBe(200);
    await expect
      .poll(async () => (await t.db("runs").where({ id: victimRun }).first("status")).status, { timeout: 15_000 })
      .toBe("failed");
    const failed = await t.db("runs").where({ id: victimRun }).first("failure_code", "status_reason");
    expect(failed.failure_code).toBe("interrupted");
    expect(failed.status_reason).toMatch(/server process running it stopped/);
    expect((await t.db("runs").where({ id: survivorRun }).first("status")).status).toBe("running");
    // A fresh worker, with a new name, takes the dead one's place.
    await expect.poll(() => workers(app!).length, { timeout: 20_000 }).toBe(2);
    const names = workers(app!).map((w) => w.name);
    expect(names).toContain(survivor!.name);
    expect(names).not.toContain(victim!.name);
  }, 60_000);
});
