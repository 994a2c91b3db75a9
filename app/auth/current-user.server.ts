/**
 * Who is asking. Reads the session cookie and returns the signed-in user, or null.
 * A tampered cookie fails its signature check and counts as no session; a session ended by
 * signing out, and a disabled or deleted user, count as signed out.
 */
import { redirect } from "react-router";
import type { Actor, Role } from "./policy.server";
import { getSession, sessionUserId } from "./session.server";
import { getDb } from "../../db/client.server";
import type { UserWithGroups } from "../../db/access/users.server";
import { loadLiveSessionUser } from "../../db/access/sessions.server";
import { onceInRequest } from "./request-scope.server";

/** The signed-in user as routes and the policy module see them. */
export interface SessionUser extends Actor {
  id: number;
  email: string;
  name: string;
  role: Role;
  groupIds: number[];
  adminGroupIds: number[];
}

/** The fields of a loaded user that routes and the policy module see. */
export function sessionUserOf(u: UserWithGroups): SessionUser {
  return { id: u.id, email: u.email, name: u.name, role: u.role, groupIds: u.groupIds, adminGroupIds: u.adminGroupIds };
}

/**
 * The user of a session cookie, or null: the session must not have been ended by signing out
 * (checked in the same query that loads the user and their groups), and no password change or
 * reset may have happened since it signed in.
 */
export async function loadSessionUser(userId: number, signedInAt: number, epoch?: number): Promise<SessionUser | null> {
  const u = await loadLiveSessionUser(getDb(), userId, signedInAt);
  if (!u) return null;
  // A password change or reset since this session signed in ends it.
  if (epoch !== undefined && u.sessionEpoch !== epoch) return null;
  return sessionUserOf(u);
}

/**
 * The signed-in user, or null. For a GET the answer is shared by everything that runs for the
 * same request (the shell's and the page's loaders), so the second asks the database no more.
 */
export function getOptionalUser(request: Request): Promise<SessionUser | null> {
  if (request.method !== "GET" && request.method !== "HEAD") return lookUp(request);
  return onceInRequest(`user:${request.headers.get("Cookie") ?? ""}`, () => lookUp(request));
}

async function lookUp(request: Request): Promise<SessionUser | null> {
  if (!request.headers.get("Cookie")) return null;
  const session = await getSession(request);
  const id = sessionUserId(session);
  if (id == null) return null;
  return loadSessionUser(id, session.get("signedInAt")!, session.get("epoch") ?? 0);
}

/** The signed-in user, or a redirect to the sign-in page that comes back here. */
export async function requireUser(request: Request): Promise<SessionUser> {
  const user = await getOptionalUser(request);
  if (!user) {
    const url = new URL(request.url);
    throw redirect(`/sign-in?next=${encodeURIComponent(url.pathname + url.search)}`);
  }
  return user;
}
