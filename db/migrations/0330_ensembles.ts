/**
 * Ensembles: many simulations of one mechanism snapshot (a parameter sweep or an uncertainty
 * propagation), their members and the summary.
 *
 * ensembles: the request as submitted (spec JSON, app/ensembles/ensemble-spec.ts), the mechanism
 * snapshot (exchange format, with its sha256) and its link (ON DELETE SET NULL, as for runs: the
 * snapshot keeps the ensemble reproducible); status queued → running → done | failed | cancelled
 * with the reason; the member count; the summary (JSON, solver/ensemble.ts EnsembleSummary),
 * written in one transaction with status "done".
 *
 * ensemble_members: one row per member, planned at creation (its parameters: T in K, initial
 * concentrations in mol/L, barrier shifts in J/mol by step id) and its outcome once computed
 * (observable values, or the error). Unique (ensemble_id, member_index): a member recorded twice
 * is overwritten, never duplicated.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("ensembles", (t) => {
    t.increments("id").primary();
    t.integer("owner_id").unsigned().notNullable().references("users.id");
    t.string("name", 300).notNullable().defaultTo("");
    t.enu("visibility", ["private", "group", "public"]).notNullable().defaultTo("private");
    t.integer("group_id").unsigned().nullable().references("groups.id").onDelete("SET NULL");
    t.integer("mechanism_id").unsigned().nullable().references("mechanisms.id").onDelete("SET NULL");
    t.integer("mechanism_version").unsigned().nullable();
    t.string("snapshot_hash", 64).notNullable();
    t.json("snapshot").notNullable();
    t.json("spec").notNullable();
    t.enu("mode", ["sweep", "uncertainty"]).notNullable();
    t.integer("total_members").unsigned().notNullable();
    t.enu("status", ["queued", "running", "done", "failed", "cancelled"]).notNullable().defaultTo("queued");
    t.text("status_reason").nullable();
    t.timestamp("cancel_requested_at", { precision: 3 }).nullable();
    t.json("summary").nullable();
    t.string("server_process", 64).nullable();
    t.timestamp("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.timestamp("started_at", { precision: 3 }).nullable();
    t.timestamp("finished_at", { precision: 3 }).nullable();
    t.index(["owner_id", "created_at"], "ensembles_owner_idx");
    t.index(["mechanism_id", "created_at"], "ensembles_mechanism_idx");
    t.index(["status"], "ensembles_status_idx");
  });

  await knex.schema.createTable("ensemble_members", (t) => {
    t.integer("ensemble_id").unsigned().notNullable().references("ensembles.id").onDelete("CASCADE");
    t.integer("member_index").unsigned().notNullable();
    t.json("params").notNullable();
    t.boolean("ok").nullable();
    t.json("outcome").nullable();
    t.text("error").nullable();
    t.timestamp("recorded_at", { precision: 3 }).nullable();
    t.primary(["ensemble_id", "member_index"]);
    t.index(["ensemble_id", "recorded_at"], "ensemble_members_recorded_idx");
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("ensemble_members");
  await knex.schema.dropTable("ensembles");
}
