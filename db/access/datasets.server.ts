/**
 * Measured concentration–time datasets: create (one insert, all rows or nothing), read, list.
 *
 * Rows are stored as entered: times in `time_unit`, concentrations in `concentration_unit`;
 * the temperature in K. Conversion to s and mol/L happens on use (datasetInSI).
 */
import type { Knex } from "knex";
import type { Actor, OwnedObject } from "../../app/auth/policy.server";

export const DATASET_TIME_UNITS = ["s", "min", "h"] as const;
export const DATASET_CONC_UNITS = ["mol/L", "mmol/L", "umol/L"] as const;
export type DatasetTimeUnit = (typeof DATASET_TIME_UNITS)[number];
export type DatasetConcUnit = (typeof DATASET_CONC_UNITS)[number];
const T_FACTOR: Record<DatasetTimeUnit, number> = { s: 1, min: 60, h: 3600 };
const C_FACTOR: Record<DatasetConcUnit, number> = { "mol/L": 1, "mmol/L": 1e-3, "umol/L": 1e-6 };

export interface DatasetRows {
  /** in time_unit */
  times: number[];
  /** species id → values in concentration_unit (null where the cell was empty) */
  series: Record<string, (number | null)[]>;
}

export interface ColumnMapping {
  time: string;
  /** CSV column → species id */
  species: Record<string, string>;
}

export interface DatasetRecord {
  id: number;
  ownerId: number;
  ownerName?: string;
  name: string;
  notes: string | null;
  visibility: OwnedObject["visibility"];
  groupId: number | null;
  mechanismId: number | null;
  temperatureK: number;
  timeUnit: DatasetTimeUnit;
  concentrationUnit: DatasetConcUnit;
  mapping: ColumnMapping;
  rows: DatasetRows | null;
  rowCount: number;
  sourceFilename: string | null;
  createdAt: Date;
}

function json<T>(v: unknown): T {
  if (v === null || v === undefined) return null as T;
  return (typeof v === "string" ? JSON.parse(v) : v) as T;
}

function toRecord(r: Record<string, any>): DatasetRecord {
  return {
    id: r.id,
    ownerId: r.owner_id,
    ownerName: r.owner_name ?? undefined,
    name: r.name,
    notes: r.notes,
    visibility: r.visibility,
    groupId: r.group_id,
    mechanismId: r.mechanism_id,
    temperatureK: r.temperature_k,
    timeUnit: r.time_unit,
    concentrationUnit: r.concentration_unit,
    mapping: json(r.column_mapping),
    rows: r.rows === undefined ? null : json(r.rows),
    rowCount: r.row_count,
    sourceFilename: r.source_filename,
    createdAt: r.created_at,
  };
}

export interface NewDataset {
  ownerId: number;
  name: string;
  notes?: string | null;
  mechanismId?: number | null;
  temperatureK: number;
  timeUnit: DatasetTimeUnit;
  concentrationUnit: DatasetConcUnit;
  mapping: ColumnMapping;
  rows: DatasetRows;
  sourceFilename?: string | null;
  visibility?: OwnedObject["visibility"];
  groupId?: number | null;
}

export async function createDataset(db: Knex, d: NewDataset): Promise<number> {
  const [id] = await db("datasets").insert({
    owner_id: d.ownerId,
    name: d.name.slice(0, 300),
    notes: d.notes ?? null,
    visibility: d.visibility ?? "private",
    group_id: d.groupId ?? null,
    mechanism_id: d.mechanismId ?? null,
    temperature_k: d.temperatureK,
    time_unit: d.timeUnit,
    concentration_unit: d.concentrationUnit,
    column_mapping: JSON.stringify(d.mapping),
    rows: JSON.stringify(d.rows),
    row_count: d.rows.times.length,
    source_filename: d.sourceFilename?.slice(0, 300) ?? null,
  });
  return id;
}

const LIST = ["d.id", "d.owner_id", "d.name", "d.notes", "d.visibility", "d.group_id", "d.mechanism_id", "d.temperature_k", "d.time_unit", "d.concentration_unit", "d.column_mapping", "d.row_count", "d.source_filename", "d.created_at"];

export async function getDataset(db: Knex, id: number): Promise<DatasetRecord | null> {
  const row = await db("datasets as d").leftJoin("users as u", "u.id", "d.owner_id").select([...LIST, "d.rows", "u.name as owner_name"]).where("d.id", id).first();
  return row ? toRecord(row) : null;
}

export async function listDatasets(db: Knex, actor: Actor | null, opts: { limit?: number; mechanismId?: number } = {}): Promise<DatasetRecord[]> {
  const q = db("datasets as d").leftJoin("users as u", "u.id", "d.owner_id").select([...LIST, "u.name as owner_name"]);
  q.where((w) => {
    w.where("d.visibility", "public");
    if (actor) {
      w.orWhere("d.owner_id", actor.id);
      if (actor.role === "admin") w.orWhereRaw("1 = 1");
      if (actor.groupIds.length) w.orWhere((g) => g.where("d.visibility", "group").whereIn("d.group_id", actor.groupIds));
    }
  });
  if (opts.mechanismId !== undefined) q.andWhere("d.mechanism_id", opts.mechanismId);
  return (await q.orderBy("d.id", "desc").limit(Math.min(opts.limit ?? 200, 1000))).map(toRecord);
}

export async function deleteDataset(db: Knex, id: number): Promise<void> {
  await db("datasets").where({ id }).delete();
}

export function datasetAsOwned(d: Pick<DatasetRecord, "ownerId" | "visibility" | "groupId">): OwnedObject {
  return { ownerId: d.ownerId, visibility: d.visibility, groupId: d.groupId };
}

/** Times in s and concentrations in mol/L per species (null cells dropped). */
export function datasetInSI(d: DatasetRecord): { temperatureK: number; series: { species: string; times: number[]; values: number[] }[] } {
  const tf = T_FACTOR[d.timeUnit], cf = C_FACTOR[d.concentrationUnit];
  const rows = d.rows ?? { times: [], series: {} };
  const series = Object.entries(rows.series).map(([species, vals]) => {
    const times: number[] = [], values: number[] = [];
    vals.forEach((v, k) => {
      if (v === null || !Number.isFinite(v)) return;
      times.push(rows.times[k] * tf);
      values.push(v * cf);
    });
    return { species, times, values };
  });
  return { temperatureK: d.temperatureK, series };
}
