/**
 * Transactions that retry when MariaDB picks them as a deadlock victim (error 1213) or a
 * lock wait times out (1205). The whole transaction was rolled back by the server, so
 * running the function again is safe; after three attempts the error goes to the caller.
 */
import type { Knex } from "knex";

const RETRYABLE = new Set([1213, 1205]);

export function isLockConflict(e: unknown): boolean {
  return RETRYABLE.has((e as { errno?: number })?.errno ?? 0);
}

export async function retryingTransaction<T>(db: Knex, fn: (trx: Knex.Transaction) => Promise<T>, attempts = 3): Promise<T> {
  for (let attempt = 1; ; attempt++) {
    try {
      return await db.transaction(fn);
    } catch (e) {
      if (!isLockConflict(e) || attempt >= attempts) throw e;
      // Short random back-off so the competing writers do not collide again at once.
      await new Promise((r) => setTimeout(r, 5 + Math.random() * 20 * attempt));
    }
  }
}
