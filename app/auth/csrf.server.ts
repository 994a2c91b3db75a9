/**
 * CSRF protection for every state-changing form post: a random token kept in the signed
 * session cookie, rendered in forms (<CsrfInput/>, from the root loader's `csrf`) and
 * checked by actions. A cross-site page can neither read the token nor forge the signed
 * cookie that holds it.
 */
import { data } from "react-router";
import { randomBytes, timingSafeEqual } from "node:crypto";
import { commitSession, getSession, type AppSession } from "./session.server";

export const CSRF_PROBLEM = "The form was out of date or came from another site; reload the page and try again.";

export function newCsrfToken(): string {
  return randomBytes(24).toString("base64url");
}

/** The session's token ("" when the session has none yet). */
export async function csrfToken(request: Request): Promise<string> {
  const session = await getSession(request);
  return session.get("csrf") ?? "";
}

/**
 * The session's token, creating one when missing. `setCookie` is the header to send
 * when a token was created (the root loader sends it).
 */
export async function ensureCsrfToken(request: Request): Promise<{ token: string; setCookie: string | null; session: AppSession }> {
  const session = await getSession(request);
  const existing = session.get("csrf");
  if (existing) return { token: existing, setCookie: null, session };
  const token = newCsrfToken();
  session.set("csrf", token);
  return { token, setCookie: await commitSession(session), session };
}

export function csrfMatches(expected: string | undefined | null, given: unknown): boolean {
  if (!expected || typeof given !== "string" || !given) return false;
  const a = Buffer.from(expected);
  const b = Buffer.from(given);
  return a.length === b.length && timingSafeEqual(a, b);
}

/** Throws 403 when the form's `csrf` field does not match the session's token. */
export async function assertCsrf(request: Request, form: FormData): Promise<void> {
  const expected = await csrfToken(request);
  if (!csrfMatches(expected, form.get("csrf"))) {
    throw data(CSRF_PROBLEM, { status: 403 });
  }
}
