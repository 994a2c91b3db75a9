/**
 * Limits of what the workbench keeps on a mechanism besides its versions: node positions of
 * the graph and named condition presets. Shared by the workbench's own saves, the mechanism API
 * (layout, conditionPresets) and the browser. A mechanism has at most 5 000 species and 20 000
 * steps, so at most 25 000 nodes; positions are finite and within ±10 000 000 px; a preset or
 * any other layout entry is at most 20 000 characters of JSON.
 */
import { z } from "zod";

export const LAYOUT_MAX_NODES = 25_000;
export const LAYOUT_MAX_COORDINATE = 10_000_000;
export const PRESET_MAX_JSON_CHARS = 20_000;

const coordinate = z.number().finite().min(-LAYOUT_MAX_COORDINATE).max(LAYOUT_MAX_COORDINATE);
const Position = z.strictObject({ x: coordinate, y: coordinate });

/** Graph node ("s:<species>" or "r:<step>") → position. */
export const PositionsSchema = z
  .record(z.string().max(220), Position)
  .refine((p) => Object.keys(p).length <= LAYOUT_MAX_NODES, `At most ${LAYOUT_MAX_NODES} node positions.`);

function jsonChars(v: unknown): number {
  try {
    return JSON.stringify(v)?.length ?? 0;
  } catch {
    return Infinity;
  }
}

/** A JSON object of at most PRESET_MAX_JSON_CHARS characters with at most 100 keys. */
export const SmallJsonObject = z
  .record(z.string().max(100), z.unknown())
  .refine((o) => Object.keys(o).length <= 100 && jsonChars(o) <= PRESET_MAX_JSON_CHARS, `At most 100 entries and ${PRESET_MAX_JSON_CHARS} characters of JSON.`);

/** A mechanism's layout: the workbench's positions, and at most 20 small entries of other kinds. */
export const LayoutSchema = z
  .object({ workbench: z.strictObject({ positions: PositionsSchema }).optional() })
  .catchall(SmallJsonObject)
  .refine((l) => Object.keys(l).length <= 20, "At most 20 layout entries.");

/** A named condition preset saved from the workbench. */
export const PresetSchema = z.object({ name: z.string().trim().min(1, "Give the preset a name.").max(100), draft: SmallJsonObject });
export type Preset = z.infer<typeof PresetSchema>;
