/**
 * Whether an error from the database driver (mysql2 through Knex) means the server cannot be
 * reached or has no connection to give (down, restarting, overloaded), rather than a fault in
 * the query: such a request may succeed when tried again shortly.
 */
const UNREACHABLE_CODES = new Set([
  "ECONNREFUSED",
  "ECONNRESET",
  "ETIMEDOUT",
  "EPIPE",
  "PROTOCOL_CONNECTION_LOST",
  "PROTOCOL_SEQUENCE_TIMEOUT",
  "ER_CON_COUNT_ERROR",
  "ER_SERVER_SHUTDOWN",
]);

export function databaseUnreachable(e: unknown): boolean {
  const err = e as { code?: unknown; name?: unknown; message?: unknown } | null;
  if (!err || typeof err !== "object") return false;
  if (typeof err.code === "string" && UNREACHABLE_CODES.has(err.code)) return true;
  // Knex's pool gives up waiting for a connection it cannot make.
  return err.name === "KnexTimeoutError" || (typeof err.message === "string" && /Timeout acquiring a connection/.test(err.message));
}
