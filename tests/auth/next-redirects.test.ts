// "Come back here" addresses after sign-in (real MariaDB, route modules): `next` is read as a
// browser would read it and only a path on this site is followed; tabs, line breaks,
// backslashes and encoded control characters neither leave the site nor break the redirect.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { TestDatabase } from "../support/db";
import { args, authDatabase, closeAuthDatabase, cookieFrom, demoSessionCookie, formRequest, getRequest, outcome } from "./support";
import { DEMO_PASSWORD } from "../../db/seeds/demo-identities";
import { safeNext } from "../../app/auth/sign-in.server";

let t: TestDatabase;
let signIn: typeof import("../../app/routes/sign-in");
let root: typeof import("../../app/root");

beforeAll(async () => {
  t = await authDatabase();
  signIn = await import("../../app/routes/sign-in");
  root = await import("../../app/root");
});
afterAll(() => closeAuthDatabase(t));

// Query-string values as an attacker would put them in a link (still percent-encoded).
const OFF_SITE = ["%2F%09%2Fexample.invalid", "%2F%0A%2Fexample.invalid", "%2F%0D%2Fexample.invalid", "%2F%5Cexample.invalid", "%2F%2Fexample.invalid", "https%3A%2F%2Fexample.invalid%2F", "%2F..%2F%2Fexample.invalid", "%20%2F%2Fexample.invalid", "javascript%3Aalert(1)"];
const BROKEN = ["/%0d/x", "/%0a/x", "%2F%0D%0ASet-Cookie%3A%20x%3D1"];

/** Where a browser would go from `location`, relative to the app. */
const landing = (location: string) => new URL(location, "http://127.0.0.1:3000/");

describe("next after sign-in", () => {
  it("keeps same-site paths with their query and fragment", () => {
    expect(safeNext("/mechanisms/7?tab=runs#plot")).toBe("/mechanisms/7?tab=runs#plot");
    expect(safeNext("/library?q=ester hydrolysis")).toBe("/library?q=ester%20hydrolysis");
    expect(safeNext(undefined)).toBe("/");
    expect(safeNext("relative")).toBe("/");
  });

  it("sends a signed-in visitor only to paths on this site, whatever the link says", async () => {
    const cookie = await demoSessionCookie("viewer@saddlebook.test", "192.0.2.90");
    for (const next of [...OFF_SITE, ...BROKEN]) {
      const r = await outcome(() => signIn.loader(args(getRequest(`/sign-in?next=${next}`, { cookie }))));
      expect(r.status, next).toBe(302);
      const to = landing(r.headers.get("Location")!);
      expect(to.origin, next).toBe("http://127.0.0.1:3000");
    }
  });

  it("signs in and lands on this site for every odd `next` in the form, never a server error", async () => {
    const v = await outcome(() => root.loader(args(getRequest("/sign-in"))));
    for (const raw of [...OFF_SITE, ...BROKEN]) {
      const next = decodeURIComponent(raw);
      const r = await outcome(() => signIn.action(args(formRequest("/sign-in", { csrf: v.body.csrf, email: "author@saddlebook.test", password: DEMO_PASSWORD, next }, { cookie: cookieFrom(v), ip: "192.0.2.91" }))));
      expect(r.status, raw).toBe(302);
      expect(landing(r.headers.get("Location")!).origin, raw).toBe("http://127.0.0.1:3000");
    }
  });

  it("shows the sign-in page for a signed-out visitor with a hostile `next`, carrying only a safe path", async () => {
    for (const next of [...OFF_SITE, ...BROKEN]) {
      const r = await outcome(() => signIn.loader(args(getRequest(`/sign-in?next=${next}`))));
      expect(r.status, next).toBe(200);
      expect(landing(r.body.next).origin, next).toBe("http://127.0.0.1:3000");
      expect(r.body.next, next).not.toMatch(/[\u0000-\u001f\\]|^\/\//);
    }
  });
});
