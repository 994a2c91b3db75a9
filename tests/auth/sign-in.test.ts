// Sign-in through the route modules on the real MariaDB: CSRF, wrong password, unknown
// user, tampered cookie, rate limits per account and per address, sign-out, audit rows.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { TestDatabase } from "../support/db";
import { args, authDatabase, cookieFrom, formRequest, getRequest, outcome } from "./support";
import { DEMO_PASSWORD } from "../../db/seeds/demo-identities";
import { LIMITS } from "../../app/auth/rate-limit.server";

let t: TestDatabase;
let signIn: typeof import("../../app/routes/sign-in");
let signOut: typeof import("../../app/routes/sign-out");
let root: typeof import("../../app/root");
let me: typeof import("../../app/routes/api.v1.me");

beforeAll(async () => {
  t = await authDatabase();
  signIn = await import("../../app/routes/sign-in");
  signOut = await import("../../app/routes/sign-out");
  root = await import("../../app/root");
  me = await import("../../app/routes/api.v1.me");
});
afterAll(async () => {
  const { getDb } = await import("../../db/client.server");
  await getDb().destroy();
  await t?.drop();
});

/** A fresh visitor: the root loader hands out the session cookie with a CSRF token. */
async function visit(): Promise<{ cookie: string; csrf: string }> {
  const r = await outcome(() => root.loader(args(getRequest("/sign-in"))));
  const csrf = r.body.csrf as string;
  expect(csrf).toMatch(/^[A-Za-z0-9_-]{32}$/);
  return { cookie: cookieFrom(r), csrf };
}

async function attempt(email: string, password: string, ip = "192.0.2.10") {
  const v = await visit();
  return outcome(() => signIn.action(args(formRequest("/sign-in", { csrf: v.csrf, email, password, next: "/mechanisms" }, { cookie: v.cookie, ip }))));
}

const detailOf = (row: { detail: unknown }) => (typeof row.detail === "string" ? JSON.parse(row.detail) : row.detail);

async function auditRows(action: string) {
  return t.db("audit_log").where({ action }).orderBy("id");
}

describe("e-mail and password", () => {
  it("signs a demo user in, returns to the page asked for, and logs who, what, when and where", async () => {
    const r = await attempt("Author@Saddlebook.test ", DEMO_PASSWORD, "198.51.100.7");
    expect(r.status).toBe(302);
    expect(r.headers.get("Location")).toBe("/mechanisms");
    const setCookie = r.headers.get("Set-Cookie")!;
    expect(setCookie).toMatch(/HttpOnly/i);
    expect(setCookie).toMatch(/SameSite=Lax/i);
    expect(setCookie).toMatch(/Max-Age=43200/);
    // Not https, not production: no Secure flag (it would stop the cookie on http://127.0.0.1).
    expect(setCookie).not.toMatch(/Secure/i);
    const user = await outcome(() => me.loader(args(getRequest("/api/v1/me", { cookie: cookieFrom(r) }))));
    expect(user.status).toBe(200);
    expect(user.body).toMatchObject({ email: "author@saddlebook.test", name: "Anouk Brandt", role: "author" });
    expect(user.body.groups).toEqual([expect.objectContaining({ slug: "demo-kinetics", groupRole: "member" })]);
    const [row] = (await auditRows("sign-in.success")).slice(-1);
    expect(row).toMatchObject({ user_id: user.body.id, ip: "198.51.100.7" });
    expect(detailOf(row)).toEqual({ method: "password" });
    expect(Date.now() - new Date(row.created_at).getTime()).toBeLessThan(60_000);
  });

  it("refuses a wrong password and an unknown address with the same sentence, and signs nobody in", async () => {
    const wrong = await attempt("viewer@saddlebook.test", "not-the-password", "192.0.2.20");
    const unknown = await attempt("nobody@saddlebook.test", DEMO_PASSWORD, "192.0.2.20");
    for (const r of [wrong, unknown]) {
      expect(r.status).toBe(400);
      expect(r.body.error).toBe("The e-mail address or the password is wrong.");
      expect(r.headers.get("Set-Cookie")).toBeNull();
    }
    const failures = await auditRows("sign-in.failure");
    const reasons = failures.map((f) => detailOf(f).reason);
    expect(reasons).toContain("wrong-password");
    expect(reasons).toContain("unknown-user");
    expect(failures.every((f) => f.ip === "192.0.2.20")).toBe(true);
  });

  it("refuses a forged or missing CSRF token with 403 before looking at the password", async () => {
    const v = await visit();
    const before = (await t.db("audit_log").count({ n: "*" }).first())!.n;
    for (const csrf of ["forged-token-forged-token-forged1", ""]) {
      const r = await outcome(() =>
        signIn.action(args(formRequest("/sign-in", { csrf, email: "author@saddlebook.test", password: DEMO_PASSWORD }, { cookie: v.cookie }))),
      );
      expect(r.status).toBe(403);
      expect(String(r.body)).toMatch(/out of date|another site/);
    }
    // Without any session cookie there is no token to match.
    const bare = await outcome(() => signIn.action(args(formRequest("/sign-in", { csrf: v.csrf, email: "author@saddlebook.test", password: DEMO_PASSWORD }))));
    expect(bare.status).toBe(403);
    expect((await t.db("audit_log").count({ n: "*" }).first())!.n).toBe(before);
  });

  it("treats a tampered session cookie as no session", async () => {
    const r = await attempt("curator@saddlebook.test", DEMO_PASSWORD, "192.0.2.30");
    const good = cookieFrom(r);
    const [name, value] = good.split("=");
    const decoded = decodeURIComponent(value);
    const [payload, sig] = decoded.split(".");
    // Same signature, body claiming another user id.
    const forgedBody = Buffer.from(JSON.stringify({ userId: 5, signedInAt: Date.now(), csrf: "x" })).toString("base64");
    for (const cookie of [`${name}=${encodeURIComponent(forgedBody + "." + sig)}`, `${name}=${encodeURIComponent(payload + "." + sig.slice(0, -2) + "AA")}`]) {
      const res = await outcome(() => me.loader(args(getRequest("/api/v1/me", { cookie }))));
      expect(res.status).toBe(401);
      expect(res.body.error.code).toBe("unauthorized");
    }
  });

  it("treats an expired session (older than 12 h) as signed out", async () => {
    const { sessionStorage } = await import("../../app/auth/session.server");
    const s = await sessionStorage().getSession();
    s.set("userId", 1);
    s.set("signedInAt", Date.now() - 13 * 3600_000);
    const cookie = (await sessionStorage().commitSession(s)).split(";")[0];
    expect((await outcome(() => me.loader(args(getRequest("/api/v1/me", { cookie }))))).status).toBe(401);
  });

  it("signs out on a POST with the CSRF token, clearing the cookie", async () => {
    const r = await attempt("admin@saddlebook.test", DEMO_PASSWORD, "192.0.2.40");
    const cookie = cookieFrom(r);
    const rootData = await outcome(() => root.loader(args(getRequest("/", { cookie }))));
    expect(rootData.body.user).toMatchObject({ email: "admin@saddlebook.test", admin: true });
    const out = await outcome(() => signOut.action(args(formRequest("/sign-out", { csrf: rootData.body.csrf }, { cookie }))));
    expect(out.status).toBe(302);
    expect(out.headers.get("Location")).toBe("/sign-in?notice=signed-out");
    expect(out.headers.get("Set-Cookie")).toMatch(/Max-Age=0|Expires=Thu, 01 Jan 1970/);
    const after = await outcome(() => root.loader(args(getRequest("/", { cookie: cookieFrom(out) }))));
    expect(after.body.user).toBeNull();
    expect((await auditRows("sign-out")).length).toBeGreaterThan(0);
  });
});

