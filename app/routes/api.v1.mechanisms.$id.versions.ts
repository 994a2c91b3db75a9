/** GET /api/v1/mechanisms/:id/versions — history (number, author, time, message). */
import { getDb } from "../../db/client.server";
import { getApiUser } from "~/auth/api-auth.server";
import { mechanismVersions } from "~/api/library-api.server";
import { methodNotAllowed } from "~/api/json-request.server";
import type { Route } from "./+types/api.v1.mechanisms.$id.versions";

export async function loader({ request, params }: Route.LoaderArgs) {
  return mechanismVersions(getDb(), await getApiUser(request), params.id);
}

export async function action({ request }: Route.ActionArgs) {
  return methodNotAllowed(request, "GET");
}
