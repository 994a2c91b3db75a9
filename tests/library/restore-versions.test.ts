// Restoring an earlier version as a new one, against the real MariaDB: a library step and a
// mechanism get a new version equal to the old one (content, pins, species, tags), in one
// transaction; only those allowed to edit may restore (policy.server.ts); a stale base is a
// conflict and writes nothing; the current version cannot be "restored" onto itself.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { freshDatabase, type TestDatabase } from "../support/db";
import { seedDemoIdentities } from "../../db/seeds/demo-identities";
import { Forbidden, type Actor } from "../../app/auth/policy.server";
import { createSpecies } from "../../db/access/species.server";
import { createStep, editStep, getStep, listStepVersions, proposeStep, restoreStepVersion, reviewStep } from "../../db/access/steps.server";
import { createMechanism, getMechanism, restoreMechanismVersion, updateMechanism } from "../../db/access/mechanisms.server";
import { ConflictError, InputError, NotFoundError } from "../../db/access/library-errors";
import type { StepInput } from "../../app/components/library/step-schema";

let t: TestDatabase;
const A: Record<string, Actor> = {};
const sp: Record<string, number> = {};

async function actor(email: string): Promise<Actor> {
  const u = await t.db("users").where({ email }).first("id", "role");
  const g = await t.db("memberships").where({ user_id: u.id }).pluck("group_id");
  return { id: u.id, role: u.role, groupIds: g, adminGroupIds: [] };
}

const dG = (v: number) => ({ form: "dG" as const, dG: v, unit: "kJ/mol" as const, T: 298.15, standardState: "1M" as const });

function stepInput(over: Partial<StepInput> = {}): StepInput {
  return {
    label: "ketene dimerisation",
    reactants: [{ speciesId: sp.K, coef: 2 }],
    products: [{ speciesId: sp.D, coef: 1 }],
    reversible: false,
    barrier: dG(80),
    provenance: { source: "computed", method: "first method" },
    tags: ["first"],
    ...over,
  };
}

beforeAll(async () => {
  t = await freshDatabase();
  await seedDemoIdentities(t.db);
  for (const e of ["viewer", "author", "author2", "curator"]) A[e] = await actor(`${e}@saddlebook.test`);
  sp.K = (await createSpecies(t.db, A.author, { label: "ketene", formula: "C2H2O" })).id;
  sp.D = (await createSpecies(t.db, A.author, { label: "diketene", formula: "C4H4O2" })).id;
  sp.W = (await createSpecies(t.db, A.author, { label: "water", formula: "H2O" })).id;
});
afterAll(async () => {
  await t?.drop();
});

describe("restoring a library step version", () => {
  it("adds a new version equal to the old one: barrier, provenance, tags", async () => {
    const r = await createStep(t.db, A.author, stepInput());
    await editStep(t.db, A.author, r.stepId, { ...stepInput({ barrier: dG(70), provenance: { source: "estimated" }, tags: ["second"] }), baseVersion: 1, message: "guess" });
    const back = await restoreStepVersion(t.db, A.author, r.stepId, 1, 2);
    expect(back.version).toBe(3);
    const d = await getStep(t.db, A.author, r.stepId);
    expect(d.version.number).toBe(3);
    expect(d.version.message).toBe("Restored version 1.");
    expect(d.version.content.barrier).toEqual(dG(80));
    expect(d.version.content.provenance).toMatchObject({ source: "computed", method: "first method" });
    expect(await t.db("step_tags").where({ step_id: r.stepId }).pluck("tag")).toEqual(["first"]);
    expect((await listStepVersions(t.db, A.author, r.stepId)).map((v) => v.number)).toEqual([3, 2, 1]);
  });

  it("refuses others, a stale base and the current version, writing nothing", async () => {
    const r = await createStep(t.db, A.author, stepInput());
    await editStep(t.db, A.author, r.stepId, { ...stepInput({ barrier: dG(75) }), baseVersion: 1 });
    await expect(restoreStepVersion(t.db, A.author2, r.stepId, 1, 2)).rejects.toSatisfy((e) => e instanceof Forbidden || e instanceof NotFoundError);
    await expect(restoreStepVersion(t.db, A.viewer, r.stepId, 1, 2)).rejects.toSatisfy((e) => e instanceof Forbidden || e instanceof NotFoundError);
    await expect(restoreStepVersion(t.db, A.author, r.stepId, 1, 1)).rejects.toBeInstanceOf(ConflictError);
    await expect(restoreStepVersion(t.db, A.author, r.stepId, 2, 2)).rejects.toBeInstanceOf(InputError);
    await expect(restoreStepVersion(t.db, A.author, r.stepId, 9, 2)).rejects.toBeInstanceOf(NotFoundError);
    expect((await listStepVersions(t.db, A.author, r.stepId)).map((v) => v.number)).toEqual([2, 1]);
  });

  it("follows the rules of an edit for the status: a curator's restore of an approved step stays approved", async () => {
    const r = await createStep(t.db, A.author, stepInput());
    await proposeStep(t.db, A.author, r.stepId);
    await reviewStep(t.db, A.curator, r.stepId, { action: "approve" });
    const current = (await t.db("steps").where({ id: r.stepId }).first("current_version_number")).current_version_number;
    const back = await restoreStepVersion(t.db, A.curator, r.stepId, 1, current);
    expect((await t.db("steps").where({ id: r.stepId }).first("status")).status).toBe("approved");
    expect(back.version).toBe(current + 1);
  });
});

