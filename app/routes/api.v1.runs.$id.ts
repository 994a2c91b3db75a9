/** GET /api/v1/runs/:id — status, progress and (when done) analysis; ?series=1 adds the curves. */
import { requireApiUser } from "~/auth/api-auth.server";
import { methodNotAllowed } from "~/api/json-request.server";
import { handleGetRun } from "~/compute/run-api.server";
import { getDb } from "../../db/client.server";
import type { Route } from "./+types/api.v1.runs.$id";

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireApiUser(request);
  return handleGetRun(getDb(), user, params.id, request);
}

export async function action({ request }: Route.ActionArgs) {
  return methodNotAllowed(request, "GET");
}
