/**
 * REST handlers for /api/v1/steps, /api/v1/mechanisms and /api/v1/species. Each takes the
 * database, the calling actor and the request, and returns a Response; the route modules
 * only find the actor. Errors use the one body shape {"error":{"code","message","fields"}}.
 *
 * Pagination: list endpoints return {"items": [...], "nextCursor": "…" | null}; pass
 * `cursor` to get the next page (opaque; `limit` 1–200, default 50).
 * Concurrency: GET of a step or mechanism returns an ETag naming its version; saves carry
 * `baseVersion` (or an If-Match header with that ETag); a stale one gets 409 and nothing is written.
 */
import type { Knex } from "knex";
import { z } from "zod";
import { apiError } from "./errors.server";
import { JSON_BODY_LIMIT_BYTES, jsonResponse, readJsonBody } from "./json-request.server";
import { parseQuery } from "./query.server";
import { Forbidden, type Actor } from "../auth/policy.server";
import { ConflictError, InputError, NotFoundError } from "../../db/access/library-errors";
import {
  addStepComment,
  createStep,
  editStep,
  getStep,
  getStepVersion,
  listStepVersions,
  proposeStep,
  searchSteps,
} from "../../db/access/steps.server";
import {
  createMechanism,
  deleteMechanism,
  diffAgainstParent,
  diffVersions,
  exportMechanism,
  forkMechanism,
  getMechanism,
  importMechanism,
  IMPORT_LIMIT_BYTES,
  listMechanismVersions,
  listMechanisms,
  updateMechanism,
} from "../../db/access/mechanisms.server";
import { createSpecies, getSpecies, listSpecies } from "../../db/access/species.server";
import { isLockConflict } from "../../db/access/transactions.server";
import { mechanismToText } from "../../solver/exchange-format";
import { SOURCE_TYPES, STEP_STATUSES } from "../components/library/step-schema";
import { notifyFork, notifyProposal } from "./library-mail.server";
import { reviewAndNotify } from "./review-mail.server";

/** Maps data-layer errors to API responses; rethrows anything else. */
export function apiFailure(e: unknown): Response {
  if (e instanceof Response) return e;
  if (e instanceof InputError) {
    const fields = Object.keys(e.fields).length ? e.fields : undefined;
    return apiError(400, "invalid_input", e.message, fields);
  }
  if (e instanceof NotFoundError) return apiError(404, "not_found", e.message);
  if (e instanceof ConflictError) {
    return apiError(409, "version_conflict", e.message, {
      baseVersion: `The current version is ${e.latest.version} (by ${e.latest.author ?? "someone"} at ${e.latest.at}: "${e.latest.message}").`,
    });
  }
  if (e instanceof Forbidden) return apiError(e.signedIn ? 403 : 401, e.signedIn ? "forbidden" : "unauthorized", e.message);
  if (isLockConflict(e)) {
    return apiError(503, "busy", "Other saves held the same rows and this one was not stored; send it again.", undefined, { "Retry-After": "1" });
  }
  throw e;
}

async function guard(run: () => Promise<Response>): Promise<Response> {
  try {
    return await run();
  } catch (e) {
    return apiFailure(e);
  }
}

function idParam(raw: string | undefined, what = "id"): number {
  const n = Number(raw);
  if (!Number.isInteger(n) || n <= 0) throw new NotFoundError(`"${raw}" is not a valid ${what}.`);
  return n;
}

async function body(request: Request, limit?: number): Promise<unknown> {
  const b = await readJsonBody(request, limit);
  if (!b.ok) throw b.response;
  return b.value;
}

// ---------------------------------------------------------------- query schemas (also in the OpenAPI description)

