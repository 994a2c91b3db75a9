/**
 * Mechanisms: create, save (new immutable version, based on a version number — a stale
 * base is a ConflictError and nothing is written), read, history, diff, fork with lineage,
 * export to and import from the Saddlebook exchange format.
 *
 * A version's `content` is a snapshot in working form (see db/migrations/0210_mechanisms.ts):
 * species with their keys, library entries pinned to step versions, local steps as
 * exchange-format steps. Units inside local steps are the ones the user entered.
 */
import type { Knex } from "knex";
import { createHash } from "node:crypto";
import type { z } from "zod";
import { can, assertCan, type Actor, type OwnedObject } from "../../app/auth/policy.server";
import {
  MechanismCreateSchema,
  MechanismUpdateSchema,
  ForkSchema,
  fieldErrors,
  speciesIdOfKey,
  speciesKey,
  type MechanismEntryInput,
  type Visibility,
} from "../../app/components/library/step-schema";
import {
  parseMechanismText,
  validateMechanismDocument,
  stepToEngine,
  type DocumentSpecies,
  type DocumentStep,
  type MechanismDocument,
  type FormatError,
} from "../../solver/exchange-format";
import { compileStep } from "../../solver/barrier-forms";
import { getSpeciesMany, type SpeciesRow } from "./species.server";
import { hydrateVersion, newerApprovedVersions, visibleVersionId, type StepRow } from "./steps.server";
import { diffMechanisms, type MechanismDiff, type ResolvedEntry, type ResolvedMechanism, type ResolvedSpecies } from "./mechanism-diff";
import { ConflictError, InputError, NotFoundError } from "./library-errors";
import { audit } from "./audit.server";
import { retryingTransaction } from "./transactions.server";

/** Largest import file accepted: 2 MB (2 097 152 bytes). */
export const IMPORT_LIMIT_BYTES = 2_097_152;

export interface SnapshotSpecies {
  key: string;
  speciesId: number;
  label: string;
  formula: string | null;
  charge: number | null;
  phase: string | null;
  notes?: string | null;
}
export type SnapshotEntry =
  | { key: string; kind: "library"; stepId: number; stepVersionId: number }
  | { key: string; kind: "local"; step: DocumentStep; fromStepVersionId?: number };
export interface Snapshot {
  about?: Omit<MechanismDocument["about"], "name" | "description">;
  species: SnapshotSpecies[];
  steps: SnapshotEntry[];
}

export interface MechanismRow {
  id: number;
  owner_id: number;
  owner_name: string;
  name: string;
  description: string | null;
  visibility: Visibility;
  group_id: number | null;
  forked_from_mechanism_id: number | null;
  forked_from_version: number | null;
  current_version: number;
  layout: Record<string, unknown> | null;
  condition_presets: Array<Record<string, unknown>> | null;
  illustrative: boolean;
  created_at: Date;
  updated_at: Date;
}

export const owned = (m: Pick<MechanismRow, "owner_id" | "visibility" | "group_id">): OwnedObject => ({ ownerId: m.owner_id, visibility: m.visibility, groupId: m.group_id });

const parseJson = <T,>(v: unknown): T => (typeof v === "string" ? JSON.parse(v) : v) as T;

export function contentHash(s: Snapshot): string {
  return createHash("sha256").update(JSON.stringify(s)).digest("hex");
}

// ---------------------------------------------------------------- building a snapshot

type ParsedBody = ReturnType<typeof MechanismCreateSchema.parse>;

function speciesOfRow(r: SpeciesRow, key: string): SnapshotSpecies {
  const s: SnapshotSpecies = { key, speciesId: r.id, label: r.label, formula: r.formula, charge: r.charge, phase: r.phase };
  if (r.notes) s.notes = r.notes;
  return s;
}

