/**
 * The step library: create, edit (new version), propose, review, deprecate, comment,
 * search, read. Every write runs in one transaction and appends an immutable version.
 *
 * Units: barrier values are stored as entered (`content`, exchange-format step with units)
 * and in SI-molar units (`kinetics`: J/mol, J/(mol·K), K, (mol/L)^(1−m)·s⁻¹). Derived
 * scalars (dg298, ea298) are J/mol at 298.15 K in the 1 mol/L standard state.
 */
import type { Knex } from "knex";
import Fuse from "fuse.js";
import type { z } from "zod";
import { can, assertCan, type Actor, type LibraryStep } from "../../app/auth/policy.server";
import {
  StepInputSchema,
  StepEditSchema,
  ReviewSchema,
  CommentSchema,
  fieldErrors,
  speciesKey,
  speciesIdOfKey,
  type StepInputParsed,
  type StepStatus,
  type SourceType,
} from "../../app/components/library/step-schema";
import { stepToEngine, type DocumentStep } from "../../solver/exchange-format";
import { compileStep } from "../../solver/barrier-forms";
import { convertBarrier, rateConstant } from "../../solver/rates";
import { ENERGY_FACTORS } from "../../solver/units";
import type { StepKinetics } from "../../solver/types";
import { getSpeciesMany, ftWords, type SpeciesRow } from "./species.server";
import { ConflictError, InputError, NotFoundError } from "./library-errors";
import { audit } from "./audit.server";

/** Reference temperature of the stored derived values, K. */
export const T_REF = 298.15;

export interface StepVersionRow {
  id: number;
  step_id: number;
  number: number;
  status: StepStatus;
  replaced_by_step_id: number | null;
  author_id: number | null;
  message: string;
  label: string;
  content: DocumentStep;
  kinetics: StepKinetics;
  energy_unit: string;
  entropy_unit: string;
  temperature_unit: "K" | "C";
  barrier_form: DocumentStep["barrier"]["form"];
  molecularity: number;
  reversible: boolean;
  dg298: number | null;
  ea298: number | null;
  t_min: number | null;
  t_max: number | null;
  uncertainty: number | null;
  source_type: SourceType | null;
  method: string | null;
  citation: string | null;
  doi: string | null;
  solvent: string | null;
  illustrative: boolean;
  tags: string[] | null;
  created_at: Date;
}

export interface StepRow {
  id: number;
  owner_id: number;
  current_version_id: number;
  current_version_number: number;
  public_version_id: number | null;
  status: StepStatus;
  created_at: Date;
  updated_at: Date;
}

function parseJson<T>(v: unknown): T {
  return (typeof v === "string" ? JSON.parse(v) : v) as T;
}

export function hydrateVersion(r: Record<string, unknown>): StepVersionRow {
  return {
    ...(r as unknown as StepVersionRow),
    content: parseJson<DocumentStep>(r.content),
    kinetics: parseJson<StepKinetics>(r.kinetics),
    tags: r.tags == null ? null : parseJson<string[]>(r.tags),
    reversible: !!r.reversible,
    illustrative: !!r.illustrative,
  };
}

/** The policy's view of a step. */
export const policyStep = (s: Pick<StepRow, "owner_id" | "status">): LibraryStep => ({ ownerId: s.owner_id, status: s.status });

// ---------------------------------------------------------------- building a version

interface BuiltVersion {
  row: Record<string, unknown>;
  terms: Array<{ side: "r" | "p"; position: number; species_id: number; coef: number }>;
  tags: string[];
}

