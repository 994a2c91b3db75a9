/** Mails with one-time links: verification and password reset. */
import type { Knex } from "knex";
import { issueOneTimeToken, LINK_LIFETIME_HOURS } from "../../db/access/tokens.server";
import { sendMail } from "../mail/transport.server";
import { passwordResetMail, verificationMail } from "../mail/templates.server";

export function appUrl(request?: Request): string {
  const configured = process.env.APP_URL;
  if (configured) return configured.replace(/\/$/, "");
  return request ? new URL(request.url).origin : "http://127.0.0.1:3000";
}

/** At most this many links of one kind per account and hour: nobody can flood an inbox. */
export const LINKS_PER_HOUR = 3;

async function tooMany(db: Knex, userId: number, purpose: "verify-email" | "reset-password"): Promise<boolean> {
  const since = new Date(Date.now() - 3600_000);
  const r = await db("one_time_tokens").where({ user_id: userId, purpose }).where("created_at", ">", since).count<{ n: number }[]>({ n: "*" }).first();
  return Number(r?.n ?? 0) >= LINKS_PER_HOUR;
}

/** Sends a confirmation link; false (nothing sent) when the hourly limit is reached. */
export async function sendVerificationLink(db: Knex, request: Request, user: { id: number; email: string; name: string }): Promise<boolean> {
  if (await tooMany(db, user.id, "verify-email")) return false;
  const { token } = await issueOneTimeToken(db, { purpose: "verify-email", userId: user.id, email: user.email });
  const url = `${appUrl(request)}/verify-email?token=${encodeURIComponent(token)}`;
  await sendMail(verificationMail(user.email, user.name, url, LINK_LIFETIME_HOURS["verify-email"]));
  return true;
}

/** Sends a password-reset link; false (nothing sent) when the hourly limit is reached. */
export async function sendResetLink(db: Knex, request: Request, user: { id: number; email: string; name: string }): Promise<boolean> {
  if (await tooMany(db, user.id, "reset-password")) return false;
  const { token } = await issueOneTimeToken(db, { purpose: "reset-password", userId: user.id, email: user.email });
  const url = `${appUrl(request)}/reset-password?token=${encodeURIComponent(token)}`;
  await sendMail(passwordResetMail(user.email, user.name, url, LINK_LIFETIME_HOURS["reset-password"]));
  return true;
}
