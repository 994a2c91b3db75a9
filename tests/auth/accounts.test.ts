// Registration, e-mail verification, password reset, group invitations, API tokens and
// role changes through the route modules, on the real MariaDB: each link works once,
// expired or reused links say so and change nothing, bad input changes nothing, and
// every token, invitation and role event leaves an audit row.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { TestDatabase } from "../support/db";
import { args, authDatabase, cookieFrom, formRequest, getRequest, outcome } from "./support";
import { DEMO_PASSWORD } from "../../db/seeds/demo-identities";
import { memoryOutbox } from "../../app/mail/transport.server";

let t: TestDatabase;
const route = {} as {
  root: typeof import("../../app/root");
  signIn: typeof import("../../app/routes/sign-in");
  register: typeof import("../../app/routes/register");
  verify: typeof import("../../app/routes/verify-email");
  forgot: typeof import("../../app/routes/forgot-password");
  reset: typeof import("../../app/routes/reset-password");
  tokens: typeof import("../../app/routes/settings.tokens");
  me: typeof import("../../app/routes/api.v1.me");
  group: typeof import("../../app/routes/groups.$slug");
  accept: typeof import("../../app/routes/invitations.accept");
  admin: typeof import("../../app/routes/admin.users");
};

beforeAll(async () => {
  t = await authDatabase();
  route.root = await import("../../app/root");
  route.signIn = await import("../../app/routes/sign-in");
  route.register = await import("../../app/routes/register");
  route.verify = await import("../../app/routes/verify-email");
  route.forgot = await import("../../app/routes/forgot-password");
  route.reset = await import("../../app/routes/reset-password");
  route.tokens = await import("../../app/routes/settings.tokens");
  route.me = await import("../../app/routes/api.v1.me");
  route.group = await import("../../app/routes/groups.$slug");
  route.accept = await import("../../app/routes/invitations.accept");
  route.admin = await import("../../app/routes/admin.users");
});
afterAll(async () => {
  const { getDb } = await import("../../db/client.server");
  await getDb().destroy();
  await t?.drop();
});

interface Visitor {
  cookie: string;
  csrf: string;
}

async function visitor(cookie = ""): Promise<Visitor> {
  const r = await outcome(() => route.root.loader(args(getRequest("/", { cookie }))));
  return { cookie: cookieFrom(r) || cookie, csrf: r.body.csrf };
}

async function signedIn(email: string, password = DEMO_PASSWORD): Promise<Visitor> {
  const v = await visitor();
  const r = await outcome(() => route.signIn.action(args(formRequest("/sign-in", { csrf: v.csrf, email, password }, { cookie: v.cookie, ip: "192.0.2.80" }))));
  expect(r.status, JSON.stringify(r.body)).toBe(302);
  return visitor(cookieFrom(r));
}

function post(v: Visitor, path: string, fields: Record<string, string>) {
  return formRequest(path, { csrf: v.csrf, ...fields }, { cookie: v.cookie, ip: "192.0.2.80" });
}

function lastMailTo(email: string) {
  const m = [...memoryOutbox].reverse().find((x) => x.to === email);
  if (!m) throw new Error(`no mail to ${email}`);
  return m;
}

function linkIn(text: string, path: string): string {
  const m = new RegExp(`https?://[^\\s]+${path}\\?token=[A-Za-z0-9_%-]+`).exec(text);
  if (!m) throw new Error(`no ${path} link in: ${text}`);
  const u = new URL(m[0]);
  return u.pathname + u.search;
}

const countUsers = async () => Number((await t.db("users").count({ n: "*" }).first())!.n);
const detailOf = (row: { detail: unknown }) => (typeof row.detail === "string" ? JSON.parse(row.detail) : row.detail);