/** Validates an input against the data rules and builds the version row (not yet inserted). */
export async function buildVersion(db: Knex, input: StepInputParsed, stepId: number | null): Promise<BuiltVersion> {
  const ids = [...input.reactants, ...input.products].map((t) => t.speciesId);
  const species = await getSpeciesMany(db, ids);
  const fields: Record<string, string> = {};
  input.reactants.forEach((t, i) => {
    if (!species.has(t.speciesId)) fields[`reactants[${i}].speciesId`] = `No species with id ${t.speciesId}.`;
  });
  input.products.forEach((t, i) => {
    if (!species.has(t.speciesId)) fields[`products[${i}].speciesId`] = `No species with id ${t.speciesId}.`;
  });
  if (Object.keys(fields).length) throw new InputError(Object.values(fields)[0], fields);
  if (input.reversible && !input.reactionThermo) {
    throw new InputError("A reversible step needs the reaction free energy (for the reverse rate).", { reactionThermo: "Required for a reversible step." });
  }

  const content: DocumentStep = {
    id: stepId ? `step-${stepId}` : "step",
    reactants: input.reactants.map((t) => ({ species: speciesKey(t.speciesId), coef: t.coef })),
    products: input.products.map((t) => ({ species: speciesKey(t.speciesId), coef: t.coef })),
    reversible: input.reversible,
    barrier: input.barrier,
  };
  if (input.label) content.label = input.label;
  if (input.reactionThermo) content.reactionThermo = input.reactionThermo;
  if (input.kappa !== undefined) content.kappa = input.kappa;
  if (input.imaginaryFrequency !== undefined) content.imaginaryFrequency = { value: input.imaginaryFrequency, unit: "cm-1" };
  if (input.reportStandardState) content.reportStandardState = input.reportStandardState;
  if (input.validRange) content.validRange = input.validRange;
  if (input.uncertainty) content.uncertainty = input.uncertainty;
  content.provenance = input.provenance;
  if (input.tags?.length) content.tags = [...new Set(input.tags)];

  const kin = stepToEngine(content, "step");
  if (!kin.ok) throw new InputError(kin.error.message, { [(kin.error.path ?? "barrier").replace(/^step\./, "")]: kin.error.message });
  const compiled = compileStep(kin.value, "step");
  if (!compiled.ok) {
    const path = (compiled.error.path ?? "barrier").replace(/^step\./, "");
    throw new InputError(compiled.error.message, { [path]: compiled.error.message });
  }
  const derived = convertBarrier({ ...kin.value, targetStandardState: "1M" }, T_REF);
  const m = input.reactants.reduce((s, t) => s + t.coef, 0);
  const label = input.label || reactionText(content, species);
  const prov = input.provenance;
  const speciesText = ids.map((id) => species.get(id)).map((s) => `${s!.label} ${s!.formula ?? ""}`);
  const searchText = [label, ...speciesText, ...(content.tags ?? []), prov.source, prov.method, prov.citation, prov.doi, prov.solvent, prov.notes]
    .filter(Boolean)
    .join(" \n ");
  const energyUnit = input.display?.energyUnit ?? ("unit" in input.barrier && input.barrier.unit ? input.barrier.unit : "kJ/mol");
  const entropyUnit = input.display?.entropyUnit ?? ("entropyUnit" in input.barrier ? input.barrier.entropyUnit : "J/(mol K)");
  const row = {
    label,
    content: JSON.stringify(content),
    kinetics: JSON.stringify(kin.value),
    energy_unit: energyUnit,
    entropy_unit: entropyUnit,
    temperature_unit: input.display?.temperatureUnit ?? "K",
    barrier_form: input.barrier.form,
    molecularity: m,
    reversible: input.reversible,
    dg298: derived.ok && Number.isFinite(derived.value.dG) ? derived.value.dG : null,
    ea298: derived.ok && Number.isFinite(derived.value.Ea) ? derived.value.Ea : null,
    t_min: input.validRange?.Tmin ?? null,
    t_max: input.validRange?.Tmax ?? null,
    uncertainty: input.uncertainty ? input.uncertainty.value * ENERGY_FACTORS[input.uncertainty.unit] : null,
    source_type: prov.source,
    method: prov.method ?? null,
    citation: prov.citation ?? null,
    doi: prov.doi ?? null,
    solvent: prov.solvent ?? null,
    illustrative: !!input.illustrative,
    tags: content.tags ? JSON.stringify(content.tags) : null,
    search_text: searchText,
  };
  const terms = [
    ...input.reactants.map((t, i) => ({ side: "r" as const, position: i, species_id: t.speciesId, coef: t.coef })),
    ...input.products.map((t, i) => ({ side: "p" as const, position: i, species_id: t.speciesId, coef: t.coef })),
  ];
  return { row, terms, tags: content.tags ?? [] };
}

/** "A + 2 B → C" (or ⇌ when reversible) from species labels. */
export function reactionText(step: Pick<DocumentStep, "reactants" | "products" | "reversible">, species: Map<number, Pick<SpeciesRow, "label">>): string {
  const side = (terms: DocumentStep["reactants"]) =>
    terms
      .map((t) => {
        const id = speciesIdOfKey(t.species);
        const label = (id !== null && species.get(id)?.label) || t.species;
        return t.coef === 1 ? label : `${t.coef} ${label}`;
      })
      .join(" + ") || "∅";
  return `${side(step.reactants)} ${step.reversible ? "⇌" : "→"} ${side(step.products)}`;
}

async function insertVersion(
  trx: Knex,
  stepId: number,
  number: number,
  status: StepStatus,
  authorId: number,
  message: string,
  built: BuiltVersion | { copyFrom: StepVersionRow },
  replacedBy: number | null = null,
): Promise<number> {
  let row: Record<string, unknown>;
  let terms: BuiltVersion["terms"];
  if ("copyFrom" in built) {
    const src = built.copyFrom;
    const { id: _id, created_at: _c, number: _n, status: _s, author_id: _a, message: _m, replaced_by_step_id: _r, step_id: _st, ...rest } = src;
    row = { ...rest, content: JSON.stringify(src.content), kinetics: JSON.stringify(src.kinetics), tags: src.tags ? JSON.stringify(src.tags) : null };
    row.search_text = (await trx("step_versions").where({ id: src.id }).first("search_text")).search_text;
    terms = (await trx("step_version_terms").where({ step_version_id: src.id }).select("side", "position", "species_id", "coef")) as BuiltVersion["terms"];
  } else {
    row = { ...built.row, content: JSON.stringify({ ...JSON.parse(built.row.content as string), id: `step-${stepId}` }) };
    terms = built.terms;
  }
  const [versionId] = await trx("step_versions").insert({
    ...row,
    step_id: stepId,
    number,
    status,
    author_id: authorId,
    message,
    replaced_by_step_id: replacedBy,
  });
  if (terms.length) await trx("step_version_terms").insert(terms.map((t) => ({ ...t, step_version_id: versionId })));
  const update: Record<string, unknown> = {
    current_version_id: versionId,
    current_version_number: number,
    status,
    updated_at: trx.fn.now(3),
  };
  if (status === "approved" || status === "deprecated") update.public_version_id = versionId;
  await trx("steps").where({ id: stepId }).update(update);
  if (!("copyFrom" in built)) {
    await trx("step_tags").where({ step_id: stepId }).delete();
    if (built.tags.length) await trx("step_tags").insert(built.tags.map((tag) => ({ step_id: stepId, tag })));
  }
  return versionId;
}

