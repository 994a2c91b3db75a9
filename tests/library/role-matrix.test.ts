// The role matrix of the library and mechanism API: who may read, create, propose, review,
// write and fork — every answer comes from the policy module through the handlers.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { freshDatabase, type TestDatabase } from "../support/db";
import { seedDemo } from "../../db/seeds/index";
import type { Actor } from "../../app/auth/policy.server";
import * as api from "../../app/api/library-api.server";

let t: TestDatabase;
const A: Record<string, Actor> = {};
const U = "http://app.test/api/v1";
const get = (p: string) => new Request(U + p);
const post = (p: string, body: unknown) => new Request(U + p, { method: "POST", body: JSON.stringify(body), headers: { "Content-Type": "application/json" } });

let draftId: number; // author's draft step
let proposedId: number; // a proposed step
let privateMech: number; // author's private mechanism
let groupMech: number; // author's group mechanism
let stepBody: Record<string, unknown>;

beforeAll(async () => {
  t = await freshDatabase();
  await seedDemo(t.db);
  for (const e of ["viewer", "author", "author2", "curator", "admin"]) {
    const u = await t.db("users").where({ email: `${e}@saddlebook.test` }).first("id", "role");
    A[e] = { id: u.id, role: u.role, groupIds: await t.db("memberships").where({ user_id: u.id }).pluck("group_id") };
  }
  A.outsider = { id: A.author2.id, role: "author", groupIds: [] };
  const label = (l: string) => t.db("steps as s").join("step_versions as v", "v.id", "s.current_version_id").where("v.label", "like", l).first("s.id");
  draftId = (await label("Acyl transfer to allyl%")).id;
  proposedId = (await label("Acyl transfer to phenol%")).id;
  const sp = await t.db("species").whereIn("label", ["water", "acetic anhydride", "acetic acid"]).select("id", "label");
  const id = (l: string) => sp.find((s: { label: string }) => s.label === l).id;
  stepBody = {
    reactants: [{ speciesId: id("acetic anhydride"), coef: 1 }, { speciesId: id("water"), coef: 1 }],
    products: [{ speciesId: id("acetic acid"), coef: 2 }],
    barrier: { form: "dG", dG: 85, unit: "kJ/mol", T: 298.15, standardState: "1M" },
    provenance: { source: "estimated" },
  };
  const mk = async (visibility: string) =>
    (await (await api.mechanismCreate(t.db, A.author, post("/mechanisms", { name: `matrix ${visibility}`, visibility, steps: [] }))).json()).id as number;
  privateMech = await mk("private");
  groupMech = await mk("group");
});
afterAll(async () => {
  await t?.drop();
});

const roles = ["viewer", "author", "author2", "outsider", "curator", "admin"] as const;

describe("library API role matrix", () => {
  it.each([
    // [role, sees draft of author, sees proposed step, may create step, may review proposed]
    ["viewer", 404, 404, 403, 404],
    ["author", 200, 200, 201, 403],
    ["author2", 404, 404, 201, 404],
    ["outsider", 404, 404, 201, 404],
    ["curator", 200, 200, 201, 200],
    ["admin", 200, 200, 201, 200],
  ] as const)("%s: read draft %i, read proposed %i, create %i, review %i", async (role, readDraft, readProposed, create, review) => {
    const a = A[role];
    expect((await api.stepGet(t.db, a, get(`/steps/${draftId}`), String(draftId))).status).toBe(readDraft);
    expect((await api.stepGet(t.db, a, get(`/steps/${proposedId}`), String(proposedId))).status).toBe(readProposed);
    expect((await api.stepsCreate(t.db, a, post("/steps", stepBody))).status).toBe(create);
    // Review with an invalid action first (400 for everyone), then request changes (does not consume the proposal).
    const r = await api.stepReview(t.db, a, post(`/steps/${proposedId}/review`, { action: "request_changes", comment: "matrix probe" }), String(proposedId));
    expect(r.status).toBe(review);
    if (r.status === 200) {
      // Put it back in the queue for the next role.
      await api.stepPropose(t.db, A.author, post(`/steps/${proposedId}/propose`, {}), String(proposedId));
    }
  });
});

describe("mechanism API role matrix", () => {
  it.each([
    // [role, read private, read group, write group, fork group]
    ["viewer", 404, 200, 403, 403],
    ["author", 200, 200, 200, 201],
    ["author2", 404, 200, 403, 201],
    ["outsider", 404, 404, 404, 404],
    ["curator", 404, 200, 403, 201],
    ["admin", 200, 200, 200, 201],
  ] as const)("%s: read private %i, read group %i, write group %i, fork group %i", async (role, readPrivate, readGroup, writeGroup, forkGroup) => {
    const a = A[role];
    expect((await api.mechanismGet(t.db, a, get(`/mechanisms/${privateMech}`), String(privateMech))).status).toBe(readPrivate);
    const g = await api.mechanismGet(t.db, a, get(`/mechanisms/${groupMech}`), String(groupMech));
    expect(g.status).toBe(readGroup);
    const current = (await t.db("mechanisms").where({ id: groupMech }).first()).current_version;
    const w = await api.mechanismUpdate(
      t.db,
      a,
      new Request(`${U}/mechanisms/${groupMech}`, { method: "PUT", body: JSON.stringify({ name: `matrix group`, visibility: "group", steps: [], message: `by ${role}`, baseVersion: current }), headers: { "Content-Type": "application/json" } }),
      String(groupMech),
    );
    expect(w.status).toBe(writeGroup);
    expect((await api.mechanismFork(t.db, a, post(`/mechanisms/${groupMech}/fork`, {}), String(groupMech))).status).toBe(forkGroup);
  });

  it("anonymous callers see public mechanisms only", async () => {
    const list = await (await api.mechanismsList(t.db, null, get("/mechanisms"))).json();
    expect(list.items.every((m: { visibility: string }) => m.visibility === "public")).toBe(true);
    expect((await api.mechanismGet(t.db, null, get(`/mechanisms/${groupMech}`), String(groupMech))).status).toBe(404);
  });
  it("covers every role", () => expect(roles.length).toBe(6));
});
