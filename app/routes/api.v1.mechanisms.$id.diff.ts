/** GET /api/v1/mechanisms/:id/diff?from=&to=&T= or ?against=parent — differences with the effect on k. */
import { getDb } from "../../db/client.server";
import { getApiUser } from "~/auth/api-auth.server";
import { mechanismDiff } from "~/api/library-api.server";
import { methodNotAllowed } from "~/api/json-request.server";
import type { Route } from "./+types/api.v1.mechanisms.$id.diff";

export async function loader({ request, params }: Route.LoaderArgs) {
  return mechanismDiff(getDb(), await getApiUser(request), request, params.id);
}

export async function action({ request }: Route.ActionArgs) {
  return methodNotAllowed(request, "GET");
}