describe("registration and e-mail verification", () => {
  const email = "rhea.lindqvist@example.test";

  it("keeps the input and changes nothing on bad input", async () => {
    const v = await visitor();
    const before = await countUsers();
    const r = await outcome(() => route.register.action(args(post(v, "/register", { name: "", email: "not-an-address", password: "short", confirm: "other" }))));
    expect(r.status).toBe(400);
    expect(r.body.fields).toMatchObject({ name: "Enter your name.", email: "Enter a valid e-mail address.", password: "Use at least 10 characters." });
    expect(r.body.input.email).toBe("not-an-address");
    expect(await countUsers()).toBe(before);
  });

  it("creates an unconfirmed account and mails a link (text and HTML)", async () => {
    const v = await visitor();
    const r = await outcome(() => route.register.action(args(post(v, "/register", { name: "Rhea Lindqvist", email, password: "tetrahedral-42", confirm: "tetrahedral-42" }))));
    expect(r.status).toBe(302);
    const row = await t.db("users").where({ email }).first();
    expect(row).toMatchObject({ name: "Rhea Lindqvist", role: "viewer", email_verified_at: null });
    expect(row.password_hash).toMatch(/^\$2[aby]\$/);
    const mail = lastMailTo(email);
    expect(mail.subject).toBe("Confirm your e-mail address for Saddlebook");
    expect(mail.text).toContain("expires in 2 days");
    expect(mail.html).toContain("Confirm e-mail address");
  });

  it("refuses a duplicate address and changes nothing", async () => {
    const v = await visitor();
    const before = await countUsers();
    const r = await outcome(() => route.register.action(args(post(v, "/register", { name: "Someone", email: "AUTHOR@saddlebook.test", password: "tetrahedral-42", confirm: "tetrahedral-42" }))));
    expect(r.status).toBe(409);
    expect(r.body.fields.email).toMatch(/exists already/);
    expect(await countUsers()).toBe(before);
  });

  it("does not sign in before the address is confirmed", async () => {
    const v = await visitor();
    const r = await outcome(() => route.signIn.action(args(post(v, "/sign-in", { email, password: "tetrahedral-42" }))));
    expect(r.status).toBe(400);
    expect(r.body.code).toBe("unverified");
  });

  it("confirms the address once; the second click says the link was used", async () => {
    const path = linkIn(lastMailTo(email).text, "/verify-email");
    const first = await outcome(() => route.verify.loader(args(getRequest(path))));
    expect(first.body).toEqual({ ok: true, message: "Your e-mail address is confirmed." });
    expect((await t.db("users").where({ email }).first()).email_verified_at).not.toBeNull();
    const again = await outcome(() => route.verify.loader(args(getRequest(path))));
    expect(again.body).toEqual({ ok: false, message: "This link has already been used. Ask for a new one if you still need it." });
    await signedIn(email, "tetrahedral-42");
  });
});

describe("password reset", () => {
  const email = "author2@saddlebook.test";

  it("answers the same for unknown addresses and sends nothing", async () => {
    const v = await visitor();
    const n = memoryOutbox.length;
    const r = await outcome(() => route.forgot.action(args(post(v, "/forgot-password", { email: "ghost@example.test" }))));
    expect(r.body.sent).toBe(true);
    expect(memoryOutbox.length).toBe(n);
  });

  it("an expired link says so and leaves the password as it was", async () => {
    const v = await visitor();
    await outcome(() => route.forgot.action(args(post(v, "/forgot-password", { email }))));
    const path = linkIn(lastMailTo(email).text, "/reset-password");
    const hashBefore = (await t.db("users").where({ email }).first()).password_hash;
    await t.db("one_time_tokens").where({ purpose: "reset-password" }).update({ expires_at: new Date(Date.now() - 1000) });
    const shown = await outcome(() => route.reset.loader(args(getRequest(path))));
    expect(shown.body.problem).toBe("This link has expired. Ask for a new one.");
    const token = new URL("http://x" + path).searchParams.get("token")!;
    const r = await outcome(() => route.reset.action(args(post(v, "/reset-password", { token, password: "new-password-123", confirm: "new-password-123" }))));
    expect(r.status).toBe(410);
    expect((await t.db("users").where({ email }).first()).password_hash).toBe(hashBefore);
  });

  it("a fresh link sets the new password once, signing out other sessions; reuse is refused", async () => {
    const earlier = await signedIn(email);
    const v = await visitor();
    await outcome(() => route.forgot.action(args(post(v, "/forgot-password", { email }))));
    const mail = lastMailTo(email);
    expect(mail.text).toContain("expires in 1 hour");
    const token = new URL("http://x" + linkIn(mail.text, "/reset-password")).searchParams.get("token")!;
    const ok = await outcome(() => route.reset.action(args(post(v, "/reset-password", { token, password: "new-password-123", confirm: "new-password-123" }))));
    expect(ok.status).toBe(302);
    const old = await outcome(() => route.me.loader(args(getRequest("/api/v1/me", { cookie: earlier.cookie }))));
    expect(old.status).toBe(401);
    await signedIn(email, "new-password-123");
    const again = await outcome(() => route.reset.action(args(post(v, "/reset-password", { token, password: "another-pass-456", confirm: "another-pass-456" }))));
    expect(again.status).toBe(410);
    expect(again.body.problem).toMatch(/already been used/);
    await signedIn(email, "new-password-123");
    expect((await t.db("audit_log").where({ action: "password.reset" })).length).toBe(1);
  });
});

