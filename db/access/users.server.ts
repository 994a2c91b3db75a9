/** Users: lookup, creation (password or single sign-on), roles, verification. */
import type { Knex } from "knex";

export type Role = "viewer" | "author" | "curator" | "admin";

export interface UserRecord {
  id: number;
  email: string;
  name: string;
  role: Role;
  passwordHash: string | null;
  emailVerifiedAt: Date | null;
  oidcSubject: string | null;
  disabled: boolean;
  createdAt: Date;
}

/** The user with group ids, in the shape the session and the policy module use. */
export interface UserWithGroups {
  id: number;
  email: string;
  name: string;
  role: Role;
  groupIds: number[];
  adminGroupIds: number[];
  emailVerified: boolean;
  /** Sessions signed in under an older epoch are no longer valid. */
  sessionEpoch: number;
}

export function normalizeEmail(email: string): string {
  return email.trim().toLowerCase();
}

function toRecord(r: Record<string, unknown>): UserRecord {
  return {
    id: Number(r.id),
    email: String(r.email),
    name: String(r.name),
    role: r.role as Role,
    passwordHash: (r.password_hash as string) ?? null,
    emailVerifiedAt: r.email_verified_at ? new Date(r.email_verified_at as string) : null,
    oidcSubject: (r.oidc_subject as string) ?? null,
    disabled: !!r.disabled,
    createdAt: new Date(r.created_at as string),
  };
}

export async function findUserById(db: Knex, id: number): Promise<UserRecord | null> {
  const r = await db("users").where({ id }).first();
  return r ? toRecord(r) : null;
}

export async function findUserByEmail(db: Knex, email: string): Promise<UserRecord | null> {
  const r = await db("users").where({ email: normalizeEmail(email) }).first();
  return r ? toRecord(r) : null;
}

export async function findUserByOidcSubject(db: Knex, subject: string): Promise<UserRecord | null> {
  const r = await db("users").where({ oidc_subject: subject }).first();
  return r ? toRecord(r) : null;
}

export async function createUser(
  db: Knex,
  u: { email: string; name: string; role: Role; passwordHash?: string | null; verified?: boolean; oidcSubject?: string | null },
): Promise<number> {
  const [id] = await db("users").insert({
    email: normalizeEmail(u.email),
    name: u.name.trim(),
    role: u.role,
    password_hash: u.passwordHash ?? null,
    email_verified_at: u.verified ? db.fn.now(3) : null,
    oidc_subject: u.oidcSubject ?? null,
  });
  return Number(id);
}

/** The user columns `userWithGroupsFromRows` reads, with the membership columns of a left join on memberships `m`. */
export const USER_WITH_GROUPS_COLUMNS = ["u.id", "u.email", "u.name", "u.role", "u.disabled", "u.email_verified_at", "u.session_epoch", "m.group_id", "m.group_role"];

/** A user from rows of users ⋈ memberships (one row per membership, or one with NULLs); null when absent or disabled. */
export function userWithGroupsFromRows(rows: Array<Record<string, unknown>>): UserWithGroups | null {
  const r = rows[0];
  if (!r || r.disabled) return null;
  const ms = rows.filter((m) => m.group_id != null);
  return {
    id: Number(r.id),
    email: String(r.email),
    name: String(r.name),
    role: r.role as Role,
    groupIds: ms.map((m) => Number(m.group_id)),
    adminGroupIds: ms.filter((m) => m.group_role === "admin").map((m) => Number(m.group_id)),
    emailVerified: !!r.email_verified_at,
    sessionEpoch: Number(r.session_epoch ?? 0),
  };
}

export async function loadUserWithGroups(db: Knex, id: number): Promise<UserWithGroups | null> {
  // One round trip: the user's row once per membership (or once with NULLs when there is none).
  const rows = await db("users as u").leftJoin("memberships as m", "m.user_id", "u.id").where("u.id", id).select(USER_WITH_GROUPS_COLUMNS);
  return userWithGroupsFromRows(rows);
}

export async function setRole(db: Knex, id: number, role: Role): Promise<void> {
  await db("users").where({ id }).update({ role, updated_at: db.fn.now(3) });
}

export async function setName(db: Knex, id: number, name: string): Promise<void> {
  await db("users").where({ id }).update({ name: name.trim(), updated_at: db.fn.now(3) });
}

/** Sets the password and ends every existing session of the user (raises the epoch). */
export async function setPasswordHash(db: Knex, id: number, hash: string): Promise<void> {
  await db("users")
    .where({ id })
    .update({ password_hash: hash, session_epoch: db.raw("session_epoch + 1"), updated_at: db.fn.now(3) });
}

/**
 * Disables or re-enables an account. Disabling also raises the session epoch, so the person's
 * sessions end and stay ended after a later re-enable (they sign in again). False when nothing changed.
 */
export async function setDisabled(db: Knex, id: number, disabled: boolean): Promise<boolean> {
  const change: Record<string, unknown> = { disabled, updated_at: db.fn.now(3) };
  if (disabled) change.session_epoch = db.raw("session_epoch + 1");
  const n = await db("users").where({ id, disabled: !disabled }).update(change);
  return n === 1;
}

export async function sessionEpoch(db: Knex, id: number): Promise<number> {
  const r = await db("users").where({ id }).first("session_epoch");
  return Number(r?.session_epoch ?? 0);
}

export async function markEmailVerified(db: Knex, id: number): Promise<void> {
  await db("users").where({ id }).whereNull("email_verified_at").update({ email_verified_at: db.fn.now(3), updated_at: db.fn.now(3) });
}

/** Binds a single sign-on subject to an account that has none; false when the account is already bound. */
export async function linkOidcSubject(db: Knex, id: number, subject: string): Promise<boolean> {
  const n = await db("users").where({ id }).whereNull("oidc_subject").update({ oidc_subject: subject, updated_at: db.fn.now(3) });
  return n === 1;
}

export interface UserListRow {
  id: number;
  email: string;
  name: string;
  role: Role;
  verified: boolean;
  disabled: boolean;
  sso: boolean;
  groups: string[];
  createdAt: string;
  lastSignInAt: string | null;
}

/** Every user with group names and the time of the last successful sign-in. */
export async function listUsers(db: Knex): Promise<UserListRow[]> {
  const users = await db("users").select("id", "email", "name", "role", "email_verified_at", "disabled", "oidc_subject", "created_at").orderBy("email");
  const ms = await db("memberships as m").join("groups as g", "g.id", "m.group_id").select("m.user_id", "g.name");
  const last = await db("audit_log").where({ action: "sign-in.success" }).groupBy("user_id").select("user_id").max({ at: "created_at" });
  const groupsByUser = new Map<number, string[]>();
  for (const m of ms) {
    const list = groupsByUser.get(Number(m.user_id)) ?? [];
    list.push(String(m.name));
    groupsByUser.set(Number(m.user_id), list);
  }
  const lastBy = new Map<number, string>((last as Array<{ user_id: number; at: string }>).map((l) => [Number(l.user_id), new Date(l.at).toISOString()]));
  return users.map((u: Record<string, unknown>) => ({
    id: Number(u.id),
    email: String(u.email),
    name: String(u.name),
    role: u.role as Role,
    verified: !!u.email_verified_at,
    disabled: !!u.disabled,
    sso: !!u.oidc_subject,
    groups: groupsByUser.get(Number(u.id)) ?? [],
    createdAt: new Date(u.created_at as string).toISOString(),
    lastSignInAt: lastBy.get(Number(u.id)) ?? null,
  }));
}
