/** GET /api/v1/steps/:id/comments; POST — add a comment. */
import { getDb } from "../../db/client.server";
import { requireApiUser } from "~/auth/api-auth.server";
import { stepCommentAdd, stepCommentsList } from "~/api/library-api.server";
import { methodNotAllowed } from "~/api/json-request.server";
import type { Route } from "./+types/api.v1.steps.$id.comments";

export async function loader({ request, params }: Route.LoaderArgs) {
  return stepCommentsList(getDb(), await requireApiUser(request), params.id);
}

export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed(request, "GET, POST");
  return stepCommentAdd(getDb(), await requireApiUser(request), request, params.id);
}