export const StepSearchParams = z.strictObject({
  q: z.string().max(200).optional().meta({ description: "Words to look for (typo-tolerant) in labels, species, formulas, tags, method, citation, notes." }),
  status: z.array(z.enum(STEP_STATUSES)).optional().meta({ description: "Comma-separated statuses." }),
  molecularity: z.array(z.coerce.number().min(0).max(3)).optional(),
  source: z.array(z.enum(SOURCE_TYPES)).optional(),
  tag: z.array(z.string().max(100)).optional(),
  tmin: z.coerce.number().positive().optional().meta({ description: "K: only steps valid from at least this low." }),
  tmax: z.coerce.number().positive().optional().meta({ description: "K: only steps valid up to at least this high." }),
  T: z.coerce.number().positive().max(5000).optional().meta({ description: "K: temperature for the reported k (default 298.15)." }),
  mine: z.enum(["1", "true"]).optional(),
  cursor: z.string().max(500).optional(),
  limit: z.coerce.number().int().min(1).max(200).optional(),
});

// ---------------------------------------------------------------- steps

export function stepsList(db: Knex, actor: Actor, request: Request): Promise<Response> {
  return guard(async () => {
    const p = parseQuery(StepSearchParams, new URL(request.url), ["status", "molecularity", "source", "tag"]);
    const r = await searchSteps(db, actor, {
      q: p.q,
      status: p.status,
      molecularity: p.molecularity,
      source: p.source,
      tags: p.tag,
      tmin: p.tmin,
      tmax: p.tmax,
      T: p.T,
      mine: !!p.mine,
      cursor: p.cursor,
      limit: p.limit,
    });
    return jsonResponse({ items: r.items, nextCursor: r.nextCursor });
  });
}

export function stepsCreate(db: Knex, actor: Actor, request: Request): Promise<Response> {
  return guard(async () => {
    const r = await createStep(db, actor, await body(request));
    return jsonResponse(r, { status: 201, headers: { Location: `/api/v1/steps/${r.stepId}`, ETag: `"step-${r.stepId}-v1"` } });
  });
}

function stepJson(d: Awaited<ReturnType<typeof getStep>>) {
  return {
    id: d.step.id,
    owner: { id: d.step.owner_id, name: d.step.owner_name },
    status: d.version.status,
    version: d.version.number,
    versionId: d.version.id,
    label: d.version.label,
    step: d.version.content,
    kineticsSI: d.version.kinetics,
    display: { energyUnit: d.version.energy_unit, entropyUnit: d.version.entropy_unit, temperatureUnit: d.version.temperature_unit },
    derived: { dG298_J_per_mol: d.version.dg298, Ea298_J_per_mol: d.version.ea298 },
    replacedByStepId: d.version.replaced_by_step_id,
    species: Object.fromEntries([...d.species].map(([id, s]) => [`s${id}`, s])),
    reviews: d.reviews,
    whereUsed: d.whereUsed,
  };
}

export function stepGet(db: Knex, actor: Actor, request: Request, rawId: string | undefined): Promise<Response> {
  return guard(async () => {
    const d = await getStep(db, actor, idParam(rawId));
    const etag = `"step-${d.step.id}-v${d.version.number}"`;
    if (request.headers.get("If-None-Match") === etag) return new Response(null, { status: 304, headers: { ETag: etag } });
    return jsonResponse(stepJson(d), { headers: { ETag: etag } });
  });
}

function baseFromIfMatch(request: Request, kind: "step" | "mech"): number | undefined {
  const m = new RegExp(`^(?:W/)?"${kind}-\\d+-v(\\d+)"$`).exec(request.headers.get("If-Match") ?? "");
  return m ? Number(m[1]) : undefined;
}

export function stepVersionsList(db: Knex, actor: Actor, rawId: string | undefined): Promise<Response> {
  return guard(async () => jsonResponse({ items: await listStepVersions(db, actor, idParam(rawId)), nextCursor: null }));
}

export function stepVersionGet(db: Knex, actor: Actor, rawId: string | undefined, rawNumber: string | undefined): Promise<Response> {
  return guard(async () => {
    const v = await getStepVersion(db, actor, idParam(rawId), idParam(rawNumber, "version number"));
    return jsonResponse({ id: v.id, number: v.number, status: v.status, label: v.label, message: v.message, step: v.content, kineticsSI: v.kinetics, createdAt: v.created_at });
  });
}

