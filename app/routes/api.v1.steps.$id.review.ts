/** POST /api/v1/steps/:id/review — curators approve, request changes or deprecate. */
import { getDb } from "../../db/client.server";
import { requireApiUser } from "~/auth/api-auth.server";
import { stepReview } from "~/api/library-api.server";
import { methodNotAllowed } from "~/api/json-request.server";
import type { Route } from "./+types/api.v1.steps.$id.review";

export async function loader({ request }: Route.LoaderArgs) {
  return methodNotAllowed(request);
}

export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed(request);
  return stepReview(getDb(), await requireApiUser(request), request, params.id);
}
