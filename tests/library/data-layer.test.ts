// The library and mechanism data layer against the real MariaDB: create, version, pin,
// fork, diff, export/import round trip, concurrent saves, visibility per role, bad input.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { freshDatabase, type TestDatabase } from "../support/db";
import { seedDemoIdentities } from "../../db/seeds/demo-identities";
import type { Actor } from "../../app/auth/policy.server";
import { createSpecies } from "../../db/access/species.server";
import {
  createStep,
  editStep,
  getStep,
  proposeStep,
  reviewStep,
  searchSteps,
  listStepVersions,
} from "../../db/access/steps.server";
import {
  createMechanism,
  diffAgainstParent,
  diffVersions,
  exportMechanism,
  forkMechanism,
  getMechanism,
  importMechanism,
  listMechanisms,
  updateMechanism,
  IMPORT_LIMIT_BYTES,
} from "../../db/access/mechanisms.server";
import { ConflictError, InputError, NotFoundError } from "../../db/access/library-errors";
import { mechanismToText } from "../../solver/exchange-format";
import type { StepInput } from "../../app/components/library/step-schema";
import { Forbidden } from "../../app/auth/policy.server";

let t: TestDatabase;
const A: Record<string, Actor> = {};
const sp: Record<string, number> = {};

async function actor(email: string): Promise<Actor> {
  const u = await t.db("users").where({ email }).first("id", "role");
  const g = await t.db("memberships").where({ user_id: u.id }).pluck("group_id");
  return { id: u.id, role: u.role, groupIds: g, adminGroupIds: [] };
}

function stepInput(over: Partial<StepInput> = {}): StepInput {
  return {
    label: "A + B → C",
    reactants: [
      { speciesId: sp.A, coef: 1 },
      { speciesId: sp.B, coef: 1 },
    ],
    products: [{ speciesId: sp.C, coef: 1 }],
    reversible: false,
    // ΔG‡ = 80 kJ/mol at 298.15 K, 1 M.
    barrier: { form: "dG", dG: 80, unit: "kJ/mol", T: 298.15, standardState: "1M" },
    validRange: { Tmin: 280, Tmax: 350 },
    provenance: { source: "computed", method: "test method", citation: "test citation" },
    tags: ["test"],
    ...over,
  };
}

beforeAll(async () => {
  t = await freshDatabase();
  await seedDemoIdentities(t.db);
  for (const e of ["viewer", "author", "author2", "curator", "admin"]) A[e] = await actor(`${e}@saddlebook.test`);
  sp.A = (await createSpecies(t.db, A.author, { label: "acetic anhydride", formula: "C4H6O3" })).id;
  sp.B = (await createSpecies(t.db, A.author, { label: "methanol", formula: "CH4O" })).id;
  sp.C = (await createSpecies(t.db, A.author, { label: "methyl acetate + acid (lumped)", formula: "C5H10O4" })).id;
  sp.D = (await createSpecies(t.db, A.author, { label: "water", formula: "H2O" })).id;
});
afterAll(async () => {
  await t?.drop();
});

describe("library steps as written", () => {
  const arrhenius = (A: number) => ({ form: "arrhenius" as const, A, rateUnit: { concentration: "mol/L" as const, time: "s" as const }, Ea: 0, unit: "kJ/mol" as const });

  it("stores a zero-order source, a sink, fractional coefficients and a species on both sides unchanged", async () => {
    const source = await createStep(t.db, A.author, stepInput({ label: undefined, reactants: [], products: [{ speciesId: sp.A, coef: 1 }], barrier: arrhenius(7e-4) }));
    const sink = await createStep(t.db, A.author, stepInput({ label: undefined, reactants: [{ speciesId: sp.A, coef: 2 }], products: [], barrier: arrhenius(3) }));
    const frac = await createStep(
      t.db,
      A.author,
      stepInput({ label: undefined, reactants: [{ speciesId: sp.B, coef: 1.5 }], products: [{ speciesId: sp.B, coef: 0.25 }, { speciesId: sp.C, coef: 77.27 }], barrier: arrhenius(2) }),
    );
    const s = await getStep(t.db, A.author, source.stepId);
    expect(s.version.content.reactants).toEqual([]);
    expect(s.version.label).toBe("∅ → acetic anhydride");
    const k = await getStep(t.db, A.author, sink.stepId);
    expect(k.version.content.products).toEqual([]);
    const f = await getStep(t.db, A.author, frac.stepId);
    expect(f.version.content.products).toEqual([{ species: `s${sp.B}`, coef: 0.25 }, { species: `s${sp.C}`, coef: 77.27 }]);
    const row = await t.db("step_versions").where({ id: frac.versionId }).first("molecularity");
    expect(row.molecularity).toBe(1.5);
    const terms = await t.db("step_version_terms").where({ step_version_id: frac.versionId }).orderBy(["side", "position"]).pluck("coef");
    expect(terms).toEqual([1.5, 0.25, 77.27]); // side "r" sorts before "p" (enum order)
    const src = await t.db("step_versions").where({ id: source.versionId }).first("molecularity");
    expect(src.molecularity).toBe(0);
  });

  it("refuses a step with no species at all and a reversible source, with field messages", async () => {
    await expect(createStep(t.db, A.author, stepInput({ reactants: [], products: [] }))).rejects.toBeInstanceOf(InputError);
    const e = await createStep(
      t.db,
      A.author,
      stepInput({ reactants: [], reversible: true, reactionThermo: { form: "dG", dG: -5, unit: "kJ/mol", T: 298.15, standardState: "1M" } }),
    ).catch((x: unknown) => x);
    expect(e).toBeInstanceOf(InputError);
    expect((e as InputError).fields.reversible).toMatch(/cannot be reversible/);
  });
});

