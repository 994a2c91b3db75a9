/**
 * JSON request handling shared by the REST API: a body-size limit read from the stream,
 * JSON syntax errors with line and column, zod issues as field maps, engine errors as 422,
 * and JSON responses that never contain NaN or Infinity.
 *
 * Every error uses the one body shape {"error":{"code","message","fields"}} from errors.server.ts.
 */
import type { z } from "zod";
import { apiError } from "./errors.server";
import { describeJsonSyntaxError, formatPath, lineColumn, locateJsonPaths } from "../../solver/exchange-format";
import type { EngineError } from "../../solver/types";

/** Largest request body the JSON endpoints accept: 1 MB (1 048 576 bytes). */
export const JSON_BODY_LIMIT_BYTES = 1_048_576;

export type BodyOutcome = { ok: true; value: unknown; text: string } | { ok: false; response: Response };

function tooLarge(limit: number): BodyOutcome {
  const mb = limit / 1_048_576;
  return {
    ok: false,
    response: apiError(413, "body_too_large", `The request body is larger than the ${mb} MB limit (${limit} bytes).`, { body: `at most ${limit} bytes` }),
  };
}

/** Reads and parses a JSON body, stopping as soon as it exceeds `limit` bytes. */
export async function readJsonBody(request: Request, limit = JSON_BODY_LIMIT_BYTES): Promise<BodyOutcome> {
  const declared = Number(request.headers.get("content-length"));
  if (Number.isFinite(declared) && declared > limit) return tooLarge(limit);
  const chunks: Uint8Array[] = [];
  let size = 0;
  if (request.body) {
    const reader = request.body.getReader();
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      size += value.byteLength;
      if (size > limit) {
        await reader.cancel().catch(() => {});
        return tooLarge(limit);
      }
      chunks.push(value);
    }
  }
  const bytes = new Uint8Array(size);
  let at = 0;
  for (const c of chunks) (bytes.set(c, at), (at += c.byteLength));
  let text: string;
  try {
    text = new TextDecoder("utf-8", { fatal: true }).decode(bytes);
  } catch {
    return { ok: false, response: apiError(400, "invalid_encoding", "The request body is not valid UTF-8 text.") };
  }
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  if (text.trim() === "") return { ok: false, response: apiError(400, "empty_body", "The request needs a JSON body.") };
  try {
    return { ok: true, value: JSON.parse(text), text };
  } catch (e) {
    const { line, column, detail } = describeJsonSyntaxError(text, e);
    return {
      ok: false,
      response: apiError(400, "malformed_json", `The request body is not valid JSON at line ${line}, column ${column}: ${detail}.`, { body: `line ${line}, column ${column}` }),
    };
  }
}

/** Field map of zod issues, "path" → "message (line L, column C)"; unknown keys get one entry each. */
export function zodFields(error: z.ZodError, text?: string): Record<string, string> {
  const where = text === undefined ? null : locateJsonPaths(text);
  const fields: Record<string, string> = {};
  const place = (path: string): string => {
    if (!where || !text) return "";
    for (let p = path; ; ) {
      const at = where.get(p);
      if (at !== undefined) {
        const { line, column } = lineColumn(text, at);
        return ` (line ${line}, column ${column})`;
      }
      const cut = Math.max(p.lastIndexOf("."), p.lastIndexOf("["));
      if (cut <= 0) return "";
      p = p.slice(0, cut);
    }
  };
  const add = (path: string, message: string) => {
    const key = path === "" ? "body" : path;
    if (!(key in fields)) fields[key] = `${message}${place(path)}`;
  };
  for (const iss of error.issues) {
    if (iss.code === "unrecognized_keys") {
      for (const k of iss.keys) add(formatPath([...iss.path, k]), `Unknown field "${k}".`);
    } else add(formatPath(iss.path), iss.message);
  }
  return fields;
}

/** 400 for a body that does not match its schema. */
export function invalidBody(fields: Record<string, string>): Response {
  const entries = Object.entries(fields);
  const [path, msg] = entries[0] ?? ["body", "The request body is not valid."];
  const more = entries.length > 1 ? ` (${entries.length} problems in all)` : "";
  return apiError(400, "invalid_body", `${path}: ${msg}${more}`, fields);
}

/** 422 for an engine error, with its message and the request path it concerns. */
export function engineFailure(error: EngineError, path?: string): Response {
  const code = error.code.toLowerCase();
  return apiError(422, code, error.message, path ? { [path]: error.message } : undefined);
}

/** 405 with the allowed method. */
export function methodNotAllowed(request: Request, allowed = "POST"): Response {
  return apiError(405, "method_not_allowed", `${new URL(request.url).pathname} accepts ${allowed} only (got ${request.method}).`, undefined, { Allow: allowed });
}

/** JSON.stringify replacer: typed arrays become arrays; NaN and ±Infinity become null. */
function safeReplacer(_key: string, value: unknown): unknown {
  if (typeof value === "number" && !Number.isFinite(value)) return null;
  if (ArrayBuffer.isView(value) && !(value instanceof DataView)) return Array.from(value as unknown as ArrayLike<number>, (v) => (Number.isFinite(v) ? v : null));
  return value;
}

/** A JSON response whose body never contains NaN or Infinity. */
export function jsonResponse(data: unknown, init: ResponseInit = {}): Response {
  const headers = new Headers(init.headers);
  headers.set("Content-Type", "application/json; charset=utf-8");
  if (!headers.has("Cache-Control")) headers.set("Cache-Control", "no-store");
  return new Response(JSON.stringify(data, safeReplacer), { ...init, headers });
}
