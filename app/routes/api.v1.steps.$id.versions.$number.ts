/** GET /api/v1/steps/:id/versions/:number — one immutable version. */
import { getDb } from "../../db/client.server";
import { requireApiUser } from "~/auth/api-auth.server";
import { stepVersionGet } from "~/api/library-api.server";
import { methodNotAllowed } from "~/api/json-request.server";
import type { Route } from "./+types/api.v1.steps.$id.versions.$number";

export async function loader({ request, params }: Route.LoaderArgs) {
  return stepVersionGet(getDb(), await requireApiUser(request), params.id, params.number);
}

export async function action({ request }: Route.ActionArgs) {
  return methodNotAllowed(request, "GET");
}