/** Checks steps and species against the library and builds the snapshot; throws InputError with field paths. */
export async function buildSnapshot(db: Knex, actor: Actor, body: Pick<ParsedBody, "species" | "steps">, about?: Snapshot["about"]): Promise<Snapshot> {
  const fields: Record<string, string> = {};
  // Library versions referenced.
  const versionIds = body.steps.flatMap((e) => (e.kind === "library" ? [e.stepVersionId] : e.fromStepVersionId ? [e.fromStepVersionId] : []));
  const versions = new Map<number, ReturnType<typeof hydrateVersion> & { owner_id: number; step_status: StepRow["status"]; public_version_id: number | null; current_version_id: number }>();
  for (let i = 0; i < versionIds.length; i += 1000) {
    const rows = await db("step_versions as v")
      .join("steps as s", "s.id", "v.step_id")
      .whereIn("v.id", versionIds.slice(i, i + 1000))
      .select("v.*", "s.owner_id", "s.status as step_status", "s.public_version_id", "s.current_version_id");
    for (const r of rows) versions.set(r.id, { ...hydrateVersion(r), owner_id: r.owner_id, step_status: r.step_status, public_version_id: r.public_version_id, current_version_id: r.current_version_id });
  }
  const mayUse = (v: { status: string; owner_id: number }) =>
    v.status === "approved" || v.status === "deprecated" ? !!actor : can(actor, { do: "step.read", object: { ownerId: v.owner_id, status: v.status as StepRow["status"] } });

  // Species: listed ones, plus every "s<id>" that a step uses.
  const wantIds = new Set<number>(body.species.map((s) => s.speciesId));
  for (const e of body.steps) {
    const doc = e.kind === "library" ? versions.get(e.stepVersionId)?.content : e.step;
    for (const t of [...(doc?.reactants ?? []), ...(doc?.products ?? [])]) {
      const id = speciesIdOfKey(t.species);
      if (id !== null) wantIds.add(id);
    }
  }
  const rows = await getSpeciesMany(db, [...wantIds]);
  const species: SnapshotSpecies[] = [];
  const keyOfId = new Map<number, string>();
  const keys = new Set<string>();
  body.species.forEach((s, i) => {
    const r = rows.get(s.speciesId);
    if (!r) return void (fields[`species[${i}].speciesId`] = `No species with id ${s.speciesId}.`);
    const key = s.key ?? speciesKey(s.speciesId);
    if (keys.has(key)) return void (fields[`species[${i}].key`] = `The key "${key}" is used twice.`);
    if (keyOfId.has(s.speciesId)) return void (fields[`species[${i}].speciesId`] = `Species ${s.speciesId} is listed twice.`);
    keys.add(key);
    keyOfId.set(s.speciesId, key);
    species.push(speciesOfRow(r, key));
  });
  const ensureSpecies = (key: string, path: string): string | null => {
    if (keys.has(key)) return key;
    const id = speciesIdOfKey(key);
    if (id !== null && rows.has(id)) {
      const existing = keyOfId.get(id);
      if (existing) return existing;
      keys.add(key);
      keyOfId.set(id, key);
      species.push(speciesOfRow(rows.get(id)!, key));
      return key;
    }
    fields[path] = `Unknown species "${key}": add it to the mechanism first.`;
    return null;
  };

  const steps: SnapshotEntry[] = [];
  const entryKeys = new Set<string>();
  body.steps.forEach((e, i) => {
    if (e.kind === "library") {
      const v = versions.get(e.stepVersionId);
      if (!v || !mayUse(v)) return void (fields[`steps[${i}].stepVersionId`] = `No library step version ${e.stepVersionId} that you can use.`);
      const key = e.key ?? `L${v.step_id}`;
      if (entryKeys.has(key)) return void (fields[`steps[${i}]`] = `Step ${v.step_id} is already in the mechanism.`);
      entryKeys.add(key);
      for (const t of [...v.content.reactants, ...v.content.products]) ensureSpecies(t.species, `steps[${i}]`);
      steps.push({ key, kind: "library", stepId: v.step_id, stepVersionId: v.id });
    } else {
      let key = e.key ?? e.step.id;
      for (let n = 2; entryKeys.has(key) && !e.key; n++) key = `${e.step.id}-${n}`;
      if (entryKeys.has(key)) return void (fields[`steps[${i}].key`] = `The step key "${key}" is used twice.`);
      entryKeys.add(key);
      const step: DocumentStep = { ...e.step, id: key };
      step.reactants.forEach((t, j) => ensureSpecies(t.species, `steps[${i}].step.reactants[${j}].species`));
      step.products.forEach((t, j) => ensureSpecies(t.species, `steps[${i}].step.products[${j}].species`));
      // Local species keys may differ from s<id>: map "s<id>" to the mechanism's key.
      const remap = (t: { species: string; coef: number }) => {
        const id = speciesIdOfKey(t.species);
        return id !== null && keyOfId.has(id) ? { ...t, species: keyOfId.get(id)! } : t;
      };
      step.reactants = step.reactants.map(remap);
      step.products = step.products.map(remap);
      const kin = stepToEngine(step, `steps[${i}].step`);
      const comp = kin.ok ? compileStep(kin.value, `steps[${i}].step`) : kin;
      if (!comp.ok) return void (fields[comp.error.path ?? `steps[${i}].step`] = comp.error.message);
      if (step.reversible && !step.reactionThermo) return void (fields[`steps[${i}].step.reactionThermo`] = "A reversible step needs the reaction free energy.");
      const entry: SnapshotEntry = { key, kind: "local", step };
      if (e.fromStepVersionId && versions.has(e.fromStepVersionId)) entry.fromStepVersionId = e.fromStepVersionId;
      steps.push(entry);
    }
  });
  if (Object.keys(fields).length) {
    const [p, m] = Object.entries(fields)[0];
    throw new InputError(`${p}: ${m}`, fields);
  }
  const snap: Snapshot = { species, steps };
  if (about && Object.keys(about).length) snap.about = about;
  return snap;
}