describe("mail flooding", () => {
  it("sends at most 3 reset links per account and hour, answering the same each time", async () => {
    const v = await visitor();
    const email = "viewer@saddlebook.test";
    const before = memoryOutbox.filter((m) => m.to === email).length;
    for (let i = 0; i < 5; i++) {
      const r = await outcome(() => route.forgot.action(args(post(v, "/forgot-password", { email }))));
      expect(r.body.sent).toBe(true);
    }
    expect(memoryOutbox.filter((m) => m.to === email).length - before).toBe(3);
  });
});

describe("changing the password in settings", () => {
  it("needs the current password, keeps this session and ends the others", async () => {
    const settings = await import("../../app/routes/settings");
    const here = await signedIn("admin@saddlebook.test");
    const elsewhere = await signedIn("admin@saddlebook.test");
    const wrong = await outcome(() =>
      settings.action(args(post(here, "/settings", { intent: "password", current: "guess-guess", password: "kinetic-isotope-2", confirm: "kinetic-isotope-2" }))),
    );
    expect(wrong.status).toBe(400);
    expect(wrong.body.fields.current).toBe("This is not your current password.");
    const ok = await outcome(() =>
      settings.action(args(post(here, "/settings", { intent: "password", current: DEMO_PASSWORD, password: "kinetic-isotope-2", confirm: "kinetic-isotope-2" }))),
    );
    expect(ok.body.ok).toMatch(/^Your password is changed\./);
    const renewed = cookieFrom(ok);
    const meHere = await outcome(() => route.me.loader(args(getRequest("/api/v1/me", { cookie: renewed }))));
    expect(meHere.status).toBe(200);
    const meElsewhere = await outcome(() => route.me.loader(args(getRequest("/api/v1/me", { cookie: elsewhere.cookie }))));
    expect(meElsewhere.status).toBe(401);
    // Back to the demo password for the tests below.
    const back = await visitor(renewed);
    await outcome(() => settings.action(args(post(back, "/settings", { intent: "password", current: "kinetic-isotope-2", password: DEMO_PASSWORD, confirm: DEMO_PASSWORD }))));
    await signedIn("admin@saddlebook.test");
  });
});

describe("API tokens through the settings page and /api/v1/me", () => {
  it("creates a token shown once, accepts it as Bearer, records use, revokes it, and logs both events", async () => {
    const v = await signedIn("curator@saddlebook.test");
    const bad = await outcome(() => route.tokens.action(args(post(v, "/settings/tokens", { intent: "create", name: "   " }))));
    expect(bad.status).toBe(400);
    const created = await outcome(() => route.tokens.action(args(post(v, "/settings/tokens", { intent: "create", name: "fitting notebook" }))));
    const token = created.body.created.token as string;
    expect(token).toMatch(/^sbk_/);
    const listed = await outcome(() => route.tokens.loader(args(getRequest("/settings/tokens", { cookie: v.cookie }))));
    expect(JSON.stringify(listed.body)).not.toContain(token);
    const tokenRow = listed.body.tokens[0];
    expect(tokenRow).toMatchObject({ name: "fitting notebook", lastUsedAt: null, revokedAt: null });

    const call = (auth?: string) => outcome(() => route.me.loader(args(getRequest("/api/v1/me", { headers: auth ? { Authorization: auth } : {} }))));
    const okCall = await call(`Bearer ${token}`);
    expect(okCall.status).toBe(200);
    expect(okCall.body).toMatchObject({ email: "curator@saddlebook.test", role: "curator", groups: [expect.objectContaining({ groupRole: "admin" })] });
    expect(Object.keys(okCall.body).sort()).toEqual(["email", "groups", "id", "name", "role"]);
    const used = await outcome(() => route.tokens.loader(args(getRequest("/settings/tokens", { cookie: v.cookie }))));
    expect(used.body.tokens[0].lastUsedAt).not.toBeNull();

    const revoked = await outcome(() => route.tokens.action(args(post(v, "/settings/tokens", { intent: "revoke", id: String(tokenRow.id) }))));
    expect(revoked.body.revoked).toMatch(/revoked/);
    const refused = await call(`Bearer ${token}`);
    expect(refused.status).toBe(401);
    expect(refused.body).toEqual({ error: { code: "unauthorized", message: "The API token is not valid: it may have been revoked or mistyped." } });
    expect(refused.headers.get("WWW-Authenticate")).toMatch(/^Bearer/);

    const none = await call();
    expect(none.status).toBe(401);
    expect(none.body.error.message).toMatch(/Sign in, or send an API token/);
    const events = await t.db("audit_log").whereIn("action", ["token.create", "token.revoke"]).orderBy("id");
    expect(events.map((e) => e.action)).toEqual(["token.create", "token.revoke"]);
    expect(events.every((e) => e.ip === "192.0.2.80" && e.object_id === String(tokenRow.id))).toBe(true);
  });

  it("judges a request that sends a bad token by the token, even with a valid session", async () => {
    const v = await signedIn("viewer@saddlebook.test");
    const r = await outcome(() => route.me.loader(args(getRequest("/api/v1/me", { cookie: v.cookie, headers: { Authorization: "Bearer sbk_nope" } }))));
    expect(r.status).toBe(401);
  });
});

