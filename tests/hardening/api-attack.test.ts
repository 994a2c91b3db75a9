/**
 * The whole REST API tried as an attacker would, on a real database with the demo scenario:
 * every /api/v1 route of app/routes.ts, through the root middleware as the served app runs it,
 * with hostile path ids, query strings (negative, non-numeric, huge, repeated and unknown
 * parameters, random ones property-based), every write method with wrong content types,
 * malformed and mismatched multipart, form and JSON bodies. Every answer below 500; every
 * refusal is the API's JSON error body {"error":{"code","message"}} with a JSON content type.
 * The totals are printed at the end (requests, statuses, 5xx = 0).
 */
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import fc from "fast-check";
import { freshDatabase, type TestDatabase } from "../support/db";
import { seedDemo } from "../../db/seeds/index";
import { apiCaller } from "../support/api-auth-stand-in";
import { throughRoot } from "../support/root-middleware";
import routes from "../../app/routes";

vi.mock("~/auth/api-auth.server", () => import("../support/api-auth-stand-in"));
// The per-user compute limits are not under test here.
process.env.COMPUTE_SIMULATIONS_PER_MINUTE = "100000000";
process.env.COMPUTE_RATES_PER_MINUTE = "100000000";

// A fixed seed keeps CI reproducible; change it locally to explore further inputs.
fc.configureGlobal({ seed: 20261205 });

interface RouteEntry {
  path?: string;
  file: string;
}
type Module = { loader?: (a: unknown) => Promise<unknown>; action?: (a: unknown) => Promise<unknown> };

const API = (routes as RouteEntry[]).filter((r) => r.path?.startsWith("api/v1/") && r.path !== "api/v1/docs");
const ORIGIN = "http://127.0.0.1:3000";

let t: TestDatabase;
const modules = new Map<string, Module>();
const statuses: Record<string, number> = {};
let requests = 0;
let real: Record<string, string> = {};

beforeAll(async () => {
  t = await freshDatabase();
  await seedDemo(t.db);
  process.env.DATABASE_URL = t.url;
  const author = await t.db("users").where({ email: "author@saddlebook.test" }).first();
  Object.assign(apiCaller, { userId: author.id, email: author.email, name: author.name, role: "author" });
  for (const r of API) modules.set(r.path!, (await import(`../../app/${r.file.replace(/\.tsx?$/, "")}`)) as Module);
  const mech = await t.db("mechanisms").where({ owner_id: author.id }).first("id");
  const step = await t.db("steps").first("id");
  const species = await t.db("species").first("id");
  const run = await t.db("runs").first("id");
  const dataset = await t.db("datasets").first("id");
  real = { mechanisms: String(mech?.id ?? 1), steps: String(step?.id ?? 1), species: String(species?.id ?? 1), runs: String(run?.id ?? 1), datasets: String(dataset?.id ?? 1) };
}, 120_000);

afterAll(async () => {
  const fives = Object.entries(statuses).filter(([s]) => Number(s) >= 500).reduce((n, [, c]) => n + c, 0);
  console.log(`[api-attack] requests: ${requests}, 5xx: ${fives}, statuses ${JSON.stringify(statuses)}`);
  const { closeApiPool } = await import("../../app/compute/api-pool.server");
  await closeApiPool();
  const { getDb } = await import("../../db/client.server");
  await getDb().destroy();
  await t?.drop();
});

/** The route's path with `:id`-style parameters filled in (real ids unless given). */
function fill(path: string, id?: string): { url: string; params: Record<string, string> } {
  const params: Record<string, string> = {};
  const parts = path.split("/").map((part, i, all) => {
    if (part === "*") return (params["*"] = "no-such-thing");
    if (!part.startsWith(":")) return part;
    const name = part.slice(1);
    params[name] = id ?? (name === "number" ? "1" : (real[all[i - 1]!] ?? "1"));
    return encodeURIComponent(params[name]!);
  });
  return { url: `${ORIGIN}/${parts.join("/")}`, params };
}

/** One request through the root middleware and the route module; checks the answer's shape. */
async function send(path: string, init: RequestInit & { query?: string; id?: string }): Promise<number> {
  const mod = modules.get(path)!;
  const { url, params } = fill(path, init.id);
  const request = new Request(url + (init.query ?? ""), init);
  const handler = request.method === "GET" || request.method === "HEAD" ? mod.loader : mod.action;
  if (!handler) return 0;
  requests++;
  const what = `${request.method} ${new URL(request.url).pathname}${init.query ?? ""} [${new Headers(init.headers).get("Content-Type") ?? "no type"}]`;
  const res = await throughRoot(request, params, () => handler({ request, params, context: {} }));
  if (!(res instanceof Response)) {
    statuses["500"] = (statuses["500"] ?? 0) + 1;
    throw new Error(`${what} threw instead of answering: ${(res as Error)?.stack ?? JSON.stringify(res)}`);
  }
  statuses[res.status] = (statuses[res.status] ?? 0) + 1;
  const text = await res.text();
  expect(res.status, `${what} → ${res.status}: ${text.slice(0, 300)}`).toBeLessThan(500);
  if (res.status >= 400) {
    expect(res.headers.get("Content-Type"), what).toMatch(/^application\/json/);
    const j = JSON.parse(text);
    expect(Object.keys(j), what).toEqual(["error"]);
    expect(typeof j.error.code, what).toBe("string");
    expect(j.error.message.length, what).toBeGreaterThan(0);
  }
  return res.status;
}

