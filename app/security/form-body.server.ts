/**
 * Page actions read HTML form submissions only. A change sent to a page address with any
 * other body type (JSON, plain text, none) is refused with 415, and a multipart body that
 * cannot be read as a form (no boundary, truncated, not multipart at all) with 400, before
 * an action's formData() would throw on it and the request end as a server error.
 * The REST API (/api/) has its own rule (app/api/body-type.server.ts).
 */
import { data, type MiddlewareFunction } from "react-router";

const WRITES = new Set(["POST", "PUT", "PATCH", "DELETE"]);

export const FORM_UNREADABLE = "The form could not be read (the upload was cut off or malformed); go back and send it again.";
export const FORM_ONLY = "This address takes form submissions from Saddlebook's pages only; programs use the REST API under /api/v1.";

/** Root middleware: 415 or 400 for a page write whose body is not a readable form. */
export const pageFormMiddleware: MiddlewareFunction<Response> = async ({ request }, next) => {
  if (!WRITES.has(request.method) || new URL(request.url).pathname.startsWith("/api/")) return next();
  const essence = (request.headers.get("Content-Type") ?? "").split(";")[0]!.trim().toLowerCase();
  if (essence !== "application/x-www-form-urlencoded" && essence !== "multipart/form-data") throw data(FORM_ONLY, { status: 415 });
  if (essence === "multipart/form-data") {
    try {
      await request.clone().formData();
    } catch {
      throw data(FORM_UNREADABLE, { status: 400 });
    }
  }
  return next();
};
