/** Species of the shared library: label, optional formula and charge, phase, notes. */
import type { Knex } from "knex";
import { parseFormula } from "../../solver/formula";
import type { Actor } from "../../app/auth/policy.server";
import { SpeciesInputSchema, fieldErrors, type SpeciesInput } from "../../app/components/library/step-schema";
import { InputError } from "./library-errors";

export interface SpeciesRow {
  id: number;
  label: string;
  formula: string | null;
  charge: number | null;
  phase: "solution" | "gas" | "solid" | "liquid" | null;
  notes: string | null;
}

const COLS = ["id", "label", "formula", "charge", "phase", "notes"] as const;

/** Checks a species input (schema and formula syntax); throws InputError. */
export function checkSpeciesInput(input: unknown): SpeciesInput {
  const parsed = SpeciesInputSchema.safeParse(input);
  if (!parsed.success) throw new InputError("The species is not valid.", fieldErrors(parsed.error));
  const s = parsed.data;
  if (s.formula) {
    const f = parseFormula(s.formula);
    if (!f.ok) throw new InputError(f.error.message, { formula: f.error.message });
    if (s.charge !== undefined && f.value.charge !== s.charge) {
      throw new InputError(`The formula's charge (${f.value.charge}) differs from the charge given (${s.charge}).`, { charge: "Does not match the formula." });
    }
  }
  return s;
}

export async function createSpecies(db: Knex, actor: Actor, input: unknown): Promise<SpeciesRow> {
  const s = checkSpeciesInput(input);
  let charge = s.charge ?? null;
  if (charge === null && s.formula) {
    const f = parseFormula(s.formula);
    if (f.ok) charge = f.value.charge;
  }
  const [id] = await db("species").insert({
    label: s.label,
    formula: s.formula || null,
    charge,
    phase: s.phase ?? null,
    notes: s.notes ?? null,
    created_by: actor.id,
  });
  return (await getSpecies(db, id))!;
}

/** An existing species with the same label, formula, charge and phase, else a new one. */
export async function findOrCreateSpecies(db: Knex, actor: Actor, input: unknown): Promise<SpeciesRow> {
  const s = checkSpeciesInput(input);
  const q = db("species").select(COLS).where({ label: s.label });
  if (s.formula) q.andWhere("formula", s.formula);
  else q.whereNull("formula");
  if (s.phase) q.andWhere("phase", s.phase);
  else q.whereNull("phase");
  const found = (await q.first()) as SpeciesRow | undefined;
  return found ?? createSpecies(db, actor, s);
}

export async function getSpecies(db: Knex, id: number): Promise<SpeciesRow | null> {
  return ((await db("species").select(COLS).where({ id }).first()) as SpeciesRow | undefined) ?? null;
}

export async function getSpeciesMany(db: Knex, ids: number[]): Promise<Map<number, SpeciesRow>> {
  const out = new Map<number, SpeciesRow>();
  const unique = [...new Set(ids)];
  for (let i = 0; i < unique.length; i += 1000) {
    const rows = (await db("species").select(COLS).whereIn("id", unique.slice(i, i + 1000))) as SpeciesRow[];
    for (const r of rows) out.set(r.id, r);
  }
  return out;
}

/** Keyset-paginated list, optionally narrowed by a label/formula prefix or FULLTEXT words. */
export async function listSpecies(db: Knex, opts: { q?: string; afterId?: number; limit?: number } = {}): Promise<{ items: SpeciesRow[]; nextAfterId: number | null }> {
  const limit = Math.min(Math.max(opts.limit ?? 50, 1), 200);
  const q = db("species").select(COLS).orderBy("id").limit(limit + 1);
  if (opts.afterId) q.where("id", ">", opts.afterId);
  const text = opts.q?.trim();
  if (text) {
    q.where((w) => {
      w.where("label", "like", `${escapeLike(text)}%`).orWhere("formula", "like", `${escapeLike(text)}%`);
      const words = ftWords(text);
      if (words) w.orWhereRaw("MATCH(label, formula) AGAINST (? IN BOOLEAN MODE)", [words]);
    });
  }
  const rows = (await q) as SpeciesRow[];
  const more = rows.length > limit;
  const items = more ? rows.slice(0, limit) : rows;
  return { items, nextAfterId: more ? items[items.length - 1].id : null };
}

export function escapeLike(s: string): string {
  return s.replace(/[\\%_]/g, (c) => "\\" + c);
}

/** FULLTEXT boolean-mode words: each term (≥ 3 characters) as a prefix; null when none. */
export function ftWords(text: string, prefixLength?: number, all = false): string | null {
  const terms = text
    .toLowerCase()
    .split(/[^\p{L}\p{N}]+/u)
    .filter((t) => t.length >= 3);
  if (terms.length === 0) return null;
  return terms.map((t) => (all ? "+" : "") + (prefixLength ? t.slice(0, prefixLength) : t) + "*").join(" ");
}
