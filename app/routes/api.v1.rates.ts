/**
 * POST /api/v1/rates — rate constants and derived barrier forms; see app/api/compute-rates.server.ts.
 * The body is read here; a request for more than RATES_INLINE_PAIRS rate constants is computed in a
 * compute thread (app/compute/api-pool.server.ts), so a large one never holds up pages.
 */
import { answerRates, RATES_INLINE_PAIRS, RATES_MAX_WALL_MS, requestedPairs } from "~/api/compute-rates.server";
import { computeAction } from "~/api/compute-route.server";
import { methodNotAllowed, readJsonBody } from "~/api/json-request.server";
import { ratesInThread } from "~/compute/api-pool.server";
import type { Route } from "./+types/api.v1.rates";

export async function loader({ request }: Route.LoaderArgs) {
  return methodNotAllowed(request);
}

export async function action({ request }: Route.ActionArgs) {
  return computeAction(request, "rates", async (req) => {
    const body = await readJsonBody(req);
    if (!body.ok) return body.response;
    // A small request costs less than the trip to a thread: answered here. Larger ones go to the pool.
    if (requestedPairs(body.value) <= RATES_INLINE_PAIRS) return answerRates(body.value, body.text);
    return ratesInThread(body.text, req.signal, RATES_MAX_WALL_MS);
  });
}
