// Library and mechanism page loaders and actions against the demo seed, with the signed-in
// user mocked (the session itself is tested with sign-in).
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { who } from "../support/page-user-stand-in";
import { freshDatabase, type TestDatabase } from "../support/db";
import { seedDemo } from "../../db/seeds/index";
import type { SessionUser } from "../../app/auth/current-user.server";

vi.mock("~/auth/current-user.server", () => import("../support/page-user-stand-in"));
vi.mock("~/auth/csrf.server", () => ({ assertCsrf: async () => {}, csrfToken: async () => "" }));

let t: TestDatabase;
const users: Record<string, SessionUser> = {};
const args = (url: string, params: Record<string, string> = {}, init?: RequestInit) => ({ request: new Request(`http://app.test${url}`, init), params, context: {} }) as never;
const post = (url: string, fields: Record<string, string>, params: Record<string, string> = {}) => {
  const body = new FormData();
  for (const [k, v] of Object.entries(fields)) body.set(k, v);
  return args(url, params, { method: "POST", body });
};
async function statusOf(p: Promise<unknown>): Promise<number> {
  try {
    const r = await p;
    return r instanceof Response ? r.status : ((r as { init?: { status?: number } })?.init?.status ?? 200);
  } catch (e) {
    if (e instanceof Response) return e.status;
    return (e as { init?: { status?: number } }).init?.status ?? 500;
  }
}

beforeAll(async () => {
  t = await freshDatabase();
  process.env.DATABASE_URL = t.url;
  await seedDemo(t.db);
  for (const e of ["viewer", "author", "author2", "curator"]) {
    const u = await t.db("users").where({ email: `${e}@saddlebook.test` }).first();
    const g = await t.db("memberships").where({ user_id: u.id }).pluck("group_id");
    users[e] = { id: u.id, email: u.email, name: u.name, role: u.role, groupIds: g, adminGroupIds: [] };
  }
});
afterAll(async () => {
  const { getDb } = await import("../../db/client.server");
  await getDb().destroy();
  await t?.drop();
});

describe("library pages", () => {
  it("search page: typo-tolerant, k at a temperature in °C, sign-in required", async () => {
    const lib = await import("../../app/routes/library");
    who.user = null;
    expect(await statusOf(lib.loader(args("/library")))).toBe(302);
    who.user = users.viewer;
    const d = (await lib.loader(args("/library?q=ketene%20trapinng&T=50&Tunit=C"))) as Awaited<ReturnType<typeof lib.loader>>;
    expect(d.items.length).toBeGreaterThan(0);
    expect(d.items[0].label).toMatch(/ketene/i);
    expect(d.query.T).toBeCloseTo(323.15, 9);
    expect(d.items.every((i) => i.status === "approved" || i.status === "deprecated")).toBe(true);
  });

  it("step page shows derived forms, k(T) over the validity range and history; editor keeps input on errors", async () => {
    who.user = users.author;
    const stepId = (await t.db("steps as s").join("step_versions as v", "v.id", "s.current_version_id").where("v.label", "like", "Acyl transfer to benzyl%").first("s.id")).id;
    const page = await import("../../app/routes/steps.$id");
    const d = (await page.loader(args(`/steps/${stepId}`, { id: String(stepId) }))) as Awaited<ReturnType<typeof page.loader>>;
    expect(d.kT.length).toBe(9);
    expect(d.kT[0].T).toBeCloseTo(273.15, 6);
    expect(d.derived!.kUnit).toBe("L mol⁻¹ s⁻¹");
    expect(d.versions.length).toBeGreaterThan(1);
    expect(d.changes.some((c) => c.path === "barrier.dG")).toBe(true);
    const editor = await import("../../app/routes/library.new");
    const bad = await editor.action(post("/library/new", { intent: "save", payload: JSON.stringify({ reactants: [], products: [], barrier: { form: "dG" }, provenance: { source: "computed" } }) }));
    expect(await statusOf(Promise.resolve(bad))).toBe(400);
    const badData = (bad as unknown as { data: { fields: Record<string, string> } }).data;
    expect(Object.keys(badData.fields)).toContain("reactants");
    who.user = users.viewer;
    expect(await statusOf(editor.loader(args("/library/new")))).toBe(403);
  });
});

