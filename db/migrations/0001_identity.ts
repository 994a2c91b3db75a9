/** Users, groups, memberships and the audit log. */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("users", (t) => {
    t.increments("id").primary();
    t.string("email", 254).notNullable().unique();
    t.string("name", 200).notNullable();
    // Global role: viewer < author < curator < admin (see app/auth/policy.server.ts).
    t.enu("role", ["viewer", "author", "curator", "admin"]).notNullable().defaultTo("author");
    t.string("password_hash", 200).nullable();
    t.timestamp("email_verified_at", { precision: 3 }).nullable();
    t.string("oidc_subject", 200).nullable().unique();
    t.boolean("disabled").notNullable().defaultTo(false);
    t.timestamp("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.timestamp("updated_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
  await knex.schema.createTable("groups", (t) => {
    t.increments("id").primary();
    t.string("slug", 80).notNullable().unique();
    t.string("name", 200).notNullable();
    t.text("description").nullable();
    t.timestamp("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
  await knex.schema.createTable("memberships", (t) => {
    t.integer("user_id").unsigned().notNullable().references("users.id").onDelete("CASCADE");
    t.integer("group_id").unsigned().notNullable().references("groups.id").onDelete("CASCADE");
    // Role inside the group: a group admin invites and manages members.
    t.enu("group_role", ["member", "admin"]).notNullable().defaultTo("member");
    t.timestamp("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.primary(["user_id", "group_id"]);
    t.index(["group_id"]);
  });
  await knex.schema.createTable("audit_log", (t) => {
    t.bigIncrements("id").primary();
    t.integer("user_id").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.string("action", 80).notNullable();
    t.string("object_type", 40).nullable();
    t.string("object_id", 64).nullable();
    t.json("detail").nullable();
    t.string("ip", 64).nullable();
    t.timestamp("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["user_id", "created_at"]);
    t.index(["object_type", "object_id"]);
    t.index(["action", "created_at"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists("audit_log");
  await knex.schema.dropTableIfExists("memberships");
  await knex.schema.dropTableIfExists("groups");
  await knex.schema.dropTableIfExists("users");
}