/** Library species keys s<id> inside a library step → the mechanism's keys. */
function remapLibraryDoc(doc: DocumentStep, key: string, keyOfId: Map<number, string>): DocumentStep {
  const m = (t: { species: string; coef: number }) => {
    const id = speciesIdOfKey(t.species);
    return { species: (id !== null && keyOfId.get(id)) || t.species, coef: t.coef };
  };
  return { ...doc, id: key, reactants: doc.reactants.map(m), products: doc.products.map(m) };
}

/** Snapshot → resolved species and steps (library pins read from their immutable versions). */
export async function resolveSnapshot(db: Knex, name: string, snap: Snapshot): Promise<ResolvedMechanism> {
  const ids = snap.steps.flatMap((e) => (e.kind === "library" ? [e.stepVersionId] : []));
  const versions = new Map<number, ReturnType<typeof hydrateVersion>>();
  for (let i = 0; i < ids.length; i += 1000) {
    const rows = await db("step_versions").whereIn("id", ids.slice(i, i + 1000)).select("id", "step_id", "number", "status", "label", "content");
    for (const r of rows) versions.set(r.id, { ...r, content: parseJson<DocumentStep>(r.content) });
  }
  const keyOfId = new Map(snap.species.map((s) => [s.speciesId, s.key]));
  const labelOfKey = new Map(snap.species.map((s) => [s.key, s.label]));
  const reaction = (d: DocumentStep) => {
    const side = (ts: DocumentStep["reactants"]) => ts.map((t) => `${t.coef === 1 ? "" : t.coef + " "}${labelOfKey.get(t.species) ?? t.species}`).join(" + ") || "∅";
    return `${side(d.reactants)} ${d.reversible ? "⇌" : "→"} ${side(d.products)}`;
  };
  const species: ResolvedSpecies[] = snap.species.map((s) => ({ key: s.key, speciesId: s.speciesId, label: s.label, formula: s.formula, charge: s.charge, phase: s.phase }));
  const steps: ResolvedEntry[] = snap.steps.map((e) => {
    if (e.kind === "library") {
      const v = versions.get(e.stepVersionId)!;
      const doc = remapLibraryDoc(v.content, e.key, keyOfId);
      return { key: e.key, kind: "library", stepId: e.stepId, stepVersionId: e.stepVersionId, versionNumber: v.number, status: v.status, label: v.label || reaction(doc), doc };
    }
    return { key: e.key, kind: "local", label: e.step.label || reaction(e.step), doc: e.step };
  });
  return { name, species, steps };
}

// ---------------------------------------------------------------- writes

async function writeVersion(trx: Knex, mechanismId: number, number: number, actor: Actor, message: string, name: string, snap: Snapshot): Promise<void> {
  await trx("mechanism_versions").insert({
    mechanism_id: mechanismId,
    number,
    author_id: actor.id,
    message,
    name,
    content: JSON.stringify(snap),
    content_hash: contentHash(snap),
  });
  await trx("mechanism_steps").where({ mechanism_id: mechanismId }).delete();
  await trx("mechanism_species").where({ mechanism_id: mechanismId }).delete();
  const stepRows = snap.steps.map((e, i) => ({
    mechanism_id: mechanismId,
    position: i,
    entry_key: e.key,
    step_id: e.kind === "library" ? e.stepId : null,
    step_version_id: e.kind === "library" ? e.stepVersionId : null,
  }));
  for (let i = 0; i < stepRows.length; i += 1000) await trx("mechanism_steps").insert(stepRows.slice(i, i + 1000));
  const spRows = snap.species.map((s, i) => ({ mechanism_id: mechanismId, species_id: s.speciesId, position: i }));
  for (let i = 0; i < spRows.length; i += 1000) await trx("mechanism_species").insert(spRows.slice(i, i + 1000));
}