function parseStepInput<T extends z.ZodType>(schema: T, input: unknown): z.output<T> {
  const parsed = schema.safeParse(input);
  if (!parsed.success) {
    const fields = fieldErrors(parsed.error);
    throw new InputError(`${Object.keys(fields)[0]}: ${Object.values(fields)[0]}`, fields);
  }
  return parsed.data;
}

// ---------------------------------------------------------------- writes

/** Creates a library step (version 1, draft). */
export async function createStep(db: Knex, actor: Actor, input: unknown): Promise<{ stepId: number; versionId: number; version: number }> {
  assertCan(actor, { do: "step.create" }, "Only authors, curators and admins add library steps.");
  const data = parseStepInput(StepInputSchema, input);
  return db.transaction(async (trx) => {
    const built = await buildVersion(trx, data, null);
    const [stepId] = await trx("steps").insert({ owner_id: actor.id, status: "draft" });
    const versionId = await insertVersion(trx, stepId, 1, "draft", actor.id, data.message || "Created.", built);
    await audit(trx, { userId: actor.id, action: "step.create", objectType: "step", objectId: stepId, detail: { version: 1 } });
    return { stepId, versionId, version: 1 };
  });
}

async function lockStep(trx: Knex, stepId: number): Promise<StepRow> {
  const s = (await trx("steps").where({ id: stepId }).forUpdate().first()) as StepRow | undefined;
  if (!s) throw new NotFoundError("No such step.");
  return s;
}

async function latestConflict(trx: Knex, s: StepRow, base: number): Promise<never> {
  const v = await trx("step_versions as v")
    .leftJoin("users as u", "u.id", "v.author_id")
    .where("v.id", s.current_version_id)
    .first("v.number", "v.message", "v.created_at", "u.name");
  throw new ConflictError(
    `This step was changed since version ${base}: version ${v.number} by ${v.name ?? "someone"} ("${v.message}"). Reload to see it; your edit was not saved.`,
    { version: v.number, author: v.name ?? null, message: v.message, at: new Date(v.created_at).toISOString() },
  );
}

/** A new version from an edit. Based on `baseVersion`: a stale base throws ConflictError. */
export async function editStep(db: Knex, actor: Actor, stepId: number, input: unknown): Promise<{ versionId: number; version: number }> {
  const data = parseStepInput(StepEditSchema, input);
  return db.transaction(async (trx) => {
    const s = await lockStep(trx, stepId);
    if (!can(actor, { do: "step.read", object: policyStep(s) })) throw new NotFoundError("No such step.");
    assertCan(actor, { do: "step.edit", object: policyStep(s) }, "You may edit only your own steps (curators edit any).");
    if (s.current_version_number !== data.baseVersion) await latestConflict(trx, s, data.baseVersion);
    const built = await buildVersion(trx, data, stepId);
    // An author's edit goes back to draft; a curator's edit keeps the library status.
    const curator = actor.role === "curator" || actor.role === "admin";
    const status: StepStatus = curator ? s.status : "draft";
    const number = s.current_version_number + 1;
    const versionId = await insertVersion(trx, stepId, number, status, actor.id, data.message || "Edited.", built);
    await audit(trx, { userId: actor.id, action: "step.edit", objectType: "step", objectId: stepId, detail: { version: number, status } });
    return { versionId, version: number };
  });
}

/**
 * Restores an earlier version as a new one: the same content, barrier, provenance, species and
 * tags, with "Restored version N." as its message; the status follows the rules of an edit (an
 * author's restore goes back to draft, a curator's keeps the library status). Who may edit the
 * step may restore it (policy "step.edit"). One transaction; a stale `baseVersion` throws
 * ConflictError and nothing is written.
 */
