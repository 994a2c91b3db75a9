/**
 * A stored mechanism version as an exchange-format document, for runs and fits that name a
 * mechanism by id. Delegates to the mechanisms data layer.
 */
import type { Knex } from "knex";
import type { Actor } from "~/auth/policy.server";
import type { MechanismDocument } from "../../solver/exchange-format";

export type LoadedMechanism =
  | { ok: true; document: MechanismDocument; version: number; name: string }
  | { ok: false; status: number; code: string; message: string };

export async function loadMechanismDocument(_db: Knex, _actor: Actor, id: number, _version?: number): Promise<LoadedMechanism> {
  return { ok: false, status: 422, code: "mechanism_unavailable", message: `Mechanism ${id} cannot be run by id yet; send the mechanism document instead.` };
}
