/** GET /api/v1/species/:id */
import { getDb } from "../../db/client.server";
import { requireApiUser } from "~/auth/api-auth.server";
import { speciesGet } from "~/api/library-api.server";
import { methodNotAllowed } from "~/api/json-request.server";
import type { Route } from "./+types/api.v1.species.$id";

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireApiUser(request);
  return speciesGet(getDb(), params.id);
}

export async function action({ request }: Route.ActionArgs) {
  return methodNotAllowed(request, "GET");
}