export async function restoreStepVersion(db: Knex, actor: Actor, stepId: number, number: number, baseVersion?: number): Promise<{ versionId: number; version: number }> {
  return db.transaction(async (trx) => {
    const s = await lockStep(trx, stepId);
    if (!can(actor, { do: "step.read", object: policyStep(s) })) throw new NotFoundError("No such step.");
    assertCan(actor, { do: "step.edit", object: policyStep(s) }, "You may restore only your own steps (curators restore any).");
    if (baseVersion !== undefined && s.current_version_number !== baseVersion) await latestConflict(trx, s, baseVersion);
    if (number === s.current_version_number) throw new InputError(`Version ${number} is already the current version.`, { version: "Choose an earlier version." });
    const src = await trx("step_versions").where({ step_id: stepId, number }).first();
    if (!src) throw new NotFoundError(`The step has no version ${number}.`);
    const from = hydrateVersion(src);
    const curator = actor.role === "curator" || actor.role === "admin";
    const status: StepStatus = curator ? s.status : "draft";
    const version = s.current_version_number + 1;
    const versionId = await insertVersion(trx, stepId, version, status, actor.id, `Restored version ${number}.`, { copyFrom: from });
    await trx("step_tags").where({ step_id: stepId }).delete();
    if (from.tags?.length) await trx("step_tags").insert([...new Set(from.tags)].map((tag) => ({ step_id: stepId, tag })));
    await audit(trx, { userId: actor.id, action: "step.restore", objectType: "step", objectId: stepId, detail: { version, from: number, status } });
    return { versionId, version };
  });
}

async function currentVersion(trx: Knex, s: StepRow): Promise<StepVersionRow> {
  return hydrateVersion(await trx("step_versions").where({ id: s.current_version_id }).first());
}

/** Draft → proposed (the curators' queue). */
export async function proposeStep(db: Knex, actor: Actor, stepId: number, comment?: string): Promise<{ version: number }> {
  return db.transaction(async (trx) => {
    const s = await lockStep(trx, stepId);
    if (!can(actor, { do: "step.read", object: policyStep(s) })) throw new NotFoundError("No such step.");
    assertCan(actor, { do: "step.propose", object: policyStep(s) }, "Only a draft can be proposed, by its owner or a curator.");
    const cur = await currentVersion(trx, s);
    const number = s.current_version_number + 1;
    const vid = await insertVersion(trx, stepId, number, "proposed", actor.id, comment?.trim() || "Proposed for the library.", { copyFrom: cur });
    await trx("step_reviews").insert({ step_id: stepId, step_version_id: vid, actor_id: actor.id, action: "propose", comment: comment?.trim() || null });
    await audit(trx, { userId: actor.id, action: "step.propose", objectType: "step", objectId: stepId, detail: { version: number } });
    return { version: number };
  });
}

/** Curator decisions: approve, request changes (back to draft, with a comment), deprecate (optionally with a replacement). */
export async function reviewStep(db: Knex, actor: Actor, stepId: number, input: unknown): Promise<{ version: number; status: StepStatus }> {
  const parsed = ReviewSchema.safeParse(input);
  if (!parsed.success) throw new InputError("The review is not valid.", fieldErrors(parsed.error));
  const r = parsed.data;
  return db.transaction(async (trx) => {
    const s = await lockStep(trx, stepId);
    if (!can(actor, { do: "step.read", object: policyStep(s) })) throw new NotFoundError("No such step.");
    if (r.action === "deprecate") assertCan(actor, { do: "step.deprecate", object: policyStep(s) }, "Only curators deprecate steps, and only once.");
    else assertCan(actor, { do: "step.review", object: policyStep(s) }, "Only curators review, and only proposed steps.");
    if (r.replacementStepId !== undefined) {
      if (r.action !== "deprecate") throw new InputError("A replacement goes with deprecation only.", { replacementStepId: "Only when deprecating." });
      if (r.replacementStepId === stepId) throw new InputError("A step cannot replace itself.", { replacementStepId: "Choose another step." });
      const rep = await trx("steps").where({ id: r.replacementStepId }).first("id", "status");
      if (!rep) throw new InputError(`No step with id ${r.replacementStepId}.`, { replacementStepId: "No such step." });
    }
    const status: StepStatus = r.action === "approve" ? "approved" : r.action === "deprecate" ? "deprecated" : "draft";
    const cur = await currentVersion(trx, s);
    const number = s.current_version_number + 1;
    const message =
      r.action === "approve" ? "Approved for the library." : r.action === "deprecate" ? (r.replacementStepId ? `Deprecated; replaced by step ${r.replacementStepId}.` : "Deprecated.") : "Changes requested.";
    const vid = await insertVersion(trx, stepId, number, status, actor.id, message, { copyFrom: cur }, r.action === "deprecate" ? (r.replacementStepId ?? null) : null);
    await trx("step_reviews").insert({
      step_id: stepId,
      step_version_id: vid,
      actor_id: actor.id,
      action: r.action,
      comment: r.comment || null,
      replacement_step_id: r.replacementStepId ?? null,
    });
    await audit(trx, { userId: actor.id, action: `step.${r.action}`, objectType: "step", objectId: stepId, detail: { version: number, ...(r.replacementStepId ? { replacementStepId: r.replacementStepId } : {}) } });
    return { version: number, status };
  });
}

