// The schema migrates up from zero, down to zero and up again on the real MariaDB.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { migrateLatest, migrationStatus, rollbackAll } from "../../db/migrate";
import { emptyDatabase, type TestDatabase } from "../support/db";

let t: TestDatabase;
beforeAll(async () => {
  t = await emptyDatabase();
});
afterAll(async () => {
  await t?.drop();
});

async function tableNames(): Promise<string[]> {
  const [rows] = await t.db.raw("SHOW TABLES");
  return (rows as Array<Record<string, string>>).map((r) => Object.values(r)[0]!).filter((n) => !n.startsWith("knex_")).sort();
}

describe("migrations", () => {
  it("apply from an empty database, roll back fully and apply again", async () => {
    const applied = await migrateLatest(t.db);
    expect(applied.length).toBeGreaterThan(0);
    const first = await tableNames();
    expect(first).toContain("users");
    expect((await migrationStatus(t.db)).pending).toEqual([]);

    await rollbackAll(t.db);
    expect(await tableNames()).toEqual([]);

    await migrateLatest(t.db);
    expect(await tableNames()).toEqual(first);
  });

  it("creates every table with utf8mb4", async () => {
    const [rows] = await t.db.raw(
      "SELECT TABLE_NAME AS name, TABLE_COLLATION AS coll FROM information_schema.TABLES WHERE TABLE_SCHEMA = ?",
      [t.name],
    );
    for (const r of rows as Array<{ name: string; coll: string }>) expect(r.coll, r.name).toMatch(/^utf8mb4/);
  });
});