/** POST /steps/:id/versions — an edit (new version). */
export function stepEdit(db: Knex, actor: Actor, request: Request, rawId: string | undefined): Promise<Response> {
  return guard(async () => {
    const b = (await body(request)) as Record<string, unknown>;
    const fromHeader = baseFromIfMatch(request, "step");
    const input = b && typeof b === "object" && b.baseVersion === undefined && fromHeader ? { ...b, baseVersion: fromHeader } : b;
    const id = idParam(rawId);
    const r = await editStep(db, actor, id, input);
    return jsonResponse(r, { status: 201, headers: { ETag: `"step-${id}-v${r.version}"` } });
  });
}

export function stepPropose(db: Knex, actor: Actor, request: Request, rawId: string | undefined): Promise<Response> {
  return guard(async () => {
    const text = await request.text();
    let comment: string | undefined;
    if (text.trim()) {
      const parsed = z.strictObject({ comment: z.string().max(10000).optional() }).safeParse(safeJson(text));
      if (!parsed.success) throw new InputError("The body may hold only an optional comment.", { body: "Expected {\"comment\": \"…\"}." });
      comment = parsed.data.comment;
    }
    const id = idParam(rawId);
    const r = await proposeStep(db, actor, id, comment);
    await notifyProposal(db, id).catch(() => {});
    return jsonResponse({ ...r, status: "proposed" });
  });
}

function safeJson(text: string): unknown {
  try {
    return JSON.parse(text);
  } catch {
    throw new InputError("The request body is not valid JSON.", { body: "Malformed JSON." });
  }
}

export function stepReview(db: Knex, actor: Actor, request: Request, rawId: string | undefined): Promise<Response> {
  return guard(async () => jsonResponse((await reviewAndNotify(db, actor, idParam(rawId), await body(request), request)).review));
}

export function stepCommentsList(db: Knex, actor: Actor, rawId: string | undefined): Promise<Response> {
  return guard(async () => jsonResponse({ items: (await getStep(db, actor, idParam(rawId))).comments, nextCursor: null }));
}

export function stepCommentAdd(db: Knex, actor: Actor, request: Request, rawId: string | undefined): Promise<Response> {
  return guard(async () => jsonResponse(await addStepComment(db, actor, idParam(rawId), await body(request)), { status: 201 }));
}

// ---------------------------------------------------------------- species

export function speciesList(db: Knex, request: Request): Promise<Response> {
  return guard(async () => {
    const p = parseQuery(z.strictObject({ q: z.string().max(200).optional(), cursor: z.string().regex(/^\d+$/, "Not a cursor this API issued.").optional(), limit: z.coerce.number().int().min(1).max(200).optional() }), new URL(request.url), []);
    const r = await listSpecies(db, { q: p.q, afterId: p.cursor ? Number(p.cursor) : undefined, limit: p.limit });
    return jsonResponse({ items: r.items, nextCursor: r.nextAfterId ? String(r.nextAfterId) : null });
  });
}

export function speciesCreate(db: Knex, actor: Actor, request: Request): Promise<Response> {
  return guard(async () => {
    if (actor.role === "viewer") throw new Forbidden(true, "Viewers cannot add species.");
    const s = await createSpecies(db, actor, await body(request));
    return jsonResponse(s, { status: 201, headers: { Location: `/api/v1/species/${s.id}` } });
  });
}

export function speciesGet(db: Knex, rawId: string | undefined): Promise<Response> {
  return guard(async () => {
    const s = await getSpecies(db, idParam(rawId));
    if (!s) throw new NotFoundError("No such species.");
    return jsonResponse(s);
  });
}

// ---------------------------------------------------------------- mechanisms

const mechCursor = z.string().max(300).optional();

