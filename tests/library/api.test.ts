// REST handlers of /api/v1/steps, /mechanisms, /species against the real MariaDB, called
// with explicit actors (the route modules only add the sign-in lookup), plus the OpenAPI description.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { freshDatabase, type TestDatabase } from "../support/db";
import { seedDemo } from "../../db/seeds/index";
import type { Actor } from "../../app/auth/policy.server";
import * as api from "../../app/api/library-api.server";
import { openApiDocument } from "../../app/api/library-openapi.server";
import { IMPORT_LIMIT_BYTES } from "../../db/access/mechanisms.server";
import { readFileSync } from "node:fs";

let t: TestDatabase;
const A: Record<string, Actor> = {};
const U = "http://app.test/api/v1";

const get = (path: string, headers: HeadersInit = {}) => new Request(U + path, { headers });
const send = (method: string, path: string, body: unknown, headers: Record<string, string> = {}) =>
  new Request(U + path, { method, body: typeof body === "string" ? body : JSON.stringify(body), headers: { "Content-Type": "application/json", ...headers } });
const json = async (r: Response) => (await r.json()) as Record<string, any>;

beforeAll(async () => {
  t = await freshDatabase();
  await seedDemo(t.db);
  for (const e of ["viewer", "author", "author2", "curator", "admin"]) {
    const u = await t.db("users").where({ email: `${e}@saddlebook.test` }).first("id", "role");
    A[e] = { id: u.id, role: u.role, groupIds: await t.db("memberships").where({ user_id: u.id }).pluck("group_id") };
  }
});
afterAll(async () => {
  await t?.drop();
});

describe("steps API", () => {
  it("searches typo-tolerantly and pages with cursors", async () => {
    const r = await api.stepsList(t.db, A.viewer, get("/steps?q=benzyl%20alcohl&T=323.15&limit=3"));
    expect(r.status).toBe(200);
    const b = await json(r);
    expect(b.items.length).toBe(3);
    expect(b.items[0].reaction.toLowerCase()).toContain("benzyl");
    expect(b.items[0].T).toBe(323.15);
    expect(b.nextCursor).toBeTruthy();
    const next = await json(await api.stepsList(t.db, A.viewer, get(`/steps?q=benzyl%20alcohl&T=323.15&limit=3&cursor=${b.nextCursor}`)));
    expect(next.items.map((i: { id: number }) => i.id)).not.toContain(b.items[0].id);
  });

  it("rejects unknown query parameters and bad filters with the error shape", async () => {
    const r = await api.stepsList(t.db, A.viewer, get("/steps?colour=red&molecularity=7"));
    expect(r.status).toBe(400);
    const b = await json(r);
    expect(b.error.code).toBe("invalid_input");
    expect(b.error.fields.colour).toMatch(/Unknown/);
  });

  it("creates a step; malformed JSON, unknown fields and wrong units are clear 400s", async () => {
    const sp = await t.db("species").whereIn("label", ["acetic anhydride", "water", "acetic acid"]).select("id", "label");
    const id = (l: string) => sp.find((s: { label: string }) => s.label === l).id;
    const body = {
      label: "API hydrolysis",
      reactants: [{ speciesId: id("acetic anhydride"), coef: 1 }, { speciesId: id("water"), coef: 1 }],
      products: [{ speciesId: id("acetic acid"), coef: 2 }],
      barrier: { form: "dG", dG: 20, unit: "kcal/mol", T: 298.15, standardState: "1M" },
      provenance: { source: "estimated" },
    };
    const bad = await api.stepsCreate(t.db, A.author, send("POST", "/steps", '{"label": "x",\n  "reactants": [,]}'));
    expect(bad.status).toBe(400);
    expect((await json(bad)).error.message).toMatch(/line 2/);
    const unknown = await api.stepsCreate(t.db, A.author, send("POST", "/steps", { ...body, barrier: { ...body.barrier, colour: 1 } }));
    expect((await json(unknown)).error.fields["barrier.colour"]).toMatch(/Unknown field/);
    // The thermal form's reference temperature is required: no 298.15 K is assumed.
    const thermal = { form: "thermal", Ea: 70, dS: -100, dn: -1, unit: "kJ/mol", entropyUnit: "J/(mol K)", standardState: "1M" };
    const noT = await api.stepsCreate(t.db, A.author, send("POST", "/steps", { ...body, barrier: thermal }));
    expect(noT.status).toBe(400);
    expect(Object.keys((await json(noT)).error.fields)).toContain("barrier.T");
    const withT = await api.stepsCreate(t.db, A.author, send("POST", "/steps", { ...body, label: "API thermal", barrier: { ...thermal, T: 330 } }));
    expect(withT.status).toBe(201);
    const unit = await api.stepsCreate(t.db, A.author, send("POST", "/steps", { ...body, barrier: { ...body.barrier, unit: "kcal" } }));
    expect(Object.keys((await json(unit)).error.fields)).toContain("barrier.unit");
    const viewer = await api.stepsCreate(t.db, A.viewer, send("POST", "/steps", body));
    expect(viewer.status).toBe(403);
    const ok = await api.stepsCreate(t.db, A.author, send("POST", "/steps", body));
    expect(ok.status).toBe(201);
    const { stepId } = await json(ok);
    const got = await api.stepGet(t.db, A.author, get(`/steps/${stepId}`), String(stepId));
    expect(got.headers.get("ETag")).toBe(`"step-${stepId}-v1"`);
    // Edit with If-Match; a second edit on the same base is a 409.
    const edit = () => api.stepEdit(t.db, A.author, send("POST", `/steps/${stepId}/versions`, { ...body, label: "API hydrolysis v2" }, { "If-Match": `"step-${stepId}-v1"` }), String(stepId));
    expect((await edit()).status).toBe(201);
    const stale = await edit();
    expect(stale.status).toBe(409);
    expect((await json(stale)).error.code).toBe("version_conflict");
    expect((await api.stepPropose(t.db, A.author, send("POST", `/steps/${stepId}/propose`, ""), String(stepId))).status).toBe(200);
    const review = await api.stepReview(t.db, A.curator, send("POST", `/steps/${stepId}/review`, { action: "approve" }), String(stepId));
    expect(await json(review)).toMatchObject({ status: "approved" });
    expect((await api.stepGet(t.db, A.viewer, get(`/steps/${stepId}`), String(stepId))).status).toBe(200);
    expect((await api.stepGet(t.db, A.viewer, get(`/steps/abc`), "abc")).status).toBe(404);
  });
});

