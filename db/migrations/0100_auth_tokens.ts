/**
 * Sign-in support: API tokens (stored as SHA-256 hashes), one-time links for e-mail
 * verification, password reset and group invitations, invitations themselves, and the
 * sign-in attempt log that rate limiting reads.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("api_tokens", (t) => {
    t.increments("id").primary();
    t.integer("user_id").unsigned().notNullable().references("users.id").onDelete("CASCADE");
    t.string("name", 100).notNullable();
    // SHA-256 of the full token (hex); the token itself is shown once and never stored.
    t.string("token_hash", 64).notNullable().unique();
    // First characters of the token, so a user can tell their tokens apart.
    t.string("prefix", 16).notNullable();
    t.timestamp("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.timestamp("last_used_at", { precision: 3 }).nullable();
    t.timestamp("revoked_at", { precision: 3 }).nullable();
    t.index(["user_id"]);
  });
  await knex.schema.createTable("invitations", (t) => {
    t.increments("id").primary();
    t.integer("group_id").unsigned().notNullable().references("groups.id").onDelete("CASCADE");
    t.string("email", 254).notNullable();
    t.enu("group_role", ["member", "admin"]).notNullable().defaultTo("member");
    // Global role given to a person who has no account yet when they accept.
    t.enu("role", ["viewer", "author"]).notNullable().defaultTo("author");
    t.integer("invited_by").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.timestamp("expires_at", { precision: 3 }).notNullable();
    t.timestamp("accepted_at", { precision: 3 }).nullable();
    t.integer("accepted_by").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.timestamp("revoked_at", { precision: 3 }).nullable();
    t.timestamp("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["group_id", "email"]);
  });
  await knex.schema.createTable("one_time_tokens", (t) => {
    t.increments("id").primary();
    t.enu("purpose", ["verify-email", "reset-password", "invitation"]).notNullable();
    t.integer("user_id").unsigned().nullable().references("users.id").onDelete("CASCADE");
    t.integer("invitation_id").unsigned().nullable().references("invitations.id").onDelete("CASCADE");
    t.string("email", 254).nullable();
    t.string("token_hash", 64).notNullable().unique();
    t.timestamp("expires_at", { precision: 3 }).notNullable();
    t.timestamp("used_at", { precision: 3 }).nullable();
    t.timestamp("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["user_id", "purpose"]);
  });
  await knex.schema.createTable("sign_in_attempts", (t) => {
    t.bigIncrements("id").primary();
    t.string("email", 254).notNullable();
    t.string("ip", 64).notNullable();
    t.boolean("success").notNullable();
    t.string("method", 20).notNullable().defaultTo("password");
    t.timestamp("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["email", "created_at"]);
    t.index(["ip", "created_at"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists("sign_in_attempts");
  await knex.schema.dropTableIfExists("one_time_tokens");
  await knex.schema.dropTableIfExists("invitations");
  await knex.schema.dropTableIfExists("api_tokens");
}
