// Who may open which account page: each demo role (and nobody signed in) × each
// protected page and API endpoint of the sign-in area, through the route loaders on the
// real MariaDB. Anonymous visitors of pages are sent to sign-in (and back); API callers
// get 401 JSON; signed-in users without the right get 403.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { TestDatabase } from "../support/db";
import { args, authDatabase, getRequest, outcome } from "./support";
import { sessionStorage } from "../../app/auth/session.server";

let t: TestDatabase;
const cookies: Record<string, string> = {};
const WHO = ["anonymous", "viewer", "author", "curator", "admin"] as const;
type Who = (typeof WHO)[number];

beforeAll(async () => {
  t = await authDatabase();
  // The curator is a group admin of the demo group (demo seed); make the viewer a member of
  // a second group only the admin and viewer share, to check group visibility.
  const [other] = await t.db("groups").insert({ slug: "second-site", name: "Second site (illustrative)" });
  const viewer = await t.db("users").where({ email: "viewer@saddlebook.test" }).first();
  await t.db("memberships").where({ user_id: viewer.id }).del();
  await t.db("memberships").insert({ user_id: viewer.id, group_id: other, group_role: "member" });
  for (const who of WHO) {
    if (who === "anonymous") continue;
    const u = await t.db("users").where({ email: `${who}@saddlebook.test` }).first();
    const s = await sessionStorage().getSession();
    s.set("userId", u.id);
    s.set("signedInAt", Date.now());
    s.set("csrf", "token-" + who);
    cookies[who] = (await sessionStorage().commitSession(s)).split(";")[0];
  }
});
afterAll(async () => {
  const { getDb } = await import("../../db/client.server");
  await getDb().destroy();
  await t?.drop();
});

type Expect = 200 | 302 | 401 | 403 | 404;
interface Case {
  path: string;
  params?: Record<string, string>;
  load: () => Promise<{ loader: (a: any) => Promise<unknown> }>;
  expect: Record<Who, Expect>;
}

const PAGES: Case[] = [
  { path: "/settings", load: () => import("../../app/routes/settings"), expect: { anonymous: 302, viewer: 200, author: 200, curator: 200, admin: 200 } },
  { path: "/settings/tokens", load: () => import("../../app/routes/settings.tokens"), expect: { anonymous: 302, viewer: 200, author: 200, curator: 200, admin: 200 } },
  { path: "/groups", load: () => import("../../app/routes/groups"), expect: { anonymous: 302, viewer: 200, author: 200, curator: 200, admin: 200 } },
  {
    path: "/groups/demo-kinetics",
    params: { slug: "demo-kinetics" },
    load: () => import("../../app/routes/groups.$slug"),
    // The viewer is not in the demo group (moved above); the others are; admins see all groups.
    expect: { anonymous: 302, viewer: 403, author: 200, curator: 200, admin: 200 },
  },
  {
    path: "/groups/second-site",
    params: { slug: "second-site" },
    load: () => import("../../app/routes/groups.$slug"),
    expect: { anonymous: 302, viewer: 200, author: 403, curator: 403, admin: 200 },
  },
  { path: "/admin/users", load: () => import("../../app/routes/admin.users"), expect: { anonymous: 302, viewer: 403, author: 403, curator: 403, admin: 200 } },
  { path: "/api/v1/me", load: () => import("../../app/routes/api.v1.me"), expect: { anonymous: 401, viewer: 200, author: 200, curator: 200, admin: 200 } },
];

describe("account pages and /api/v1/me by role", () => {
  for (const c of PAGES) {
    for (const who of WHO) {
      it(`${who} → GET ${c.path}: ${c.expect[who]}`, async () => {
        const mod = await c.load();
        const r = await outcome(() => mod.loader(args(getRequest(c.path, { cookie: cookies[who] }), c.params ?? {})));
        expect(r.status).toBe(c.expect[who]);
        if (r.status === 302) expect(r.headers.get("Location")).toBe(`/sign-in?next=${encodeURIComponent(c.path)}`);
        if (r.status === 401) expect(r.body.error.code).toBe("unauthorized");
      });
    }
  }
});

describe("group management controls by role", () => {
  it("shows management to the group admin and site admin only, and role choices the policy allows", async () => {
    const mod = await import("../../app/routes/groups.$slug");
    const view = async (who: Who) => (await outcome(() => mod.loader(args(getRequest("/groups/demo-kinetics", { cookie: cookies[who] }), { slug: "demo-kinetics" })))).body;
    expect((await view("author")).manage).toBe(false);
    const curator = await view("curator");
    expect(curator.manage).toBe(true);
    const byEmail = (d: any, email: string) => d.members.find((m: any) => m.email === email);
    // Group admin: no site-wide role changes at all.
    expect(byEmail(curator, "author@saddlebook.test").roleOptions).toEqual(["author"]);
    expect(byEmail(curator, "admin@saddlebook.test").roleOptions).toEqual(["admin"]);
    const admin = await view("admin");
    expect(byEmail(admin, "author@saddlebook.test").roleOptions).toEqual(["viewer", "author", "curator", "admin"]);
  });

  it("an author cannot post group changes even with a valid CSRF token", async () => {
    const mod = await import("../../app/routes/groups.$slug");
    const { formRequest } = await import("./support");
    const author2 = await t.db("users").where({ email: "author2@saddlebook.test" }).first();
    const r = await outcome(() =>
      mod.action(args(formRequest("/groups/demo-kinetics", { csrf: "token-author", intent: "remove", userId: String(author2.id) }, { cookie: cookies.author }), { slug: "demo-kinetics" })),
    );
    expect(r.status).toBe(403);
    expect(await t.db("memberships").where({ user_id: author2.id })).toHaveLength(1);
  });
});

describe("development mailbox", () => {
  // Mail holds sign-in and reset links: whoever reads it can take the account. The page is
  // 404 unless the local stand-ins run, and then to everyone but an admin.
  it("is 404 unless the stand-ins run, and then 404 to the signed-out and to every role but admin", async () => {
    const mod = await import("../../app/routes/dev.mailbox");
    const saved = { ...process.env };
    const open = (who: Who) => outcome(() => mod.loader(args(getRequest("/dev/mailbox", who === "anonymous" ? {} : { cookie: cookies[who] }))));
    try {
      process.env.MAIL_CATCHER_DIR = "/nonexistent-mail-dir";
      delete process.env.DEV_STANDINS;
      for (const who of WHO) expect((await open(who)).status, who).toBe(404);
      process.env.DEV_STANDINS = "0";
      expect((await open("admin")).status).toBe(404);
      process.env.DEV_STANDINS = "1";
      for (const who of WHO) expect((await open(who)).status, who).toBe(who === "admin" ? 200 : 404);
    } finally {
      for (const k of ["DEV_STANDINS", "MAIL_CATCHER_DIR"]) {
        if (saved[k] === undefined) delete process.env[k];
        else process.env[k] = saved[k];
      }
    }
  });
});
