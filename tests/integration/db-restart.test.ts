// Fault: the database restarts under the running app. While it is down the health check
// answers 503 with the reason; when it is back the app recovers without a restart.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { ensureEmbedded, type DatabaseHandle } from "../../scripts/mariadb";
import { startAppServer, type AppServer } from "../../scripts/app-server";
import { freePort } from "../../scripts/ports";

// Needs the production build, which npm test makes before the suites run.
describe.skipIf(!process.env.APP_URL)("database restart under the running app", () => {
  let dir: string;
  let dbPort: number;
  let db: DatabaseHandle;
  let app: AppServer;
  const opts = () => ({
    dataDir: dir,
    port: dbPort,
    database: "saddlebook_fault",
    user: "saddlebook",
    password: "fault-test",
    fastCommit: true,
    log: () => {},
  });

  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), "sbk-fault-"));
    dbPort = await freePort();
    db = await ensureEmbedded(opts());
    app = await startAppServer({
      port: await freePort(),
      quiet: true,
      env: { DATABASE_URL: db.url, SESSION_SECRET: "fault-test-secret-fault-test-secret" },
    });
  }, 120_000);

  afterAll(async () => {
    await app?.stop();
    await db?.stop();
    rmSync(dir, { recursive: true, force: true });
  });

  it("answers 503 with a reason while the database is down, then recovers", async () => {
    const health = () => fetch(app.url + "/api/v1/health");
    expect((await health()).status).toBe(200);

    await db.stop();
    const down = await health();
    expect(down.status).toBe(503);
    const body = (await down.json()) as { status: string; reason: string };
    expect(body.reason).toMatch(/database is not answering/i);
    // The app itself keeps serving pages that need no data.
    expect((await fetch(app.url + "/favicon.svg")).status).toBe(200);

    db = await ensureEmbedded(opts());
    await expect
      .poll(async () => (await health()).status, { timeout: 20_000, interval: 250 })
      .toBe(200);
  }, 90_000);
});
