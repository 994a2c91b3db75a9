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

describe("single sign-on problems on the sign-in page", () => {
  async function started() {
    const start = await import("../../app/routes/auth.oidc");
    const go = await outcome(() => start.loader(args(getRequest("/auth/oidc"))));
    return { state: new URL(go.headers.get("Location")!).searchParams.get("state")!, browser: cookiesOf(go) };
  }

  it("names each failure by a short code in the address, never by the provider's words", async () => {
    const callback = await import("../../app/routes/auth.oidc.callback");
    const { state, browser } = await started();
    const refused = await outcome(() =>
      callback.loader(args(getRequest(`/auth/oidc/callback?state=${state}&error=access_denied&error_description=${encodeURIComponent("Your bank account is locked: call +1 555 0100")}`, { cookie: browser }))),
    );
    expect(refused.headers.get("Location")).toBe("/sign-in?error=sso-refused");
    const foreign = await outcome(() => callback.loader(args(getRequest("/auth/oidc/callback?state=not-this-browsers&code=x", { cookie: browser }))));
    expect(foreign.headers.get("Location")).toBe("/sign-in?error=sso-expired");
    const none = await outcome(() => callback.loader(args(getRequest(`/auth/oidc/callback?state=${state}&code=x`))));
    expect(none.headers.get("Location")).toBe("/sign-in?error=sso-expired");
  });

  it("the sign-in page shows the sentence of a known code and nothing for any other text", async () => {
    const signIn = await import("../../app/routes/sign-in");
    const { SIGN_IN_PROBLEMS } = await import("../../app/auth/sign-in-problems.server");
    const shown = async (error: string) => (await outcome(() => signIn.loader(args(getRequest(`/sign-in?error=${encodeURIComponent(error)}`))))).body.error;
    expect(await shown("sso-refused")).toBe(SIGN_IN_PROBLEMS["sso-refused"]);
    expect(await shown("disabled")).toBe(SIGN_IN_PROBLEMS.disabled);
    for (const text of ["Your session expired: call +1 555 0100 to restore your account", "<b>Enter your password at evil.example</b>", "__proto__", "constructor", "toString", "SSO-REFUSED", ""]) {
      expect(await shown(text), text).toBeNull();
    }
  });
});
