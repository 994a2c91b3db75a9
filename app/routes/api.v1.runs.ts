/** GET /api/v1/runs (list) and POST /api/v1/runs (start a run); see app/compute/run-api.server.ts. */
import { requireApiUser } from "~/auth/api-auth.server";
import { methodNotAllowed } from "~/api/json-request.server";
import { handleCreateRun, handleListRuns } from "~/compute/run-api.server";
import { getDb } from "../../db/client.server";
import type { Route } from "./+types/api.v1.runs";

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireApiUser(request);
  return handleListRuns(getDb(), user, request);
}

export async function action({ request }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed(request, "GET, POST");
  const user = await requireApiUser(request);
  return handleCreateRun(getDb(), user, request);
}
