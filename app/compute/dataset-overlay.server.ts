/** A measured dataset as plot series (s, mol/L) for drawing over a run, if the user may read it. */
import type { Knex } from "knex";
import { can, type Actor } from "~/auth/policy.server";
import { datasetAsOwned, datasetInSI, getDataset } from "../../db/access/datasets.server";

export interface OverlaySeries {
  datasetId: number;
  name: string;
  species: string;
  /** s */
  times: number[];
  /** mol/L */
  values: number[];
}

export async function datasetOverlay(db: Knex, actor: Actor, id: number): Promise<OverlaySeries[] | null> {
  const d = await getDataset(db, id);
  if (!d || !can(actor, { do: "dataset.read", object: datasetAsOwned(d) })) return null;
  return datasetInSI(d).series.map((s) => ({ datasetId: d.id, name: d.name, ...s }));
}
