/** GET /api/v1/ensembles (list) and POST /api/v1/ensembles (start one); see app/ensembles/ensemble-api.server.ts. */
import { requireApiUser } from "~/auth/api-auth.server";
import { methodNotAllowed } from "~/api/json-request.server";
import { handleCreateEnsemble, handleListEnsembles } from "~/ensembles/ensemble-api.server";
import { getDb } from "../../db/client.server";
import type { Route } from "./+types/api.v1.ensembles";

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireApiUser(request);
  return handleListEnsembles(getDb(), user, request);
}

export async function action({ request }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed(request, "GET, POST");
  const user = await requireApiUser(request);
  return handleCreateEnsemble(getDb(), user, request);
}
