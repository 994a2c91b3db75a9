// API tokens (stored hashed, last-used time, revocation) and one-time links (expiry,
// single use, simultaneous use) in the data layer, on the real MariaDB.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { freshDatabase, type TestDatabase } from "../support/db";
import { seedDemoIdentities } from "../../db/seeds/demo-identities";
import {
  checkOneTimeToken,
  consumeOneTimeToken,
  createApiToken,
  issueOneTimeToken,
  listApiTokens,
  revokeApiToken,
  sha256Hex,
  userForApiToken,
  LINK_LIFETIME_HOURS,
} from "../../db/access/tokens.server";
import { findUserByEmail, loadUserWithGroups } from "../../db/access/users.server";

let t: TestDatabase;
let author: number;
let admin: number;

beforeAll(async () => {
  t = await freshDatabase();
  await seedDemoIdentities(t.db);
  author = (await findUserByEmail(t.db, "author@saddlebook.test"))!.id;
  admin = (await findUserByEmail(t.db, "admin@saddlebook.test"))!.id;
});
afterAll(async () => {
  await t?.drop();
});

describe("API tokens", () => {
  it("are shown once and stored only as a SHA-256 hash", async () => {
    const { id, token } = await createApiToken(t.db, author, "  plotting script ");
    expect(token).toMatch(/^sbk_[A-Za-z0-9_-]{43}$/);
    const row = await t.db("api_tokens").where({ id }).first();
    expect(row.token_hash).toBe(sha256Hex(token));
    expect(JSON.stringify(row)).not.toContain(token.slice(4));
    expect(row.name).toBe("plotting script");
    expect(row.prefix).toBe(token.slice(0, 10));
  });

  it("identify their owner and stamp the last-used time", async () => {
    const { id, token } = await createApiToken(t.db, author, "notebook");
    expect((await listApiTokens(t.db, author)).find((x) => x.id === id)?.lastUsedAt).toBeNull();
    expect(await userForApiToken(t.db, token)).toMatchObject({ userId: author, tokenId: id, user: { id: author } });
    expect((await listApiTokens(t.db, author)).find((x) => x.id === id)?.lastUsedAt).not.toBeNull();
  });

  it("stop working when revoked, and only their owner can revoke them", async () => {
    const { id, token } = await createApiToken(t.db, author, "old laptop");
    expect(await revokeApiToken(t.db, admin, id)).toBe(false);
    expect(await userForApiToken(t.db, token)).not.toBeNull();
    expect(await revokeApiToken(t.db, author, id)).toBe(true);
    expect(await userForApiToken(t.db, token)).toBeNull();
    expect(await revokeApiToken(t.db, author, id)).toBe(false);
  });

  it("bring their owner's groups in the same answer as the user lookup, and no user when the owner is disabled", async () => {
    const { token } = await createApiToken(t.db, author, "groups check");
    const viaToken = await userForApiToken(t.db, token);
    expect(viaToken?.user).toEqual(await loadUserWithGroups(t.db, author));
    await t.db("users").where({ id: author }).update({ disabled: 1 });
    try {
      expect(await userForApiToken(t.db, token)).toMatchObject({ userId: author, user: null });
    } finally {
      await t.db("users").where({ id: author }).update({ disabled: 0 });
    }
  });

  it("reject unknown, malformed and over-long tokens", async () => {
    expect(await userForApiToken(t.db, "sbk_" + "x".repeat(43))).toBeNull();
    expect(await userForApiToken(t.db, "not-a-token")).toBeNull();
    expect(await userForApiToken(t.db, "sbk_" + "a".repeat(500))).toBeNull();
  });
});

describe("one-time links", () => {
  it("work once", async () => {
    const { token } = await issueOneTimeToken(t.db, { purpose: "reset-password", userId: author });
    const first = await consumeOneTimeToken(t.db, "reset-password", token);
    expect(first.ok && first.token.userId).toBe(author);
    expect(await consumeOneTimeToken(t.db, "reset-password", token)).toEqual({ ok: false, reason: "used" });
  });

  it("expire after their lifetime (1 h reset, 48 h verification, 7 d invitation) and stay unused", async () => {
    expect(LINK_LIFETIME_HOURS).toEqual({ "reset-password": 1, "verify-email": 48, invitation: 168 });
    const issued = new Date("2026-01-10T08:00:00Z");
    const { token, expiresAt } = await issueOneTimeToken(t.db, { purpose: "reset-password", userId: author, now: issued });
    expect(expiresAt.toISOString()).toBe("2026-01-10T09:00:00.000Z");
    const justBefore = new Date("2026-01-10T08:59:59Z");
    expect((await checkOneTimeToken(t.db, "reset-password", token, justBefore)).ok).toBe(true);
    const after = new Date("2026-01-10T09:00:01Z");
    expect(await consumeOneTimeToken(t.db, "reset-password", token, after)).toEqual({ ok: false, reason: "expired" });
    const row = await t.db("one_time_tokens").where({ token_hash: sha256Hex(token) }).first();
    expect(row.used_at).toBeNull();
  });

  it("belong to one purpose", async () => {
    const { token } = await issueOneTimeToken(t.db, { purpose: "verify-email", userId: author });
    expect(await consumeOneTimeToken(t.db, "reset-password", token)).toEqual({ ok: false, reason: "unknown" });
    expect((await consumeOneTimeToken(t.db, "verify-email", token)).ok).toBe(true);
  });

  it("let only one of two simultaneous uses through", async () => {
    const { token } = await issueOneTimeToken(t.db, { purpose: "reset-password", userId: author });
    const results = await Promise.all([
      consumeOneTimeToken(t.db, "reset-password", token),
      consumeOneTimeToken(t.db, "reset-password", token),
      consumeOneTimeToken(t.db, "reset-password", token),
    ]);
    expect(results.filter((r) => r.ok)).toHaveLength(1);
  });

  it("answer 'unknown' for garbage", async () => {
    expect(await checkOneTimeToken(t.db, "verify-email", "")).toEqual({ ok: false, reason: "unknown" });
    expect(await checkOneTimeToken(t.db, "verify-email", "nope")).toEqual({ ok: false, reason: "unknown" });
  });
});

describe("audit log listing", () => {
  it("filters by action prefixes, newest first, with the actor's e-mail", async () => {
    const { audit, listAudit } = await import("../../db/access/audit.server");
    await audit(t.db, { userId: author, action: "sign-in.success", ip: "192.0.2.1", detail: { method: "password" } });
    await audit(t.db, { userId: author, action: "mechanism.create", ip: "192.0.2.1" });
    await audit(t.db, { userId: admin, action: "role.change", objectType: "user", objectId: author, ip: "192.0.2.2", detail: { role: { from: "viewer", to: "author" } } });
    const rows = await listAudit(t.db, { prefixes: ["sign-in.", "role."] });
    expect(rows.map((r) => r.action)).toEqual(["role.change", "sign-in.success"]);
    expect(rows[0]).toMatchObject({ userEmail: "admin@saddlebook.test", objectId: String(author), ip: "192.0.2.2", detail: { role: { from: "viewer", to: "author" } } });
  });
});
