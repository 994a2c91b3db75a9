/** POST /api/v1/rates — rate constants and derived barrier forms; see app/api/compute-rates.server.ts. */
import { handleRates } from "~/api/compute-rates.server";
import { computeAction } from "~/api/compute-route.server";
import { methodNotAllowed } from "~/api/json-request.server";
import type { Route } from "./+types/api.v1.rates";

export async function loader({ request }: Route.LoaderArgs) {
  return methodNotAllowed(request);
}

export async function action({ request }: Route.ActionArgs) {
  return computeAction(request, "rates", handleRates);
}
