// Editing from the workbench graph through the workbench route's action, on a fresh database
// with the demo seed: the owner adds a library step (pinned to its version) and a local step and
// changes a barrier — each a new mechanism version with the message given; a save based on a
// stale version is refused with 409 and stores nothing; a viewer is refused; bad input is 400.
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { who } from "../support/page-user-stand-in";
import { freshDatabase, type TestDatabase } from "../support/db";
import { seedDemo } from "../../db/seeds/index";
import type { SessionUser } from "../../app/auth/current-user.server";

vi.mock("~/auth/current-user.server", () => import("../support/page-user-stand-in"));
vi.mock("~/auth/csrf.server", () => ({ assertCsrf: async () => {}, csrfToken: async () => "" }));

let t: TestDatabase;
const users: Record<string, SessionUser> = {};
let mechId = 0;

type Answer = { ok: boolean; version?: number; message?: string; conflict?: { version: number } };
async function edit(payload: unknown): Promise<{ status: number; body: Answer }> {
  const wb = await import("../../app/routes/mechanisms.$id.workbench");
  const form = new FormData();
  form.set("intent", "graph-edit");
  form.set("payload", JSON.stringify(payload));
  const r = (await wb.action({ request: new Request(`http://app.test/mechanisms/${mechId}/workbench`, { method: "POST", body: form }), params: { id: String(mechId) }, context: {} } as never)) as unknown;
  if (r && typeof r === "object" && "init" in r && "data" in r) return { status: (r as { init: { status: number } }).init.status, body: (r as { data: Answer }).data };
  return { status: 200, body: r as Answer };
}
const versionCount = async () => (await t.db("mechanism_versions").where({ mechanism_id: mechId }).count({ n: "*" }))[0].n as number;
const current = async () => (await t.db("mechanisms").where({ id: mechId }).first("current_version")).current_version as number;
const snapshot = async (n: number) => {
  const v = await t.db("mechanism_versions").where({ mechanism_id: mechId, number: n }).first("content", "message");
  return { ...(typeof v.content === "string" ? JSON.parse(v.content) : v.content), message: v.message as string };
};

beforeAll(async () => {
  t = await freshDatabase();
  process.env.DATABASE_URL = t.url;
  await seedDemo(t.db);
  for (const e of ["viewer", "author"]) {
    const u = await t.db("users").where({ email: `${e}@saddlebook.test` }).first();
    const g = await t.db("memberships").where({ user_id: u.id }).pluck("group_id");
    users[e] = { id: u.id, email: u.email, name: u.name, role: u.role, groupIds: g, adminGroupIds: [] };
  }
  mechId = (await t.db("mechanisms").where({ owner_id: users.author.id }).where("name", "like", "Illustrative acetylation cycle%").first("id")).id;
});
afterAll(async () => {
  const { getDb } = await import("../../db/client.server");
  await getDb().destroy();
  await t?.drop();
});

