/**
 * The OpenAPI 3.1 description of every /api/v1 endpoint in app/routes.ts — the library,
 * mechanism and species endpoints, the compute endpoints (rates, simulate, activation
 * parameters), runs, datasets, the caller, health and this description itself — generated
 * from the same zod schemas the handlers validate with (zod 4 `z.toJSONSchema`).
 * Served at /api/v1/openapi.json and shown as a page at /api/v1/docs; a test checks that every
 * API route of app/routes.ts is described.
 */
import { z } from "zod";
import {
  CommentSchema,
  ForkSchema,
  MechanismCreateSchema,
  MechanismUpdateSchema,
  ReviewSchema,
  SpeciesInputSchema,
  StepEditSchema,
  StepInputSchema,
} from "../components/library/step-schema";
import { MechanismDocumentSchema } from "../../solver/exchange-format";
import { DiffParams, StepSearchParams } from "./library-api.server";
import { IMPORT_LIMIT_BYTES } from "../../db/access/mechanisms.server";
import { RatesRequestSchema, RATES_MAX_PAIRS } from "./compute-rates.server";
import { SimulateRequestSchema } from "./compute-simulate.server";
import { ActivationRequestSchema } from "./compute-activation.server";
import { RunCreateSchema } from "../compute/run-api.server";
import { DatasetCreateSchema } from "../compute/dataset-api.server";
import { EnsembleSpecSchema } from "../ensembles/ensemble-spec";

const ErrorBodySchema = z.strictObject({
  error: z.strictObject({
    code: z.string().meta({ description: "Machine-readable code, e.g. invalid_input, not_found, version_conflict, forbidden." }),
    message: z.string().meta({ description: "One sentence for a person." }),
    fields: z.record(z.string(), z.string()).optional().meta({ description: "Field path → problem (with line and column for uploaded documents)." }),
  }),
});

const PageSchema = z.strictObject({
  items: z.array(z.record(z.string(), z.unknown())),
  nextCursor: z.string().nullable().meta({ description: "Pass as `cursor` for the next page; null on the last page." }),
});

const SCHEMAS: Record<string, z.ZodType> = {
  Error: ErrorBodySchema,
  Page: PageSchema,
  StepInput: StepInputSchema,
  StepEdit: StepEditSchema,
  Review: ReviewSchema,
  Comment: CommentSchema,
  SpeciesInput: SpeciesInputSchema,
  MechanismCreate: MechanismCreateSchema,
  MechanismUpdate: MechanismUpdateSchema,
  Fork: ForkSchema,
  MechanismDocument: MechanismDocumentSchema,
  RatesRequest: RatesRequestSchema,
  SimulateRequest: SimulateRequestSchema,
  ActivationParametersRequest: ActivationRequestSchema,
  RunCreate: RunCreateSchema,
  DatasetCreate: DatasetCreateSchema,
  EnsembleCreate: EnsembleSpecSchema,
};

function componentSchemas(): Record<string, unknown> {
  const reg = z.registry<{ id: string }>();
  for (const [id, s] of Object.entries(SCHEMAS)) reg.add(s, { id });
  const out = z.toJSONSchema(reg, { uri: (id) => `#/components/schemas/${id}`, target: "draft-2020-12", io: "input", unrepresentable: "any" }) as { schemas: Record<string, Record<string, unknown>> };
  const clean: Record<string, unknown> = {};
  for (const [id, s] of Object.entries(out.schemas)) {
    const { $schema: _s, $id: _i, ...rest } = s;
    clean[id] = rest;
  }
  return clean;
}

/** Query parameters from a zod object schema. */
function queryParams(schema: z.ZodObject, arrays: string[] = []): unknown[] {
  const js = z.toJSONSchema(schema, { io: "input", unrepresentable: "any" }) as { properties: Record<string, Record<string, unknown>> };
  return Object.entries(js.properties).map(([name, s]) => ({
    name,
    in: "query",
    required: false,
    description: [s.description, arrays.includes(name) ? "Comma-separated list." : null].filter(Boolean).join(" ") || undefined,
    schema: arrays.includes(name) ? { type: "string" } : s,
  }));
}

const ref = (id: string) => ({ $ref: `#/components/schemas/${id}` });
const json = (id: string) => ({ content: { "application/json": { schema: ref(id) } } });
const errors = (...codes: number[]) =>
  Object.fromEntries(
    codes.map((c) => [
      String(c),
      {
        description:
          {
            400: "Invalid input (fields name each problem)",
            401: "Not signed in / no valid token",
            403: "Not allowed for your role",
            404: "Not found or not visible to you",
            405: "Method not allowed (the Allow header names the one accepted)",
            409: "Stale baseVersion: someone saved first; nothing was written",
            413: "Body too large",
            422: "Valid JSON the engine cannot compute (code and field say why)",
            429: "Too many compute requests this minute (Retry-After says when to try again)",
            503: "Busy or degraded; try again",
          }[c] ?? "Error",
        ...json("Error"),
      },
    ]),
  );
