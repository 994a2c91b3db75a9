/**
 * API tokens and one-time links.
 *
 * Both are random secrets (32 bytes from the OS generator) that the database only ever
 * stores as SHA-256 hashes: a leaked table does not leak working tokens. A fast hash is
 * enough because the secrets are random, not chosen by people (common practice).
 */
import type { Knex } from "knex";
import { USER_WITH_GROUPS_COLUMNS, userWithGroupsFromRows, type UserWithGroups } from "./users.server";
import { createHash, randomBytes } from "node:crypto";

export const API_TOKEN_PREFIX = "sbk_";

export function sha256Hex(s: string): string {
  return createHash("sha256").update(s, "utf8").digest("hex");
}

function randomSecret(): string {
  return randomBytes(32).toString("base64url");
}

// ---------------------------------------------------------------- API tokens

export interface ApiTokenRow {
  id: number;
  name: string;
  prefix: string;
  createdAt: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
}

/** Creates a named token; returns the token text, which is never retrievable again. */
export async function createApiToken(db: Knex, userId: number, name: string): Promise<{ id: number; token: string }> {
  const token = API_TOKEN_PREFIX + randomSecret();
  const [id] = await db("api_tokens").insert({
    user_id: userId,
    name: name.trim(),
    token_hash: sha256Hex(token),
    prefix: token.slice(0, 10),
  });
  return { id: Number(id), token };
}

export async function listApiTokens(db: Knex, userId: number): Promise<ApiTokenRow[]> {
  const rows = await db("api_tokens").where({ user_id: userId }).orderBy("id", "desc");
  const iso = (v: unknown) => (v ? new Date(v as string).toISOString() : null);
  return rows.map((r: Record<string, unknown>) => ({
    id: Number(r.id),
    name: String(r.name),
    prefix: String(r.prefix),
    createdAt: iso(r.created_at)!,
    lastUsedAt: iso(r.last_used_at),
    revokedAt: iso(r.revoked_at),
  }));
}

/** Revokes one of the user's tokens; false when there is no such live token of theirs. */
export async function revokeApiToken(db: Knex, userId: number, tokenId: number): Promise<boolean> {
  const n = await db("api_tokens").where({ id: tokenId, user_id: userId }).whereNull("revoked_at").update({ revoked_at: db.fn.now(3) });
  return n > 0;
}

/**
 * The owner of a live token with their groups, in one round trip (api_tokens ⋈ users ⋈
 * memberships), and stamps the token's last-used time, to the minute. Null for an unknown or
 * revoked token; `user` is null when the owner is disabled.
 */
export async function userForApiToken(db: Knex, token: string): Promise<{ userId: number; tokenId: number; user: UserWithGroups | null } | null> {
  if (!token.startsWith(API_TOKEN_PREFIX) || token.length > 200) return null;
  const rows = (await db("api_tokens as t")
    .join("users as u", "u.id", "t.user_id")
    .leftJoin("memberships as m", "m.user_id", "u.id")
    .where("t.token_hash", sha256Hex(token))
    .whereNull("t.revoked_at")
    .select(["t.id as token_id", "t.last_used_at", ...USER_WITH_GROUPS_COLUMNS])) as Array<Record<string, unknown>>;
  const row = rows[0];
  if (!row) return null;
  // Stamp at most once a minute: a script calling the API in a loop need not write every time.
  const last = row.last_used_at ? new Date(row.last_used_at as string).getTime() : 0;
  if (Date.now() - last > 60_000) await db("api_tokens").where({ id: row.token_id }).update({ last_used_at: db.fn.now(3) });
  return { userId: Number(row.id), tokenId: Number(row.token_id), user: userWithGroupsFromRows(rows) };
}

// ---------------------------------------------------------------- one-time links

export type OneTimePurpose = "verify-email" | "reset-password" | "invitation";

/** How long each kind of link stays valid, in hours. */
export const LINK_LIFETIME_HOURS: Record<OneTimePurpose, number> = {
  "verify-email": 48,
  "reset-password": 1,
  invitation: 24 * 7,
};

export async function issueOneTimeToken(
  db: Knex,
  t: { purpose: OneTimePurpose; userId?: number | null; invitationId?: number | null; email?: string | null; now?: Date },
): Promise<{ token: string; expiresAt: Date }> {
  const token = randomSecret();
  const now = t.now ?? new Date();
  const expiresAt = new Date(now.getTime() + LINK_LIFETIME_HOURS[t.purpose] * 3600_000);
  await db("one_time_tokens").insert({
    purpose: t.purpose,
    user_id: t.userId ?? null,
    invitation_id: t.invitationId ?? null,
    email: t.email ?? null,
    token_hash: sha256Hex(token),
    expires_at: expiresAt,
  });
  return { token, expiresAt };
}

export interface OneTimeToken {
  id: number;
  purpose: OneTimePurpose;
  userId: number | null;
  invitationId: number | null;
  email: string | null;
  expiresAt: Date;
}

export type TokenCheck =
  | { ok: true; token: OneTimeToken }
  | { ok: false; reason: "unknown" | "expired" | "used" };

export const LINK_PROBLEM: Record<"unknown" | "expired" | "used", string> = {
  unknown: "This link is not valid. Check that it was copied whole, or ask for a new one.",
  expired: "This link has expired. Ask for a new one.",
  used: "This link has already been used. Ask for a new one if you still need it.",
};

/** Looks a link up without using it (to show a form before the change is made). */
export async function checkOneTimeToken(db: Knex, purpose: OneTimePurpose, token: string, now = new Date()): Promise<TokenCheck> {
  if (!token || token.length > 100) return { ok: false, reason: "unknown" };
  const row = await db("one_time_tokens").where({ token_hash: sha256Hex(token), purpose }).first();
  if (!row) return { ok: false, reason: "unknown" };
  if (row.used_at) return { ok: false, reason: "used" };
  const expiresAt = new Date(row.expires_at);
  if (expiresAt.getTime() <= now.getTime()) return { ok: false, reason: "expired" };
  return {
    ok: true,
    token: {
      id: Number(row.id),
      purpose: row.purpose,
      userId: row.user_id == null ? null : Number(row.user_id),
      invitationId: row.invitation_id == null ? null : Number(row.invitation_id),
      email: row.email ?? null,
      expiresAt,
    },
  };
}

/**
 * Uses a link: marks it used in the same statement that checks it is unused and
 * unexpired, so two simultaneous clicks cannot both succeed. Every other unused link of
 * the same kind for the same person (an older reset mail, say) dies with it. Call inside
 * the transaction that makes the change the link allows.
 */
export async function consumeOneTimeToken(db: Knex, purpose: OneTimePurpose, token: string, now = new Date()): Promise<TokenCheck> {
  const check = await checkOneTimeToken(db, purpose, token, now);
  if (!check.ok) return check;
  const n = await db("one_time_tokens")
    .where({ id: check.token.id })
    .whereNull("used_at")
    .where("expires_at", ">", now)
    .update({ used_at: now });
  if (n !== 1) return { ok: false, reason: "used" };
  if (check.token.userId !== null && purpose !== "invitation") {
    await db("one_time_tokens").where({ user_id: check.token.userId, purpose }).whereNull("used_at").update({ used_at: now });
  }
  return check;
}
