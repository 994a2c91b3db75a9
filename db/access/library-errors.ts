/** Typed failures of the library and mechanism data layer; routes map them to HTTP. */

/** Input that passed the schema but not the data rules (unknown species, bad barrier…). 400/422. */
export class InputError extends Error {
  constructor(
    message: string,
    readonly fields: Record<string, string> = {},
  ) {
    super(message);
  }
}

/** The object does not exist or the actor may not see it (404 either way, so nothing leaks). */
export class NotFoundError extends Error {
  constructor(message = "Not found.") {
    super(message);
  }
}

/** A save based on a stale version (409); `latest` describes the newer change. */
export class ConflictError extends Error {
  constructor(
    message: string,
    readonly latest: { version: number; author: string | null; message: string; at: string },
  ) {
    super(message);
  }
}
