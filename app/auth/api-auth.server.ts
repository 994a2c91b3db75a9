/**
 * Who is calling the REST API: a bearer token (Authorization: Bearer …) or the session.
 * (The sign-in work fills in token lookup; the signatures are the contract.)
 */
import { apiError } from "~/api/errors.server";
import { getOptionalUser, type SessionUser } from "./current-user.server";

export async function getApiUser(request: Request): Promise<SessionUser | null> {
  return getOptionalUser(request);
}

/** The calling user, or a thrown JSON 401 response. */
export async function requireApiUser(request: Request): Promise<SessionUser> {
  const user = await getApiUser(request);
  if (!user) throw apiError(401, "unauthorized", "Sign in, or send an API token as 'Authorization: Bearer <token>'.");
  return user;
}
