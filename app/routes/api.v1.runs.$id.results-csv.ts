/** GET /api/v1/runs/:id/results.csv — time (s), T (K) and concentrations (mol/L) of a finished run: `#` comment lines (title, units, a key from each column's species name to its id and formula), then a header row of names with units. */
import { requireApiUser } from "~/auth/api-auth.server";
import { handleRunCsv } from "~/compute/run-api.server";
import { getDb } from "../../db/client.server";
import type { Route } from "./+types/api.v1.runs.$id.results-csv";

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireApiUser(request);
  return handleRunCsv(getDb(), user, params.id);
}