export async function addStepComment(db: Knex, actor: Actor, stepId: number, input: unknown): Promise<{ id: number }> {
  const parsed = CommentSchema.safeParse(input);
  if (!parsed.success) throw new InputError("The comment is not valid.", fieldErrors(parsed.error));
  const s = (await db("steps").where({ id: stepId }).first()) as StepRow | undefined;
  if (!s || !can(actor, { do: "step.read", object: policyStep(s) }) && !s.public_version_id) throw new NotFoundError("No such step.");
  const status = can(actor, { do: "step.read", object: policyStep(s) }) ? s.status : "approved";
  assertCan(actor, { do: "step.comment", object: { ownerId: s.owner_id, status } });
  const [id] = await db("step_comments").insert({ step_id: stepId, step_version_id: s.current_version_id, author_id: actor.id, body: parsed.data.body });
  return { id };
}

// ---------------------------------------------------------------- reads

/** Which version of a step the actor sees: the current one if allowed, else the public one. */
export function visibleVersionId(actor: Actor | null, s: StepRow): number | null {
  if (can(actor, { do: "step.read", object: policyStep(s) })) return s.current_version_id;
  if (s.public_version_id && can(actor, { do: "step.read", object: { ownerId: s.owner_id, status: "approved" } })) return s.public_version_id;
  return null;
}

function seesAllVersions(actor: Actor | null, s: StepRow): boolean {
  return can(actor, { do: "step.read", object: policyStep(s) }) && (actor?.id === s.owner_id || actor?.role === "curator" || actor?.role === "admin");
}

export interface StepDetail {
  step: StepRow & { owner_name: string };
  version: StepVersionRow;
  species: Map<number, SpeciesRow>;
  versions: Array<{ id: number; number: number; status: StepStatus; message: string; author: string | null; created_at: Date }>;
  reviews: Array<{ action: string; comment: string | null; actor: string | null; replacement_step_id: number | null; created_at: Date; version: number }>;
  comments: Array<{ id: number; body: string; author: string | null; created_at: Date }>;
  whereUsed: Array<{ id: number; name: string; pinnedVersion: number | null; owner: string }>;
  canEdit: boolean;
  canPropose: boolean;
  canReview: boolean;
  canDeprecate: boolean;
}

export async function getStepRow(db: Knex, stepId: number): Promise<(StepRow & { owner_name: string }) | null> {
  return ((await db("steps as s").join("users as u", "u.id", "s.owner_id").where("s.id", stepId).first("s.*", "u.name as owner_name")) as
    | (StepRow & { owner_name: string })
    | undefined) ?? null;
}

export async function getStepVersionById(db: Knex, id: number): Promise<StepVersionRow | null> {
  const r = await db("step_versions").where({ id }).first();
  return r ? hydrateVersion(r) : null;
}

/** The version with this number, if the actor may see it. */
export async function getStepVersion(db: Knex, actor: Actor | null, stepId: number, number: number): Promise<StepVersionRow> {
  const s = await getStepRow(db, stepId);
  if (!s || visibleVersionId(actor, s) === null) throw new NotFoundError("No such step.");
  const r = await db("step_versions").where({ step_id: stepId, number }).first();
  if (!r) throw new NotFoundError(`Step ${stepId} has no version ${number}.`);
  const v = hydrateVersion(r);
  if (!seesAllVersions(actor, s) && v.status !== "approved" && v.status !== "deprecated") throw new NotFoundError(`Step ${stepId} has no version ${number}.`);
  return v;
}

export async function listStepVersions(db: Knex, actor: Actor | null, stepId: number): Promise<StepDetail["versions"]> {
  const s = await getStepRow(db, stepId);
  if (!s || visibleVersionId(actor, s) === null) throw new NotFoundError("No such step.");
  const q = db("step_versions as v")
    .leftJoin("users as u", "u.id", "v.author_id")
    .where("v.step_id", stepId)
    .orderBy("v.number", "desc")
    .select("v.id", "v.number", "v.status", "v.message", "u.name as author", "v.created_at");
  if (!seesAllVersions(actor, s)) q.whereIn("v.status", ["approved", "deprecated"]);
  return q;
}

