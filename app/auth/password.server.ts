/** Password hashing with bcrypt (bcryptjs), cost 12 in production, and the password rules. */
import bcrypt from "bcryptjs";
import { z } from "zod";

const COST = process.env.NODE_ENV === "production" ? 12 : 10;

export const PASSWORD_MIN = 10;
export const PASSWORD_MAX = 72; // bcrypt reads at most 72 bytes

export const passwordSchema = z
  .string()
  .min(PASSWORD_MIN, `Use at least ${PASSWORD_MIN} characters.`)
  .refine((p) => Buffer.byteLength(p, "utf8") <= PASSWORD_MAX, `Use at most ${PASSWORD_MAX} bytes (bcrypt ignores the rest).`);

export function hashPassword(password: string): Promise<string> {
  return bcrypt.hash(password, COST);
}

let dummyHash: string | undefined;

export async function verifyPassword(password: string, hash: string | null): Promise<boolean> {
  // Compare against a throwaway hash when the account has none, so the response time
  // does not tell whether an address has a password.
  dummyHash ??= await bcrypt.hash("no password set for this account", COST);
  const ok = await bcrypt.compare(password, hash ?? dummyHash);
  return ok && hash != null;
}
