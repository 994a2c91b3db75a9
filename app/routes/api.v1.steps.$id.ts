/** GET /api/v1/steps/:id — the step (the version you may see), with ETag. */
import { getDb } from "../../db/client.server";
import { requireApiUser } from "~/auth/api-auth.server";
import { stepGet } from "~/api/library-api.server";
import { methodNotAllowed } from "~/api/json-request.server";
import type { Route } from "./+types/api.v1.steps.$id";

export async function loader({ request, params }: Route.LoaderArgs) {
  return stepGet(getDb(), await requireApiUser(request), request, params.id);
}

export async function action({ request }: Route.ActionArgs) {
  return methodNotAllowed(request, "GET");
}
