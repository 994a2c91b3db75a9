/** The size of the curators' review queue (steps proposed for the shared library), for the navigation. */
import type { Knex } from "knex";

export async function countWaitingProposals(db: Knex): Promise<number> {
  const r = await db("steps").where({ status: "proposed" }).count<{ n: number }[]>({ n: "*" }).first();
  return Number(r?.n ?? 0);
}
