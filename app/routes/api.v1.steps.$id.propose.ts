/** POST /api/v1/steps/:id/propose — a draft goes to the curators' queue (they are e-mailed). */
import { getDb } from "../../db/client.server";
import { requireApiUser } from "~/auth/api-auth.server";
import { stepPropose } from "~/api/library-api.server";
import { methodNotAllowed } from "~/api/json-request.server";
import type { Route } from "./+types/api.v1.steps.$id.propose";

export async function loader({ request }: Route.LoaderArgs) {
  return methodNotAllowed(request);
}

export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed(request);
  return stepPropose(getDb(), await requireApiUser(request), request, params.id);
}