export function mechanismsList(db: Knex, actor: Actor | null, request: Request): Promise<Response> {
  return guard(async () => {
    const p = parseQuery(z.strictObject({ q: z.string().max(200).optional(), mine: z.enum(["1", "true"]).optional(), cursor: mechCursor, limit: z.coerce.number().int().min(1).max(200).optional() }), new URL(request.url), []);
    let after: { updatedAt: string; id: number } | null = null;
    if (p.cursor) {
      try {
        after = JSON.parse(Buffer.from(p.cursor, "base64url").toString("utf8"));
        if (!after || typeof after.id !== "number" || typeof after.updatedAt !== "string") throw new Error();
      } catch {
        throw new InputError("The cursor is not valid; start again from the first page.", { cursor: "Not a cursor this API issued." });
      }
    }
    const r = await listMechanisms(db, actor, { q: p.q, mine: !!p.mine, limit: p.limit, after });
    return jsonResponse({ items: r.items, nextCursor: r.next ? Buffer.from(JSON.stringify(r.next)).toString("base64url") : null });
  });
}

export function mechanismCreate(db: Knex, actor: Actor, request: Request): Promise<Response> {
  return guard(async () => {
    const r = await createMechanism(db, actor, await body(request));
    return jsonResponse(r, { status: 201, headers: { Location: `/api/v1/mechanisms/${r.id}`, ETag: `"mech-${r.id}-v1"` } });
  });
}

export function mechanismGet(db: Knex, actor: Actor | null, request: Request, rawId: string | undefined): Promise<Response> {
  return guard(async () => {
    const url = new URL(request.url);
    const v = url.searchParams.get("version");
    const d = await getMechanism(db, actor, idParam(rawId), v ? idParam(v, "version") : undefined);
    const etag = `"mech-${d.mechanism.id}-v${d.version.number}"`;
    if (request.headers.get("If-None-Match") === etag) return new Response(null, { status: 304, headers: { ETag: etag } });
    const m = d.mechanism;
    return jsonResponse(
      {
        id: m.id,
        name: d.version.name,
        description: m.description,
        owner: { id: m.owner_id, name: m.owner_name },
        visibility: m.visibility,
        groupId: m.group_id,
        forkedFrom: m.forked_from_mechanism_id ? { id: m.forked_from_mechanism_id, version: m.forked_from_version } : null,
        currentVersion: m.current_version,
        version: { number: d.version.number, author: d.version.author, message: d.version.message, createdAt: d.version.created_at, contentHash: d.version.content_hash },
        species: d.snapshot.species,
        steps: d.snapshot.steps,
        resolvedSteps: d.resolved.steps,
        updatesAvailable: d.updates,
        forks: d.forks,
        layout: m.layout,
        conditionPresets: m.condition_presets,
      },
      { headers: { ETag: etag } },
    );
  });
}

export function mechanismUpdate(db: Knex, actor: Actor, request: Request, rawId: string | undefined): Promise<Response> {
  return guard(async () => {
    const b = (await body(request)) as Record<string, unknown>;
    const fromHeader = baseFromIfMatch(request, "mech");
    const input = b && typeof b === "object" && b.baseVersion === undefined && fromHeader !== undefined ? { ...b, baseVersion: fromHeader } : b;
    const id = idParam(rawId);
    const r = await updateMechanism(db, actor, id, input);
    return jsonResponse(r, { headers: { ETag: `"mech-${id}-v${r.version}"` } });
  });
}

export function mechanismDelete(db: Knex, actor: Actor, rawId: string | undefined): Promise<Response> {
  return guard(async () => {
    await deleteMechanism(db, actor, idParam(rawId));
    return new Response(null, { status: 204 });
  });
}

export function mechanismVersions(db: Knex, actor: Actor | null, rawId: string | undefined): Promise<Response> {
  return guard(async () => jsonResponse({ items: await listMechanismVersions(db, actor, idParam(rawId)), nextCursor: null }));
}