describe("restoring a mechanism version", () => {
  const local = (dGkJ: number, label: string) => ({
    kind: "local" as const,
    key: "dimer",
    step: { id: "dimer", label, reactants: [{ species: `s${sp.K}`, coef: 2 }], products: [{ species: `s${sp.D}`, coef: 1 }], reversible: false, barrier: dG(dGkJ) },
  });

  it("adds a new version with the old name, species and steps", async () => {
    const m = await createMechanism(t.db, A.author, { name: "Dimer v1", visibility: "private", steps: [local(80, "first estimate")] });
    await updateMechanism(t.db, A.author, m.id, {
      name: "Dimer v2",
      visibility: "private",
      species: [{ speciesId: sp.W }],
      steps: [local(60, "second estimate")],
      baseVersion: 1,
      message: "lower barrier, water added",
    });
    const r = await restoreMechanismVersion(t.db, A.author, m.id, 1, 2);
    expect(r.version).toBe(3);
    const d = await getMechanism(t.db, A.author, m.id);
    expect(d.version.number).toBe(3);
    expect(d.version.message).toBe("Restored version 1.");
    expect(d.mechanism.name).toBe("Dimer v1");
    expect(d.resolved.steps.map((s) => s.label)).toEqual(["first estimate"]);
    expect(d.resolved.steps[0].doc.barrier).toEqual(dG(80));
    expect(d.snapshot.species.map((s) => s.speciesId).sort()).toEqual([sp.K, sp.D].sort());
    // the mechanism's step and species tables follow the restored version
    expect(await t.db("mechanism_species").where({ mechanism_id: m.id }).pluck("species_id")).not.toContain(sp.W);
  });

  it("refuses others, a stale base and the current version, writing nothing", async () => {
    const m = await createMechanism(t.db, A.author, { name: "Guarded", visibility: "public", steps: [local(80, "a")] });
    await updateMechanism(t.db, A.author, m.id, { name: "Guarded", visibility: "public", steps: [local(81, "b")], baseVersion: 1, message: "b" });
    await expect(restoreMechanismVersion(t.db, A.author2, m.id, 1, 2)).rejects.toBeInstanceOf(Forbidden);
    await expect(restoreMechanismVersion(t.db, A.viewer, m.id, 1, 2)).rejects.toBeInstanceOf(Forbidden);
    await expect(restoreMechanismVersion(t.db, A.author, m.id, 1, 1)).rejects.toBeInstanceOf(ConflictError);
    await expect(restoreMechanismVersion(t.db, A.author, m.id, 2, 2)).rejects.toBeInstanceOf(InputError);
    await expect(restoreMechanismVersion(t.db, A.author, m.id, 7, 2)).rejects.toBeInstanceOf(NotFoundError);
    expect(await t.db("mechanism_versions").where({ mechanism_id: m.id }).count({ n: "*" }).first()).toMatchObject({ n: 2 });
  });
});
