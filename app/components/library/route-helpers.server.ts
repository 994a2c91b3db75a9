/** Route-side helpers of the library and mechanism pages: data-layer errors → HTTP. */
import { data } from "react-router";
import { Forbidden } from "~/auth/policy.server";
import { ConflictError, InputError, NotFoundError } from "../../../db/access/library-errors";

/** Throws the matching error response for loaders (404, 403); rethrows others. */
export function loaderFailure(e: unknown): never {
  if (e instanceof NotFoundError) throw data(e.message, { status: 404 });
  if (e instanceof Forbidden) throw data(e.message, { status: 403 });
  if (e instanceof InputError) throw data(e.message, { status: 400 });
  throw e;
}

export type ActionFailure = { ok: false; message: string; fields: Record<string, string>; conflict?: ConflictError["latest"] };

/** Maps data-layer errors to an action result the page shows beside the form (input kept). */
export function actionFailure(e: unknown): ReturnType<typeof data<ActionFailure>> {
  if (e instanceof InputError) return data({ ok: false as const, message: e.message, fields: e.fields }, { status: 400 });
  if (e instanceof ConflictError) return data({ ok: false as const, message: e.message, fields: {}, conflict: e.latest }, { status: 409 });
  if (e instanceof Forbidden) return data({ ok: false as const, message: e.message, fields: {} }, { status: 403 });
  if (e instanceof NotFoundError) return data({ ok: false as const, message: e.message, fields: {} }, { status: 404 });
  throw e;
}

export function routeId(raw: string | undefined): number {
  const n = Number(raw);
  if (!Number.isInteger(n) || n <= 0) throw data("There is nothing at this address.", { status: 404 });
  return n;
}
