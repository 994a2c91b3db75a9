/**
 * Runs of a mechanism shared with a group: its members read them (detail, list, results CSV,
 * the run page and the comparison) but cannot cancel them; someone outside the group gets 404,
 * as for a run that does not exist. A run of a public mechanism stays private to its owner.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { apiCaller } from "../support/api-auth-stand-in";
import { who } from "../support/page-user-stand-in";
import { freshDatabase, type TestDatabase } from "../support/db";
import type { SessionUser } from "../../app/auth/current-user.server";

vi.mock("~/auth/api-auth.server", () => import("../support/api-auth-stand-in"));
vi.mock("~/auth/current-user.server", () => import("../support/page-user-stand-in"));

let t: TestDatabase;
const U: Record<"author" | "member" | "outsider", SessionUser> = {} as never;
let sharedRunId = 0;
let publicMechRunId = 0;

const args = (request: Request, params: Record<string, string> = {}) => ({ request, params, context: {} }) as never;
function as(u: SessionUser) {
  Object.assign(apiCaller, { userId: u.id, email: u.email, name: u.name, role: u.role, groupIds: u.groupIds });
  who.user = u;
}
async function apiGet(path: string, params: Record<string, string>, mod: { loader: (a: never) => unknown }) {
  const res = (await mod.loader(args(new Request(`http://localhost/api/v1${path}`), params))) as Response;
  return res;
}

beforeAll(async () => {
  t = await freshDatabase();
  process.env.DATABASE_URL = t.url;
  const { seedDemo } = await import("../../db/seeds/index");
  await seedDemo(t.db);
  const user = async (email: string): Promise<SessionUser> => {
    const u = await t.db("users").where({ email }).first();
    return { id: u.id, email: u.email, name: u.name, role: u.role, groupIds: await t.db("memberships").where({ user_id: u.id }).pluck("group_id"), adminGroupIds: [] };
  };
  U.author = await user("author@saddlebook.test");
  U.member = await user("author2@saddlebook.test");
  const [oid] = await t.db("users").insert({ email: "outsider@example.test", name: "Outside reader", role: "author" });
  U.outsider = await user("outsider@example.test");
  expect(U.member.groupIds.length).toBe(1);
  expect(U.outsider.groupIds).toEqual([]);
  expect(oid).toBe(U.outsider.id);

  const shared = await t.db("mechanisms").where({ owner_id: U.author.id, visibility: "group" }).first("id");
  const open = await t.db("mechanisms").where({ owner_id: U.author.id, visibility: "public" }).first("id");
  const { loadMechanismDocument } = await import("../../app/compute/mechanism-source.server");
  const { startRun } = await import("../../app/compute/run-api.server");
  const { getRun } = await import("../../db/access/runs.server");
  const start = async (mechanismId: number) => {
    const doc = await loadMechanismDocument(t.db, U.author, mechanismId);
    if (!doc.ok) throw new Error(doc.message);
    const initial = Object.fromEntries(doc.document.species.map((s) => [s.id, { value: 0.1, unit: "mol/L" }]));
    const r = await startRun(t.db, U.author, { mechanismId, conditions: { temperature: { value: 298.15, unit: "K" }, initial, endTime: { value: 10, unit: "s" } } } as never);
    if (!r.ok) throw new Error(await r.response.text());
    return r.id;
  };
  sharedRunId = await start(shared.id);
  publicMechRunId = await start(open.id);
  for (const id of [sharedRunId, publicMechRunId]) {
    const until = Date.now() + 30_000;
    while (!["done", "failed", "cancelled"].includes((await getRun(t.db, id))!.status)) {
      if (Date.now() > until) throw new Error(`run ${id} did not end`);
      await new Promise((r) => setTimeout(r, 100));
    }
  }
  expect((await getRun(t.db, sharedRunId))!.visibility).toBe("private");
  expect((await getRun(t.db, sharedRunId))!.status).toBe("done");
});

afterAll(async () => {
  const { getComputeService } = await import("../../app/compute/pool.server");
  const { getDb } = await import("../../db/client.server");
  await getComputeService(getDb()).destroy();
  await getDb().destroy();
  await t?.drop();
});

describe("runs of a mechanism shared with a group", () => {
  it("the API shows a group member the run, its results CSV and lists it; an outsider gets 404 and an empty list", async () => {
    const one = await import("../../app/routes/api.v1.runs.$id");
    const csv = await import("../../app/routes/api.v1.runs.$id.results-csv");
    const list = await import("../../app/routes/api.v1.runs");
    const id = String(sharedRunId);

    as(U.member);
    expect((await apiGet(`/runs/${id}`, { id }, one)).status).toBe(200);
    const c = await apiGet(`/runs/${id}/results.csv`, { id }, csv);
    expect(c.status).toBe(200);
    expect(await c.text()).toMatch(/^time \(s\),T \(K\),/m);
    const ids = ((await (await apiGet("/runs", {}, list)).json()) as any).runs.map((r: any) => r.id);
    expect(ids).toContain(sharedRunId);
    expect(ids).not.toContain(publicMechRunId);
    // A run of a public mechanism stays the owner's: a public mechanism is not a group share.
    expect((await apiGet(`/runs/${publicMechRunId}`, { id: String(publicMechRunId) }, one)).status).toBe(404);

    as(U.outsider);
    const miss = await apiGet(`/runs/${id}`, { id }, one);
    expect(miss.status).toBe(404);
    expect(((await miss.json()) as any).error.code).toBe("not_found");
    expect((await apiGet(`/runs/${id}/results.csv`, { id }, csv)).status).toBe(404);
    const none = ((await (await apiGet("/runs", {}, list)).json()) as any).runs.map((r: any) => r.id);
    expect(none).not.toContain(sharedRunId);
  });

  it("a group member reads the run read only: cancelling is refused", async () => {
    const cancel = await import("../../app/routes/api.v1.runs.$id.cancel");
    as(U.member);
    const res = (await cancel.action(args(new Request(`http://localhost/api/v1/runs/${sharedRunId}/cancel`, { method: "POST" }), { id: String(sharedRunId) }))) as Response;
    expect(res.status).toBe(403);
  });

  it("the runs list, run page and comparison open for a group member and not for an outsider", async () => {
    const runsPage = await import("../../app/routes/runs");
    const runPage = await import("../../app/routes/runs.$id");
    const compare = await import("../../app/routes/runs.compare");
    const id = String(sharedRunId);
    const page = (path: string) => new Request(`http://localhost${path}`);

    as(U.member);
    const listed = (await runsPage.loader(args(page("/runs")))) as any;
    expect(JSON.stringify(listed)).toContain(`"id":${sharedRunId}`);
    const detail = (await runPage.loader(args(page(`/runs/${id}`), { id }))) as any;
    expect(detail.run.id).toBe(sharedRunId);
    expect(detail.run.canCancel).toBe(false);
    const cmp = (await compare.loader(args(page(`/runs/compare?run=${id}&run=${id}`)))) as any;
    expect(cmp.problem).toBeNull();
    expect(cmp.runs).toHaveLength(2);

    as(U.outsider);
    expect(JSON.stringify(await runsPage.loader(args(page("/runs"))))).not.toContain(`"id":${sharedRunId}`);
    const err = await Promise.resolve(runPage.loader(args(page(`/runs/${id}`), { id }))).then(
      () => null,
      (e) => e,
    );
    expect(err).toBeInstanceOf(Response);
    expect((err as Response).status).toBe(404);
    const cmp2 = (await compare.loader(args(page(`/runs/compare?run=${id}&run=${id}`)))) as any;
    expect(cmp2.problem).toMatch(/no run/);
  });
});
