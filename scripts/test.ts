/**
 * `npm test`: everything the test suites need, then every suite.
 *
 * 1. A test MariaDB of its own (.data/mariadb-test on DB_TEST_PORT, or TEST_DATABASE_URL),
 *    never the demo database; each integration test file makes a database of its own.
 *    The compute queue's test Redis likewise (.data/redis-test on REDIS_TEST_PORT, default
 *    DB_TEST_PORT + 3000, or REDIS_TEST_URL), nothing kept on disk.
 * 2. Debian's Chromium for the browser tests (installed when missing and root).
 * 3. A fresh production build, served on a free loopback port against a database
 *    migrated from zero and seeded with the demo scenario, with the local fakes.
 * 4. vitest over tests/ (unit, integration, API, browser); counts from its JSON report.
 * Stops everything it started. The last line is `tests: N passed, N failed`.
 */
import { existsSync, mkdirSync, readFileSync, rmSync } from "node:fs";
import { spawn } from "node:child_process";
import { resolve } from "node:path";
import { randomBytes } from "node:crypto";
import knexFactory from "knex";
import { ConfigProblem, projectRoot } from "./env";
import { ensureDatabase, type DatabaseHandle } from "./mariadb";
import { ensureRedis, type RedisHandle } from "./redis";
import { ensureChromium } from "./chromium";
import { buildApp } from "./build-state";
import { startAppServer, type AppServer } from "./app-server";
import { startDevServices, type DevServices } from "./dev-services";
import { freePort } from "./ports";
import { knexConfigFromUrl, withDatabase } from "../db/config";
import { migrateLatest } from "../db/migrate";
import { seedDemo } from "../db/seeds/index";

const log = (line: string) => console.log(line);
const reportFile = resolve(projectRoot, ".data/test-report.json");

let database: DatabaseHandle | undefined;
let redis: RedisHandle | undefined;
let services: DevServices | undefined;
let app: AppServer | undefined;
let e2eDb: string | undefined;

async function cleanup(): Promise<void> {
  await app?.stop().catch(() => {});
  await services?.stop().catch(() => {});
  if (database && e2eDb) {
    const admin = knexFactory(knexConfigFromUrl(database.url, { min: 0, max: 1 }));
    await admin.raw("DROP DATABASE IF EXISTS ??", [e2eDb]).catch(() => {});
    await admin.destroy();
  }
  await database?.stop().catch(() => {});
  await redis?.stop().catch(() => {});
}

function runVitest(env: Record<string, string>, args: string[]): Promise<number> {
  return new Promise((done) => {
    const child = spawn(
      resolve(projectRoot, "node_modules/.bin/vitest"),
      ["run", "--reporter=default", "--reporter=json", `--outputFile.json=${reportFile}`, ...args],
      { cwd: projectRoot, env: { ...process.env, ...env }, stdio: "inherit" },
    );
    child.once("exit", (code) => done(code ?? 1));
  });
}

function counts(): { passed: number; failed: number } | null {
  if (!existsSync(reportFile)) return null;
  try {
    const r = JSON.parse(readFileSync(reportFile, "utf8")) as {
      numPassedTests: number;
      numFailedTests: number;
      testResults?: Array<{ status: string; assertionResults: Array<{ status: string }> }>;
    };
    // A file that fails outside its tests (loading, a failing beforeAll/afterAll) has no failed
    // test of its own (its tests are skipped or absent): count it as one failure.
    const brokenFiles = (r.testResults ?? []).filter((f) => f.status === "failed" && !f.assertionResults.some((a) => a.status === "failed")).length;
    return { passed: r.numPassedTests, failed: r.numFailedTests + brokenFiles };
  } catch {
    return null;
  }
}

async function main(): Promise<number> {
  mkdirSync(resolve(projectRoot, ".data"), { recursive: true });
  rmSync(reportFile, { force: true });
  const chromium = ensureChromium(log);
  database = await ensureDatabase("test");
  redis = await ensureRedis("test", log);

  // The database the served app uses in the browser tests: migrated from zero, demo seeded.
  e2eDb = `saddlebook_t_e2e_${randomBytes(4).toString("hex")}`;
  const admin = knexFactory(knexConfigFromUrl(database.url, { min: 0, max: 1 }));
  await admin.raw("CREATE DATABASE ?? CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci", [e2eDb]);
  await admin.destroy();
  const e2eUrl = withDatabase(database.url, e2eDb);
  const e2e = knexFactory(knexConfigFromUrl(e2eUrl, { min: 0, max: 2 }));
  await migrateLatest(e2e);
  await seedDemo(e2e);
  await e2e.destroy();

  if (!buildApp(log)) return 1;
  const port = await freePort();
  const appUrl = `http://127.0.0.1:${port}`;
  // The tests sign in through the stand-in provider and read caught mail: stand-ins on, as the setting allows.
  services = await startDevServices({ log, appUrl, databaseUrl: e2eUrl, standins: true });
  app = await startAppServer({
    port,
    quiet: true,
    env: { ...services.env, DATABASE_URL: e2eUrl, REDIS_URL: redis.url, SESSION_SECRET: randomBytes(32).toString("hex"), APP_URL: appUrl },
  });
  log(`App under test at ${appUrl}`);

  const code = await runVitest(
    {
      ...services.env,
      TEST_DATABASE_URL: database.url,
      REDIS_TEST_URL: redis.url,
      E2E_DATABASE_URL: e2eUrl,
      APP_URL: appUrl,
      CHROMIUM_PATH: chromium,
    },
    process.argv.slice(2),
  );
  const c = counts();
  await cleanup();
  if (!c) {
    log("tests: 0 passed, 1 failed");
    return 1;
  }
  log(`tests: ${c.passed} passed, ${c.failed} failed`);
  return code !== 0 || c.failed > 0 ? 1 : 0;
}

process.on("SIGINT", () => void cleanup().then(() => process.exit(130)));
main().then(
  (code) => process.exit(code),
  async (e) => {
    await cleanup();
    console.error(e instanceof ConfigProblem ? `\n✖ ${e.message}\n` : e);
    console.log("tests: 0 passed, 1 failed");
    process.exit(1);
  },
);
