/** GET /api/v1/ensembles/:id/summary.csv — mean, sd and percentiles of each observable at each output time of a finished ensemble. */
import { requireApiUser } from "~/auth/api-auth.server";
import { handleEnsembleCsv } from "~/ensembles/ensemble-api.server";
import { getDb } from "../../db/client.server";
import type { Route } from "./+types/api.v1.ensembles.$id.summary-csv";

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireApiUser(request);
  return handleEnsembleCsv(getDb(), user, params.id, "summary");
}
