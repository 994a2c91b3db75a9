/**
 * Simulation runs, measured datasets and barrier fits.
 *
 * runs: a mechanism snapshot in the exchange format (with its sha256) so a run is reproducible
 * whatever happens to the mechanism later; conditions and solver settings as submitted; the
 * status (queued → running → done | failed | cancelled, with the reason); progress as the
 * simulated time reached (s); results as one Float64 block (times, temperatures, then each
 * species' concentrations — see app/compute/run-task.ts packResults); the analysis summary and
 * solver statistics as JSON. Results, analysis and statistics are written in one transaction
 * together with status "done", never partially.
 *
 * datasets: uploaded concentration–time tables (rows as JSON, the column mapping, units, T).
 * fits: barrier shifts fitted to datasets, with standard errors and residuals.
 *
 * The links to mechanisms carry no foreign keys here; 0310 adds them.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("runs", (t) => {
    t.increments("id").primary();
    t.integer("owner_id").unsigned().notNullable().references("users.id");
    t.string("name", 300).notNullable().defaultTo("");
    t.enu("visibility", ["private", "group", "public"]).notNullable().defaultTo("private");
    t.integer("group_id").unsigned().nullable().references("groups.id").onDelete("SET NULL");
    t.integer("mechanism_id").unsigned().nullable();
    t.integer("mechanism_version").unsigned().nullable();
    t.string("snapshot_hash", 64).notNullable();
    t.json("snapshot").notNullable();
    t.json("conditions").notNullable();
    t.json("solver_options").notNullable();
    t.json("analysis_request").nullable();
    t.enu("status", ["queued", "running", "done", "failed", "cancelled"]).notNullable().defaultTo("queued");
    // budget | cancelled | invalid | engine | crash | interrupted
    t.string("failure_code", 20).nullable();
    t.text("status_reason").nullable();
    t.double("t_end").notNullable(); // s
    t.double("progress_time").notNullable().defaultTo(0); // s, simulated time reached
    t.timestamp("cancel_requested_at", { precision: 3 }).nullable();
    t.json("result_species").nullable();
    t.integer("result_points").unsigned().nullable();
    t.specificType("results", "LONGBLOB").nullable();
    t.json("analysis").nullable();
    t.json("statistics").nullable();
    t.json("warnings").nullable();
    t.timestamp("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.timestamp("started_at", { precision: 3 }).nullable();
    t.timestamp("finished_at", { precision: 3 }).nullable();
    t.index(["owner_id", "created_at"], "runs_owner_idx");
    t.index(["mechanism_id", "created_at"], "runs_mechanism_idx");
    t.index(["status"], "runs_status_idx");
  });

  await knex.schema.createTable("datasets", (t) => {
    t.increments("id").primary();
    t.integer("owner_id").unsigned().notNullable().references("users.id");
    t.string("name", 300).notNullable();
    t.text("notes").nullable();
    t.enu("visibility", ["private", "group", "public"]).notNullable().defaultTo("private");
    t.integer("group_id").unsigned().nullable().references("groups.id").onDelete("SET NULL");
    t.integer("mechanism_id").unsigned().nullable();
    t.double("temperature_k").notNullable();
    t.string("time_unit", 8).notNullable();
    t.string("concentration_unit", 16).notNullable();
    // { time: "<column>", species: { "<column>": "<species id>" }, sigma?: … }
    t.json("column_mapping").notNullable();
    // { times: number[] (in time_unit), series: { "<species id>": (number|null)[] (in concentration_unit) } }
    t.json("rows").notNullable();
    t.integer("row_count").unsigned().notNullable();
    t.string("source_filename", 300).nullable();
    t.timestamp("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["owner_id", "created_at"], "datasets_owner_idx");
    t.index(["mechanism_id"], "datasets_mechanism_idx");
  });

  await knex.schema.createTable("fits", (t) => {
    t.increments("id").primary();
    t.integer("owner_id").unsigned().notNullable().references("users.id");
    t.integer("mechanism_id").unsigned().nullable();
    t.integer("mechanism_version").unsigned().nullable();
    t.string("snapshot_hash", 64).notNullable();
    t.json("snapshot").notNullable();
    t.json("dataset_ids").notNullable();
    // [{ stepId, initial?, lower?, upper? }] in J/mol
    t.json("chosen_steps").notNullable();
    // [{ stepId, shift, se, ci, atBound, barrierBefore, barrierAfter }]
    t.json("fitted").notNullable();
    t.json("residuals").notNullable();
    t.json("statistics").notNullable();
    t.timestamp("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["owner_id", "created_at"], "fits_owner_idx");
  });

  await knex.schema.createTable("fit_datasets", (t) => {
    t.integer("fit_id").unsigned().notNullable().references("fits.id").onDelete("CASCADE");
    t.integer("dataset_id").unsigned().notNullable().references("datasets.id").onDelete("CASCADE");
    t.primary(["fit_id", "dataset_id"]);
    t.index(["dataset_id"], "fit_datasets_dataset_idx");
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists("fit_datasets");
  await knex.schema.dropTableIfExists("fits");
  await knex.schema.dropTableIfExists("datasets");
  await knex.schema.dropTableIfExists("runs");
}
