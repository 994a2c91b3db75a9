/**
 * Sign-in rate limits, read from the sign_in_attempts log: at most 5 failed attempts per
 * account and 20 per address within 15 minutes (common practice for interactive
 * sign-in). A success clears neither count: only time does.
 *
 * The count is atomic: a password sign-in first claims its attempt (claimSignInAttempt),
 * which, holding a database named lock on the account and one on the address, counts the
 * failures and, when allowed, writes the attempt as a failure before the password is even
 * hashed. Parallel guesses therefore queue on the lock and each sees the ones before it;
 * afterwards settleSignInAttempt turns the row into a success, or removes it when the
 * password was right but the account may not sign in (only wrong passwords count).
 */
import { createHash } from "node:crypto";
import type { Knex } from "knex";
import { normalizeEmail } from "../../db/access/users.server";

export const LIMITS = {
  windowMinutes: 15,
  perAccount: 5,
  perAddress: 20,
  /** How long a claim waits for another attempt on the same account or address, in seconds. */
  lockWaitSeconds: 10,
};

export interface LimitCheck {
  allowed: boolean;
  /** A sentence for the person signing in when refused. */
  message?: string;
  retryAfterSeconds?: number;
}

/** Another attempt on the same account or address held the lock for too long. */
export class SignInLockTimeout extends Error {
  constructor() {
    super("Another sign-in for this account or address is still being checked.");
  }
}

function minutes(s: number) {
  const m = Math.max(1, Math.ceil(s / 60));
  return m === 1 ? "1 minute" : `${m} minutes`;
}

/** The attempts table, on the pinned connection. */
function attempts(db: Knex, conn: unknown): Knex.QueryBuilder {
  return db("sign_in_attempts").connection(conn);
}

async function limitCheck(db: Knex, conn: unknown, email: string, ip: string, now: Date): Promise<LimitCheck> {
  const since = new Date(now.getTime() - LIMITS.windowMinutes * 60_000);
  const failures = async (col: "email" | "ip", value: string) =>
    (await attempts(db, conn)
      .where(col, value)
      .where("success", false)
      .where("created_at", ">", since)
      .select(db.raw("count(*) as n, min(created_at) as first_at"))
      .first()) as { n: number; first_at: string | Date | null } | undefined;
  // One after the other: on a pinned connection queries cannot overlap anyway.
  const acct = await failures("email", normalizeEmail(email));
  const addr = await failures("ip", ip);
  const retry = (firstAt: string | Date | null | undefined) =>
    firstAt ? Math.max(1, Math.ceil((new Date(firstAt).getTime() + LIMITS.windowMinutes * 60_000 - now.getTime()) / 1000)) : LIMITS.windowMinutes * 60;
  if (Number(acct?.n ?? 0) >= LIMITS.perAccount) {
    const s = retry(acct?.first_at);
    return {
      allowed: false,
      retryAfterSeconds: s,
      message: `Too many failed sign-in attempts for this account: try again in ${minutes(s)}, or reset your password.`,
    };
  }
  if (Number(addr?.n ?? 0) >= LIMITS.perAddress) {
    const s = retry(addr?.first_at);
    return {
      allowed: false,
      retryAfterSeconds: s,
      message: `Too many failed sign-in attempts from your network address: try again in ${minutes(s)}.`,
    };
  }
  return { allowed: true };
}

/**
 * A named lock's name (at most 64 characters, server-wide): a digest of the database, what
 * is limited and its value, so the same address in two databases on one server never meet.
 */
export function signInLockName(db: Knex, kind: "account" | "address", value: string): string {
  const database = String((db.client.config.connection as { database?: string } | undefined)?.database ?? "");
  const digest = createHash("sha256").update(`${database}\n${kind}\n${value}`).digest("base64url").slice(0, 40);
  return `sb.sign-in.${kind}.${digest}`;
}

export type AttemptClaim = (LimitCheck & { allowed: false }) | { allowed: true; attemptId: number };

/**
 * Counts the failures and, when allowed, writes this attempt as a failure, all while holding
 * the account's and then the address's named lock on one connection (autocommit, so the row
 * is visible before the locks go). Throws SignInLockTimeout when a lock is not had in time.
 */
export async function claimSignInAttempt(db: Knex, email: string, ip: string, now = new Date()): Promise<AttemptClaim> {
  const account = normalizeEmail(email).slice(0, 254);
  const address = ip.slice(0, 64);
  const conn = await db.client.acquireConnection();
  const held: string[] = [];
  try {
    for (const name of [signInLockName(db, "account", account), signInLockName(db, "address", address)]) {
      const [rows] = await db.raw("SELECT GET_LOCK(?, ?) AS got", [name, LIMITS.lockWaitSeconds]).connection(conn);
      if (Number(rows[0]?.got) !== 1) throw new SignInLockTimeout();
      held.push(name);
    }
    const limit = await limitCheck(db, conn, account, address, now);
    if (!limit.allowed) return { ...limit, allowed: false };
    const [attemptId] = await attempts(db, conn).insert({ email: account, ip: address, success: false, method: "password" });
    return { allowed: true, attemptId: Number(attemptId) };
  } finally {
    try {
      for (const name of held.reverse()) await db.raw("SELECT RELEASE_LOCK(?)", [name]).connection(conn);
    } catch (e) {
      // A connection that may still hold a lock never goes back to the pool: the pool drops it,
      // and the server frees its locks when it closes.
      (conn as { __knex__disposed?: unknown }).__knex__disposed = e;
    }
    await db.client.releaseConnection(conn);
  }
}

/** After the password was checked: the claimed failure becomes a success, or is forgotten. */
export async function settleSignInAttempt(db: Knex, attemptId: number, outcome: "success" | "forget"): Promise<void> {
  if (outcome === "success") await db("sign_in_attempts").where({ id: attemptId }).update({ success: true });
  else await db("sign_in_attempts").where({ id: attemptId }).delete();
}

export async function recordSignInAttempt(db: Knex, a: { email: string; ip: string; success: boolean; method?: string }): Promise<void> {
  await db("sign_in_attempts").insert({
    email: normalizeEmail(a.email).slice(0, 254),
    ip: a.ip.slice(0, 64),
    success: a.success,
    method: a.method ?? "password",
  });
}
