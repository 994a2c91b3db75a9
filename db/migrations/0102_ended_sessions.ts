/**
 * Sessions ended by signing out. A session cookie names its user and the moment of sign-in
 * (ms); signing out records that pair here, and a cookie whose pair is recorded no longer
 * signs anyone in, even when replayed before it expires. Rows older than the cookie lifetime
 * (12 h) serve no purpose and are removed as the user signs out again.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("ended_sessions", (t) => {
    t.integer("user_id").unsigned().notNullable().references("users.id").onDelete("CASCADE");
    t.bigInteger("signed_in_at").notNullable();
    t.timestamp("ended_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.primary(["user_id", "signed_in_at"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("ended_sessions");
}
