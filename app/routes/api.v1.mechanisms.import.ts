/** POST /api/v1/mechanisms/import — body: a Saddlebook mechanism document (at most 2 MB). */
import { getDb } from "../../db/client.server";
import { requireApiUser } from "~/auth/api-auth.server";
import { mechanismImport } from "~/api/library-api.server";
import { methodNotAllowed } from "~/api/json-request.server";
import type { Route } from "./+types/api.v1.mechanisms.import";

export async function loader({ request }: Route.LoaderArgs) {
  return methodNotAllowed(request);
}

export async function action({ request }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed(request);
  return mechanismImport(getDb(), await requireApiUser(request), request);
}
