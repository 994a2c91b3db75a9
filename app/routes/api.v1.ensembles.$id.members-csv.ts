/** GET /api/v1/ensembles/:id/members.csv — one row per member: parameters by step and species name, observables at the chosen times (layout in app/ensembles/ensemble-csv.ts). */
import { requireApiUser } from "~/auth/api-auth.server";
import { handleEnsembleCsv } from "~/ensembles/ensemble-api.server";
import { getDb } from "../../db/client.server";
import type { Route } from "./+types/api.v1.ensembles.$id.members-csv";

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireApiUser(request);
  return handleEnsembleCsv(getDb(), user, params.id, "members");
}
