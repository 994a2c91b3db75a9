// Single sign-on from the first redirect to the session, through the route modules, against
// the local OpenID provider (scripts/fake-oidc.ts) and a real MariaDB: the authorization
// request carries a nonce, the provider's ID token brings it back, and the callback signs the
// person in and returns to the page asked for.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { TestDatabase } from "../support/db";
import { args, authDatabase, closeAuthDatabase, getRequest, outcome } from "./support";
import { startFakeOidc, type FakeOidc } from "../../scripts/fake-oidc";
import { freePort } from "../../scripts/ports";

let t: TestDatabase;
let provider: FakeOidc;
const saved = { ...process.env };

beforeAll(async () => {
  t = await authDatabase();
  provider = await startFakeOidc({ port: await freePort() });
  Object.assign(process.env, { OIDC_ISSUER: provider.issuer, OIDC_CLIENT_ID: provider.clientId, OIDC_CLIENT_SECRET: provider.clientSecret, APP_URL: "http://127.0.0.1:3000" });
});
afterAll(async () => {
  process.env = { ...saved, DATABASE_URL: process.env.DATABASE_URL };
  await provider?.stop();
  await closeAuthDatabase(t);
});

/** "a=1; b=2" from a response's Set-Cookie headers. */
const cookiesOf = (r: { headers: Headers }) => r.headers.getSetCookie().map((c) => c.split(";")[0]).join("; ");

describe("single sign-on, start to finish", () => {
  it("sends a nonce, gets it back in the ID token, signs the person in and returns to the page asked for", async () => {
    const start = await import("../../app/routes/auth.oidc");
    const callback = await import("../../app/routes/auth.oidc.callback");
    const me = await import("../../app/routes/api.v1.me");
    const { oidcNonce } = await import("../../app/auth/oidc.server");

    const go = await outcome(() => start.loader(args(getRequest("/auth/oidc?next=%2Fmechanisms"))));
    expect(go.status).toBe(302);
    const authorize = new URL(go.headers.get("Location")!);
    const state = authorize.searchParams.get("state")!;
    expect(authorize.searchParams.get("nonce")).toBe(oidcNonce(state));
    const browser = cookiesOf(go);

    authorize.searchParams.set("login_hint", "curator@saddlebook.test");
    const back = await fetch(authorize, { redirect: "manual" });
    const callbackUrl = new URL(back.headers.get("Location")!);
    expect(callbackUrl.pathname).toBe("/auth/oidc/callback");

    const done = await outcome(() => callback.loader(args(getRequest(callbackUrl.pathname + callbackUrl.search, { cookie: browser }))));
    expect(done.status, JSON.stringify(done.headers.get("Location"))).toBe(302);
    expect(done.headers.get("Location")).toBe("/mechanisms");
    const session = cookiesOf(done).split("; ").find((c) => c.startsWith("__saddlebook="))!;
    const who = await outcome(() => me.loader(args(getRequest("/api/v1/me", { cookie: session }))));
    expect(who.body).toMatchObject({ email: "curator@saddlebook.test" });
  });
});
