/**
 * REST handlers for measured datasets:
 *   GET  /api/v1/datasets        datasets the caller may read
 *   POST /api/v1/datasets        {"name","temperature":{"value","unit":"K"|"degC"},"timeUnit":"s"|"min"|"h",
 *                                 "concentrationUnit":"mol/L"|"mmol/L"|"umol/L","csv":"<text>","mapping":{"time","species":{column: id}},
 *                                 "notes"?,"mechanismId"?} → 201 {dataset}; bad rows → 422 with fields "line N";
 *                                 a mechanismId the caller cannot read (or that does not exist) → 404
 *   GET  /api/v1/datasets/:id    the dataset with its rows (as entered) and in SI (s, mol/L)
 */
import { z } from "zod";
import type { Knex } from "knex";
import { apiError } from "~/api/errors.server";
import { invalidBody, jsonResponse, readJsonBody, zodFields } from "~/api/json-request.server";
import { can, type Actor } from "~/auth/policy.server";
import { MappingSchema, applyMapping, datasetTemperatureProblem, parseCsv, MAX_CSV_BYTES } from "~/components/workbench/dataset-csv";
import { mechanismReadable } from "../../db/access/mechanisms.server";
import { createDataset, datasetAsOwned, datasetInSI, getDataset, listDatasets, type DatasetRecord } from "../../db/access/datasets.server";

export const DatasetCreateSchema = z.strictObject({
  name: z.string().trim().min(1).max(300),
  notes: z.string().max(10_000).optional(),
  temperature: z.strictObject({ value: z.number(), unit: z.enum(["K", "degC", "°C"]) }),
  timeUnit: z.enum(["s", "min", "h"]),
  concentrationUnit: z.enum(["mol/L", "mmol/L", "umol/L"]),
  csv: z.string().min(1).max(MAX_CSV_BYTES),
  mapping: MappingSchema,
  mechanismId: z.int().positive().optional(),
});

function datasetJson(d: DatasetRecord, withRows = false) {
  const out: Record<string, unknown> = {
    id: d.id,
    name: d.name,
    notes: d.notes,
    owner: { id: d.ownerId, name: d.ownerName ?? null },
    mechanismId: d.mechanismId,
    temperature: { value: d.temperatureK, unit: "K" },
    timeUnit: d.timeUnit,
    concentrationUnit: d.concentrationUnit,
    mapping: d.mapping,
    rowCount: d.rowCount,
    sourceFilename: d.sourceFilename,
    createdAt: d.createdAt,
    links: { self: `/api/v1/datasets/${d.id}`, page: `/data/${d.id}` },
  };
  if (withRows && d.rows) {
    out.rows = d.rows;
    out.si = datasetInSI(d);
  }
  return out;
}

export async function handleListDatasets(db: Knex, actor: Actor): Promise<Response> {
  return jsonResponse({ datasets: (await listDatasets(db, actor)).map((d) => datasetJson(d)) });
}

export async function handleCreateDataset(db: Knex, actor: Actor, request: Request): Promise<Response> {
  if (!can(actor, { do: "dataset.create" })) return apiError(403, "forbidden", "Your role does not allow uploading datasets (authors and above may).");
  const body = await readJsonBody(request, MAX_CSV_BYTES + 100_000);
  if (!body.ok) return body.response;
  const parsed = DatasetCreateSchema.safeParse(body.value);
  if (!parsed.success) return invalidBody(zodFields(parsed.error, body.text));
  const b = parsed.data;
  const csv = parseCsv(b.csv);
  if (!csv.ok) return apiError(422, "invalid_csv", csv.message, { csv: csv.message });
  const mapped = applyMapping(csv.value, b.mapping);
  if (!mapped.ok) {
    const fields: Record<string, string> = { csv: mapped.message };
    for (const e of mapped.errors.slice(0, 100)) fields[`line ${e.line}`] = e.message;
    return apiError(422, "invalid_rows", mapped.message, fields);
  }
  if (b.mechanismId !== undefined && !(await mechanismReadable(db, actor, b.mechanismId))) {
    const message = `There is no mechanism ${b.mechanismId} that you can see.`;
    return apiError(404, "not_found", message, { mechanismId: message });
  }
  const TK = b.temperature.unit === "K" ? b.temperature.value : b.temperature.value + 273.15;
  const badT = datasetTemperatureProblem(TK);
  if (badT) return apiError(422, "temperature", badT.message, { "temperature.value": badT.field });
  const id = await createDataset(db, { ownerId: actor.id, name: b.name, notes: b.notes ?? null, mechanismId: b.mechanismId ?? null, temperatureK: TK, timeUnit: b.timeUnit, concentrationUnit: b.concentrationUnit, mapping: b.mapping, rows: mapped.value });
  return jsonResponse({ dataset: datasetJson((await getDataset(db, id))!) }, { status: 201, headers: { Location: `/api/v1/datasets/${id}` } });
}

export async function handleGetDataset(db: Knex, actor: Actor, idParam: string | undefined): Promise<Response> {
  const id = Number(idParam);
  const d = Number.isInteger(id) && id > 0 ? await getDataset(db, id) : null;
  if (!d || !can(actor, { do: "dataset.read", object: datasetAsOwned(d) })) return apiError(404, "not_found", `There is no dataset ${idParam} that you can see.`);
  return jsonResponse({ dataset: datasetJson(d, true) });
}