describe("group invitations and roles", () => {
  const invitee = "milo.serrano@example.test";

  it("a plain member cannot invite; the group admin invites, with an expiring link and an audit row", async () => {
    const author = await signedIn("author@saddlebook.test");
    const denied = await outcome(() => route.group.action(args(post(author, "/groups/demo-kinetics", { intent: "invite", email: invitee, role: "author", groupRole: "member" }), { slug: "demo-kinetics" })));
    expect(denied.status).toBe(403);
    expect(await t.db("invitations").count({ n: "*" }).first()).toMatchObject({ n: 0 });

    const curator = await signedIn("curator@saddlebook.test");
    const bad = await outcome(() => route.group.action(args(post(curator, "/groups/demo-kinetics", { intent: "invite", email: "nope", role: "admin", groupRole: "member" }), { slug: "demo-kinetics" })));
    expect(bad.status).toBe(400);
    expect(bad.body.fields).toMatchObject({ email: "Enter a valid e-mail address.", role: "Choose viewer or author." });
    const ok = await outcome(() => route.group.action(args(post(curator, "/groups/demo-kinetics", { intent: "invite", email: invitee, role: "author", groupRole: "member" }), { slug: "demo-kinetics" })));
    expect(ok.status).toBe(200);
    const mail = lastMailTo(invitee);
    expect(mail.subject).toBe("Corin Aldane invites you to Demo kinetics group (illustrative) on Saddlebook");
    expect(mail.text).toContain("expires in 7 days");
    const [row] = await t.db("audit_log").where({ action: "invitation.create" });
    expect(detailOf(row)).toMatchObject({ email: invitee, role: "author", groupRole: "member" });
  });

  it("the invitation creates the account in the group once; the second use is refused", async () => {
    const path = linkIn(lastMailTo(invitee).text, "/invitations/accept");
    const token = new URL("http://x" + path).searchParams.get("token")!;
    const shown = await outcome(() => route.accept.loader(args(getRequest(path))));
    expect(shown.body.invitation).toMatchObject({ email: invitee, group: "Demo kinetics group (illustrative)", role: "author" });
    const v = await visitor();
    const r = await outcome(() => route.accept.action(args(post(v, "/invitations/accept", { token, name: "Milo Serrano", password: "hydride-shift-9", confirm: "hydride-shift-9" }))));
    expect(r.status).toBe(302);
    expect(r.headers.get("Location")).toBe("/groups/demo-kinetics");
    const me = await outcome(() => route.me.loader(args(getRequest("/api/v1/me", { cookie: cookieFrom(r) }))));
    expect(me.body).toMatchObject({ email: invitee, role: "author", groups: [expect.objectContaining({ slug: "demo-kinetics", groupRole: "member" })] });
    const before = await countUsers();
    const fresh = await visitor();
    const again = await outcome(() => route.accept.action(args(post(fresh, "/invitations/accept", { token, name: "X", password: "hydride-shift-9", confirm: "hydride-shift-9" }))));
    expect(again.status).toBe(410);
    expect(await countUsers()).toBe(before);
    expect((await t.db("audit_log").where({ action: "invitation.accept" })).length).toBe(1);
  });

  it("a group admin cannot change anyone's site-wide role (not even between viewer and author); a site admin can, and it is logged", async () => {
    const curator = await signedIn("curator@saddlebook.test");
    const milo = await t.db("users").where({ email: invitee }).first();
    const curatorId = (await t.db("users").where({ email: "curator@saddlebook.test" }).first()).id;
    for (const [userId, role] of [[milo.id, "viewer"], [milo.id, "curator"], [curatorId, "admin"]] as const) {
      const r = await outcome(() => route.group.action(args(post(curator, "/groups/demo-kinetics", { intent: "set-role", userId: String(userId), role }), { slug: "demo-kinetics" })));
      expect(r.status, `${userId} → ${role}`).toBe(403);
      expect(r.body.error).toMatch(/site admin only/);
    }
    expect((await t.db("users").where({ id: milo.id }).first()).role).toBe("author");
    expect((await t.db("users").where({ id: curatorId }).first()).role).toBe("curator");
    const shown = await outcome(() => route.group.loader(args(getRequest("/groups/demo-kinetics", { cookie: curator.cookie }), { slug: "demo-kinetics" })));
    for (const m of shown.body.members) expect(m.roleOptions, m.email).toEqual([m.role]);
    expect(await t.db("audit_log").where({ action: "role.change", object_id: String(milo.id) })).toHaveLength(0);
    const admin = await signedIn("admin@saddlebook.test");
    const toViewer = await outcome(() => route.group.action(args(post(admin, "/groups/demo-kinetics", { intent: "set-role", userId: String(milo.id), role: "viewer" }), { slug: "demo-kinetics" })));
    expect(toViewer.body.ok).toBe("Role changed to viewer.");
    const changes = await t.db("audit_log").where({ action: "role.change", object_id: String(milo.id) });
    expect(changes).toHaveLength(1);
    expect(detailOf(changes[0])).toMatchObject({ role: { from: "author", to: "viewer" } });
  });

  it("the last group admin cannot be removed; members can", async () => {
    const admin = await signedIn("admin@saddlebook.test");
    const curatorId = (await t.db("users").where({ email: "curator@saddlebook.test" }).first()).id;
    const adminId = (await t.db("users").where({ email: "admin@saddlebook.test" }).first()).id;
    await t.db("memberships").where({ user_id: adminId }).update({ group_role: "member" });
    const refused = await outcome(() => route.group.action(args(post(admin, "/groups/demo-kinetics", { intent: "remove", userId: String(curatorId) }), { slug: "demo-kinetics" })));
    expect(refused.status).toBe(409);
    const milo = await t.db("users").where({ email: invitee }).first();
    const removed = await outcome(() => route.group.action(args(post(admin, "/groups/demo-kinetics", { intent: "remove", userId: String(milo.id) }), { slug: "demo-kinetics" })));
    expect(removed.body.ok).toBe("Removed from the group.");
    expect(await t.db("memberships").where({ user_id: milo.id })).toHaveLength(0);
    expect((await t.db("audit_log").where({ action: "member.remove" })).length).toBe(1);
  });

  it("the admin users page changes global roles, refuses a forged form and logs the change", async () => {
    const admin = await signedIn("admin@saddlebook.test");
    const viewerId = (await t.db("users").where({ email: "viewer@saddlebook.test" }).first()).id;
    const forged = await outcome(() =>
      route.admin.action(args(formRequest("/admin/users", { csrf: "forged", userId: String(viewerId), role: "curator" }, { cookie: admin.cookie }))),
    );
    expect(forged.status).toBe(403);
    expect((await t.db("users").where({ id: viewerId }).first()).role).toBe("viewer");
    const r = await outcome(() => route.admin.action(args(post(admin, "/admin/users", { userId: String(viewerId), role: "author" }))));
    expect(r.body.ok).toBe("viewer@saddlebook.test is now author.");
    const [row] = await t.db("audit_log").where({ action: "role.change", object_id: String(viewerId) });
    expect(detailOf(row)).toEqual({ role: { from: "viewer", to: "author" } });
    const self = await outcome(() => route.admin.action(args(post(admin, "/admin/users", { userId: String(row.user_id), role: "viewer" }))));
    expect(self.status).toBe(409);
  });
});

