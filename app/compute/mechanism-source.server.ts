/**
 * A stored mechanism version as an exchange-format document, for runs and fits that name a
 * mechanism by id (the mechanisms data layer resolves pinned step versions). The caller must be
 * allowed to read the mechanism; the version defaults to the current one.
 */
import type { Knex } from "knex";
import type { Actor } from "~/auth/policy.server";
import type { MechanismDocument } from "../../solver/exchange-format";
import { exportMechanism, getMechanismRow } from "../../db/access/mechanisms.server";
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
