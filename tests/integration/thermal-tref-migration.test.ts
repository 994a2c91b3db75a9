// Stored thermal barriers that relied on the former 298.15 K default get that value written
// into them explicitly (migration 0240), so the stored rate constants do not change.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { freshDatabase, type TestDatabase } from "../support/db";
import { seedDemoIdentities } from "../../db/seeds/demo-identities";
import { createSpecies } from "../../db/access/species.server";
import { createStep, getStep } from "../../db/access/steps.server";
import { up, stateThermalTref } from "../../db/migrations/0240_thermal_reference_temperature";
import { rateConstant } from "../../solver/rates";
import type { Actor } from "../../app/auth/policy.server";
import type { StepKinetics } from "../../solver/types";

let t: TestDatabase;
let author: Actor;
beforeAll(async () => {
  t = await freshDatabase();
  await seedDemoIdentities(t.db);
  const u = await t.db("users").where({ email: "author@saddlebook.test" }).first("id", "role");
  author = { id: u.id, role: u.role, groupIds: [], adminGroupIds: [] };
});
afterAll(async () => {
  await t?.drop();
});

describe("thermal reference temperature migration", () => {
  it("adds T (document) and Tref (engine) only where missing", () => {
    const doc = { form: "thermal", Ea: 60, dS: -90, dn: -1, unit: "kJ/mol", entropyUnit: "J/(mol K)", standardState: "1M" };
    const eng = { form: "thermal", Ea: 60e3, dS: -90, dn: -1, standardState: "1M" };
    const kept = { form: "thermal", Ea: 60, dS: -90, dn: -1, unit: "kJ/mol", entropyUnit: "J/(mol K)", standardState: "1M", T: 350 };
    const wrapped = { steps: [{ barrier: doc }, { barrier: kept }], kinetics: { barrier: eng }, other: { form: "dG", dG: 1 } };
    expect(stateThermalTref(wrapped)).toBe(true);
    expect(doc).toMatchObject({ T: 298.15 });
    expect(eng).toMatchObject({ Tref: 298.15 });
    expect(kept.T).toBe(350);
    expect(wrapped.other).toEqual({ form: "dG", dG: 1 });
    expect(stateThermalTref(wrapped)).toBe(false);
  });

  it("writes 298.15 K into a stored step that relied on the default; its k is unchanged", async () => {
    const A = (await createSpecies(t.db, author, { label: "substrate" })).id;
    const B = (await createSpecies(t.db, author, { label: "partner" })).id;
    const C = (await createSpecies(t.db, author, { label: "adduct" })).id;
    const made = await createStep(t.db, author, {
      reactants: [{ speciesId: A, coef: 1 }, { speciesId: B, coef: 1 }],
      products: [{ speciesId: C, coef: 1 }],
      reversible: false,
      barrier: { form: "thermal", Ea: 60, dS: -90, dn: -1, unit: "kJ/mol", entropyUnit: "J/(mol K)", standardState: "1M", T: 298.15 },
      provenance: { source: "estimated" },
    });
    const before = (await getStep(t.db, author, made.stepId)).version;
    const kBefore = rateConstant(before.kinetics as StepKinetics, 320);
    // As a step stored before the reference temperature was required looks.
    const row = await t.db("step_versions").where({ id: made.versionId }).first("content", "kinetics");
    const content = typeof row.content === "string" ? JSON.parse(row.content) : row.content;
    const kinetics = typeof row.kinetics === "string" ? JSON.parse(row.kinetics) : row.kinetics;
    delete content.barrier.T;
    delete kinetics.barrier.Tref;
    await t.db("step_versions").where({ id: made.versionId }).update({ content: JSON.stringify(content), kinetics: JSON.stringify(kinetics) });

    await up(t.db);
    const after = (await getStep(t.db, author, made.stepId)).version;
    expect(after.content.barrier).toMatchObject({ form: "thermal", T: 298.15 });
    expect((after.kinetics as StepKinetics).barrier).toMatchObject({ form: "thermal", Tref: 298.15 });
    const kAfter = rateConstant(after.kinetics as StepKinetics, 320);
    expect(kBefore.ok && kAfter.ok && kAfter.value.k).toBe(kBefore.ok && kBefore.value.k);
  });
});