function checkVisibility(actor: Actor, visibility: Visibility, groupId: number | null | undefined): number | null {
  if (visibility !== "group") return null;
  const g = groupId ?? actor.groupIds[0];
  if (!g) throw new InputError("You belong to no group, so the mechanism cannot be shared with one.", { groupId: "Choose private or public." });
  if (!actor.groupIds.includes(g) && actor.role !== "admin") throw new InputError("You can share only with a group you belong to.", { groupId: "Not one of your groups." });
  return g;
}

function parseBody<S extends z.ZodType>(schema: S, input: unknown): z.output<S> {
  const parsed = schema.safeParse(input);
  if (!parsed.success) {
    const fields = fieldErrors(parsed.error);
    throw new InputError(`${Object.keys(fields)[0]}: ${Object.values(fields)[0]}`, fields);
  }
  return parsed.data;
}

export async function createMechanism(
  db: Knex,
  actor: Actor,
  input: unknown,
  extra: { about?: Snapshot["about"]; illustrative?: boolean; forkedFrom?: { id: number; version: number }; snapshot?: Snapshot } = {},
): Promise<{ id: number; version: number }> {
  assertCan(actor, { do: "mechanism.create" }, "Viewers cannot create mechanisms; ask an admin for the author role.");
  const body = parseBody(MechanismCreateSchema, input);
  const groupId = checkVisibility(actor, body.visibility, body.groupId);
  const run = async (trx: Knex) => {
    const snap = extra.snapshot ?? (await buildSnapshot(trx, actor, body, extra.about));
    const [id] = await trx("mechanisms").insert({
      owner_id: actor.id,
      name: body.name,
      description: body.description ?? null,
      visibility: body.visibility,
      group_id: groupId,
      forked_from_mechanism_id: extra.forkedFrom?.id ?? null,
      forked_from_version: extra.forkedFrom?.version ?? null,
      current_version: 1,
      layout: body.layout ? JSON.stringify(body.layout) : null,
      condition_presets: body.conditionPresets ? JSON.stringify(body.conditionPresets) : null,
      illustrative: !!extra.illustrative,
    });
    await writeVersion(trx, id, 1, actor, body.message || "Created.", body.name, snap);
    await audit(trx, {
      userId: actor.id,
      action: extra.forkedFrom ? "mechanism.fork" : "mechanism.create",
      objectType: "mechanism",
      objectId: id,
      detail: extra.forkedFrom ? { parentId: extra.forkedFrom.id, parentVersion: extra.forkedFrom.version } : { steps: snap.steps.length },
    });
    return { id, version: 1 };
  };
  return db.isTransaction ? run(db) : retryingTransaction(db, run);
}

async function lockMechanism(trx: Knex, id: number): Promise<MechanismRow> {
  const m = (await trx("mechanisms").where({ id }).forUpdate().first()) as MechanismRow | undefined;
  if (!m) throw new NotFoundError("No such mechanism.");
  return m;
}

/** Saves a new version. `baseVersion` must be the current one, else ConflictError and nothing is written. */
export async function updateMechanism(db: Knex, actor: Actor, id: number, input: unknown): Promise<{ version: number }> {
  const body = parseBody(MechanismUpdateSchema, input);
  return retryingTransaction(db, async (trx) => {
    const m = await lockMechanism(trx, id);
    if (!can(actor, { do: "mechanism.read", object: owned(m) })) throw new NotFoundError("No such mechanism.");
    assertCan(actor, { do: "mechanism.write", object: owned(m) }, "Only the owner can change this mechanism; fork it to make your own copy.");
    if (m.current_version !== body.baseVersion) {
      const v = await trx("mechanism_versions as v")
        .leftJoin("users as u", "u.id", "v.author_id")
        .where({ "v.mechanism_id": id, "v.number": m.current_version })
        .first("v.number", "v.message", "v.created_at", "u.name");
      throw new ConflictError(
        `This mechanism was saved as version ${v.number} by ${v.name ?? "someone"} ("${v.message}") after the version ${body.baseVersion} you edited. Your changes were not saved; reload, compare and apply them again.`,
        { version: v.number, author: v.name ?? null, message: v.message, at: new Date(v.created_at).toISOString() },
      );
    }
    const groupId = checkVisibility(actor, body.visibility, body.groupId ?? m.group_id);
    const prev = await trx("mechanism_versions").where({ mechanism_id: id, number: m.current_version }).first("content");
    const prevAbout = prev ? parseJson<Snapshot>(prev.content).about : undefined;
    const snap = await buildSnapshot(trx, actor, body, prevAbout);
    const number = m.current_version + 1;
    await trx("mechanisms")
      .where({ id })
      .update({
        name: body.name,
        description: body.description ?? null,
        visibility: body.visibility,
        group_id: groupId,
        current_version: number,
        layout: body.layout === undefined ? trx.raw("layout") : body.layout ? JSON.stringify(body.layout) : null,
        condition_presets: body.conditionPresets === undefined ? trx.raw("condition_presets") : body.conditionPresets ? JSON.stringify(body.conditionPresets) : null,
        updated_at: trx.fn.now(3),
      });
    await writeVersion(trx, id, number, actor, body.message, body.name, snap);
    await audit(trx, { userId: actor.id, action: "mechanism.update", objectType: "mechanism", objectId: id, detail: { version: number } });
    return { version: number };
  });
}

