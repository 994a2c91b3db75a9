// Page actions under malformed submissions (fresh database with the demo seed, through the root
// middleware): a body that is not a form gets 415, a broken multipart upload 400, and the
// workbench's intents refuse fields that are not JSON with 400 and a sentence, never a server
// error, and store nothing.
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { who } from "../support/page-user-stand-in";
import type { TestDatabase } from "../support/db";
import { demoAuthorDatabase, dropDemoDatabase } from "../support/demo-author";
import { throughRoot } from "../support/root-middleware";

vi.mock("~/auth/current-user.server", () => import("../support/page-user-stand-in"));
vi.mock("~/auth/csrf.server", () => ({ assertCsrf: async () => {}, csrfToken: async () => "", ensureCsrfToken: async () => ({ token: "", setCookie: null }) }));

let t: TestDatabase;
let mechId = 0;

beforeAll(async () => {
  const d = await demoAuthorDatabase();
  [t, who.user, mechId] = [d.t, d.author, d.mechId];
});
afterAll(() => dropDemoDatabase(t));

/** Status and body of whatever came back (Response, data() or a plain object). */
async function settle(value: unknown): Promise<{ status: number; body: any }> {
  if (value instanceof Response) return { status: value.status, body: await value.text() };
  if (value && typeof value === "object" && (value as { type?: string }).type === "DataWithResponseInit") {
    const v = value as { data: unknown; init: ResponseInit | null };
    return { status: v.init?.status ?? 200, body: v.data };
  }
  if (value instanceof Error) throw value;
  return { status: 200, body: value };
}

async function post(path: string, init: { type?: string; body: BodyInit }, handler: (r: Request) => Promise<unknown>, params: Record<string, string> = {}) {
  const request = new Request(`http://127.0.0.1:3000${path}`, { method: "POST", headers: init.type ? { "Content-Type": init.type } : {}, body: init.body });
  return settle(await throughRoot(request, params, () => handler(request)));
}

const count = async (table: string) => Number((await t.db(table).count({ n: "*" }).first())!.n);

describe("page forms", () => {
  it("a dataset upload with a broken multipart body is 400, a JSON or typeless body 415, and nothing is stored", async () => {
    const data = await import("../../app/routes/data");
    const act = (r: Request) => data.action({ request: r, params: {}, context: {} } as never);
    const before = await count("datasets");
    const broken = [
      { type: "multipart/form-data; boundary=----x", body: "not multipart at all" },
      { type: "multipart/form-data; boundary=----x", body: '------x\r\nContent-Disposition: form-data; name="csv"\r\n\r\nt,A\n0,1' },
      { type: "multipart/form-data", body: "--\r\n\r\n" },
    ];
    for (const b of broken) {
      const r = await post("/data", b, act);
      expect(r.status, b.body).toBe(400);
      expect(r.body).toMatch(/form could not be read/);
    }
    for (const b of [{ type: "application/json", body: '{"name":"x"}' }, { type: "text/plain", body: "name=x" }, { body: "" }]) {
      const r = await post("/data", b, act);
      expect(r.status, b.type).toBe(415);
    }
    expect(await count("datasets")).toBe(before);
  });

  it("workbench intents with fields that are not JSON are refused with 400 and a sentence", async () => {
    const wb = await import("../../app/routes/mechanisms.$id.workbench");
    const act = (r: Request) => wb.action({ request: r, params: { id: String(mechId) }, context: {} } as never);
    const layoutBefore = (await t.db("mechanisms").where({ id: mechId }).first("layout", "condition_presets"));
    const runsBefore = await count("runs");
    for (const [intent, field, message] of [
      ["layout", "positions", /layout could not be read/],
      ["preset", "draft", /conditions could not be read/],
      ["run", "request", /run request could not be read/],
    ] as const) {
      for (const bad of ["{", "{'x':1}", "[1,", "\u0000"]) {
        const r = await post(`/mechanisms/${mechId}/workbench`, { type: "application/x-www-form-urlencoded", body: new URLSearchParams({ intent, name: "p", [field]: bad }).toString() }, act, { id: String(mechId) });
        expect(r.status, `${intent} ${bad}`).toBe(400);
        expect(r.body.error, intent).toMatch(message);
      }
    }
    const r = await post(`/mechanisms/${mechId}/workbench`, { type: "application/x-www-form-urlencoded", body: "intent=run&request=%5B1%2C2%5D" }, act, { id: String(mechId) });
    expect(r.status).toBe(400);
    expect(await t.db("mechanisms").where({ id: mechId }).first("layout", "condition_presets")).toEqual(layoutBefore);
    expect(await count("runs")).toBe(runsBefore);
  });

  it("a workbench address whose id is not a number is 404", async () => {
    const wb = await import("../../app/routes/mechanisms.$id.workbench");
    const r = await post("/mechanisms/abc/workbench", { type: "application/x-www-form-urlencoded", body: "intent=layout&positions=%7B%7D" }, (req) => wb.action({ request: req, params: { id: "abc" }, context: {} } as never), { id: "abc" });
    expect(r.status).toBe(404);
  });
});
