/** GET /api/v1/datasets/:id — a dataset with its rows as entered and in s and mol/L. */
import { requireApiUser } from "~/auth/api-auth.server";
import { methodNotAllowed } from "~/api/json-request.server";
import { handleGetDataset } from "~/compute/dataset-api.server";
import { getDb } from "../../db/client.server";
import type { Route } from "./+types/api.v1.datasets.$id";

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireApiUser(request);
  return handleGetDataset(getDb(), user, params.id);
}

export async function action({ request }: Route.ActionArgs) {
  return methodNotAllowed(request, "GET");
}