const BAD_IDS = ["abc", "-1", "0", "1.5", "1e3", "0x10", "99999999999999999999", "9007199254740993", " 1", "1;DROP TABLE runs", "%00", "\u202e1"];
const BAD_QUERIES = [
  "?limit=-1",
  "?limit=0",
  "?limit=abc",
  "?limit=1e999",
  "?limit=99999999999",
  "?limit=1&limit=2",
  "?mechanismId=abc",
  "?mechanismId=-1",
  "?mechanismId=1e999",
  "?version=abc",
  "?version=0",
  "?version=-3",
  "?version=99999999999",
  "?from=abc&to=-1",
  "?cursor=zzz",
  "?cursor=-1",
  "?series=%00",
  "?q=" + "x".repeat(5000),
  "?visibility=bogus",
  "?T=abc",
  "?T=-5",
  "?status=bogus",
  "?molecularity=9",
  "?mine=perhaps",
  "?unknown=1",
  "?%zz=%zz",
  "?limit[]=1",
];
const WRITE_METHODS = ["POST", "PUT", "PATCH", "DELETE"];
const BOUNDARY = "----saddlebook-attack";
const BODIES: Array<{ type?: string; body: string }> = [
  { type: "text/plain", body: '{"name":"x"}' },
  { type: "text/plain;charset=UTF-8", body: "hello" },
  { type: "application/x-www-form-urlencoded", body: "name=x&visibility=private" },
  { type: `multipart/form-data; boundary=${BOUNDARY}`, body: `--${BOUNDARY}\r\nContent-Disposition: form-data; name="name"\r\n\r\nx\r\n--${BOUNDARY}--\r\n` },
  { type: `multipart/form-data; boundary=${BOUNDARY}`, body: "not a multipart body at all" },
  { type: "multipart/form-data", body: "--x\r\n\r\n" },
  { type: "application/xml", body: "<name>x</name>" },
  { type: "application/json", body: "{" },
  { type: "application/json", body: '{"name":' },
  { type: "application/json", body: "" },
  { type: "application/json", body: "\u0000\u0001" },
  { type: "application/json; charset=latin1", body: "[1,2" },
  { body: "{}" },
  { type: "application/json", body: "null" },
];

describe("every /api/v1 route under hostile requests", () => {
  it("covers every API route of the route table", () => {
    expect(API.length).toBeGreaterThanOrEqual(28);
    for (const r of API) expect(modules.get(r.path!), r.path).toBeDefined();
  });

  it("hostile path ids, on every method, answer 4xx JSON or a normal answer", async () => {
    for (const r of API.filter((x) => x.path!.includes(":"))) {
      for (const id of BAD_IDS) {
        await send(r.path!, { method: "GET", id });
        for (const method of WRITE_METHODS) await send(r.path!, { method, id, headers: { "Content-Type": "application/json" }, body: "{}" });
      }
    }
  }, 120_000);

  it("hostile query strings on every GET answer 4xx JSON or a normal answer", async () => {
    for (const r of API) for (const q of BAD_QUERIES) await send(r.path!, { method: "GET", query: q });
  }, 120_000);

  it("a list given a negative limit or a non-numeric mechanism id is refused with 400 and names the parameter", async () => {
    for (const [path, query, field] of [
      ["api/v1/runs", "?limit=-1", "limit"],
      ["api/v1/runs", "?mechanismId=abc", "mechanismId"],
      ["api/v1/mechanisms", "?limit=-1", "limit"],
      ["api/v1/steps", "?limit=-1", "limit"],
    ] as const) {
      const { url, params } = fill(path);
      const res = (await modules.get(path)!.loader!({ request: new Request(url + query), params, context: {} })) as Response;
      expect(res.status, path + query).toBe(400);
      const j = (await res.json()) as { error: { fields?: Record<string, string> } };
      expect(Object.keys(j.error.fields ?? {}), path + query).toContain(field);
    }
  });

  it("wrong content types, malformed multipart and malformed JSON on every write answer 4xx JSON", async () => {
    for (const r of API) {
      for (const method of WRITE_METHODS) {
        for (const b of BODIES) await send(r.path!, { method, headers: b.type ? { "Content-Type": b.type } : {}, body: b.body });
      }
    }
  }, 300_000);

  it("a body sent as anything but JSON is refused with 415 before it is read", async () => {
    for (const path of ["api/v1/mechanisms", "api/v1/steps", "api/v1/datasets", "api/v1/runs", "api/v1/rates", "api/v1/simulate", "api/v1/mechanisms/import"]) {
      for (const b of BODIES.filter((x) => x.type && !x.type.startsWith("application/json"))) {
        expect(await send(path, { method: "POST", headers: { "Content-Type": b.type! }, body: b.body }), `${path} ${b.type}`).toBe(415);
      }
    }
  }, 120_000);

  it("random query strings (property-based) never give a server error", async () => {
    const keys = fc.constantFrom("limit", "mechanismId", "version", "from", "to", "cursor", "q", "series", "visibility", "T", "tmin", "tmax", "status", "molecularity", "source", "tag", "mine", "format");
    const values = fc.oneof(fc.string({ maxLength: 20 }), fc.integer().map(String), fc.double().map(String), fc.constantFrom("", "-1", "0", "NaN", "Infinity", "1e309", "%", "[]", "{}", "null", "true"));
    await fc.assert(
      fc.asyncProperty(fc.constantFrom(...API.map((r) => r.path!)), fc.array(fc.tuple(keys, values), { maxLength: 4 }), async (path, pairs) => {
        await send(path, { method: "GET", query: "?" + new URLSearchParams(pairs).toString() });
      }),
      { numRuns: 400 },
    );
  }, 300_000);

  it("reports the totals: every request answered below 500", () => {
    expect(requests).toBeGreaterThan(2000);
    expect(Object.keys(statuses).filter((s) => Number(s) >= 500)).toEqual([]);
  });
});
