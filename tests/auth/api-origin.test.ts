// Cross-site request forgery on the REST API (real MariaDB, root middleware in front of the
// route module): an API write signed in by the session cookie is refused with 403 JSON when
// the browser says it comes from another origin (another site, or this host on another
// port), and goes through from the app's own pages, from programs that send no browser
// headers, and with an API token.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { TestDatabase } from "../support/db";
import { args, authDatabase, closeAuthDatabase, demoSessionCookie, outcome } from "./support";
import { createApiToken } from "../../db/access/tokens.server";
import { throughRoot } from "../support/root-middleware";

let t: TestDatabase;
let mechanisms: typeof import("../../app/routes/api.v1.mechanisms");
let cookie = "";

beforeAll(async () => {
  t = await authDatabase();
  mechanisms = await import("../../app/routes/api.v1.mechanisms");
  cookie = await demoSessionCookie("author@saddlebook.test", "192.0.2.70");
});
afterAll(() => closeAuthDatabase(t));

/** A POST /api/v1/mechanisms through the root middleware, as the served app runs it. */
async function create(name: string, headers: Record<string, string>) {
  const request = new Request("http://127.0.0.1:3000/api/v1/mechanisms", {
    method: "POST",
    headers: { "Content-Type": "application/json", ...headers },
    body: JSON.stringify({ name, visibility: "private", steps: [] }),
  });
  return outcome(() => throughRoot(request, {}, () => mechanisms.action(args(request))));
}

const count = async (name: string) => (await t.db("mechanisms").where({ name })).length;

describe("API writes signed in by the session cookie", () => {
  it("are refused with 403 JSON from another origin, and nothing is created", async () => {
    const foreign: Array<Record<string, string>> = [
      { Origin: "http://127.0.0.1:4000" }, // this host, another port: same site, another origin
      { Origin: "https://example.invalid" },
      { Origin: "null" },
      { "Sec-Fetch-Site": "same-site" },
      { "Sec-Fetch-Site": "cross-site" },
      { Origin: "http://127.0.0.1:4000", "Sec-Fetch-Site": "same-origin" },
    ];
    for (const h of foreign) {
      const r = await create("Forged from another page", { Cookie: cookie, ...h });
      expect(r.status, JSON.stringify(h)).toBe(403);
      expect(r.headers.get("Content-Type")).toMatch(/^application\/json/);
      expect(r.body.error.code).toBe("cross_origin");
      expect(r.body.error.message).toMatch(/another site/);
    }
    expect(await count("Forged from another page")).toBe(0);
  });

  it("go through from the app's own origin, and from a client that sends no browser headers", async () => {
    const own: Array<Record<string, string>> = [{ Origin: "http://127.0.0.1:3000" }, { "Sec-Fetch-Site": "same-origin" }, {}];
    for (const [i, h] of own.entries()) {
      const r = await create(`Own page ${i}`, { Cookie: cookie, ...h });
      expect(r.status, JSON.stringify(h)).toBe(201);
      expect(await count(`Own page ${i}`)).toBe(1);
    }
  });

  it("do not apply to an API token, which a foreign page cannot send", async () => {
    const u = await t.db("users").where({ email: "author@saddlebook.test" }).first();
    const { token } = await createApiToken(t.db, u.id, "origin test");
    const r = await create("Made with a token", { Authorization: `Bearer ${token}`, Origin: "http://127.0.0.1:4000" });
    expect(r.status).toBe(201);
  });
});