export async function deleteMechanism(db: Knex, actor: Actor, id: number): Promise<void> {
  await retryingTransaction(db, async (trx) => {
    const m = await lockMechanism(trx, id);
    if (!can(actor, { do: "mechanism.read", object: owned(m) })) throw new NotFoundError("No such mechanism.");
    assertCan(actor, { do: "mechanism.delete", object: owned(m) }, "Only the owner can delete this mechanism.");
    await trx("mechanisms").where({ forked_from_mechanism_id: id }).update({ forked_from_mechanism_id: null });
    await trx("mechanisms").where({ id }).delete();
    await audit(trx, { userId: actor.id, action: "mechanism.delete", objectType: "mechanism", objectId: id, detail: { name: m.name } });
  });
}

/** Copies a version of a mechanism the actor can read into the actor's space, keeping lineage. */
export async function forkMechanism(db: Knex, actor: Actor, parentId: number, input: unknown = {}): Promise<{ id: number; version: number; parentOwnerId: number }> {
  const body = parseBody(ForkSchema, input ?? {});
  return retryingTransaction(db, async (trx) => {
    const parent = (await trx("mechanisms").where({ id: parentId }).first()) as MechanismRow | undefined;
    if (!parent || !can(actor, { do: "mechanism.read", object: owned(parent) })) throw new NotFoundError("No such mechanism.");
    assertCan(actor, { do: "mechanism.fork", object: owned(parent) }, "Viewers cannot fork; ask an admin for the author role.");
    const version = body.version ?? parent.current_version;
    const pv = await trx("mechanism_versions").where({ mechanism_id: parentId, number: version }).first("content", "name");
    if (!pv) throw new InputError(`The mechanism has no version ${version}.`, { version: "No such version." });
    const snap = parseJson<Snapshot>(pv.content);
    const created = await createMechanism(
      trx,
      actor,
      { name: body.name ?? `${pv.name} (fork)`, description: parent.description ?? undefined, visibility: "private", message: `Forked from "${pv.name}" version ${version}.` },
      { forkedFrom: { id: parentId, version }, snapshot: snap, illustrative: !!parent.illustrative },
    );
    return { ...created, parentOwnerId: parent.owner_id };
  });
}

// ---------------------------------------------------------------- reads

export async function getMechanismRow(db: Knex, actor: Actor | null, id: number): Promise<MechanismRow> {
  const m = await db("mechanisms as m").join("users as u", "u.id", "m.owner_id").where("m.id", id).first("m.*", "u.name as owner_name");
  if (!m || !can(actor, { do: "mechanism.read", object: owned(m) })) throw new NotFoundError("No such mechanism.");
  return { ...m, layout: m.layout ? parseJson(m.layout) : null, condition_presets: m.condition_presets ? parseJson(m.condition_presets) : null, illustrative: !!m.illustrative };
}

export interface MechanismVersionRow {
  id: number;
  number: number;
  author: string | null;
  message: string;
  name: string;
  content_hash: string;
  created_at: Date;
}

export async function getVersionSnapshot(db: Knex, mechanismId: number, number: number): Promise<{ row: MechanismVersionRow; snapshot: Snapshot }> {
  const v = await db("mechanism_versions as v")
    .leftJoin("users as u", "u.id", "v.author_id")
    .where({ "v.mechanism_id": mechanismId, "v.number": number })
    .first("v.id", "v.number", "u.name as author", "v.message", "v.name", "v.content_hash", "v.created_at", "v.content");
  if (!v) throw new NotFoundError(`The mechanism has no version ${number}.`);
  const { content, ...row } = v;
  return { row, snapshot: parseJson<Snapshot>(content) };
}

export interface MechanismDetail {
  mechanism: MechanismRow;
  version: MechanismVersionRow;
  snapshot: Snapshot;
  resolved: ResolvedMechanism;
  /** Library entries with a newer approved version: entry key → offer. */
  updates: Record<string, { stepVersionId: number; number: number }>;
  parent: { id: number; name: string; version: number | null; readable: boolean } | null;
  forks: Array<{ id: number; name: string; owner: string; forked_from_version: number | null }>;
  canWrite: boolean;
  canFork: boolean;
}

