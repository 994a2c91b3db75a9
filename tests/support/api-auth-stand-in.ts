/**
 * A stand-in for app/auth/api-auth.server.ts, for tests that call API route modules directly
 * (no server, no token):
 *
 *   vi.mock("~/auth/api-auth.server", () => import("../support/api-auth-stand-in"));
 *   import { apiCaller } from "../support/api-auth-stand-in";
 *
 * The request comes from `apiCaller` (an author by default); userId 0 means signed out, and
 * requireApiUser then throws the API's 401 answer.
 */
import { apiError } from "../../app/api/errors.server";
import type { SessionUser } from "../../app/auth/current-user.server";

export const apiCaller = { userId: 1, email: "kinetics@example.test", name: "Test user", role: "author" as SessionUser["role"], groupIds: [] as number[] };

function caller(): SessionUser | null {
  if (!apiCaller.userId) return null;
  return { id: apiCaller.userId, email: apiCaller.email, name: apiCaller.name, role: apiCaller.role, groupIds: apiCaller.groupIds, adminGroupIds: [] };
}

export function bearerToken(): string | null {
  return null;
}

export async function getApiUser(): Promise<SessionUser | null> {
  return caller();
}

export async function requireApiUser(): Promise<SessionUser> {
  const user = caller();
  if (!user) throw apiError(401, "unauthorized", "Sign in, or send an API token.");
  return user;
}