describe("library steps", () => {
  it("creates version 1 as a draft, stores user units and SI, and derives ΔG‡ and k", async () => {
    const r = await createStep(t.db, A.author, stepInput({ barrier: { form: "dG", dG: 19.12, unit: "kcal/mol", T: 298.15, standardState: "1M" } }));
    const d = await getStep(t.db, A.author, r.stepId);
    expect(d.version.number).toBe(1);
    expect(d.version.status).toBe("draft");
    expect(d.version.content.barrier).toMatchObject({ dG: 19.12, unit: "kcal/mol" });
    // 19.12 kcal/mol × 4184 J/kcal (thermochemical calorie, CODATA/common practice) = 79 998.08 J/mol
    expect(d.version.kinetics.barrier).toMatchObject({ form: "dG" });
    expect((d.version.kinetics.barrier as { dG: number }).dG).toBeCloseTo(79998.08, 6);
    expect(d.version.dg298!).toBeCloseTo(79998.08, 3);
  });

  it("makes a new immutable version per edit and refuses a stale base (409) without writing", async () => {
    const r = await createStep(t.db, A.author, stepInput());
    const v2 = await editStep(t.db, A.author, r.stepId, { ...stepInput({ barrier: { form: "dG", dG: 78, unit: "kJ/mol", T: 298.15, standardState: "1M" } }), baseVersion: 1, message: "lower" });
    expect(v2.version).toBe(2);
    await expect(editStep(t.db, A.author, r.stepId, { ...stepInput(), baseVersion: 1 })).rejects.toBeInstanceOf(ConflictError);
    const versions = await listStepVersions(t.db, A.author, r.stepId);
    expect(versions.map((v) => v.number)).toEqual([2, 1]);
    const first = await t.db("step_versions").where({ step_id: r.stepId, number: 1 }).first("content");
    const c = typeof first.content === "string" ? JSON.parse(first.content) : first.content;
    expect(c.barrier.dG).toBe(80);
  });

  it("goes draft → proposed → approved; others see only approved steps; viewers cannot edit", async () => {
    const r = await createStep(t.db, A.author, stepInput({ label: "visibility probe" }));
    await expect(getStep(t.db, A.author2, r.stepId)).rejects.toBeInstanceOf(NotFoundError);
    await expect(getStep(t.db, A.viewer, r.stepId)).rejects.toBeInstanceOf(NotFoundError);
    expect((await getStep(t.db, A.curator, r.stepId)).version.status).toBe("draft");
    await expect(reviewStep(t.db, A.curator, r.stepId, { action: "approve" })).rejects.toBeInstanceOf(Forbidden); // not proposed yet
    await proposeStep(t.db, A.author, r.stepId);
    await expect(reviewStep(t.db, A.author, r.stepId, { action: "approve" })).rejects.toBeInstanceOf(Forbidden);
    await reviewStep(t.db, A.curator, r.stepId, { action: "approve", comment: "ok" });
    const seen = await getStep(t.db, A.viewer, r.stepId);
    expect(seen.version.status).toBe("approved");
    expect(seen.canEdit).toBe(false);
    // An author's edit of an approved step is a draft; others keep seeing the approved version.
    await editStep(t.db, A.author, r.stepId, { ...stepInput({ label: "visibility probe (edited)" }), baseVersion: 3 });
    expect((await getStep(t.db, A.author, r.stepId)).version.number).toBe(4);
    const other = await getStep(t.db, A.author2, r.stepId);
    expect(other.version.number).toBe(3);
    expect(other.versions.map((v) => v.number)).toEqual([3]);
  });

  it("requests changes with a comment and deprecates with a replacement", async () => {
    const a = await createStep(t.db, A.author, stepInput({ label: "to deprecate" }));
    const b = await createStep(t.db, A.author, stepInput({ label: "replacement" }));
    await proposeStep(t.db, A.author, a.stepId);
    await expect(reviewStep(t.db, A.curator, a.stepId, { action: "request_changes" })).rejects.toBeInstanceOf(InputError);
    const back = await reviewStep(t.db, A.curator, a.stepId, { action: "request_changes", comment: "cite the method" });
    expect(back.status).toBe("draft");
    const dep = await reviewStep(t.db, A.curator, a.stepId, { action: "deprecate", replacementStepId: b.stepId });
    expect(dep.status).toBe("deprecated");
    const d = await getStep(t.db, A.viewer, a.stepId);
    expect(d.version.replaced_by_step_id).toBe(b.stepId);
  });

  it("warns nothing silently: unknown species, unknown fields and wrong units are field errors", async () => {
    await expect(createStep(t.db, A.author, stepInput({ reactants: [{ speciesId: 999999, coef: 1 }] }))).rejects.toMatchObject({ fields: { "reactants[0].speciesId": expect.any(String) } });
    await expect(createStep(t.db, A.author, { ...stepInput(), colour: "red" })).rejects.toMatchObject({ fields: { colour: 'Unknown field "colour".' } });
    await expect(createStep(t.db, A.author, stepInput({ barrier: { form: "dG", dG: 80, unit: "kJ" as "kJ/mol", T: 298.15, standardState: "1M" } }))).rejects.toMatchObject({
      fields: { "barrier.unit": expect.any(String) },
    });
    await expect(createStep(t.db, A.viewer, stepInput())).rejects.toBeInstanceOf(Forbidden);
  });

  it("stores labels with HTML or SQL verbatim (escaping is the view's job)", async () => {
    const label = `<script>alert(1)</script>'; DROP TABLE steps; --`;
    const r = await createStep(t.db, A.author, stepInput({ label }));
    expect((await getStep(t.db, A.author, r.stepId)).version.label).toBe(label);
    expect(await t.db.schema.hasTable("steps")).toBe(true);
  });

  it("searches typo-tolerantly with filters and reports k at the chosen temperature", async () => {
    const r = await createStep(t.db, A.author, stepInput({ label: "Methanolysis of anhydride", tags: ["solvolysis"], validRange: { Tmin: 250, Tmax: 400 } }));
    await proposeStep(t.db, A.author, r.stepId);
    await reviewStep(t.db, A.curator, r.stepId, { action: "approve" });
    const res = await searchSteps(t.db, A.viewer, { q: "methanolisys", T: 310 });
    const hit = res.items.find((i) => i.id === r.stepId);
    expect(hit).toBeDefined();
    expect(hit!.status).toBe("approved");
    expect(hit!.kUnit).toBe("L mol⁻¹ s⁻¹");
    // k = (k_B T/h)·exp(−ΔG‡/RT) with c° = 1 M (Eyring; CODATA 2018 constants), ΔG‡ held at 80 kJ/mol.
    const kB = 1.380649e-23, h = 6.62607015e-34, R = 8.314462618;
    expect(hit!.k!).toBeCloseTo(((kB * 310) / h) * Math.exp(-80000 / (R * 310)), 8);
    // Viewers see no drafts.
    const all = await searchSteps(t.db, A.viewer, { limit: 200 });
    expect(all.items.every((i) => i.status === "approved" || i.status === "deprecated")).toBe(true);
    expect((await searchSteps(t.db, A.viewer, { q: "methanol", tmin: 260, tmax: 390 })).items.some((i) => i.id === r.stepId)).toBe(true);
    expect((await searchSteps(t.db, A.viewer, { q: "methanol", tmin: 200 })).items.some((i) => i.id === r.stepId)).toBe(false);
    expect((await searchSteps(t.db, A.viewer, { q: "methanol", molecularity: [1] })).items.some((i) => i.id === r.stepId)).toBe(false);
    expect((await searchSteps(t.db, A.viewer, { tags: ["solvolysis"] })).items.map((i) => i.id)).toEqual([r.stepId]);
  });

  it("paginates with cursors without repeating or skipping", async () => {
    const p1 = await searchSteps(t.db, A.curator, { limit: 3 });
    const p2 = await searchSteps(t.db, A.curator, { limit: 3, cursor: p1.nextCursor });
    const all = await searchSteps(t.db, A.curator, { limit: 6 });
    expect([...p1.items, ...p2.items].map((i) => i.id)).toEqual(all.items.map((i) => i.id));
    await expect(searchSteps(t.db, A.curator, { cursor: "garbage!" })).rejects.toBeInstanceOf(InputError);
  });
});

