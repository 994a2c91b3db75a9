/**
 * A per-user session epoch: sessions carry the epoch they were signed in under, and a
 * password change or reset raises it, which signs the user out everywhere else.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("users", (t) => {
    t.integer("session_epoch").unsigned().notNullable().defaultTo(0);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable("users", (t) => {
    t.dropColumn("session_epoch");
  });
}
