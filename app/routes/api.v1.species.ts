/** GET /api/v1/species — list (prefix or word search); POST — add a species. */
import { getDb } from "../../db/client.server";
import { requireApiUser } from "~/auth/api-auth.server";
import { speciesCreate, speciesList } from "~/api/library-api.server";
import { methodNotAllowed } from "~/api/json-request.server";
import type { Route } from "./+types/api.v1.species";

export async function loader({ request }: Route.LoaderArgs) {
  await requireApiUser(request);
  return speciesList(getDb(), request);
}

export async function action({ request }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed(request, "GET, POST");
  return speciesCreate(getDb(), await requireApiUser(request), request);
}
