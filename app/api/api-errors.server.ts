/**
 * Root middleware for the REST API: an error a route did not answer itself becomes the API's
 * JSON error body instead of a plain-text 500. While the database cannot be reached (down,
 * restarting) the answer is 503 with Retry-After, so scripts know to try again.
 */
import type { MiddlewareFunction } from "react-router";
import { apiError } from "./errors.server";
import { databaseUnreachable } from "../../db/unreachable";
import { databaseProblem } from "../../db/client.server";

const databaseDown = () =>
  apiError(503, "database_unavailable", "The database is not answering (it may be restarting); try again shortly.", undefined, { "Retry-After": "5" });
const internalError = () => apiError(500, "internal_error", "The server could not answer this request; it has been logged.");

/** The JSON answer for an error thrown by an API route. */
function apiErrorResponse(e: unknown, path: string): Response {
  if (databaseUnreachable(e)) return databaseDown();
  console.error(`API ${path}: ${e instanceof Error ? (e.stack ?? e.message) : String(e)}`);
  return internalError();
}

/**
 * React Router answers an error a resource route threw with a plain-text 500 (after logging it):
 * such an answer is replaced by the JSON shape, 503 when the database is not answering.
 */
export const apiErrorsMiddleware: MiddlewareFunction<Response> = async ({ request }, next) => {
  const path = new URL(request.url).pathname;
  if (!path.startsWith("/api/")) return next();
  let res: Response;
  try {
    res = await next();
  } catch (e) {
    if (e instanceof Response) throw e;
    return apiErrorResponse(e, path);
  }
  if (res.status !== 500 || /application\/json/.test(res.headers.get("Content-Type") ?? "")) return res;
  await res.body?.cancel().catch(() => {});
  return (await databaseProblem()) ? databaseDown() : internalError();
};
