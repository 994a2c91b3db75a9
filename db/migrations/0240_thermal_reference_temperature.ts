/**
 * The thermal barrier form (Ea, ΔS‡, Δn‡) now always states the temperature at which Ea was
 * determined (ΔH‡ = Ea − (1 − Δn‡)·R·Tref depends on it). Stored steps that left it out were
 * computed with 298.15 K; this migration writes that value into them explicitly, so every
 * stored rate constant stays exactly what it was. Affected: library step versions (content in
 * the exchange format, `barrier.T`; kinetics in engine form, `barrier.Tref`), mechanism version
 * contents, and the mechanism snapshots of runs and fits (hashes recomputed over the new JSON,
 * as the data layer computes them: sha256 of JSON.stringify).
 */
import { createHash } from "node:crypto";
import type { Knex } from "knex";

/** K: the temperature the engine assumed for a thermal barrier without one before this change. */
const FORMER_THERMAL_TREF = 298.15;

/** Adds the former reference temperature to every thermal barrier without one; true if anything changed. */
export function stateThermalTref(v: unknown): boolean {
  if (Array.isArray(v)) return v.map(stateThermalTref).some(Boolean);
  if (!v || typeof v !== "object") return false;
  const o = v as Record<string, unknown>;
  let changed = false;
  if (o.form === "thermal" && "Ea" in o && "dn" in o) {
    // Exchange-format barriers carry their units ("unit") and use T; engine barriers use Tref.
    const key = "unit" in o ? "T" : "Tref";
    if (o[key] === undefined || o[key] === null) {
      o[key] = FORMER_THERMAL_TREF;
      changed = true;
    }
  }
  for (const child of Object.values(o)) if (stateThermalTref(child)) changed = true;
  return changed;
}

const parse = (v: unknown): unknown => (typeof v === "string" ? JSON.parse(v) : v);
const sha256 = (v: unknown) => createHash("sha256").update(JSON.stringify(v)).digest("hex");

/** Rewrites the JSON columns of every row whose thermal barriers lacked a reference temperature. */
async function rewrite(knex: Knex, table: string, columns: string[], hash?: [from: string, to: string]): Promise<void> {
  const rows = (await knex(table).select("id", ...columns).where((q) => {
    for (const c of columns) q.orWhere(c, "like", '%"thermal"%');
  })) as Array<Record<string, unknown>>;
  for (const row of rows) {
    const update: Record<string, unknown> = {};
    for (const c of columns) {
      const value = parse(row[c]);
      if (stateThermalTref(value)) {
        update[c] = JSON.stringify(value);
        if (hash && hash[0] === c) update[hash[1]] = sha256(value);
      }
    }
    if (Object.keys(update).length > 0) await knex(table).where({ id: row.id }).update(update);
  }
}

export async function up(knex: Knex): Promise<void> {
  await rewrite(knex, "step_versions", ["content", "kinetics"]);
  await rewrite(knex, "mechanism_versions", ["content"], ["content", "content_hash"]);
  await rewrite(knex, "runs", ["snapshot"], ["snapshot", "snapshot_hash"]);
  await rewrite(knex, "fits", ["snapshot"], ["snapshot", "snapshot_hash"]);
}

export async function down(): Promise<void> {
  // The explicit 298.15 K is what the former default computed with: keeping it changes nothing.
}
