/** POST /api/v1/ensembles/:id/cancel — stop a queued or running ensemble (members already computed are kept). */
import { requireApiUser } from "~/auth/api-auth.server";
import { methodNotAllowed } from "~/api/json-request.server";
import { handleCancelEnsemble } from "~/ensembles/ensemble-api.server";
import { getDb } from "../../db/client.server";
import type { Route } from "./+types/api.v1.ensembles.$id.cancel";

export async function loader({ request }: Route.LoaderArgs) {
  return methodNotAllowed(request);
}

export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed(request);
  const user = await requireApiUser(request);
  return handleCancelEnsemble(getDb(), user, params.id);
}