export async function getStep(db: Knex, actor: Actor | null, stepId: number, versionNumber?: number): Promise<StepDetail> {
  const s = await getStepRow(db, stepId);
  if (!s) throw new NotFoundError("No such step.");
  const vid = visibleVersionId(actor, s);
  if (vid === null) throw new NotFoundError("No such step.");
  const version = versionNumber ? await getStepVersion(db, actor, stepId, versionNumber) : (await getStepVersionById(db, vid))!;
  const ids = [...version.content.reactants, ...version.content.products].map((t) => speciesIdOfKey(t.species)).filter((x): x is number => x !== null);
  const [species, versions, reviews, comments, used] = await Promise.all([
    getSpeciesMany(db, ids),
    listStepVersions(db, actor, stepId),
    db("step_reviews as r")
      .leftJoin("users as u", "u.id", "r.actor_id")
      .join("step_versions as v", "v.id", "r.step_version_id")
      .where("r.step_id", stepId)
      .orderBy("r.id", "desc")
      .select("r.action", "r.comment", "u.name as actor", "r.replacement_step_id", "r.created_at", "v.number as version"),
    db("step_comments as c").leftJoin("users as u", "u.id", "c.author_id").where("c.step_id", stepId).orderBy("c.id").select("c.id", "c.body", "u.name as author", "c.created_at"),
    db("mechanism_steps as ms")
      .join("mechanisms as m", "m.id", "ms.mechanism_id")
      .join("users as u", "u.id", "m.owner_id")
      .leftJoin("step_versions as v", "v.id", "ms.step_version_id")
      .where("ms.step_id", stepId)
      .select("m.id", "m.name", "m.owner_id", "m.visibility", "m.group_id", "u.name as owner", "v.number as pinnedVersion")
      .limit(500),
  ]);
  const whereUsed = (used as Array<{ id: number; name: string; owner_id: number; visibility: "private" | "group" | "public"; group_id: number | null; owner: string; pinnedVersion: number | null }>)
    .filter((m) => can(actor, { do: "mechanism.read", object: { ownerId: m.owner_id, visibility: m.visibility, groupId: m.group_id } }))
    .map(({ id, name, owner, pinnedVersion }) => ({ id, name, owner, pinnedVersion }));
  const seen = new Set<number>();
  const dedup = whereUsed.filter((m) => (seen.has(m.id) ? false : (seen.add(m.id), true)));
  const full = seesAllVersions(actor, s);
  return {
    step: s,
    version,
    species,
    versions,
    reviews: full ? reviews : reviews.filter((r: { action: string }) => r.action === "approve" || r.action === "deprecate"),
    comments,
    whereUsed: dedup,
    canEdit: can(actor, { do: "step.edit", object: policyStep(s) }),
    canPropose: can(actor, { do: "step.propose", object: policyStep(s) }),
    canReview: can(actor, { do: "step.review", object: policyStep(s) }),
    canDeprecate: can(actor, { do: "step.deprecate", object: policyStep(s) }),
  };
}

/** Proposed steps awaiting review (curators). */
export async function reviewQueue(db: Knex, actor: Actor): Promise<Array<{ id: number; label: string; owner: string; version: number; proposed_at: Date; source_type: string | null }>> {
  if (!can(actor, { do: "step.review", object: { ownerId: -1, status: "proposed" } })) return [];
  return db("steps as s")
    .join("step_versions as v", "v.id", "s.current_version_id")
    .join("users as u", "u.id", "s.owner_id")
    .where("s.status", "proposed")
    .orderBy("s.updated_at")
    .select("s.id", "v.label", "u.name as owner", "v.number as version", "v.created_at as proposed_at", "v.source_type");
}

// ---------------------------------------------------------------- search

export interface StepSearchQuery {
  q?: string;
  status?: StepStatus[];
  molecularity?: number[];
  source?: SourceType[];
  tags?: string[];
  /** K: steps whose validity range covers [tmin, tmax]. */
  tmin?: number;
  tmax?: number;
  /** K: temperature at which k is reported; default 298.15. */
  T?: number;
  limit?: number;
  cursor?: string | null;
  /** Only steps owned by the actor. */
  mine?: boolean;
}

export interface StepSearchItem {
  id: number;
  versionId: number;
  version: number;
  label: string;
  reaction: string;
  status: StepStatus;
  ownerId: number;
  form: string;
  /** Main barrier value in its display unit, e.g. { value: 82.4, unit: "kJ/mol", symbol: "ΔG‡" } */
  barrier: { symbol: string; value: number; unit: string };
  /** J/mol at 298.15 K, 1 M */
  dg298: number | null;
  molecularity: number;
  /** k at T, (mol/L)^(1−m)·s⁻¹; null when it cannot be computed. */
  k: number | null;
  kUnit: string;
  extrapolated: boolean;
  T: number;
  source: SourceType | null;
  method: string | null;
  citation: string | null;
  tags: string[];
  tMin: number | null;
  tMax: number | null;
  illustrative: boolean;
  score: number | null;
}

/** Candidate rows fetched from MariaDB before fuzzy ranking. */
export const SEARCH_CANDIDATES = 200;
/** Best FULLTEXT matches considered per stage (all versions, before visibility and filters). */
const FT_LIMIT = 1000;

interface Cursor {
  o?: number; // offset into a ranked result
  u?: string; // keyset: updated_at ISO
  i?: number; // keyset: id
}
const encodeCursor = (c: Cursor) => Buffer.from(JSON.stringify(c)).toString("base64url");
function decodeCursor(s: string | null | undefined): Cursor {
  if (!s) return {};
  try {
    const c = JSON.parse(Buffer.from(s, "base64url").toString("utf8")) as Cursor;
    if (typeof c !== "object" || c === null) throw new Error();
    return c;
  } catch {
    throw new InputError("The cursor is not valid; start again from the first page.", { cursor: "Not a cursor this API issued." });
  }
}

const SYMBOL: Record<string, string> = { dG: "ΔG‡", dHdS: "ΔH‡", thermal: "Ea", arrhenius: "Ea", measured: "k" };