export const DiffParams = z.strictObject({
  from: z.coerce.number().int().positive().optional().meta({ description: "Version number; with `to` compares two versions." }),
  to: z.coerce.number().int().positive().optional(),
  against: z.literal("parent").optional().meta({ description: "Compare a fork with the parent version it was forked from." }),
  T: z.coerce.number().positive().max(5000).optional().meta({ description: "K: temperature of the reported effect on k (default 298.15)." }),
});

export function mechanismDiff(db: Knex, actor: Actor | null, request: Request, rawId: string | undefined): Promise<Response> {
  return guard(async () => {
    const p = parseQuery(DiffParams, new URL(request.url), []);
    const id = idParam(rawId);
    if (p.against === "parent") {
      const r = await diffAgainstParent(db, actor, id, p.T);
      return jsonResponse(r);
    }
    if (!p.from || !p.to) throw new InputError("Give `from` and `to` version numbers, or `against=parent`.", { from: "Required." });
    return jsonResponse({ diff: await diffVersions(db, actor, id, p.from, p.to, p.T) });
  });
}

export function mechanismFork(db: Knex, actor: Actor, request: Request, rawId: string | undefined): Promise<Response> {
  return guard(async () => {
    // The body is optional (name, version); it gets the same 1 MB limit as every JSON body.
    const declared = Number(request.headers.get("content-length") ?? 0);
    const text = declared > JSON_BODY_LIMIT_BYTES ? null : await request.text();
    if (text === null || new TextEncoder().encode(text).length > JSON_BODY_LIMIT_BYTES) {
      return apiError(413, "body_too_large", `The request body is larger than the limit of ${JSON_BODY_LIMIT_BYTES} bytes (1 MB).`);
    }
    const input = text.trim() ? safeJson(text) : {};
    const r = await forkMechanism(db, actor, idParam(rawId), input);
    await notifyFork(db, r.id).catch(() => {});
    return jsonResponse({ id: r.id, version: r.version }, { status: 201, headers: { Location: `/api/v1/mechanisms/${r.id}` } });
  });
}

export function mechanismExport(db: Knex, actor: Actor | null, request: Request, rawId: string | undefined): Promise<Response> {
  return guard(async () => {
    const v = new URL(request.url).searchParams.get("version");
    const id = idParam(rawId);
    const doc = await exportMechanism(db, actor, id, v ? idParam(v, "version") : undefined);
    const slug = doc.about.name.replace(/[^A-Za-z0-9._-]+/g, "-").replace(/^-|-$/g, "").slice(0, 80) || "mechanism";
    return new Response(mechanismToText(doc), {
      headers: {
        "Content-Type": "application/json; charset=utf-8",
        "Content-Disposition": `attachment; filename="${slug}.saddlebook.json"`,
        "Cache-Control": "no-store",
      },
    });
  });
}

/** POST /mechanisms/import — body: the exchange-format document itself (limit 2 MB). */
export function mechanismImport(db: Knex, actor: Actor, request: Request): Promise<Response> {
  return guard(async () => {
    const declared = Number(request.headers.get("content-length"));
    if (Number.isFinite(declared) && declared > IMPORT_LIMIT_BYTES) {
      return apiError(413, "body_too_large", `The document is larger than the import limit of 2 MB (${IMPORT_LIMIT_BYTES} bytes).`, { body: `at most ${IMPORT_LIMIT_BYTES} bytes` });
    }
    const b = await readJsonBody(request, IMPORT_LIMIT_BYTES);
    if (!b.ok) return b.response;
    const url = new URL(request.url);
    const vis = url.searchParams.get("visibility");
    if (vis && !["private", "group", "public"].includes(vis)) throw new InputError("visibility must be private, group or public.", { visibility: "Unknown value." });
    const r = await importMechanism(db, actor, b.text, { visibility: (vis as "private" | "group" | "public" | null) ?? undefined });
    return jsonResponse(r, { status: 201, headers: { Location: `/api/v1/mechanisms/${r.id}` } });
  });
}
