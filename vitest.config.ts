import { defineConfig } from "vitest/config";
import { fileURLToPath } from "node:url";

// Unit tests (tests/solver, tests/unit) need nothing running; integration tests
// (tests/integration) need the test database, browser tests (tests/browser) the served app.
// `npm test` (scripts/test.ts) starts both and runs everything.
export default defineConfig({
  resolve: {
    alias: {
      "~": fileURLToPath(new URL("./app", import.meta.url)),
    },
  },
  test: {
    include: ["tests/**/*.test.ts"],
    environment: "node",
    globalSetup: ["tests/support/global-setup.ts"],
    testTimeout: 30_000,
    hookTimeout: 120_000,
    fileParallelism: true,
    pool: "forks",
  },
});
