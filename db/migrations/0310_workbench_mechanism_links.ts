/**
 * Links runs, datasets and fits to the mechanisms they came from. ON DELETE SET NULL: a run
 * keeps its own snapshot, so deleting a mechanism never loses a run's results.
 */
import type { Knex } from "knex";

const TABLES = ["runs", "datasets", "fits"] as const;

export async function up(knex: Knex): Promise<void> {
  for (const t of TABLES) {
    await knex.schema.alterTable(t, (tb) => {
      tb.foreign("mechanism_id", `${t}_mechanism_fk`).references("mechanisms.id").onDelete("SET NULL");
    });
  }
}

export async function down(knex: Knex): Promise<void> {
  for (const t of TABLES) {
    await knex.schema.alterTable(t, (tb) => {
      tb.dropForeign(["mechanism_id"], `${t}_mechanism_fk`);
    });
  }
}