/**
 * Saves a new version of a mechanism read with getMechanism that changes only its steps: name,
 * description, visibility, group and species stay as they are. Same checks as updateMechanism
 * (a stale baseVersion is a ConflictError and nothing is written).
 */
export function updateMechanismSteps(
  db: Knex,
  actor: Actor,
  d: MechanismDetail,
  steps: MechanismEntryInput[],
  baseVersion: number,
  message: string,
): Promise<{ version: number }> {
  return updateMechanism(db, actor, d.mechanism.id, {
    name: d.version.name,
    description: d.mechanism.description ?? undefined,
    visibility: d.mechanism.visibility,
    groupId: d.mechanism.group_id,
    species: d.snapshot.species.map((s) => ({ key: s.key, speciesId: s.speciesId })),
    steps,
    baseVersion,
    message,
  });
}

export async function getMechanism(db: Knex, actor: Actor | null, id: number, versionNumber?: number): Promise<MechanismDetail> {
  const m = await getMechanismRow(db, actor, id);
  const { row, snapshot } = await getVersionSnapshot(db, id, versionNumber ?? m.current_version);
  const pinned = snapshot.steps.flatMap((e) => (e.kind === "library" ? [e.stepVersionId] : []));
  const [resolved, newer, p, forkRows] = await Promise.all([
    resolveSnapshot(db, row.name, snapshot),
    newerApprovedVersions(db, pinned),
    m.forked_from_mechanism_id ? db("mechanisms").where({ id: m.forked_from_mechanism_id }).first("id", "name", "owner_id", "visibility", "group_id") : Promise.resolve(null),
    db("mechanisms as m")
      .join("users as u", "u.id", "m.owner_id")
      .where("m.forked_from_mechanism_id", id)
      .select("m.id", "m.name", "m.owner_id", "m.visibility", "m.group_id", "m.forked_from_version", "u.name as owner"),
  ]);
  const updates: MechanismDetail["updates"] = {};
  for (const e of snapshot.steps) if (e.kind === "library" && newer.has(e.stepVersionId)) { const n = newer.get(e.stepVersionId)!; updates[e.key] = { stepVersionId: n.versionId, number: n.number }; }
  const parent: MechanismDetail["parent"] = p ? { id: p.id, name: p.name, version: m.forked_from_version, readable: can(actor, { do: "mechanism.read", object: owned(p) }) } : null;
  const forks = forkRows
    .filter((f: MechanismRow) => can(actor, { do: "mechanism.read", object: owned(f) }))
    .map((f: MechanismRow & { owner: string }) => ({ id: f.id, name: f.name, owner: f.owner, forked_from_version: f.forked_from_version }));
  return {
    mechanism: m,
    version: row,
    snapshot,
    resolved,
    updates,
    parent,
    forks,
    canWrite: can(actor, { do: "mechanism.write", object: owned(m) }),
    canFork: can(actor, { do: "mechanism.fork", object: owned(m) }),
  };
}

export async function listMechanismVersions(db: Knex, actor: Actor | null, id: number): Promise<MechanismVersionRow[]> {
  await getMechanismRow(db, actor, id);
  return db("mechanism_versions as v")
    .leftJoin("users as u", "u.id", "v.author_id")
    .where("v.mechanism_id", id)
    .orderBy("v.number", "desc")
    .select("v.id", "v.number", "u.name as author", "v.message", "v.name", "v.content_hash", "v.created_at");
}

export interface MechanismListItem {
  id: number;
  name: string;
  owner_id: number;
  owner_name: string;
  visibility: Visibility;
  group_id: number | null;
  current_version: number;
  forked_from_mechanism_id: number | null;
  step_count: number;
  illustrative: boolean;
  updated_at: Date;
}

