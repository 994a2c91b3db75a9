/**
 * Vitest global setup: makes sure a test MariaDB answers before integration tests run.
 *
 * `npm test` (scripts/test.ts) starts the servers itself and passes TEST_DATABASE_URL and
 * REDIS_TEST_URL; a direct `npx vitest run tests/integration/…` starts the embedded test
 * MariaDB and Redis here and leaves them running for the next run (`npm test` stops the
 * servers it starts). Runs of
 * solver tests alone need no database.
 */
import type { TestProject } from "vitest/node";
import { ensureDatabase } from "../../scripts/mariadb";
import { ensureRedis } from "../../scripts/redis";


function onlyPureTests(): boolean {
  const filters = process.argv.slice(2).filter((a) => !a.startsWith("-") && a !== "run" && a !== "watch");
  return filters.length > 0 && filters.every((f) => f.includes("tests/solver"));
}

export async function setup(_project: TestProject): Promise<void> {
  if (onlyPureTests()) return;
  if (!process.env.TEST_DATABASE_URL) process.env.TEST_DATABASE_URL = (await ensureDatabase("test")).url;
  if (!process.env.REDIS_TEST_URL) process.env.REDIS_TEST_URL = (await ensureRedis("test")).url;
}
