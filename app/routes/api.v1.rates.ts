/**
 * POST /api/v1/rates — rate constants and derived barrier forms; see app/api/compute-rates.server.ts.
 * The body is read here; a request for more than RATES_INLINE_PAIRS rate constants is computed in a
 * compute thread (app/compute/api-pool.server.ts), so a large one never holds up pages.
 */
import { handleRates, RATES_MAX_WALL_MS } from "~/api/compute-rates.server";
import { computeAction } from "~/api/compute-route.server";
import { methodNotAllowed } from "~/api/json-request.server";
import { ratesInThread } from "~/compute/api-pool.server";
import type { Route } from "./+types/api.v1.rates";

export async function loader({ request }: Route.LoaderArgs) {
  return methodNotAllowed(request);
}

export async function action({ request }: Route.ActionArgs) {
  return computeAction(request, "rates", (req) => handleRates(req, (text, signal) => ratesInThread(text, signal, RATES_MAX_WALL_MS)));
}
