/**
 * The REST API reads JSON bodies only. A write whose body is declared as anything else (a
 * form, multipart, plain text, XML) is answered 415 with the API's error body before any
 * handler reads it, so no parser ever sees a body of a type it was not written for. A write
 * without a body (Content-Length 0) or without a declared type is left to the handler.
 */
import type { MiddlewareFunction } from "react-router";
import { apiError } from "./errors.server";

const WRITES = new Set(["POST", "PUT", "PATCH", "DELETE"]);

/** application/json, or a JSON-based type such as application/merge-patch+json. */
export function isJsonType(contentType: string): boolean {
  const essence = contentType.split(";")[0]!.trim().toLowerCase();
  return essence === "application/json" || /^application\/[a-z0-9.+-]+\+json$/.test(essence);
}

/** Root middleware: 415 JSON for an API write whose body is declared as something other than JSON. */
export const apiBodyTypeMiddleware: MiddlewareFunction<Response> = async ({ request }, next) => {
  const type = request.headers.get("Content-Type");
  if (type !== null && WRITES.has(request.method) && request.headers.get("Content-Length") !== "0" && new URL(request.url).pathname.startsWith("/api/") && !isJsonType(type)) {
    const shown = type.split(";")[0]!.trim().slice(0, 100) || "(empty)";
    return apiError(415, "unsupported_media_type", `The API reads JSON bodies only: send "Content-Type: application/json" (this request said ${shown}).`, { "Content-Type": "application/json" });
  }
  return next();
};
