/**
 * Sign-in rate limits, read from the sign_in_attempts log: at most 5 failed attempts per
 * account and 20 per address within 15 minutes (common practice for interactive
 * sign-in). A success clears neither count: only time does.
 */
import type { Knex } from "knex";
import { normalizeEmail } from "../../db/access/users.server";

export const LIMITS = {
  windowMinutes: 15,
  perAccount: 5,
  perAddress: 20,
};

export interface LimitCheck {
  allowed: boolean;
  /** A sentence for the person signing in when refused. */
  message?: string;
  retryAfterSeconds?: number;
}

function minutes(s: number) {
  const m = Math.max(1, Math.ceil(s / 60));
  return m === 1 ? "1 minute" : `${m} minutes`;
}

export async function checkSignInAllowed(db: Knex, email: string, ip: string, now = new Date()): Promise<LimitCheck> {
  const since = new Date(now.getTime() - LIMITS.windowMinutes * 60_000);
  const failures = (col: "email" | "ip", value: string) =>
    db("sign_in_attempts")
      .where(col, value)
      .where("success", false)
      .where("created_at", ">", since)
      .select(db.raw("count(*) as n, min(created_at) as first_at"))
      .first() as Promise<{ n: number; first_at: string | Date | null }>;
  const [acct, addr] = await Promise.all([failures("email", normalizeEmail(email)), failures("ip", ip)]);
  const retry = (firstAt: string | Date | null) =>
    firstAt ? Math.max(1, Math.ceil((new Date(firstAt).getTime() + LIMITS.windowMinutes * 60_000 - now.getTime()) / 1000)) : LIMITS.windowMinutes * 60;
  if (Number(acct?.n ?? 0) >= LIMITS.perAccount) {
    const s = retry(acct.first_at);
    return {
      allowed: false,
      retryAfterSeconds: s,
      message: `Too many failed sign-in attempts for this account: try again in ${minutes(s)}, or reset your password.`,
    };
  }
  if (Number(addr?.n ?? 0) >= LIMITS.perAddress) {
    const s = retry(addr.first_at);
    return {
      allowed: false,
      retryAfterSeconds: s,
      message: `Too many failed sign-in attempts from your network address: try again in ${minutes(s)}.`,
    };
  }
  return { allowed: true };
}

export async function recordSignInAttempt(db: Knex, a: { email: string; ip: string; success: boolean; method?: string }): Promise<void> {
  await db("sign_in_attempts").insert({
    email: normalizeEmail(a.email).slice(0, 254),
    ip: a.ip.slice(0, 64),
    success: a.success,
    method: a.method ?? "password",
  });
}
