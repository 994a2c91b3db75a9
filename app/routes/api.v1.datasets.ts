/** GET /api/v1/datasets (list) and POST /api/v1/datasets (upload); see app/compute/dataset-api.server.ts. */
import { requireApiUser } from "~/auth/api-auth.server";
import { methodNotAllowed } from "~/api/json-request.server";
import { handleCreateDataset, handleListDatasets } from "~/compute/dataset-api.server";
import { getDb } from "../../db/client.server";
import type { Route } from "./+types/api.v1.datasets";

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireApiUser(request);
  return handleListDatasets(getDb(), user);
}

export async function action({ request }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed(request, "GET, POST");
  const user = await requireApiUser(request);
  return handleCreateDataset(getDb(), user, request);
}