describe("mechanisms API", () => {
  it("updates with version checks: stale saves get 409 and nothing is overwritten", async () => {
    const list = await json(await api.mechanismsList(t.db, A.author, get("/mechanisms?mine=1&q=cycle")));
    const m = list.items[0];
    const detail = await api.mechanismGet(t.db, A.author, get(`/mechanisms/${m.id}`), String(m.id));
    const d = await json(detail);
    const etag = detail.headers.get("ETag")!;
    const put = (name: string, headers: Record<string, string> = {}, base?: number) =>
      api.mechanismUpdate(t.db, A.author, send("PUT", `/mechanisms/${m.id}`, { name, visibility: d.visibility, species: d.species.map((s: { key: string; speciesId: number }) => ({ key: s.key, speciesId: s.speciesId })), steps: d.steps.map(({ stepId: _s, ...e }: Record<string, unknown>) => e), message: `rename ${name}`, ...(base !== undefined ? { baseVersion: base } : {}) }, headers), String(m.id));
    const first = await put("renamed once", { "If-Match": etag });
    expect(first.status).toBe(200);
    const second = await put("renamed twice", { "If-Match": etag });
    expect(second.status).toBe(409);
    const after = await json(await api.mechanismGet(t.db, A.author, get(`/mechanisms/${m.id}`), String(m.id)));
    expect(after.name).toBe("renamed once");
    const notOwner = await api.mechanismUpdate(t.db, A.author2, send("PUT", `/mechanisms/${m.id}`, { name: "x", message: "x", baseVersion: after.currentVersion }), String(m.id));
    expect([403, 404]).toContain(notOwner.status);
  });

  it("forks, diffs against the parent, exports and imports back identically", async () => {
    const pub = (await json(await api.mechanismsList(t.db, A.viewer, get("/mechanisms?q=alcohol%20series")))).items[0];
    const fork = await api.mechanismFork(t.db, A.author2, send("POST", `/mechanisms/${pub.id}/fork`, { name: "my copy" }), String(pub.id));
    expect(fork.status).toBe(201);
    const { id } = await json(fork);
    const diff = await json(await api.mechanismDiff(t.db, A.author2, get(`/mechanisms/${id}/diff?against=parent&T=330`), String(id)));
    expect(diff.diff.steps.unchanged).toBe(5);
    expect(diff.diff.T).toBe(330);
    const exp = await api.mechanismExport(t.db, A.author2, get(`/mechanisms/${id}/export`), String(id));
    expect(exp.headers.get("Content-Disposition")).toMatch(/attachment; filename="my-copy\.saddlebook\.json"/);
    const text = await exp.text();
    const imp = await api.mechanismImport(t.db, A.author, send("POST", "/mechanisms/import", text));
    expect(imp.status).toBe(201);
    const back = await api.mechanismExport(t.db, A.author, get(`/mechanisms/x/export`), String((await json(imp)).id));
    expect(await back.text()).toBe(text);
  });

  it("refuses oversized and invalid imports, storing nothing", async () => {
    const before = Number((await t.db("mechanisms").count({ n: "*" }).first())!.n);
    const big = await api.mechanismImport(t.db, A.author, send("POST", "/mechanisms/import", "x".repeat(IMPORT_LIMIT_BYTES + 10)));
    expect(big.status).toBe(413);
    const wrong = await api.mechanismImport(t.db, A.author, send("POST", "/mechanisms/import", { format: "saddlebook.mechanism", version: 1, about: { name: "x" }, species: [{ id: "a" }], steps: [{ id: "s", reactants: [{ species: "a", coef: 1 }], products: [{ species: "a", coef: 1 }], reversible: false, barrier: { form: "dG", dG: 80, unit: "kJ/mol", T: 298.15, standardState: "1M" } }], extra: true }));
    expect(wrong.status).toBe(400);
    expect((await json(wrong)).error.fields.extra).toMatch(/line 1/);
    expect(Number((await t.db("mechanisms").count({ n: "*" }).first())!.n)).toBe(before);
  });
});

