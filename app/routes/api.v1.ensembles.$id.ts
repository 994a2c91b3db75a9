/** GET /api/v1/ensembles/:id — status, progress (members done of total) and, when done, the summary. */
import { requireApiUser } from "~/auth/api-auth.server";
import { methodNotAllowed } from "~/api/json-request.server";
import { handleGetEnsemble } from "~/ensembles/ensemble-api.server";
import { getDb } from "../../db/client.server";
import type { Route } from "./+types/api.v1.ensembles.$id";

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireApiUser(request);
  return handleGetEnsemble(getDb(), user, params.id);
}

export async function action({ request }: Route.ActionArgs) {
  return methodNotAllowed(request, "GET");
}