describe("rate limits", () => {
  it(`lock an account after ${LIMITS.perAccount} failures in ${LIMITS.windowMinutes} minutes, even for the right password`, async () => {
    for (let i = 0; i < LIMITS.perAccount; i++) {
      // Different addresses: the account limit holds across them.
      const r = await attempt("author2@saddlebook.test", `wrong-${i}`, `203.0.113.${i + 1}`);
      expect(r.status).toBe(400);
    }
    const locked = await attempt("author2@saddlebook.test", DEMO_PASSWORD, "203.0.113.99");
    expect(locked.status).toBe(429);
    expect(locked.body.error).toMatch(/^Too many failed sign-in attempts for this account: try again in (1[0-5]|[1-9]) minutes?, or reset your password\.$/);
    expect(locked.headers.get("Set-Cookie")).toBeNull();
    const refused = await auditRows("sign-in.refused");
    expect(refused.at(-1)).toMatchObject({ ip: "203.0.113.99" });
    // The window passes (attempts moved 16 minutes back): the right password works again.
    await t.db("sign_in_attempts").where({ email: "author2@saddlebook.test" }).update({ created_at: new Date(Date.now() - 16 * 60_000) });
    expect((await attempt("author2@saddlebook.test", DEMO_PASSWORD, "203.0.113.99")).status).toBe(302);
  });

  it(`block an address after ${LIMITS.perAddress} failures across accounts, but not other addresses`, async () => {
    const ip = "198.18.0.1";
    await t.db("sign_in_attempts").insert(
      Array.from({ length: LIMITS.perAddress }, (_, i) => ({ email: `guess${i}@example.test`, ip, success: false })),
    );
    const blocked = await attempt("viewer@saddlebook.test", DEMO_PASSWORD, ip);
    expect(blocked.status).toBe(429);
    expect(blocked.body.error).toMatch(/^Too many failed sign-in attempts from your network address: try again in \d+ minutes?\.$/);
    expect((await attempt("viewer@saddlebook.test", DEMO_PASSWORD, "198.18.0.2")).status).toBe(302);
  });
});
