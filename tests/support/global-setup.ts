/**
 * Vitest global setup: makes sure a test MariaDB answers before integration tests run.
 *
 * `npm test` (scripts/test.ts) starts the server itself and passes TEST_DATABASE_URL;
 * a direct `npx vitest run tests/integration/…` starts the embedded test server here and
 * leaves it running for the next run (`npm test` stops the server it starts). Runs of
 * solver tests alone need no database.
 */
import type { TestProject } from "vitest/node";
import { ensureDatabase } from "../../scripts/mariadb";


function onlyPureTests(): boolean {
  const filters = process.argv.slice(2).filter((a) => !a.startsWith("-") && a !== "run" && a !== "watch");
  return filters.length > 0 && filters.every((f) => f.includes("tests/solver"));
}

export async function setup(_project: TestProject): Promise<void> {
  if (process.env.TEST_DATABASE_URL || onlyPureTests()) return;
  const handle = await ensureDatabase("test");
  process.env.TEST_DATABASE_URL = handle.url;
}