export function barrierSummary(c: DocumentStep): StepSearchItem["barrier"] {
  const b = c.barrier;
  switch (b.form) {
    case "dG":
      return { symbol: `ΔG‡(${b.T} K)`, value: b.dG, unit: b.unit };
    case "dHdS":
      return { symbol: "ΔH‡", value: b.dH, unit: b.unit };
    case "thermal":
    case "arrhenius":
      return { symbol: "Ea", value: b.Ea, unit: b.unit };
    case "measured":
      return { symbol: `k(${b.T} K)`, value: b.k, unit: `${b.rateUnit.concentration}, ${b.rateUnit.time}` };
  }
  return { symbol: SYMBOL[(b as { form: string }).form] ?? "?", value: NaN, unit: "" };
}

/**
 * Library search. MariaDB narrows the candidates (visibility, filters, FULLTEXT prefix
 * match on the words of the query), fuse.js ranks them typo-tolerantly; without a query
 * the newest steps come first with keyset pagination.
 */
export async function searchSteps(db: Knex, actor: Actor | null, query: StepSearchQuery): Promise<{ items: StepSearchItem[]; nextCursor: string | null; candidates: number }> {
  if (!actor) return { items: [], nextCursor: null, candidates: 0 };
  const limit = Math.min(Math.max(query.limit ?? 50, 1), 200);
  const T = query.T ?? T_REF;
  const cursor = decodeCursor(query.cursor);
  const curator = actor.role === "curator" || actor.role === "admin";
  const COLS = [
    "s.id",
    "s.owner_id",
    "s.updated_at",
    "v.id as version_id",
    "v.number",
    "v.status",
    "v.label",
    "v.content",
    "v.kinetics",
    "v.dg298",
    "v.molecularity",
    "v.source_type",
    "v.method",
    "v.citation",
    "v.tags",
    "v.t_min",
    "v.t_max",
    "v.illustrative",
  ];
  /** Filters of the query, on the visible version v of step s. */
  const filtered = (q: Knex.QueryBuilder) => {
    if (query.mine) q.where("s.owner_id", actor.id);
    if (query.status?.length) {
      q.whereIn("v.status", query.status);
      // Narrow by index as well: a curator sees the current version (its status is the step's);
      // anyone else sees drafts and proposals of their own steps only.
      if (curator) q.whereIn("s.status", query.status);
      else if (query.status.every((st) => st === "draft" || st === "proposed")) q.where("s.owner_id", actor.id);
    }
    if (query.molecularity?.length) q.whereIn("v.molecularity", query.molecularity);
    if (query.source?.length) q.whereIn("v.source_type", query.source);
    if (query.tmin !== undefined) q.where("v.t_min", "<=", query.tmin);
    if (query.tmax !== undefined) q.where("v.t_max", ">=", query.tmax);
    if (query.tags?.length) q.whereExists(db("step_tags as t").whereRaw("t.step_id = s.id").whereIn("t.tag", query.tags));
    return q;
  };
  /** The version each step shows to this actor: curators see the current one; others their own current or the public one. */
  const visible = (q: Knex.QueryBuilder) => {
    if (curator) q.whereRaw("v.id = s.current_version_id");
    else {
      q.whereRaw("v.id = IF(s.owner_id = ?, s.current_version_id, s.public_version_id)", [actor.id]);
      q.where((w) => w.where("s.owner_id", actor.id).orWhereNotNull("s.public_version_id"));
    }
    return q;
  };

  const text = query.q?.trim() ?? "";
  let rows: Array<Record<string, unknown>>;
  let ranked: Array<{ row: Record<string, unknown>; score: number | null }>;
  let nextCursor: string | null = null;
  if (text) {
    // FULLTEXT narrows in stages, each on step_versions alone (so its index drives the query):
    // all words as prefixes, then their first 5 letters (a typo later in a word still finds it),
    // then any word. fuse.js then ranks the candidates typo-tolerantly.
    // Stages: every word as a prefix; every word by its first 5 letters (a typo later in a word
    // still finds it); any word. The first stage that finds something gives the candidates.
    const nWords = text.split(/[^\p{L}\p{N}]+/u).filter((w) => w.length >= 3).length;
    const stages = [ftWords(text, undefined, true), ftWords(text, 5, true), nWords > 1 ? ftWords(text) : null].filter((w, i, a): w is string => !!w && a.indexOf(w) === i);
    rows = [];
    const seen = new Set<unknown>();
    for (const words of stages) {
      const ft = db("step_versions")
        .select("id", db.raw("MATCH(search_text) AGAINST (? IN BOOLEAN MODE) AS ft_score", [words]))
        .whereRaw("MATCH(search_text) AGAINST (? IN BOOLEAN MODE)", [words])
        .orderBy("ft_score", "desc")
        .limit(FT_LIMIT);
      const q = db
        .from(ft.as("ft"))
        .join("step_versions as v", "v.id", "ft.id")
        .join("steps as s", "s.id", "v.step_id")
        .select(COLS)
        .orderBy("ft.ft_score", "desc")
        .limit(SEARCH_CANDIDATES);
      for (const r of (await filtered(visible(q))) as Array<Record<string, unknown>>) {
        if (!seen.has(r.id)) (seen.add(r.id), rows.push(r));
      }
      if (rows.length > 0) break;
    }
    if (stages.length === 0) {
      // Only short words: the newest steps are the candidates.
      rows = await filtered(visible(db("steps as s").join("step_versions as v", "v.step_id", "s.id").select(COLS)))
        .orderBy("s.updated_at", "desc")
        .limit(SEARCH_CANDIDATES);
    }
    // fuse.js ranks on the short fields (label with species names, tags, method); candidates
    // FULLTEXT found only in longer text (formulas, citation, notes) follow in FULLTEXT order.
    const docs = rows.map((r) => ({ row: r, label: r.label as string, tags: (parseJson<string[] | null>(r.tags) ?? []).join(" "), method: r.method ?? "" }));
    const fuse = new Fuse(docs, {
      keys: [
        { name: "label", weight: 3 },
        { name: "tags", weight: 2 },
        { name: "method", weight: 1 },
      ],
      includeScore: true,
      ignoreLocation: true,
      threshold: 0.4,
      minMatchCharLength: 2,
    });
    const found = fuse.search(text);
    const hit = new Set(found.map((f) => f.item.row));
    ranked = [...found.map((f) => ({ row: f.item.row, score: f.score ?? null })), ...(stages.length ? rows.filter((r) => !hit.has(r)).map((row) => ({ row, score: null })) : [])];
    const offset = cursor.o ?? 0;
    const page = ranked.slice(offset, offset + limit);
    if (offset + limit < ranked.length) nextCursor = encodeCursor({ o: offset + limit });
    ranked = page;
  } else {
    // Walk the steps newest first by index; the optimizer otherwise merges two indexes and sorts them all.
    const from = query.status?.length || query.mine ? db.raw("steps AS s") : db.raw("steps AS s FORCE INDEX (steps_updated_idx)");
    const q = filtered(visible(db.from(from).join("step_versions as v", "v.step_id", "s.id").select(COLS)));
    if (cursor.u && cursor.i) {
      const u = new Date(cursor.u);
      q.where((w) => w.where("s.updated_at", "<", u).orWhere((w2) => w2.where("s.updated_at", "=", u).andWhere("s.id", "<", cursor.i!)));
    }
    rows = await q.orderBy("s.updated_at", "desc").orderBy("s.id", "desc").limit(limit + 1);
    if (rows.length > limit) {
      rows = rows.slice(0, limit);
      const last = rows[rows.length - 1];
      nextCursor = encodeCursor({ u: new Date(last.updated_at as Date).toISOString(), i: last.id as number });
    }
    ranked = rows.map((row) => ({ row, score: null }));
  }

  // Species labels for the reaction text of this page.
  const pageRows = ranked.map((r) => r.row);
  const contents = pageRows.map((r) => parseJson<DocumentStep>(r.content));
  const ids = contents.flatMap((c) => [...c.reactants, ...c.products].map((t) => speciesIdOfKey(t.species))).filter((x): x is number => x !== null);
  const species = await getSpeciesMany(db, ids);
  const items = ranked.map(({ row: r, score }, i): StepSearchItem => {
    const content = contents[i];
    const kin = parseJson<StepKinetics>(r.kinetics);
    const k = rateConstant(kin, T);
    return {
      id: r.id as number,
      versionId: r.version_id as number,
      version: r.number as number,
      label: r.label as string,
      reaction: reactionText(content, species),
      status: r.status as StepStatus,
      ownerId: r.owner_id as number,
      form: content.barrier.form,
      barrier: barrierSummary(content),
      dg298: (r.dg298 as number | null) ?? null,
      molecularity: r.molecularity as number,
      k: k.ok ? k.value.k : null,
      kUnit: k.ok ? k.value.units : "",
      extrapolated: k.ok ? k.value.extrapolated : false,
      T,
      source: (r.source_type as SourceType | null) ?? null,
      method: (r.method as string | null) ?? null,
      citation: (r.citation as string | null) ?? null,
      tags: parseJson<string[] | null>(r.tags) ?? [],
      tMin: (r.t_min as number | null) ?? null,
      tMax: (r.t_max as number | null) ?? null,
      illustrative: !!r.illustrative,
      score,
    };
  });
  return { items, nextCursor, candidates: rows.length };
}

/** Newer approved versions of the given pinned versions: pinned version id → newer public version. */
export async function newerApprovedVersions(db: Knex, pinnedVersionIds: number[]): Promise<Map<number, { versionId: number; number: number; status: StepStatus }>> {
  const out = new Map<number, { versionId: number; number: number; status: StepStatus }>();
  if (pinnedVersionIds.length === 0) return out;
  const rows = await db("step_versions as pv")
    .join("steps as s", "s.id", "pv.step_id")
    .join("step_versions as nv", "nv.id", "s.public_version_id")
    .whereIn("pv.id", [...new Set(pinnedVersionIds)])
    .whereRaw("nv.number > pv.number")
    .where("nv.status", "approved")
    .select("pv.id as pinned", "nv.id as versionId", "nv.number", "nv.status");
  for (const r of rows as Array<{ pinned: number; versionId: number; number: number; status: StepStatus }>) out.set(r.pinned, { versionId: r.versionId, number: r.number, status: r.status });
  return out;
}
