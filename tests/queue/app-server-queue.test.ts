/**
 * The production server (scripts/serve.ts, as `npm start` runs it) computes ensembles with its
 * own queue workers: an ensemble submitted to its queue ends done with every member recorded,
 * with no `npm run worker` process anywhere; and it reports the queue in /api/v1/health.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { freshDatabase, type TestDatabase } from "../support/db";
import { freshQueue, until, type TestQueue } from "../support/queue";
import { startAppServer, type AppServer } from "../../scripts/app-server";
import { startDevServices, type DevServices } from "../../scripts/dev-services";
import { freePort } from "../../scripts/ports";
import { createEnsemble, ensembleProgress } from "../../db/access/ensembles.server";
import { planEnsemble } from "../../app/ensembles/ensemble-plan";
import { submitEnsemble } from "../../app/ensembles/submit.server";
import { CHUNK_SIZE } from "../../app/queue/jobs";
import { networkDocument, networkEnsembleSpec } from "../../bench/ensemble-network";

// Needs the production build, which npm test makes before the suites run.
describe.skipIf(!process.env.APP_URL)("the production server's own queue workers", () => {
  let t: TestDatabase;
  let q: TestQueue;
  let services: DevServices;
  let app: AppServer | undefined;

  beforeAll(async () => {
    t = await freshDatabase();
    q = await freshQueue();
    const port = await freePort();
    const appUrl = `http://127.0.0.1:${port}`;
    services = await startDevServices({ appUrl, databaseUrl: t.url, standins: false });
    app = await startAppServer({
      port,
      quiet: true,
      env: { ...services.env, DATABASE_URL: t.url, REDIS_URL: q.url, QUEUE_PREFIX: q.prefix, QUEUE_WORKERS: "2", SESSION_SECRET: "queue-server-secret-queue-server", APP_URL: appUrl, WEB_CONCURRENCY: "1" },
    });
  }, 180_000);

  afterAll(async () => {
    await app?.stop();
    await services?.stop();
    await q?.drop();
    await t?.drop();
  });

  it("computes a submitted ensemble to the end", async () => {
    const net = networkDocument(50, 1284);
    const spec = networkEnsembleSpec(net.initial, 2 * CHUNK_SIZE);
    const members = planEnsemble(spec, net.document);
    if (!members.ok) throw new Error(members.error.message);
    const [uid] = await t.db("users").insert({ email: "server-queue@example.test", name: "Server queue", role: "author" });
    const id = await createEnsemble(t.db, { ownerId: uid, mechanismId: null, mechanismVersion: null, snapshot: net.document, spec, members: members.value });
    await submitEnsemble(t.db, id, q.queue);
    const p = await until(() => ensembleProgress(t.db, id), (v) => v!.status !== "queued" && v!.status !== "running", 180_000, 250);
    expect(p).toEqual({ done: 2 * CHUNK_SIZE, total: 2 * CHUNK_SIZE, status: "done" });
  }, 240_000);

  it("reports the queue's Redis in its health answer", async () => {
    const r = await fetch(app!.url + "/api/v1/health");
    expect(r.status).toBe(200);
    expect(await r.json()).toEqual({ status: "ok", db: "ok", queue: "ok" });
  });
});
