/**
 * Barrier fits: which datasets, which steps, the fitted shifts with standard errors, the
 * residuals and statistics. One transaction per fit (the fit row and its dataset links).
 * Units: shifts and standard errors J/mol; residuals mol/L; times s.
 */
import type { Knex } from "knex";
import { snapshotHash } from "./runs.server";
import type { FitTaskOutput, FittedStep } from "../../app/compute/fit-task";

export interface FitRecord {
  id: number;
  ownerId: number;
  mechanismId: number | null;
  mechanismVersion: number | null;
  snapshotHash: string;
  datasetIds: number[];
  chosenSteps: string[];
  fitted: FittedStep[];
  residuals: FitTaskOutput["residuals"];
  statistics: Omit<FitTaskOutput, "steps" | "residuals"> & { runId?: number };
  createdAt: Date;
}

function json<T>(v: unknown): T {
  if (v === null || v === undefined) return null as T;
  return (typeof v === "string" ? JSON.parse(v) : v) as T;
}

export async function createFit(
  db: Knex,
  f: { ownerId: number; mechanismId: number | null; mechanismVersion: number | null; snapshot: unknown; datasetIds: number[]; stepIds: string[]; output: FitTaskOutput; runId?: number },
): Promise<number> {
  const { steps, residuals, ...stats } = f.output;
  return db.transaction(async (trx) => {
    const [id] = await trx("fits").insert({
      owner_id: f.ownerId,
      mechanism_id: f.mechanismId,
      mechanism_version: f.mechanismVersion,
      snapshot_hash: snapshotHash(f.snapshot),
      snapshot: JSON.stringify(f.snapshot),
      dataset_ids: JSON.stringify(f.datasetIds),
      chosen_steps: JSON.stringify(f.stepIds),
      fitted: JSON.stringify(steps),
      residuals: JSON.stringify(residuals),
      statistics: JSON.stringify({ ...stats, runId: f.runId }),
    });
    await trx("fit_datasets").insert(f.datasetIds.map((d) => ({ fit_id: id, dataset_id: d })));
    return id;
  });
}

function toRecord(r: Record<string, any>): FitRecord {
  return {
    id: r.id,
    ownerId: r.owner_id,
    mechanismId: r.mechanism_id,
    mechanismVersion: r.mechanism_version,
    snapshotHash: r.snapshot_hash,
    datasetIds: json(r.dataset_ids),
    chosenSteps: json(r.chosen_steps),
    fitted: json(r.fitted),
    residuals: json(r.residuals),
    statistics: json(r.statistics),
    createdAt: r.created_at,
  };
}

export async function getFit(db: Knex, id: number): Promise<FitRecord | null> {
  const r = await db("fits").select("id", "owner_id", "mechanism_id", "mechanism_version", "snapshot_hash", "dataset_ids", "chosen_steps", "fitted", "residuals", "statistics", "created_at").where({ id }).first();
  return r ? toRecord(r) : null;
}

/** The mechanism snapshot a fit ran on (exchange format), for naming its species and steps. */
export async function getFitSnapshot(db: Knex, id: number): Promise<unknown> {
  const r = await db("fits").select("snapshot").where({ id }).first();
  return r ? json(r.snapshot) : null;
}

export async function listFitsForDataset(db: Knex, datasetId: number, ownerId: number): Promise<{ id: number; createdAt: Date; steps: string[] }[]> {
  const rows = await db("fits as f")
    .join("fit_datasets as fd", "fd.fit_id", "f.id")
    .where("fd.dataset_id", datasetId)
    .andWhere("f.owner_id", ownerId)
    .select("f.id", "f.created_at", "f.chosen_steps")
    .orderBy("f.id", "desc")
    .limit(50);
  return rows.map((r) => ({ id: r.id, createdAt: r.created_at, steps: json<string[]>(r.chosen_steps) }));
}
