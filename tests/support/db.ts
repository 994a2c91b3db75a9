/**
 * A database of its own for each integration test file: created on the test server,
 * migrated to the latest schema, dropped afterwards.
 */
import knexFactory, { type Knex } from "knex";
import { randomBytes } from "node:crypto";
import { knexConfigFromUrl, withDatabase } from "../../db/config";
import { migrateLatest } from "../../db/migrate";

export interface TestDatabase {
  db: Knex;
  url: string;
  name: string;
  drop(): Promise<void>;
}

function serverUrl(): string {
  const url = process.env.TEST_DATABASE_URL;
  if (!url) throw new Error("TEST_DATABASE_URL is not set: run tests through `npm test` or vitest (global setup starts the test server).");
  return url;
}

/** Creates an empty database (no tables) named saddlebook_t_<random>. */
export async function emptyDatabase(): Promise<TestDatabase> {
  const base = serverUrl();
  const name = `saddlebook_t_${randomBytes(5).toString("hex")}`;
  const admin = knexFactory(knexConfigFromUrl(base, { min: 0, max: 1 }));
  await admin.raw("CREATE DATABASE ?? CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci", [name]);
  await admin.destroy();
  const url = withDatabase(base, name);
  const db = knexFactory(knexConfigFromUrl(url, { min: 0, max: 8 }));
  return {
    db,
    url,
    name,
    async drop() {
      await db.destroy();
      const a = knexFactory(knexConfigFromUrl(base, { min: 0, max: 1 }));
      await a.raw("DROP DATABASE IF EXISTS ??", [name]);
      await a.destroy();
    },
  };
}

/** Creates a database migrated to the latest schema. */
export async function freshDatabase(): Promise<TestDatabase> {
  const t = await emptyDatabase();
  await migrateLatest(t.db);
  return t;
}