describe("several reset links", () => {
  it("using the newer link makes the older one useless, and the other way round", async () => {
    const email = "curator@saddlebook.test";
    const v = await visitor();
    const tokens: string[] = [];
    for (let i = 0; i < 2; i++) {
      await outcome(() => route.forgot.action(args(post(v, "/forgot-password", { email }))));
      tokens.push(new URL("http://x" + linkIn(lastMailTo(email).text, "/reset-password")).searchParams.get("token")!);
    }
    expect(tokens[0]).not.toBe(tokens[1]);
    const newer = await outcome(() => route.reset.action(args(post(v, "/reset-password", { token: tokens[1]!, password: "newer-link-pass-1", confirm: "newer-link-pass-1" }))));
    expect(newer.status).toBe(302);
    const hash = (await t.db("users").where({ email }).first()).password_hash;
    const shown = await outcome(() => route.reset.loader(args(getRequest(`/reset-password?token=${tokens[0]}`))));
    expect(shown.body.problem).toMatch(/already been used/);
    const older = await outcome(() => route.reset.action(args(post(v, "/reset-password", { token: tokens[0]!, password: "older-link-pass-2", confirm: "older-link-pass-2" }))));
    expect(older.status).toBe(410);
    expect((await t.db("users").where({ email }).first()).password_hash).toBe(hash);
    await signedIn(email, "newer-link-pass-1");
  });
});

