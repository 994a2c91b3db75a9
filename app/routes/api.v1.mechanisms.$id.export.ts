/** GET /api/v1/mechanisms/:id/export[?version=N] — the exchange-format document as a download. */
import { getDb } from "../../db/client.server";
import { getApiUser } from "~/auth/api-auth.server";
import { mechanismExport } from "~/api/library-api.server";
import { methodNotAllowed } from "~/api/json-request.server";
import type { Route } from "./+types/api.v1.mechanisms.$id.export";

export async function loader({ request, params }: Route.LoaderArgs) {
  return mechanismExport(getDb(), await getApiUser(request), request, params.id);
}

export async function action({ request }: Route.ActionArgs) {
  return methodNotAllowed(request, "GET");
}
