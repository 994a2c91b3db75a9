/**
 * Who is asking. Reads the session cookie and returns the signed-in user, or null.
 * (The sign-in work fills in the session lookup; the signatures below are the contract
 * routes rely on.)
 */
import { redirect } from "react-router";
import type { Actor, Role } from "./policy.server";

/** The signed-in user as routes and the policy module see them. */
export interface SessionUser extends Actor {
  id: number;
  email: string;
  name: string;
  role: Role;
  groupIds: number[];
  adminGroupIds: number[];
}

export async function getOptionalUser(_request: Request): Promise<SessionUser | null> {
  return null;
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
