/** GET /api/v1/steps/:id/versions — history; POST — a new version (edit with baseVersion or If-Match). */
import { getDb } from "../../db/client.server";
import { requireApiUser } from "~/auth/api-auth.server";
import { stepEdit, stepVersionsList } from "~/api/library-api.server";
import { methodNotAllowed } from "~/api/json-request.server";
import type { Route } from "./+types/api.v1.steps.$id.versions";

export async function loader({ request, params }: Route.LoaderArgs) {
  return stepVersionsList(getDb(), await requireApiUser(request), params.id);
}

export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed(request, "GET, POST");
  return stepEdit(getDb(), await requireApiUser(request), request, params.id);
}
