/**
 * Which server process a run belongs to: the production server runs several worker processes
 * (scripts/serve.ts), each holding its own queue of runs. When one of them dies, its supervisor
 * marks exactly that worker's queued and running runs failed, leaving the others' runs alone.
 * NULL for runs made outside such a server (tests, scripts).
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("runs", (tb) => {
    tb.string("server_process", 64).nullable();
    tb.index(["server_process", "status"], "runs_server_process_idx");
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable("runs", (tb) => {
    tb.dropIndex(["server_process", "status"], "runs_server_process_idx");
    tb.dropColumn("server_process");
  });
}