describe("mechanism pages", () => {
  it("a stale save is refused with the newer version shown; nothing is overwritten", async () => {
    who.user = users.author;
    const m = await t.db("mechanisms").where("name", "like", "Illustrative acetylation cycle%").first();
    const page = await import("../../app/routes/mechanisms.$id");
    const d = (await page.loader(args(`/mechanisms/${m.id}`, { id: String(m.id) }))) as Awaited<ReturnType<typeof page.loader>>;
    expect(d.canWrite).toBe(true);
    expect(d.steps.some((s) => s.update)).toBe(true);
    const payload = (name: string) =>
      JSON.stringify({
        name,
        visibility: d.visibility,
        species: d.species.map((s) => ({ key: s.key, speciesId: s.speciesId })),
        steps: d.steps.map((s) => (s.kind === "library" ? { kind: "library", key: s.key, stepVersionId: s.stepVersionId } : { kind: "local", key: s.key, step: s.doc })),
        message: `rename to ${name}`,
        baseVersion: d.currentVersion,
      });
    expect(await statusOf(page.action(post(`/mechanisms/${m.id}`, { intent: "save", payload: payload("first") }, { id: String(m.id) })))).toBe(302);
    const stale = await page.action(post(`/mechanisms/${m.id}`, { intent: "save", payload: payload("second") }, { id: String(m.id) }));
    expect(await statusOf(Promise.resolve(stale))).toBe(409);
    expect((stale as unknown as { data: { conflict: { version: number } } }).data.conflict.version).toBe(d.currentVersion + 1);
    expect((await t.db("mechanisms").where({ id: m.id }).first()).name).toBe("first");
  });

  it("fork page shows the diff against the parent with the effect on k", async () => {
    who.user = users.author;
    const fork = await t.db("mechanisms").where("name", "like", "Cycle with faster acyl transfer%").first();
    const page = await import("../../app/routes/mechanisms.$id.lineage");
    const d = (await page.loader(args(`/mechanisms/${fork.id}/lineage?T=310`, { id: String(fork.id) }))) as Awaited<ReturnType<typeof page.loader>>;
    expect(d.diff.steps.added.length).toBe(1);
    const changed = d.diff.steps.changed[0];
    expect(changed.fields.find((f) => f.path === "barrier.dG")).toMatchObject({ old: 66, new: 61 });
    // The step carries ΔH‡ = 44 kJ/mol beside ΔG‡(298.15 K): lowering ΔG‡ by 5 kJ/mol at fixed ΔH‡
    // raises ΔS‡ by 5000/298.15 J/(mol·K), so k(T) rises by exp(5000 J/mol / (R · 298.15 K)) = 7.516
    // at every T (Eyring, ln k = ln(k_B T/h) − ΔH‡/RT + ΔS‡/R; R from CODATA 2018).
    expect(changed.ratio!).toBeCloseTo(Math.exp(5000 / (8.314462618 * 298.15)), 6);
    who.user = users.viewer;
    const fp = await import("../../app/routes/mechanisms.$id");
    expect(await statusOf(fp.action(post(`/mechanisms/${fork.id}`, { intent: "fork" }, { id: String(fork.id) })))).toBe(403);
  });

  it("shows labels with HTML as text (never as markup)", async () => {
    who.user = users.author;
    const list = await import("../../app/routes/mechanisms");
    const r = await list.action(post("/mechanisms", { intent: "create", name: `<img src=x onerror=alert(1)>'; DROP TABLE mechanisms; --`, visibility: "private" }));
    expect(await statusOf(Promise.resolve(r))).toBe(302);
    const d = (await list.loader(args("/mechanisms?mine=1"))) as Awaited<ReturnType<typeof list.loader>>;
    expect(d.items.some((m) => m.name.startsWith("<img"))).toBe(true);
    expect(await t.db.schema.hasTable("mechanisms")).toBe(true);
  });
});
