// Signing out ends the session on the server (real MariaDB, route modules): a copy of the
// cookie taken before signing out, replayed afterwards, signs nobody in, for pages and the
// API alike, while the same person's other sessions (another browser) go on.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { TestDatabase } from "../support/db";
import { args, authDatabase, closeAuthDatabase, demoSessionCookie as signedIn, formRequest, getRequest, outcome } from "./support";

let t: TestDatabase;
let signOut: typeof import("../../app/routes/sign-out");
let root: typeof import("../../app/root");
let me: typeof import("../../app/routes/api.v1.me");

beforeAll(async () => {
  t = await authDatabase();
  signOut = await import("../../app/routes/sign-out");
  root = await import("../../app/root");
  me = await import("../../app/routes/api.v1.me");
});
afterAll(() => closeAuthDatabase(t));

const apiStatus = async (cookie: string) => (await outcome(() => me.loader(args(getRequest("/api/v1/me", { cookie }))))).status;
const pageUser = async (cookie: string) => (await outcome(() => root.loader(args(getRequest("/", { cookie }))))).body.user;

describe("signing out", () => {
  it("ends the session on the server: the old cookie, replayed, signs nobody in", async () => {
    const cookie = await signedIn("author@saddlebook.test", "192.0.2.60");
    await new Promise((r) => setTimeout(r, 5)); // a later moment of sign-in for the second browser
    const otherBrowser = await signedIn("author@saddlebook.test", "192.0.2.61");
    expect(await apiStatus(cookie)).toBe(200);
    const page = await outcome(() => root.loader(args(getRequest("/", { cookie }))));
    const out = await outcome(() => signOut.action(args(formRequest("/sign-out", { csrf: page.body.csrf }, { cookie }))));
    expect(out.status).toBe(302);
    // The copy an attacker kept (or a browser that ignored the cleared cookie):
    expect(await apiStatus(cookie)).toBe(401);
    expect(await pageUser(cookie)).toBeNull();
    const author = await t.db("users").where({ email: "author@saddlebook.test" }).first("id");
    expect(await t.db("ended_sessions").where({ user_id: author.id })).toHaveLength(1);
    // The other browser's session is a different one and stays signed in.
    expect(await apiStatus(otherBrowser)).toBe(200);
    expect(await pageUser(otherBrowser)).toMatchObject({ email: "author@saddlebook.test" });
  });

  it("signing in again after signing out gives a new, working session", async () => {
    const first = await signedIn("viewer@saddlebook.test", "192.0.2.62");
    const page = await outcome(() => root.loader(args(getRequest("/", { cookie: first }))));
    await outcome(() => signOut.action(args(formRequest("/sign-out", { csrf: page.body.csrf }, { cookie: first }))));
    await new Promise((r) => setTimeout(r, 5));
    const second = await signedIn("viewer@saddlebook.test", "192.0.2.62");
    expect(await apiStatus(first)).toBe(401);
    expect(await apiStatus(second)).toBe(200);
  });

  it("forgets ended sessions older than the cookie lifetime when the person signs out again", async () => {
    const u = await t.db("users").where({ email: "curator@saddlebook.test" }).first("id");
    await t.db("ended_sessions").insert({ user_id: u.id, signed_in_at: Date.now() - 13 * 3600_000 });
    const cookie = await signedIn("curator@saddlebook.test", "192.0.2.63");
    const page = await outcome(() => root.loader(args(getRequest("/", { cookie }))));
    await outcome(() => signOut.action(args(formRequest("/sign-out", { csrf: page.body.csrf }, { cookie }))));
    const rows = await t.db("ended_sessions").where({ user_id: u.id });
    expect(rows).toHaveLength(1);
    expect(Date.now() - Number(rows[0].signed_in_at)).toBeLessThan(60_000);
  });
});