describe("disabling an account in the admin page", () => {
  it("ends the person's sessions and tokens and refuses sign-in; re-enabling lets them sign in again; both logged", async () => {
    const email = "author@saddlebook.test";
    const admin = await signedIn("admin@saddlebook.test");
    const person = await signedIn(email);
    const target = await t.db("users").where({ email }).first();
    const { createApiToken } = await import("../../db/access/tokens.server");
    const { token } = await createApiToken(t.db, target.id, "disable test");
    const asPerson = () => outcome(() => route.me.loader(args(getRequest("/api/v1/me", { cookie: person.cookie }))));
    const asToken = () => outcome(() => route.me.loader(args(getRequest("/api/v1/me", { headers: { Authorization: `Bearer ${token}` } }))));
    expect((await asPerson()).status).toBe(200);

    const forged = await outcome(() => route.admin.action(args(formRequest("/admin/users", { csrf: "forged", intent: "disable", userId: String(target.id) }, { cookie: admin.cookie }))));
    expect(forged.status).toBe(403);
    const notAdmin = await outcome(() => route.admin.action(args(post(person, "/admin/users", { intent: "disable", userId: String(target.id) }))));
    expect(notAdmin.status).toBe(403);
    expect((await t.db("users").where({ id: target.id }).first()).disabled).toBeFalsy();

    const off = await outcome(() => route.admin.action(args(post(admin, "/admin/users", { intent: "disable", userId: String(target.id) }))));
    expect(off.body.ok).toMatch(/is disabled/);
    expect((await asPerson()).status).toBe(401);
    expect((await asToken()).status).toBe(401);
    const v = await visitor();
    const refused = await outcome(() => route.signIn.action(args(formRequest("/sign-in", { csrf: v.csrf, email, password: DEMO_PASSWORD }, { cookie: v.cookie, ip: "192.0.2.81" }))));
    expect(refused.status).toBe(400);
    expect(refused.body.error).toMatch(/disabled/);
    const page = await outcome(() => route.admin.loader(args(getRequest("/admin/users", { cookie: admin.cookie }))));
    expect(page.body.users.find((u: { email: string }) => u.email === email).disabled).toBe(true);

    const on = await outcome(() => route.admin.action(args(post(admin, "/admin/users", { intent: "enable", userId: String(target.id) }))));
    expect(on.body.ok).toMatch(/enabled again/);
    expect((await asToken()).status).toBe(200);
    expect((await asPerson()).status).toBe(401); // the old session stays ended
    await signedIn(email);

    const self = await outcome(() => route.admin.action(args(post(admin, "/admin/users", { intent: "disable", userId: String(page.body.me) }))));
    expect(self.status).toBe(409);
    expect((await t.db("audit_log").where({ action: "user.disable", object_id: String(target.id) })).length).toBe(1);
    expect((await t.db("audit_log").where({ action: "user.enable", object_id: String(target.id) })).length).toBe(1);
  });
});
