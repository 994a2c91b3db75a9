/**
 * The shared step library: species, steps with immutable versions, reviews and comments.
 *
 * A step is a stable identity (`steps`) with a chain of versions (`step_versions`). A
 * version row is written once and never updated: an edit, and also every change of library
 * status (propose, approve, request changes, deprecate), appends a new version. `steps`
 * holds only pointers (current and latest public version) and the owner.
 *
 * Each version keeps the step twice: `content` is the step exactly as the user entered it
 * (exchange-format step, values in the user's units with the units named), `kinetics` is
 * the same step in SI-molar units (J/mol, J/(mol·K), K, (mol/L)^(1−m)·s⁻¹) as the engine
 * reads it. Scalar columns derived from it (ΔG‡ and Ea at 298.15 K, validity range,
 * molecularity, source type) serve filters and sorting; `search_text` feeds FULLTEXT.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("species", (t) => {
    t.increments("id").primary();
    t.string("label", 500).notNullable();
    t.string("formula", 200).nullable();
    t.integer("charge").nullable();
    t.enu("phase", ["solution", "gas", "solid", "liquid"]).nullable();
    t.text("notes").nullable();
    t.integer("created_by").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.timestamp("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["label"], "species_label_idx");
    t.index(["formula"], "species_formula_idx");
  });
  await knex.raw("ALTER TABLE species ADD FULLTEXT INDEX species_ft (label, formula)");

  await knex.schema.createTable("steps", (t) => {
    t.increments("id").primary();
    t.integer("owner_id").unsigned().notNullable().references("users.id");
    // Pointers into step_versions (set right after the first version is written).
    t.integer("current_version_id").unsigned().nullable();
    t.integer("current_version_number").unsigned().notNullable().defaultTo(0);
    /** Latest approved or deprecated version: what others see in the shared library. */
    t.integer("public_version_id").unsigned().nullable();
    t.enu("status", ["draft", "proposed", "approved", "deprecated"]).notNullable().defaultTo("draft");
    t.timestamp("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.timestamp("updated_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["status", "updated_at"], "steps_status_idx");
    t.index(["owner_id", "updated_at"], "steps_owner_idx");
    t.index(["updated_at"], "steps_updated_idx");
  });

  await knex.schema.createTable("step_versions", (t) => {
    t.increments("id").primary();
    t.integer("step_id").unsigned().notNullable().references("steps.id").onDelete("CASCADE");
    t.integer("number").unsigned().notNullable();
    t.enu("status", ["draft", "proposed", "approved", "deprecated"]).notNullable();
    t.integer("replaced_by_step_id").unsigned().nullable().references("steps.id").onDelete("SET NULL");
    t.integer("author_id").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.string("message", 1000).notNullable().defaultTo("");
    t.string("label", 500).notNullable().defaultTo("");
    /** Exchange-format step as entered (user units). */
    t.json("content").notNullable();
    /** StepKinetics in SI-molar units. */
    t.json("kinetics").notNullable();
    /** Display units the user chose: energy, entropy, temperature ("K" or "C"). */
    t.string("energy_unit", 16).notNullable().defaultTo("kJ/mol");
    t.string("entropy_unit", 16).notNullable().defaultTo("J/(mol K)");
    t.string("temperature_unit", 4).notNullable().defaultTo("K");
    t.enu("barrier_form", ["dG", "dHdS", "thermal", "arrhenius", "measured"]).notNullable();
    t.tinyint("molecularity").unsigned().notNullable();
    t.boolean("reversible").notNullable().defaultTo(false);
    /** J/mol, derived at 298.15 K in the 1 mol/L standard state; null when not derivable. */
    t.double("dg298").nullable();
    t.double("ea298").nullable();
    t.double("t_min").nullable(); // K
    t.double("t_max").nullable(); // K
    t.double("uncertainty").nullable(); // J/mol
    t.enu("source_type", ["computed", "measured", "estimated", "literature"]).nullable();
    t.string("method", 1000).nullable();
    t.string("citation", 2000).nullable();
    t.string("doi", 300).nullable();
    t.string("solvent", 300).nullable();
    t.boolean("illustrative").notNullable().defaultTo(false);
    t.json("tags").nullable();
    t.text("search_text").notNullable();
    t.timestamp("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.unique(["step_id", "number"], { indexName: "step_versions_step_number_uq" });
    t.index(["molecularity", "source_type"], "step_versions_filter_idx");
  });
  await knex.raw("ALTER TABLE step_versions ADD FULLTEXT INDEX step_versions_ft (search_text)");
  await knex.schema.alterTable("steps", (t) => {
    t.foreign("current_version_id").references("step_versions.id");
    t.foreign("public_version_id").references("step_versions.id");
  });

  /** Reactants (side r) and products (side p) of a version, for "steps with this species". */
  await knex.schema.createTable("step_version_terms", (t) => {
    t.integer("step_version_id").unsigned().notNullable().references("step_versions.id").onDelete("CASCADE");
    t.enu("side", ["r", "p"]).notNullable();
    t.tinyint("position").unsigned().notNullable();
    t.integer("species_id").unsigned().notNullable().references("species.id");
    t.tinyint("coef").unsigned().notNullable();
    t.primary(["step_version_id", "side", "position"]);
    t.index(["species_id"], "svt_species_idx");
  });

  await knex.schema.createTable("step_tags", (t) => {
    t.integer("step_id").unsigned().notNullable().references("steps.id").onDelete("CASCADE");
    t.string("tag", 100).notNullable();
    t.primary(["step_id", "tag"]);
    t.index(["tag"], "step_tags_tag_idx");
  });

  /** Curation events: propose, approve, request changes, deprecate (with replacement). */
  await knex.schema.createTable("step_reviews", (t) => {
    t.increments("id").primary();
    t.integer("step_id").unsigned().notNullable().references("steps.id").onDelete("CASCADE");
    t.integer("step_version_id").unsigned().notNullable().references("step_versions.id").onDelete("CASCADE");
    t.integer("actor_id").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.enu("action", ["propose", "approve", "request_changes", "deprecate"]).notNullable();
    t.text("comment").nullable();
    t.integer("replacement_step_id").unsigned().nullable().references("steps.id").onDelete("SET NULL");
    t.timestamp("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["step_id", "created_at"], "step_reviews_step_idx");
  });

  await knex.schema.createTable("step_comments", (t) => {
    t.increments("id").primary();
    t.integer("step_id").unsigned().notNullable().references("steps.id").onDelete("CASCADE");
    t.integer("step_version_id").unsigned().nullable().references("step_versions.id").onDelete("SET NULL");
    t.integer("author_id").unsigned().nullable().references("users.id").onDelete("SET NULL");
    t.text("body").notNullable();
    t.timestamp("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["step_id", "created_at"], "step_comments_step_idx");
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists("step_comments");
  await knex.schema.dropTableIfExists("step_reviews");
  await knex.schema.dropTableIfExists("step_tags");
  await knex.schema.dropTableIfExists("step_version_terms");
  await knex.schema.alterTable("steps", (t) => {
    t.dropForeign(["current_version_id"]);
    t.dropForeign(["public_version_id"]);
  });
  await knex.schema.dropTableIfExists("step_versions");
  await knex.schema.dropTableIfExists("steps");
  await knex.schema.dropTableIfExists("species");
}