describe("workbench graph edits", () => {
  it("the loader offers editing to the owner only, with pinned versions for the side panel", async () => {
    const wb = await import("../../app/routes/mechanisms.$id.workbench");
    const load = async () => (await wb.loader({ request: new Request(`http://app.test/mechanisms/${mechId}/workbench`), params: { id: String(mechId) }, context: {} } as never)) as Awaited<ReturnType<typeof wb.loader>>;
    who.user = users.author;
    const mine = await load();
    expect(mine.editable).toBe(true);
    expect(Object.values(mine.entries).some((e) => e.kind === "library" && e.versionNumber! > 0)).toBe(true);
    expect(mine.allSpecies.length).toBeGreaterThan(0);
    who.user = users.viewer;
    const theirs = await load();
    expect(theirs.editable).toBe(false);
    expect(theirs.allSpecies).toEqual([]);
  });

  it("a pinned step moves to its newer approved version", async () => {
    who.user = users.author;
    const { getMechanism } = await import("../../db/access/mechanisms.server");
    const d = await getMechanism(t.db, users.author, mechId);
    const [key, offer] = Object.entries(d.updates)[0];
    const base = await current();
    const r = await edit({ edit: { op: "use-update", key }, message: "Use the newer approved version.", baseVersion: base });
    expect(r.status).toBe(200);
    const snap = await snapshot(base + 1);
    expect(snap.steps.find((e: { key: string }) => e.key === key).stepVersionId).toBe(offer.stepVersionId);
    const again = await edit({ edit: { op: "use-update", key }, message: "again", baseVersion: base + 1 });
    expect(again.status).toBe(400);
  });

  it("the owner adds a pinned library step and a local step, and edits a barrier", async () => {
    who.user = users.author;
    const base = await current();
    const snap0 = await snapshot(base);
    const pinned = new Set(snap0.steps.filter((e: { kind: string }) => e.kind === "library").map((e: { stepId: number }) => e.stepId));
    const candidates = await t.db("step_versions as v").join("steps as s", "s.current_version_id", "v.id").where("v.status", "approved").select("v.id", "v.step_id");
    const lib = candidates.find((c: { step_id: number }) => !pinned.has(c.step_id));
    expect(lib).toBeTruthy();

    const a = await edit({ edit: { op: "add-library", stepVersionId: lib.id }, message: "Added a library step from the graph.", baseVersion: base });
    expect(a.status).toBe(200);
    expect(a.body.version).toBe(base + 1);
    const snap1 = await snapshot(base + 1);
    expect(snap1.message).toBe("Added a library step from the graph.");
    expect(snap1.steps.some((e: { kind: string; stepVersionId?: number }) => e.kind === "library" && e.stepVersionId === lib.id)).toBe(true);

    const [sp1, sp2] = snap1.species.map((s: { key: string }) => s.key);
    const step = { id: "local-x", label: "Graph local step", reactants: [{ species: sp1, coef: 1 }], products: [{ species: sp2, coef: 1 }], reversible: false, barrier: { form: "dG", dG: 21.5, unit: "kcal/mol", T: 298.15, standardState: "1M" } };
    const b = await edit({ edit: { op: "add-local", step }, message: "Added a local step.", baseVersion: base + 1 });
    expect(b.status).toBe(200);
    const snap2 = await snapshot(base + 2);
    const local = snap2.steps.find((e: { kind: string; step?: { label?: string } }) => e.kind === "local" && e.step?.label === "Graph local step");
    expect(local.step.barrier).toEqual(step.barrier);

    // Side panel: change the barrier and make it reversible with a reaction free energy.
    const c = await edit({ edit: { op: "set-step", key: local.key, step: { ...step, reversible: true, barrier: { ...step.barrier, dG: 22 }, reactionThermo: { form: "dG", dG: -10, unit: "kJ/mol", T: 298.15, standardState: "1M" } } }, message: "Raised the barrier.", baseVersion: base + 2 });
    expect(c.status).toBe(200);
    const snap3 = await snapshot(base + 3);
    const edited = snap3.steps.find((e: { key: string }) => e.key === local.key);
    expect(edited.step.barrier.dG).toBe(22);
    expect(edited.step.reversible).toBe(true);

    // A pinned library step replaced with a local edit keeps its origin.
    const libKey = snap3.steps.find((e: { kind: string }) => e.kind === "library").key;
    const d = await edit({ edit: { op: "set-step", key: libKey, step }, message: "Local edit of a library step.", baseVersion: base + 3 });
    expect(d.status).toBe(200);
    const snap4 = await snapshot(base + 4);
    const replaced = snap4.steps.find((e: { key: string }) => e.key === libKey);
    expect(replaced.kind).toBe("local");
    expect(replaced.fromStepVersionId).toBeGreaterThan(0);
  });

  it("a stale base version is refused with 409, the newer change described, nothing stored", async () => {
    who.user = users.author;
    const before = await versionCount();
    const cur = await current();
    const r = await edit({ edit: { op: "use-update", key: "nope" }, message: "stale", baseVersion: cur - 1 });
    // the unknown key would be 400; a real key with a stale base:
    const snap = await snapshot(cur);
    const key = snap.steps[0].key;
    const stale = await edit({ edit: { op: "set-step", key, step: snap.steps[0].step ?? { id: key, reactants: [{ species: snap.species[0].key, coef: 1 }], products: [{ species: snap.species[1].key, coef: 1 }], reversible: false, barrier: { form: "dG", dG: 80, unit: "kJ/mol", T: 298.15, standardState: "1M" } } }, message: "stale edit", baseVersion: cur - 1 });
    expect(stale.status).toBe(409);
    expect(stale.body.conflict?.version).toBe(cur);
    expect(stale.body.message).toMatch(/version/);
    expect(r.status).toBe(400);
    expect(await versionCount()).toBe(before);
  });

  it("a viewer is refused and bad input is a 400 with nothing stored", async () => {
    const before = await versionCount();
    const cur = await current();
    who.user = users.viewer;
    const v = await edit({ edit: { op: "add-library", stepVersionId: 1 }, message: "viewer", baseVersion: cur });
    expect([403, 404]).toContain(v.status);
    who.user = users.author;
    const bad = await edit({ edit: { op: "add-local", step: { id: "x", reactants: [], products: [], reversible: false, barrier: { form: "dG" } } }, message: "bad", baseVersion: cur });
    expect(bad.status).toBe(400);
    const noMsg = await edit({ edit: { op: "add-library", stepVersionId: 1 }, message: " ", baseVersion: cur });
    expect(noMsg.status).toBe(400);
    expect(noMsg.body.message).toMatch(/Say what changed/);
    expect(await versionCount()).toBe(before);
  });
});
