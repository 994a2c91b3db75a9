/** POST /api/v1/runs/:id/cancel — stop a queued or running run. */
import { requireApiUser } from "~/auth/api-auth.server";
import { methodNotAllowed } from "~/api/json-request.server";
import { handleCancelRun } from "~/compute/run-api.server";
import { getDb } from "../../db/client.server";
import type { Route } from "./+types/api.v1.runs.$id.cancel";

export async function loader({ request }: Route.LoaderArgs) {
  return methodNotAllowed(request);
}

export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed(request);
  const user = await requireApiUser(request);
  return handleCancelRun(getDb(), user, params.id);
}
