// db:backup and db:restore round-trip a seeded database: every table comes back identical.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { freshDatabase, type TestDatabase } from "../support/db";
import { seedDemo } from "../../db/seeds/index";
import { backupDatabase, restoreDatabase } from "../../scripts/backup";

let t: TestDatabase;
let dir: string;
beforeAll(async () => {
  t = await freshDatabase();
  await seedDemo(t.db);
  dir = mkdtempSync(join(tmpdir(), "saddlebook-backup-"));
});
afterAll(async () => {
  await t?.drop();
  rmSync(dir, { recursive: true, force: true });
});

async function snapshot(): Promise<Record<string, unknown[]>> {
  const [rows] = await t.db.raw("SHOW TABLES");
  const out: Record<string, unknown[]> = {};
  for (const r of rows as Array<Record<string, string>>) {
    const table = Object.values(r)[0]!;
    out[table] = await t.db(table).select("*").orderByRaw("1");
  }
  return out;
}

describe("backup and restore", () => {
  it("restores every table of a seeded database exactly", async () => {
    const before = await snapshot();
    expect(Object.keys(before).length).toBeGreaterThan(3);
    expect(before.users!.length).toBeGreaterThan(0);
    const file = join(dir, "round-trip.sql");
    const bytes = await backupDatabase(t.url, file);
    expect(bytes).toBeGreaterThan(1000);

    // Lose data: empty the audit log and memberships, drop the users' names.
    await t.db("memberships").del();
    await t.db("users").update({ name: "lost" });

    await restoreDatabase(t.url, file);
    expect(await snapshot()).toEqual(before);
  });

  it("reports a missing backup file in one sentence", async () => {
    await expect(restoreDatabase(t.url, join(dir, "absent.sql"))).rejects.toThrow(/No backup file at/);
  });
});
