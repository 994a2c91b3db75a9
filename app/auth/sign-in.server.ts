/** Starting and ending sessions, and the safe "come back here" address. */
import { redirect } from "react-router";
import { SESSION_MAX_AGE_S, commitSession, destroySession, getSession, sessionUserId } from "./session.server";
import { newCsrfToken } from "./csrf.server";
import { getDb } from "../../db/client.server";
import { sessionEpoch } from "../../db/access/users.server";
import { endSessionRecord } from "../../db/access/sessions.server";

const NEXT_BASE = new URL("http://saddlebook.invalid/");

/**
 * The one check of every "come back here" address (sign-in, single sign-on): `next` is resolved
 * as a URL, as a browser would (tabs and line breaks dropped, backslashes read as slashes), and
 * only a path on this site is kept, in its encoded form (safe in a Location header). Anything
 * that would leave the site, or is not a path at all, gives `fallback`.
 */
export function safeNext(next: unknown, fallback = "/"): string {
  if (typeof next !== "string" || !next.startsWith("/") || next.length > 2000) return fallback;
  let url: URL;
  try {
    url = new URL(next, NEXT_BASE);
  } catch {
    return fallback;
  }
  if (url.origin !== NEXT_BASE.origin) return fallback;
  const path = url.pathname + url.search + url.hash;
  // A path that still starts with two slashes (or a slash and a backslash) would be read as another host.
  if (!path.startsWith("/") || /^\/[/\\]/.test(path) || path.length > 500) return fallback;
  return path;
}

/** A fresh session for the user (new CSRF token), then a redirect. */
export async function startSession(request: Request, userId: number, method: string, to: string): Promise<Response> {
  const session = await getSession(request);
  session.unset("oidcNext");
  session.set("userId", userId);
  session.set("signedInAt", Date.now());
  session.set("method", method);
  session.set("csrf", newCsrfToken());
  session.set("epoch", await sessionEpoch(getDb(), userId));
  return redirect(to, { headers: { "Set-Cookie": await commitSession(session) } });
}

/**
 * Ends the session on the server as well as in the browser: the cookie's (user, sign-in moment)
 * is recorded as ended, so a copy of the cookie replayed later signs nobody in.
 */
export async function endSession(request: Request, to = "/"): Promise<Response> {
  const session = await getSession(request);
  const userId = sessionUserId(session);
  if (userId !== null) await endSessionRecord(getDb(), userId, session.get("signedInAt")!, Date.now() - SESSION_MAX_AGE_S * 1000);
  return redirect(to, { headers: { "Set-Cookie": await destroySession(session) } });
}

/** After the user changed their own password: keep this session, under the new epoch. */
export async function renewSession(request: Request, userId: number): Promise<string> {
  const session = await getSession(request);
  session.set("epoch", await sessionEpoch(getDb(), userId));
  return commitSession(session);
}
