/**
 * Password hashing with bcrypt (bcryptjs), cost 12 in production, and the password rules.
 *
 * bcrypt is deliberately slow and bcryptjs runs on the request thread, so every hash and
 * every comparison passes one per-process gate: at most HASHING.concurrent at once, at most
 * HASHING.queued waiting; beyond that the caller gets PasswordHashingBusy (answered as
 * "busy, try again shortly" with 503 and Retry-After) instead of a queue that grows until
 * pages and database connections time out.
 */
import bcrypt from "bcryptjs";
import pLimit from "p-limit";
import { z } from "zod";

const COST = process.env.NODE_ENV === "production" ? 12 : 10;

export const PASSWORD_MIN = 10;
export const PASSWORD_MAX = 72; // bcrypt reads at most 72 bytes

export const passwordSchema = z
  .string()
  .min(PASSWORD_MIN, `Use at least ${PASSWORD_MIN} characters.`)
  .refine((p) => Buffer.byteLength(p, "utf8") <= PASSWORD_MAX, `Use at most ${PASSWORD_MAX} bytes (bcrypt ignores the rest).`);

export const HASHING = {
  /** Password checks or hashes running at once in this process. */
  concurrent: 4,
  /** Waiting for a turn; one more is told to come back. */
  queued: 64,
  /** What a refused caller is told to wait, in seconds. */
  retryAfterSeconds: 5,
};

export const BUSY_MESSAGE = "Saddlebook is busy checking passwords right now; try again in a few seconds.";

/** The gate is full: nothing was hashed or checked (and nothing was recorded). */
export class PasswordHashingBusy extends Error {
  readonly retryAfterSeconds = HASHING.retryAfterSeconds;
  constructor() {
    super(BUSY_MESSAGE);
  }
  /** The answer's status and Retry-After header. */
  get init(): ResponseInit {
    return { status: 503, headers: { "Retry-After": String(this.retryAfterSeconds) } };
  }
}

/** The work's value, or the busy refusal (for a form to answer 503) instead of throwing it. */
export async function unlessBusy<T>(work: Promise<T>): Promise<T | PasswordHashingBusy> {
  try {
    return await work;
  } catch (e) {
    if (e instanceof PasswordHashingBusy) return e;
    throw e;
  }
}

const gate = pLimit(HASHING.concurrent);

/** Runs `work` holding one hashing turn; throws PasswordHashingBusy when the queue is full. */
export function withHashingTurn<T>(work: (check: typeof checkPassword) => Promise<T>): Promise<T> {
  if (gate.pendingCount >= HASHING.queued) return Promise.reject(new PasswordHashingBusy());
  return gate(() => work(checkPassword));
}

/** bcrypt calls in progress, and the most seen at once (read by the tests). */
export const hashingLoad = { inFlight: 0, peak: 0 };

async function measured<T>(run: () => Promise<T>): Promise<T> {
  hashingLoad.inFlight++;
  hashingLoad.peak = Math.max(hashingLoad.peak, hashingLoad.inFlight);
  try {
    return await run();
  } finally {
    hashingLoad.inFlight--;
  }
}

export function hashPassword(password: string): Promise<string> {
  return withHashingTurn(() => measured(() => bcrypt.hash(password, COST)));
}

let dummyHash: Promise<string> | undefined;

/** The comparison itself; call only while holding a turn (withHashingTurn). */
async function checkPassword(password: string, hash: string | null): Promise<boolean> {
  // Compare against a throwaway hash when the account has none, so the response time
  // does not tell whether an address has a password.
  dummyHash ??= measured(() => bcrypt.hash("no password set for this account", COST));
  const against = hash ?? (await dummyHash);
  const ok = await measured(() => bcrypt.compare(password, against));
  return ok && hash != null;
}

export function verifyPassword(password: string, hash: string | null): Promise<boolean> {
  return withHashingTurn((check) => check(password, hash));
}