/** Mechanisms the actor can read, newest first, keyset-paginated by (updated_at, id). */
export async function listMechanisms(
  db: Knex,
  actor: Actor | null,
  opts: { mine?: boolean; q?: string; limit?: number; after?: { updatedAt: string; id: number } | null } = {},
): Promise<{ items: MechanismListItem[]; next: { updatedAt: string; id: number } | null }> {
  const limit = Math.min(Math.max(opts.limit ?? 50, 1), 200);
  const q = db("mechanisms as m")
    .join("users as u", "u.id", "m.owner_id")
    .select(
      "m.id",
      "m.name",
      "m.owner_id",
      "u.name as owner_name",
      "m.visibility",
      "m.group_id",
      "m.current_version",
      "m.forked_from_mechanism_id",
      "m.illustrative",
      "m.updated_at",
      db.raw("(SELECT COUNT(*) FROM mechanism_steps ms WHERE ms.mechanism_id = m.id) AS step_count"),
    )
    .orderBy("m.updated_at", "desc")
    .orderBy("m.id", "desc")
    .limit(limit + 1);
  if (!actor) q.where("m.visibility", "public");
  else if (actor.role !== "admin") {
    q.where((w) => {
      w.where("m.visibility", "public").orWhere("m.owner_id", actor.id);
      if (actor.groupIds.length) w.orWhere((g) => g.where("m.visibility", "group").whereIn("m.group_id", actor.groupIds));
    });
  }
  if (opts.mine && actor) q.where("m.owner_id", actor.id);
  if (opts.q?.trim()) q.where("m.name", "like", `%${opts.q.trim().replace(/[\\%_]/g, (c) => "\\" + c)}%`);
  if (opts.after) {
    const u = new Date(opts.after.updatedAt);
    q.where((w) => w.where("m.updated_at", "<", u).orWhere((w2) => w2.where("m.updated_at", "=", u).andWhere("m.id", "<", opts.after!.id)));
  }
  let rows = (await q) as MechanismListItem[];
  let next: { updatedAt: string; id: number } | null = null;
  if (rows.length > limit) {
    rows = rows.slice(0, limit);
    const last = rows[rows.length - 1];
    next = { updatedAt: new Date(last.updated_at).toISOString(), id: last.id };
  }
  // The SQL above mirrors the policy; the policy has the last word.
  const items = rows
    .filter((r) => can(actor, { do: "mechanism.read", object: owned(r) }))
    .map((r) => ({ ...r, step_count: Number(r.step_count), illustrative: !!r.illustrative }));
  return { items, next };
}

/** Difference between two versions of one mechanism. */
export async function diffVersions(db: Knex, actor: Actor | null, id: number, from: number, to: number, T = 298.15): Promise<MechanismDiff> {
  await getMechanismRow(db, actor, id);
  const a = await getVersionSnapshot(db, id, from);
  const b = await getVersionSnapshot(db, id, to);
  return diffMechanisms(await resolveSnapshot(db, a.row.name, a.snapshot), await resolveSnapshot(db, b.row.name, b.snapshot), T);
}

/** Difference of a fork (its current version) against the parent version it was forked from. */
export async function diffAgainstParent(db: Knex, actor: Actor | null, id: number, T = 298.15, parentVersion?: number): Promise<{ diff: MechanismDiff; parentId: number; parentVersion: number }> {
  const m = await getMechanismRow(db, actor, id);
  if (!m.forked_from_mechanism_id) throw new InputError("This mechanism is not a fork.", { id: "Not a fork." });
  const parent = await getMechanismRow(db, actor, m.forked_from_mechanism_id);
  const pv = parentVersion ?? m.forked_from_version ?? parent.current_version;
  const a = await getVersionSnapshot(db, parent.id, pv);
  const b = await getVersionSnapshot(db, id, m.current_version);
  const diff = diffMechanisms(await resolveSnapshot(db, a.row.name, a.snapshot), await resolveSnapshot(db, b.row.name, b.snapshot), T);
  return { diff, parentId: parent.id, parentVersion: pv };
}

// ---------------------------------------------------------------- exchange format

/** A version of a mechanism as an exchange-format document (validated). */
export async function exportMechanism(db: Knex, actor: Actor | null, id: number, versionNumber?: number): Promise<MechanismDocument> {
  const m = await getMechanismRow(db, actor, id);
  const { row, snapshot } = await getVersionSnapshot(db, id, versionNumber ?? m.current_version);
  const resolved = await resolveSnapshot(db, row.name, snapshot);
  const species: DocumentSpecies[] = snapshot.species.map((s) => {
    const d: DocumentSpecies = { id: s.key, label: s.label };
    if (s.formula) d.formula = s.formula;
    if (s.charge !== null && s.charge !== undefined) d.charge = s.charge;
    if (s.phase) d.phase = s.phase as DocumentSpecies["phase"];
    if (s.notes) d.notes = s.notes;
    return d;
  });
  const about: MechanismDocument["about"] = { name: row.name, ...(m.description ? { description: m.description } : {}), ...(snapshot.about ?? {}) };
  if (m.illustrative && about.illustrative === undefined) about.illustrative = true;
  const doc = { format: "saddlebook.mechanism", version: 1, about, species, steps: resolved.steps.map((s) => s.doc) };
  const v = validateMechanismDocument(doc);
  if (!v.ok) throw new InputError(`The mechanism cannot be exported: ${v.error.message}`, { [v.error.path ?? "body"]: v.error.message });
  return v.value;
}

