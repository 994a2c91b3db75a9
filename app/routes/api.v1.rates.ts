/** POST /api/v1/rates — rate constants and derived barrier forms; see app/api/compute-rates.server.ts. */
import { computeAccess } from "~/api/compute-access.server";
import { handleRates } from "~/api/compute-rates.server";
import { methodNotAllowed } from "~/api/json-request.server";
import type { Route } from "./+types/api.v1.rates";

export async function loader({ request }: Route.LoaderArgs) {
  return methodNotAllowed(request);
}

export async function action({ request }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed(request);
  await computeAccess(request);
  return handleRates(request);
}
