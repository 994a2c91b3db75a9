/**
 * Steps as written: stoichiometric coefficients may be fractional (0.5, 77.27) and a step may
 * have no reactants (a zero-order source, molecularity 0) or no products (a sink). The term
 * coefficient and the version's molecularity (reaction order, Σ reactant coefficients) become
 * doubles; every stored integer keeps its value.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("step_version_terms", (t) => {
    t.double("coef").notNullable().alter();
  });
  await knex.schema.alterTable("step_versions", (t) => {
    t.double("molecularity").notNullable().alter();
  });
}

export async function down(knex: Knex): Promise<void> {
  // The integer columns cannot hold fractional coefficients or a source's order 0: refuse
  // rather than round them (that would change the chemistry of stored steps).
  const [terms] = (await knex.raw("SELECT COUNT(*) AS n FROM step_version_terms WHERE coef <> FLOOR(coef)")) as [Array<{ n: number }>];
  const [versions] = (await knex.raw("SELECT COUNT(*) AS n FROM step_versions WHERE molecularity <> FLOOR(molecularity) OR molecularity < 1")) as [
    Array<{ n: number }>,
  ];
  if (Number(terms[0].n) > 0 || Number(versions[0].n) > 0) {
    throw new Error("Stored steps have fractional coefficients, no reactants or no products; they cannot be kept in integer columns.");
  }
  await knex.schema.alterTable("step_version_terms", (t) => {
    t.tinyint("coef").unsigned().notNullable().alter();
  });
  await knex.schema.alterTable("step_versions", (t) => {
    t.tinyint("molecularity").unsigned().notNullable().alter();
  });
}
