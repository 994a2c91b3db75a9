// Every /api/v1 endpoint that changes something refuses a caller without credentials,
// and one with a revoked token, with the JSON 401 body; a live token of each demo role
// reads /api/v1/me. Runs against the app `npm test` serves (plain HTTP, no browser).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import knexFactory, { type Knex } from "knex";
import { knexConfigFromUrl } from "../../db/config";
import { createApiToken, revokeApiToken } from "../../db/access/tokens.server";
import { appUrl, hasApp } from "../support/browser";

const ROLES = ["viewer", "author", "curator", "admin"] as const;

// [method, path] for every state-changing endpoint in app/routes.ts (ids that need not exist:
// credentials are checked before anything is looked up).
const WRITES: Array<[string, string]> = [
  ["POST", "/api/v1/rates"],
  ["POST", "/api/v1/simulate"],
  ["POST", "/api/v1/runs"],
  ["POST", "/api/v1/runs/1/cancel"],
  ["POST", "/api/v1/steps"],
  ["POST", "/api/v1/steps/1/propose"],
  ["POST", "/api/v1/steps/1/review"],
  ["POST", "/api/v1/steps/1/comments"],
  ["POST", "/api/v1/species"],
  ["POST", "/api/v1/mechanisms"],
  ["POST", "/api/v1/mechanisms/import"],
  ["PUT", "/api/v1/mechanisms/1"],
  ["DELETE", "/api/v1/mechanisms/1"],
  ["POST", "/api/v1/mechanisms/1/fork"],
];

describe.skipIf(!hasApp() || !process.env.E2E_DATABASE_URL)("API credentials", () => {
  let db: Knex;
  const tokens: Record<string, string> = {};
  let revoked = "";

  beforeAll(async () => {
    db = knexFactory(knexConfigFromUrl(process.env.E2E_DATABASE_URL!, { min: 0, max: 2 }));
    for (const role of ROLES) {
      const u = await db("users").where({ email: `${role}@saddlebook.test` }).first();
      tokens[role] = (await createApiToken(db, u.id, `access test ${role}`)).token;
    }
    const u = await db("users").where({ email: "author@saddlebook.test" }).first();
    const r = await createApiToken(db, u.id, "access test revoked");
    await revokeApiToken(db, u.id, r.id);
    revoked = r.token;
  });
  afterAll(async () => {
    await db?.destroy();
  });

  const call = (method: string, path: string, auth?: string) =>
    fetch(appUrl() + path, {
      method,
      headers: { "Content-Type": "application/json", ...(auth ? { Authorization: auth } : {}) },
      body: method === "GET" ? undefined : "{}",
    });

  for (const role of ROLES) {
    it(`a ${role}'s token reads /api/v1/me`, async () => {
      const r = await call("GET", "/api/v1/me", `Bearer ${tokens[role]}`);
      expect(r.status).toBe(200);
      expect(await r.json()).toMatchObject({ email: `${role}@saddlebook.test`, role });
    });
  }

  for (const [method, path] of [["GET", "/api/v1/me"] as [string, string], ...WRITES]) {
    it(`${method} ${path}: 401 JSON without credentials and with a revoked token`, async () => {
      for (const auth of [undefined, `Bearer ${revoked}`, "Bearer "]) {
        const r = await call(method, path, auth);
        expect(r.status, `${method} ${path} with ${auth ?? "nothing"}`).toBe(401);
        const body = await r.json();
        expect(body.error.code).toBe("unauthorized");
        expect(body.error.message.length).toBeGreaterThan(10);
      }
    });
  }
});
