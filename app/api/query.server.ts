/**
 * Query strings of the REST API, read through zod: every parameter is checked (numbers,
 * enums, ranges), an unknown one is named, and a bad one is a 400 with the API's error body
 * ({"error":{"code":"invalid_input","message","fields":{parameter: problem}}}), never a query
 * that reaches the database with NaN or a negative limit.
 */
import type { z } from "zod";
import { apiError } from "./errors.server";
import { InputError } from "../../db/access/library-errors";

/** A comma-separated parameter as a list (undefined when absent or empty). */
export function commaList(v: string | null): string[] | undefined {
  return v
    ? v
        .split(",")
        .map((s) => s.trim())
        .filter(Boolean)
    : undefined;
}

/** The query parsed by `schema`; `arrays` names the comma-separated parameters. Throws InputError. */
export function parseQuery<S extends z.ZodType>(schema: S, url: URL, arrays: string[] = []): z.output<S> {
  const raw: Record<string, unknown> = {};
  for (const [k, v] of url.searchParams) raw[k] = arrays.includes(k) ? commaList(v) : v;
  const r = schema.safeParse(raw);
  if (!r.success) {
    const fields: Record<string, string> = {};
    for (const i of r.error.issues) {
      if (i.code === "unrecognized_keys") for (const k of i.keys) fields[k] = `Unknown query parameter "${k}".`;
      else fields[String(i.path[0] ?? "query")] ??= i.message;
    }
    throw new InputError(`${Object.keys(fields)[0]}: ${Object.values(fields)[0]}`, fields);
  }
  return r.data;
}

/** As parseQuery, answering a bad query with the API's 400 instead of throwing. */
export function readQuery<S extends z.ZodType>(schema: S, url: URL, arrays: string[] = []): { ok: true; value: z.output<S> } | { ok: false; response: Response } {
  try {
    return { ok: true, value: parseQuery(schema, url, arrays) };
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    return { ok: false, response: apiError(400, "invalid_input", e.message, e.fields) };
  }
}