describe("OpenAPI description", () => {
  it("is OpenAPI 3.1 generated from the zod schemas, and every $ref resolves", () => {
    const doc = openApiDocument() as { openapi: string; paths: Record<string, unknown>; components: { schemas: Record<string, unknown> } };
    expect(doc.openapi).toBe("3.1.0");
    for (const p of ["/steps", "/steps/{id}/review", "/mechanisms/{id}", "/mechanisms/import", "/species"]) expect(doc.paths).toHaveProperty(p);
    const text = JSON.stringify(doc);
    for (const m of text.matchAll(/"\$ref":"#\/components\/schemas\/([^"]+)"/g)) expect(doc.components.schemas, m[1]).toHaveProperty(m[1]);
    expect(JSON.stringify(doc.components.schemas.StepInput)).toContain("kcal/mol");
  });

  it("describes every API route of app/routes.ts (all but the not-found catch-all)", () => {
    const doc = openApiDocument() as { paths: Record<string, unknown> };
    const table = readFileSync(new URL("../../app/routes.ts", import.meta.url), "utf8");
    const apiPaths = [...table.matchAll(/route\("api\/v1(\/[^"]*)"/g)].map((m) => m[1]).filter((p) => p !== "/*");
    expect(apiPaths.length).toBeGreaterThan(25);
    const described = Object.keys(doc.paths);
    for (const p of apiPaths) expect(described, p).toContain(p.replace(/:([A-Za-z]+)/g, "{$1}"));
    // and nothing is described that the route table does not serve
    const served = new Set(apiPaths.map((p) => p.replace(/:([A-Za-z]+)/g, "{$1}")));
    for (const p of described) expect(served.has(p), p).toBe(true);
  });
});
