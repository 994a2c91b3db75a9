/** Starting and ending sessions, and the safe "come back here" address. */
import { redirect } from "react-router";
import { commitSession, destroySession, getSession } from "./session.server";
import { newCsrfToken } from "./csrf.server";
import { getDb } from "../../db/client.server";
import { sessionEpoch } from "../../db/access/users.server";

/** Only same-site paths ("/x", not "//host" or "https://…"); else the dashboard. */
export function safeNext(next: unknown, fallback = "/"): string {
  if (typeof next !== "string" || !next.startsWith("/") || next.startsWith("//") || next.startsWith("/\\")) return fallback;
  return next.slice(0, 500);
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

export async function endSession(request: Request, to = "/"): Promise<Response> {
  const session = await getSession(request);
  return redirect(to, { headers: { "Set-Cookie": await destroySession(session) } });
}

/** After the user changed their own password: keep this session, under the new epoch. */
export async function renewSession(request: Request, userId: number): Promise<string> {
  const session = await getSession(request);
  session.set("epoch", await sessionEpoch(getDb(), userId));
  return commitSession(session);
}
