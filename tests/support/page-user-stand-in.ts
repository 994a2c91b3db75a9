/**
 * A stand-in for app/auth/current-user.server.ts, for tests that call page route modules
 * directly (no server, no session cookie):
 *
 *   vi.mock("~/auth/current-user.server", () => import("../support/page-user-stand-in"));
 *   import { who } from "../support/page-user-stand-in";
 *
 * The signed-in user is `who.user`; null means signed out, and requireUser then throws the
 * redirect to the sign-in page.
 */
import type { SessionUser } from "../../app/auth/current-user.server";

export const who: { user: SessionUser | null } = { user: null };

export async function getOptionalUser(): Promise<SessionUser | null> {
  return who.user;
}

export async function requireUser(): Promise<SessionUser> {
  if (!who.user) throw new Response(null, { status: 302, headers: { Location: "/sign-in" } });
  return who.user;
}
