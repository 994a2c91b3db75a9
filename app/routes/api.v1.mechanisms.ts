/** GET /api/v1/mechanisms — mechanisms you can read; POST — create one. */
import { getDb } from "../../db/client.server";
import { getApiUser, requireApiUser } from "~/auth/api-auth.server";
import { mechanismCreate, mechanismsList } from "~/api/library-api.server";
import { methodNotAllowed } from "~/api/json-request.server";
import type { Route } from "./+types/api.v1.mechanisms";

export async function loader({ request }: Route.LoaderArgs) {
  return mechanismsList(getDb(), await getApiUser(request), request);
}

export async function action({ request }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed(request, "GET, POST");
  return mechanismCreate(getDb(), await requireApiUser(request), request);
}
