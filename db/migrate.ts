/** Schema migration helpers shared by the start script, tests and `npm run db:migrate`. */
import type { Knex } from "knex";
import { migrationSource } from "./migrations/index";

const options: Knex.MigratorConfig = { migrationSource, tableName: "knex_migrations" };

export async function migrateLatest(db: Knex): Promise<string[]> {
  const [, applied] = (await db.migrate.latest(options)) as [number, string[]];
  return applied;
}

export async function rollbackAll(db: Knex): Promise<string[]> {
  const [, undone] = (await db.migrate.rollback(options, true)) as [number, string[]];
  return undone;
}

export async function migrationStatus(db: Knex): Promise<{ done: string[]; pending: string[] }> {
  const [done, pending] = (await db.migrate.list(options)) as [Array<{ name: string } | string>, Array<{ file: string } | string>];
  return {
    done: done.map((d) => (typeof d === "string" ? d : d.name)),
    pending: pending.map((p) => (typeof p === "string" ? p : p.file)),
  };
}
