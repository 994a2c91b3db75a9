/**
 * Mechanisms with immutable versions and fork lineage.
 *
 * `mechanisms` is the mutable head (owner, visibility, current version number, layout,
 * condition presets). Each save appends a `mechanism_versions` row that is never changed:
 * its `content` is a self-contained snapshot in Saddlebook's working form —
 *   { species: [{ id, label, formula, charge, phase }],
 *     steps:   [{ key, kind: "library", stepId, stepVersionId }
 *             | { key, kind: "local", step: <exchange-format step>, fromStepVersionId? }] }
 * Library entries point at immutable step versions, so a snapshot resolves to the same
 * numbers forever; the exchange-format document is produced from it on export.
 * `mechanism_steps` and `mechanism_species` mirror the current version as rows, for
 * "where is this step used" and the pinned-update check.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("mechanisms", (t) => {
    t.increments("id").primary();
    t.integer("owner_id").unsigned().notNullable().references("users.id");
    t.string("name", 300).notNullable();
    t.text("description").nullable();
    t.enu("visibility", ["private", "group", "public"]).notNullable().defaultTo("private");
    t.integer("group_id").unsigned().nullable().references("groups.id").onDelete("SET NULL");
    t.integer("forked_from_mechanism_id").unsigned().nullable().references("mechanisms.id").onDelete("SET NULL");
    t.integer("forked_from_version").unsigned().nullable();
    t.integer("current_version").unsigned().notNullable().defaultTo(0);
    t.json("layout").nullable();
    t.json("condition_presets").nullable();
    t.boolean("illustrative").notNullable().defaultTo(false);
    t.timestamp("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.timestamp("updated_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["owner_id", "updated_at"], "mechanisms_owner_idx");
    t.index(["visibility", "group_id"], "mechanisms_visibility_idx");
    t.index(["forked_from_mechanism_id"], "mechanisms_parent_idx");
  });

  await knex.schema.createTable("mechanism_versions", (t) => {
    t.increments("id").primary();
    t.integer("mechanism_id").unsigned().notNullable().references("mechanisms.id").onDelete("CASCADE");
    t.integer("number").unsigned().notNullable();
    t.integer("author_id").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.string("message", 1000).notNullable();
    t.string("name", 300).notNullable();
    t.json("content").notNullable();
    /** sha256 of the canonical content JSON (runs record it). */
    t.string("content_hash", 64).notNullable();
    t.timestamp("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.unique(["mechanism_id", "number"], { indexName: "mechanism_versions_number_uq" });
  });

  await knex.schema.createTable("mechanism_steps", (t) => {
    t.integer("mechanism_id").unsigned().notNullable().references("mechanisms.id").onDelete("CASCADE");
    t.integer("position").unsigned().notNullable();
    t.string("entry_key", 200).notNullable();
    t.integer("step_id").unsigned().nullable().references("steps.id");
    t.integer("step_version_id").unsigned().nullable().references("step_versions.id");
    t.primary(["mechanism_id", "position"]);
    t.index(["step_id"], "mechanism_steps_step_idx");
  });

  await knex.schema.createTable("mechanism_species", (t) => {
    t.integer("mechanism_id").unsigned().notNullable().references("mechanisms.id").onDelete("CASCADE");
    t.integer("species_id").unsigned().notNullable().references("species.id");
    t.integer("position").unsigned().notNullable();
    t.primary(["mechanism_id", "species_id"]);
    t.index(["species_id"], "mechanism_species_species_idx");
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists("mechanism_species");
  await knex.schema.dropTableIfExists("mechanism_steps");
  await knex.schema.dropTableIfExists("mechanism_versions");
  await knex.schema.dropTableIfExists("mechanisms");
}