describe("mechanisms", () => {
  let libVersion: number;
  let libStep: number;
  beforeAll(async () => {
    const r = await createStep(t.db, A.author, stepInput({ label: "pinned library step" }));
    await proposeStep(t.db, A.author, r.stepId);
    await reviewStep(t.db, A.curator, r.stepId, { action: "approve" });
    libStep = r.stepId;
    libVersion = (await t.db("steps").where({ id: r.stepId }).first("current_version_id")).current_version_id;
  });

  const localStep = () => ({
    kind: "local" as const,
    key: "hydrolysis",
    step: {
      id: "hydrolysis",
      label: "local hydrolysis",
      reactants: [
        { species: `s${sp.A}`, coef: 1 },
        { species: `s${sp.D}`, coef: 1 },
      ],
      products: [{ species: `s${sp.C}`, coef: 1 }],
      reversible: false,
      barrier: { form: "dG" as const, dG: 85, unit: "kJ/mol" as const, T: 298.15, standardState: "1M" as const },
    },
  });

  it("creates with a pinned library step and a local step; species are added automatically", async () => {
    const m = await createMechanism(t.db, A.author, { name: "Pin test", visibility: "private", steps: [{ kind: "library", stepVersionId: libVersion }, localStep()] });
    const d = await getMechanism(t.db, A.author, m.id);
    expect(d.resolved.steps.map((s) => s.kind)).toEqual(["library", "local"]);
    expect(d.resolved.steps[0].stepVersionId).toBe(libVersion);
    expect(d.snapshot.species.map((s) => s.speciesId).sort()).toEqual([sp.A, sp.B, sp.C, sp.D].sort());
    // A newer approved version of the pinned step is offered.
    await editStep(t.db, A.curator, libStep, { ...stepInput({ label: "pinned library step", barrier: { form: "dG", dG: 77, unit: "kJ/mol", T: 298.15, standardState: "1M" } }), baseVersion: 3 });
    const after = await getMechanism(t.db, A.author, m.id);
    expect(after.resolved.steps[0].stepVersionId).toBe(libVersion); // still pinned
    expect(Object.values(after.updates)[0]).toMatchObject({ number: 4 });
  });

  it("lets one of two concurrent saves win; the other gets a conflict and nothing is lost", async () => {
    const m = await createMechanism(t.db, A.author, { name: "Race", visibility: "private", steps: [localStep()] });
    const save = (name: string) => updateMechanism(t.db, A.author, m.id, { name, visibility: "private", steps: [localStep()], baseVersion: 1, message: `rename to ${name}` });
    const results = await Promise.allSettled([save("Race A"), save("Race B")]);
    const ok = results.filter((r) => r.status === "fulfilled");
    const failed = results.filter((r) => r.status === "rejected") as PromiseRejectedResult[];
    expect(ok).toHaveLength(1);
    expect(failed).toHaveLength(1);
    expect(failed[0].reason).toBeInstanceOf(ConflictError);
    expect((failed[0].reason as ConflictError).latest.version).toBe(2);
    const versions = await t.db("mechanism_versions").where({ mechanism_id: m.id }).orderBy("number").pluck("name");
    expect(versions).toHaveLength(2);
    expect(versions[0]).toBe("Race");
  });

  it("forks with lineage and shows the diff against the parent with the effect on k", async () => {
    const parent = await createMechanism(t.db, A.author, { name: "Parent", visibility: "group", steps: [{ kind: "library", stepVersionId: libVersion }, localStep()] });
    await expect(forkMechanism(t.db, A.viewer, parent.id)).rejects.toBeInstanceOf(Forbidden);
    const f = await forkMechanism(t.db, A.author2, parent.id, {});
    const fd = await getMechanism(t.db, A.author2, f.id);
    expect(fd.mechanism.forked_from_mechanism_id).toBe(parent.id);
    expect(fd.mechanism.forked_from_version).toBe(1);
    const changed = localStep();
    changed.step.barrier = { ...changed.step.barrier, dG: 80 };
    await updateMechanism(t.db, A.author2, f.id, {
      name: "Fork",
      visibility: "private",
      steps: [changed, { kind: "local", key: "extra", step: { ...localStep().step, id: "extra", label: "extra step" } }],
      baseVersion: 1,
      message: "lower barrier, drop the library step, add one",
    });
    const { diff } = await diffAgainstParent(t.db, A.author2, f.id, 298.15);
    expect(diff.steps.added.map((s) => s.key)).toEqual(["extra"]);
    expect(diff.steps.removed.map((s) => s.key)).toEqual([`L${libStep}`]);
    expect(diff.steps.changed).toHaveLength(1);
    expect(diff.steps.changed[0].fields).toContainEqual({ path: "barrier.dG", old: 85, new: 80 });
    // exp(5000 J/mol / (R·298.15 K)) = 7.52 (Eyring: k ratio = exp(−ΔΔG‡/RT)).
    expect(diff.steps.changed[0].ratio!).toBeCloseTo(Math.exp(5000 / (8.314462618 * 298.15)), 6);
    const p = await getMechanism(t.db, A.author, parent.id);
    expect(p.forks.map((x) => x.id)).toEqual([]); // the fork is private to author2
    const v = await diffVersions(t.db, A.author2, f.id, 1, 2);
    expect(v.steps.added).toHaveLength(1);
  });

  it("applies visibility per role", async () => {
    const priv = await createMechanism(t.db, A.author, { name: "vis private", visibility: "private", steps: [localStep()] });
    const grp = await createMechanism(t.db, A.author, { name: "vis group", visibility: "group", steps: [localStep()] });
    const pub = await createMechanism(t.db, A.author, { name: "vis public", visibility: "public", steps: [localStep()] });
    const names = async (a: Actor | null) => (await listMechanisms(t.db, a, { q: "vis ", limit: 200 })).items.map((i) => i.name).sort();
    expect(await names(A.author)).toEqual(["vis group", "vis private", "vis public"]);
    expect(await names(A.author2)).toEqual(["vis group", "vis public"]);
    expect(await names({ ...A.author2, groupIds: [] })).toEqual(["vis public"]);
    expect(await names(A.admin)).toEqual(["vis group", "vis private", "vis public"]);
    expect(await names(null)).toEqual(["vis public"]);
    await expect(getMechanism(t.db, A.author2, priv.id)).rejects.toBeInstanceOf(NotFoundError);
    await expect(updateMechanism(t.db, A.author2, grp.id, { name: "x", steps: [localStep()], baseVersion: 1, message: "m" })).rejects.toBeInstanceOf(Forbidden);
    expect((await getMechanism(t.db, A.viewer, pub.id)).canWrite).toBe(false);
  });

  it("exports to the exchange format and imports back identically, in one transaction", async () => {
    const m = await createMechanism(t.db, A.author, { name: "Round trip <b>bold</b>", visibility: "private", steps: [{ kind: "library", stepVersionId: libVersion }, localStep()] });
    const doc = await exportMechanism(t.db, A.author, m.id);
    const text = mechanismToText(doc);
    const imported = await importMechanism(t.db, A.author2, text);
    const again = await exportMechanism(t.db, A.author2, imported.id);
    expect(mechanismToText(again)).toBe(text);
  });

  it("rejects bad imports with line/field errors and stores nothing", async () => {
    const before = await t.db("mechanisms").count({ n: "*" }).first();
    await expect(importMechanism(t.db, A.author, '{"format": "saddlebook.mechanism",\n "version": 1,\n "about": {')).rejects.toMatchObject({ message: expect.stringMatching(/line 3/) });
    const doc = await exportMechanism(t.db, A.author, (await createMechanism(t.db, A.author, { name: "src", steps: [localStep()] })).id);
    const withUnknown = mechanismToText({ ...doc, steps: [{ ...doc.steps[0], colour: "red" } as (typeof doc.steps)[0]] });
    await expect(importMechanism(t.db, A.author, withUnknown)).rejects.toMatchObject({ fields: { "steps[0].colour": expect.stringMatching(/line \d+/) } });
    const badSpecies = { ...doc, steps: [{ ...doc.steps[0], products: [{ species: "nope", coef: 1 }] }] };
    await expect(importMechanism(t.db, A.author, badSpecies)).rejects.toMatchObject({ fields: { "steps[0].products[0].species": expect.any(String) } });
    await expect(importMechanism(t.db, A.author, " ".repeat(IMPORT_LIMIT_BYTES + 1))).rejects.toMatchObject({ message: expect.stringMatching(/2 MB/) });
    const after = await t.db("mechanisms").count({ n: "*" }).first();
    expect(Number(after!.n)).toBe(Number(before!.n) + 1); // only "src"
  });
});
