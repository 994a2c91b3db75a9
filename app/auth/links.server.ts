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

export async function sendVerificationLink(db: Knex, request: Request, user: { id: number; email: string; name: string }): Promise<void> {
  const { token } = await issueOneTimeToken(db, { purpose: "verify-email", userId: user.id, email: user.email });
  const url = `${appUrl(request)}/verify-email?token=${encodeURIComponent(token)}`;
  await sendMail(verificationMail(user.email, user.name, url, LINK_LIFETIME_HOURS["verify-email"]));
}

export async function sendResetLink(db: Knex, request: Request, user: { id: number; email: string; name: string }): Promise<void> {
  const { token } = await issueOneTimeToken(db, { purpose: "reset-password", userId: user.id, email: user.email });
  const url = `${appUrl(request)}/reset-password?token=${encodeURIComponent(token)}`;
  await sendMail(passwordResetMail(user.email, user.name, url, LINK_LIFETIME_HOURS["reset-password"]));
}
