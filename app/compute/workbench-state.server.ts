/**
 * What the workbench keeps on a mechanism without making a new version: node positions of the
 * graph (layout JSON, key "workbench": {"positions": {"s:<species>"|"r:<step>": {x, y}}}) and
 * named condition presets. Only a user who may write the mechanism saves them.
 */
import type { Knex } from "knex";
import type { z } from "zod";
import { PositionsSchema, PresetSchema, type Preset } from "~/components/workbench/layout-schema";
import { assertCan, type Actor } from "~/auth/policy.server";
import { owned } from "../../db/access/mechanisms.server";

export { PositionsSchema, PresetSchema, type Preset } from "~/components/workbench/layout-schema";

function parse<T>(v: unknown): T | null {
  if (v === null || v === undefined) return null;
  return (typeof v === "string" ? JSON.parse(v) : v) as T;
}

async function lockWritable(trx: Knex, actor: Actor, id: number) {
  const m = await trx("mechanisms").where({ id }).forUpdate().first("id", "owner_id", "visibility", "group_id", "layout", "condition_presets");
  if (!m) throw new Response("No such mechanism.", { status: 404 });
  assertCan(actor, { do: "mechanism.write", object: owned(m) }, "Only the owner can save the layout or presets of this mechanism.");
  return m;
}

export async function saveLayout(db: Knex, actor: Actor, id: number, positions: z.infer<typeof PositionsSchema>): Promise<void> {
  await db.transaction(async (trx) => {
    const m = await lockWritable(trx, actor, id);
    const layout = parse<Record<string, unknown>>(m.layout) ?? {};
    await trx("mechanisms").where({ id }).update({ layout: JSON.stringify({ ...layout, workbench: { positions } }) });
  });
}

export function layoutPositions(layout: Record<string, unknown> | null): Record<string, { x: number; y: number }> {
  const w = (layout?.workbench as { positions?: unknown } | undefined)?.positions;
  const p = PositionsSchema.safeParse(w);
  return p.success ? p.data : {};
}

/** Adds a preset, replacing one of the same name. */
export async function savePreset(db: Knex, actor: Actor, id: number, preset: Preset): Promise<void> {
  await db.transaction(async (trx) => {
    const m = await lockWritable(trx, actor, id);
    const list = (parse<Record<string, unknown>[]>(m.condition_presets) ?? []).filter((p) => p.name !== preset.name);
    list.push(preset);
    await trx("mechanisms").where({ id }).update({ condition_presets: JSON.stringify(list.slice(-100)) });
  });
}

export function presetsOf(raw: Array<Record<string, unknown>> | null): Preset[] {
  return (raw ?? []).map((p) => PresetSchema.safeParse(p)).filter((p) => p.success).map((p) => p.data!);
}
