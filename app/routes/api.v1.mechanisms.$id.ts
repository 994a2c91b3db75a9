/** GET /api/v1/mechanisms/:id[?version=N] (ETag); PUT — save a new version (baseVersion or If-Match); DELETE. */
import { getDb } from "../../db/client.server";
import { getApiUser, requireApiUser } from "~/auth/api-auth.server";
import { mechanismDelete, mechanismGet, mechanismUpdate } from "~/api/library-api.server";
import { methodNotAllowed } from "~/api/json-request.server";
import type { Route } from "./+types/api.v1.mechanisms.$id";

export async function loader({ request, params }: Route.LoaderArgs) {
  return mechanismGet(getDb(), await getApiUser(request), request, params.id);
}

export async function action({ request, params }: Route.ActionArgs) {
  if (request.method === "PUT") return mechanismUpdate(getDb(), await requireApiUser(request), request, params.id);
  if (request.method === "DELETE") return mechanismDelete(getDb(), await requireApiUser(request), params.id);
  return methodNotAllowed(request, "GET, PUT, DELETE");
}
