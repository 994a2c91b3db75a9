/**
 * A stored mechanism version as an exchange-format document, for runs and fits that name a
 * mechanism by id (the mechanisms data layer resolves pinned step versions). The caller must be
 * allowed to read the mechanism; the version defaults to the current one.
 */
import type { Knex } from "knex";
import type { Actor } from "~/auth/policy.server";
import type { MechanismDocument } from "../../solver/exchange-format";
import { exportMechanism, getMechanismRow, getVersionSnapshot, type MechanismRow } from "../../db/access/mechanisms.server";
import { InputError, NotFoundError } from "../../db/access/library-errors";

export type LoadedMechanism =
  | { ok: true; document: MechanismDocument; version: number; name: string }
  | { ok: false; status: number; code: string; message: string };

export async function loadMechanismDocument(db: Knex, actor: Actor, id: number, version?: number): Promise<LoadedMechanism> {
  try {
    const row = await getMechanismRow(db, actor, id);
    const v = version ?? row.current_version;
    if (!(v >= 1) || v > row.current_version) return { ok: false, status: 422, code: "unknown_version", message: `Mechanism ${id} has no version ${v} (latest: ${row.current_version}).` };
    const document = await exportMechanism(db, actor, id, v);
    return { ok: true, document, version: v, name: row.name };
  } catch (e) {
    if (e instanceof NotFoundError) return { ok: false, status: 404, code: "not_found", message: `There is no mechanism ${id} that you can see.` };
    if (e instanceof InputError) return { ok: false, status: 422, code: "invalid_mechanism", message: e.message };
    throw e;
  }
}

/**
 * The document of a mechanism version that has no steps yet (the exchange format needs at least
 * one step, so export refuses it): its name and species, no steps. Null when the version has
 * steps or does not exist (loadMechanismDocument answers those). The caller has read `row`
 * through the policy (getMechanismRow). For pages only: the API's
 * export and runs still need a step.
 */
export async function emptyMechanismDocument(db: Knex, row: Pick<MechanismRow, "id" | "name" | "current_version" | "description">, version?: number): Promise<LoadedMechanism | null> {
  const v = version ?? row.current_version;
  if (!(v >= 1) || v > row.current_version) return null;
  const { snapshot } = await getVersionSnapshot(db, row.id, v);
  if (snapshot.steps.length > 0) return null;
  const document = {
    format: "saddlebook.mechanism",
    version: 1,
    about: { name: row.name, ...(row.description ? { description: row.description } : {}) },
    species: snapshot.species.map((s) => ({ id: s.key, label: s.label, ...(s.formula ? { formula: s.formula } : {}) })),
    steps: [],
  } as unknown as MechanismDocument;
  return { ok: true, document, version: v, name: row.name };
}