/** Field map from exchange-format issues: "steps[2].barrier.dG" → "message (line L, column C)". */
export function formatIssueFields(err: FormatError): Record<string, string> {
  const out: Record<string, string> = {};
  for (const i of err.issues) {
    const where = i.line ? ` (line ${i.line}, column ${i.column})` : "";
    out[i.path || "body"] ??= `${i.message}${where}`;
  }
  return out;
}

/**
 * Imports an exchange-format document (text or parsed value) as a new mechanism owned by
 * the actor: every step becomes a local step, species are matched to identical library
 * species or created. One transaction: on any error nothing is stored.
 */
export async function importMechanism(
  db: Knex,
  actor: Actor,
  source: string | unknown,
  opts: { visibility?: Visibility; name?: string; message?: string } = {},
): Promise<{ id: number; version: number }> {
  assertCan(actor, { do: "mechanism.create" }, "Viewers cannot import mechanisms.");
  if (typeof source === "string" && Buffer.byteLength(source, "utf8") > IMPORT_LIMIT_BYTES) {
    throw new InputError(`The file is larger than the import limit of 2 MB (${IMPORT_LIMIT_BYTES} bytes).`, { file: `at most ${IMPORT_LIMIT_BYTES} bytes` });
  }
  const parsed = typeof source === "string" ? parseMechanismText(source) : validateMechanismDocument(source);
  if (!parsed.ok) {
    const fields = formatIssueFields(parsed.error);
    const first = parsed.error.issues[0];
    const where = first?.line ? ` (line ${first.line}, column ${first.column})` : "";
    throw new InputError(`${first?.path || "file"}: ${first?.message ?? parsed.error.message}${where}`, fields);
  }
  const doc = parsed.value;
  // Kinetics checks before anything is written.
  const fields: Record<string, string> = {};
  const speciesIds = new Set(doc.species.map((s) => s.id));
  doc.steps.forEach((st, i) => {
    [...st.reactants.map((t, j) => [t, `steps[${i}].reactants[${j}].species`] as const), ...st.products.map((t, j) => [t, `steps[${i}].products[${j}].species`] as const)].forEach(([t, p]) => {
      if (!speciesIds.has(t.species)) fields[p] ??= `Unknown species "${t.species}".`;
    });
    const k = stepToEngine(st, `steps[${i}]`);
    const c = k.ok ? compileStep(k.value, `steps[${i}]`) : k;
    if (!c.ok) fields[c.error.path ?? `steps[${i}]`] ??= c.error.message;
  });
  if (new Set(doc.steps.map((s) => s.id)).size !== doc.steps.length) fields["steps"] = "Step ids must be unique.";
  if (speciesIds.size !== doc.species.length) fields["species"] = "Species ids must be unique.";
  if (Object.keys(fields).length) {
    const [p, m] = Object.entries(fields)[0];
    throw new InputError(`${p}: ${m}`, fields);
  }
  return retryingTransaction(db, async (trx) => {
    const species: SnapshotSpecies[] = [];
    for (const s of doc.species) {
      const label = s.label ?? s.id;
      const match = trx("species").where({ label });
      for (const [col, val] of [["formula", s.formula], ["charge", s.charge], ["phase", s.phase], ["notes", s.notes]] as const) {
        if (val === undefined || val === null) match.whereNull(col);
        else match.where(col, val);
      }
      let row = (await match.first()) as SpeciesRow | undefined;
      if (!row) {
        const [id] = await trx("species").insert({ label, formula: s.formula ?? null, charge: s.charge ?? null, phase: s.phase ?? null, notes: s.notes ?? null, created_by: actor.id });
        row = { id, label, formula: s.formula ?? null, charge: s.charge ?? null, phase: s.phase ?? null, notes: s.notes ?? null };
      }
      species.push(speciesOfRow(row, s.id));
    }
    const { name, description, ...about } = doc.about;
    const snap: Snapshot = { species, steps: doc.steps.map((st) => ({ key: st.id, kind: "local" as const, step: st })) };
    if (Object.keys(about).length) snap.about = about;
    return createMechanism(
      trx,
      actor,
      { name: opts.name ?? name, description, visibility: opts.visibility ?? "private", message: opts.message ?? "Imported from a file." },
      { snapshot: snap, illustrative: !!about.illustrative },
    );
  });
}

export { diffMechanisms, visibleVersionId };
