/**
 * Who is calling the REST API: a bearer token (Authorization: Bearer …) or the session.
 * A request that sends a token is judged by the token alone: a revoked or unknown token
 * is refused even when a session cookie comes along.
 */
import { apiError } from "~/api/errors.server";
import { getOptionalUser, sessionUserOf, type SessionUser } from "./current-user.server";
import { getDb } from "../../db/client.server";
import { userForApiToken } from "../../db/access/tokens.server";

export function bearerToken(request: Request): string | null {
  const h = request.headers.get("Authorization");
  if (!h) return null;
  const m = /^Bearer\s+(\S+)\s*$/i.exec(h);
  return m ? m[1] : "";
}

export async function getApiUser(request: Request): Promise<SessionUser | null> {
  const token = bearerToken(request);
  if (token !== null) {
    if (!token) return null;
    const u = (await userForApiToken(getDb(), token))?.user;
    return u ? sessionUserOf(u) : null;
  }
  return getOptionalUser(request);
}

/** The calling user, or a thrown JSON 401 response. */
export async function requireApiUser(request: Request): Promise<SessionUser> {
  const user = await getApiUser(request);
  if (!user) {
    const sent = bearerToken(request) !== null;
    throw apiError(
      401,
      "unauthorized",
      sent
        ? "The API token is not valid: it may have been revoked or mistyped."
        : "Sign in, or send an API token as 'Authorization: Bearer <token>'.",
      undefined,
      { "WWW-Authenticate": 'Bearer realm="saddlebook"' },
    );
  }
  return user;
}
