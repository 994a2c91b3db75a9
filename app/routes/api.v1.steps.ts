/** GET /api/v1/steps — search the library; POST — create a step. See app/api/library-api.server.ts. */
import { getDb } from "../../db/client.server";
import { requireApiUser } from "~/auth/api-auth.server";
import { stepsCreate, stepsList } from "~/api/library-api.server";
import { methodNotAllowed } from "~/api/json-request.server";
import type { Route } from "./+types/api.v1.steps";

export async function loader({ request }: Route.LoaderArgs) {
  return stepsList(getDb(), await requireApiUser(request), request);
}

export async function action({ request }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed(request, "GET, POST");
  return stepsCreate(getDb(), await requireApiUser(request), request);
}