const ok = (description: string, schema?: string) => (schema ? { description, ...json(schema) } : { description, content: { "application/json": { schema: { type: "object" } } } });
const idParam = (name = "id") => ({ name, in: "path", required: true, schema: { type: "integer", minimum: 1 } });

export function openApiDocument(): Record<string, unknown> {
  return {
    openapi: "3.1.0",
    info: {
      title: "Saddlebook API — step library, mechanisms, rate constants, simulations, runs and datasets",
      version: "1",
      description:
        "JSON over HTTPS. Authenticate with the browser session or `Authorization: Bearer <token>`. Errors: {\"error\":{\"code\",\"message\",\"fields\"}}. Lists: {\"items\",\"nextCursor\"} with `cursor` and `limit` (1–200). Saves carry `baseVersion` (or If-Match with the ETag from GET); a stale one gets 409. Bodies are JSON (`Content-Type: application/json`; another declared type gets 415). A change signed in by the session cookie is accepted from Saddlebook's own pages only (another origin gets 403 `cross_origin`). Energies in requests carry their unit; derived values in responses are SI (J/mol, K).",
    },
    servers: [{ url: "/api/v1" }],
    security: [{ bearer: [] }, { session: [] }],
    components: {
      securitySchemes: {
        bearer: { type: "http", scheme: "bearer", description: "An API token from your account page." },
        session: { type: "apiKey", in: "cookie", name: "__session" },
      },
      schemas: componentSchemas(),
    },
    paths: {
      "/steps": {
        get: { summary: "Search the step library", parameters: queryParams(StepSearchParams, ["status", "molecularity", "source", "tag"]), responses: { 200: ok("A page of steps with k at T", "Page"), ...errors(400, 401) } },
        post: { summary: "Create a library step (version 1, draft)", requestBody: { required: true, ...json("StepInput") }, responses: { 201: ok("Created: {stepId, versionId, version}"), ...errors(400, 401, 403, 413) } },
      },
      "/steps/{id}": { get: { summary: "A step (the version you may see), with ETag", parameters: [idParam()], responses: { 200: ok("The step"), 304: { description: "Not modified" }, ...errors(401, 404) } } },
      "/steps/{id}/versions": {
        get: { summary: "Version history", parameters: [idParam()], responses: { 200: ok("Versions, newest first", "Page"), ...errors(401, 404) } },
        post: { summary: "Edit: a new immutable version", parameters: [idParam()], requestBody: { required: true, ...json("StepEdit") }, responses: { 201: ok("{versionId, version}"), ...errors(400, 401, 403, 404, 409) } },
      },
      "/steps/{id}/versions/{number}": { get: { summary: "One version", parameters: [idParam(), idParam("number")], responses: { 200: ok("The version"), ...errors(401, 404) } } },
      "/steps/{id}/propose": { post: { summary: "Propose a draft for the library (curators are e-mailed)", parameters: [idParam()], responses: { 200: ok("{version, status}"), ...errors(400, 401, 403, 404) } } },
      "/steps/{id}/review": { post: { summary: "Curators: approve, request changes, deprecate (with replacement)", parameters: [idParam()], requestBody: { required: true, ...json("Review") }, responses: { 200: ok("{version, status}"), ...errors(400, 401, 403, 404) } } },
      "/steps/{id}/comments": {
        get: { summary: "Comments", parameters: [idParam()], responses: { 200: ok("Comments", "Page"), ...errors(401, 404) } },
        post: { summary: "Add a comment", parameters: [idParam()], requestBody: { required: true, ...json("Comment") }, responses: { 201: ok("{id}"), ...errors(400, 401, 404) } },
      },
      "/species": {
        get: { summary: "List species", parameters: [{ name: "q", in: "query", schema: { type: "string" } }, { name: "cursor", in: "query", schema: { type: "string" } }, { name: "limit", in: "query", schema: { type: "integer", minimum: 1, maximum: 200 } }], responses: { 200: ok("A page of species", "Page"), ...errors(400, 401) } },
        post: { summary: "Add a species (formula checked)", requestBody: { required: true, ...json("SpeciesInput") }, responses: { 201: ok("The species"), ...errors(400, 401, 403) } },
      },
      "/species/{id}": { get: { summary: "One species", parameters: [idParam()], responses: { 200: ok("The species"), ...errors(401, 404) } } },
      "/mechanisms": {
        get: { summary: "Mechanisms you can read", parameters: [{ name: "q", in: "query", schema: { type: "string" } }, { name: "mine", in: "query", schema: { type: "string", enum: ["1", "true"] } }, { name: "cursor", in: "query", schema: { type: "string" } }, { name: "limit", in: "query", schema: { type: "integer" } }], responses: { 200: ok("A page of mechanisms", "Page"), ...errors(400) } },
        post: { summary: "Create a mechanism (version 1)", requestBody: { required: true, ...json("MechanismCreate") }, responses: { 201: ok("{id, version}"), ...errors(400, 401, 403) } },
      },
      "/mechanisms/import": {
        post: {
          summary: `Import a Saddlebook mechanism document (at most ${IMPORT_LIMIT_BYTES} bytes); one transaction`,
          parameters: [{ name: "visibility", in: "query", schema: { type: "string", enum: ["private", "group", "public"] } }],
          requestBody: { required: true, ...json("MechanismDocument") },
          responses: { 201: ok("{id, version}"), ...errors(400, 401, 403, 413) },
        },
      },
      "/mechanisms/{id}": {
        get: { summary: "A mechanism (current or ?version=N), with ETag", parameters: [idParam(), { name: "version", in: "query", schema: { type: "integer" } }], responses: { 200: ok("The mechanism with resolved steps and update offers"), ...errors(404) } },
        put: { summary: "Save a new version (based on baseVersion or If-Match)", parameters: [idParam()], requestBody: { required: true, ...json("MechanismUpdate") }, responses: { 200: ok("{version}"), ...errors(400, 401, 403, 404, 409) } },
        delete: { summary: "Delete (owner)", parameters: [idParam()], responses: { 204: { description: "Deleted" }, ...errors(401, 403, 404) } },
      },
      "/mechanisms/{id}/versions": { get: { summary: "History", parameters: [idParam()], responses: { 200: ok("Versions, newest first", "Page"), ...errors(404) } } },
      "/mechanisms/{id}/diff": { get: { summary: "Differences between versions, or against the parent", parameters: [idParam(), ...queryParams(DiffParams)], responses: { 200: ok("The diff, with k at T before and after"), ...errors(400, 404) } } },
      "/mechanisms/{id}/fork": { post: { summary: "Fork into your space (the owner is e-mailed)", parameters: [idParam()], requestBody: { required: false, ...json("Fork") }, responses: { 201: ok("{id, version}"), ...errors(400, 401, 403, 404) } } },
      "/health": {
        get: {
          summary: "Liveness: {status, db, queue}; 503 with the reason when the database is down; the compute queue's Redis is reported (ok, down with queueReason, off) but never makes it 503 (no sign-in needed)",
          security: [],
          responses: { 200: ok("{status: \"ok\", db: \"ok\", queue: \"ok\"}"), 503: { description: "{status: \"degraded\", db: \"down\", reason, queue}", content: { "application/json": { schema: { type: "object" } } } } },
        },
      },
      "/me": { get: { summary: "The caller: id, e-mail, name, role and groups", responses: { 200: ok("The signed-in user"), ...errors(401, 405) } } },
      "/rates": {
        post: {
          summary: `Rate constants and every derived barrier form of steps at temperatures (at most ${RATES_MAX_PAIRS} steps × temperatures)`,
          requestBody: { required: true, ...json("RatesRequest") },
          responses: { 200: ok("{temperatureUnit, results: [{id, molecularity, form, at: [{T, kForward, kReverse?, derived, relations, notes}]}]}"), ...errors(400, 401, 405, 413, 422, 429) },
        },
      },
      "/simulate": {
        post: {
          summary: "Concentrations against time for a mechanism document and conditions (not stored; runs are stored)",
          requestBody: { required: true, ...json("SimulateRequest") },
          responses: { 200: ok("{times, concentrations, temperatures, rateConstants, analysis, statistics, warnings}"), ...errors(400, 401, 405, 413, 422, 429, 503) },
        },
      },
      "/activation-parameters": {
        post: {
          summary: "Eyring and Arrhenius regression of a measured k(T) table: ΔH‡, ΔS‡, ΔG‡, Ea, ln A with standard errors and confidence intervals",
          requestBody: { required: true, ...json("ActivationParametersRequest") },
          responses: { 200: ok("{standardState, kUnit, n, dof, confidence, eyring: {dH, dS, dG, referenceTemperature, r2, residuals}, arrhenius: {Ea, lnA, A, r2, residuals}, notes}"), ...errors(400, 401, 405, 413, 422, 429) },
        },
      },
      "/runs": {
        get: {
          summary: "Runs you can read, newest first",
          parameters: [{ name: "mechanismId", in: "query", schema: { type: "integer", minimum: 1 } }, { name: "limit", in: "query", schema: { type: "integer", minimum: 1, default: 100 } }],
          responses: { 200: ok("{runs: [run]}"), ...errors(401) },
        },
        post: { summary: "Store a run and queue it (a mechanism document or a stored mechanism version, conditions, solver settings)", requestBody: { required: true, ...json("RunCreate") }, responses: { 202: ok("{run}; Location names the run"), ...errors(400, 401, 403, 404, 405, 413, 422) } },
      },
      "/runs/{id}": {
        get: {
          summary: "A run: status, conditions, solver settings, statistics; with ?series=1 the concentration series of a finished run",
          parameters: [idParam(), { name: "series", in: "query", schema: { type: "string", enum: ["0", "1"] } }],
          responses: { 200: ok("{run}"), ...errors(401, 404, 405) },
        },
      },
      "/runs/{id}/cancel": { post: { summary: "Cancel a queued or running run (owner or admin)", parameters: [idParam()], responses: { 202: ok("{run}"), ...errors(401, 403, 404, 405, 409) } } },
      "/runs/{id}/results.csv": {
        get: {
          summary: "A finished run's concentrations as CSV (time in s, concentrations in mol/L)",
          parameters: [idParam()],
          responses: { 200: { description: "CSV text", content: { "text/csv": { schema: { type: "string" } } } }, ...errors(401, 404, 409) },
        },
      },
      "/ensembles": {
        get: {
          summary: "Ensembles you can read, newest first",
          parameters: [{ name: "mechanismId", in: "query", schema: { type: "integer", minimum: 1 } }, { name: "limit", in: "query", schema: { type: "integer", minimum: 1, default: 100 } }],
          responses: { 200: ok("{ensembles: [ensemble]}"), ...errors(401) },
        },
        post: {
          summary: "Store an ensemble of simulations of a stored mechanism version — a sweep of one or two parameters (T, an initial concentration, a step's barrier shift) or an uncertainty propagation (Monte Carlo or Latin hypercube, barrier errors correlated by method) — and start it",
          requestBody: { required: true, ...json("EnsembleCreate") },
          responses: { 202: ok("{ensemble}; Location names it"), ...errors(400, 401, 403, 404, 405, 413, 422) },
        },
      },
      "/ensembles/{id}": {
        get: {
          summary: "An ensemble: status, progress (members done of total), labels by name; when done the summary (per observable and time: mean, sd, percentiles; histograms at the chosen times; rank-correlation sensitivities)",
          parameters: [idParam()],
          responses: { 200: ok("{ensemble}"), ...errors(401, 404, 405) },
        },
      },
      "/ensembles/{id}/cancel": { post: { summary: "Cancel a queued or running ensemble (owner or admin); members already computed are kept", parameters: [idParam()], responses: { 202: ok("{ensemble}"), ...errors(401, 403, 404, 405, 409) } } },
      "/ensembles/{id}/members.csv": {
        get: {
          summary: "One row per member: T (K), initial concentrations (mol/L) and barrier shifts (kJ/mol) by name, then each observable at each chosen time (fraction)",
          parameters: [idParam()],
          responses: { 200: { description: "CSV text", content: { "text/csv": { schema: { type: "string" } } } }, ...errors(401, 404) },
        },
      },
      "/ensembles/{id}/summary.csv": {
        get: {
          summary: "A finished ensemble's distributions: per observable and output time, members, mean, sd and the 5/25/50/75/95th percentiles (fractions)",
          parameters: [idParam()],
          responses: { 200: { description: "CSV text", content: { "text/csv": { schema: { type: "string" } } } }, ...errors(401, 404, 409) },
        },
      },
      "/datasets": {
        get: { summary: "Measured datasets you can read", responses: { 200: ok("{datasets: [dataset]}"), ...errors(401) } },
        post: {
          summary: "Upload concentration–time data (CSV with a column mapping, units and temperature)",
          requestBody: { required: true, ...json("DatasetCreate") },
          responses: { 201: ok("{dataset}; Location names it"), ...errors(400, 401, 403, 405, 413, 422) },
        },
      },
      "/datasets/{id}": { get: { summary: "A dataset with its rows, and the rows in SI units", parameters: [idParam()], responses: { 200: ok("{dataset}"), ...errors(401, 404, 405) } } },
      "/openapi.json": { get: { summary: "This description (OpenAPI 3.1)", security: [], responses: { 200: ok("The OpenAPI document"), ...errors(405) } } },
      "/docs": { get: { summary: "This description as a readable page (HTML)", security: [], responses: { 200: { description: "HTML page", content: { "text/html": { schema: { type: "string" } } } } } } },
      "/mechanisms/{id}/export": { get: { summary: "Download as a Saddlebook mechanism document", parameters: [idParam(), { name: "version", in: "query", schema: { type: "integer" } }], responses: { 200: ok("The document", "MechanismDocument"), ...errors(404) } } },
    },
  };
}
