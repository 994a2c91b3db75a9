/**
 * How long a stopping production server lets its workers finish the requests they hold, ms.
 * Shared by the supervisor (scripts/serve.ts), which waits a little longer before giving up on
 * a worker, and the worker (scripts/serve-worker.mjs), which exits after it.
 */
export const SHUTDOWN_GRACE_MS = 10_000;
