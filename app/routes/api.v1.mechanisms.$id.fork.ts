/** POST /api/v1/mechanisms/:id/fork — copy into your space with lineage; the owner is e-mailed. */
import { getDb } from "../../db/client.server";
import { requireApiUser } from "~/auth/api-auth.server";
import { mechanismFork } from "~/api/library-api.server";
import { methodNotAllowed } from "~/api/json-request.server";
import type { Route } from "./+types/api.v1.mechanisms.$id.fork";

export async function loader({ request }: Route.LoaderArgs) {
  return methodNotAllowed(request);
}

export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed(request);
  return mechanismFork(getDb(), await requireApiUser(request), request, params.id);
}
