/**
 * POST /api/v1/simulate — concentrations against time; see app/api/compute-simulate.server.ts.
 * The body is read here; the simulation runs in a compute thread (app/compute/api-pool.server.ts).
 */
import { SIMULATE_MAX_WALL_MS } from "~/api/compute-simulate.server";
import { computeAction } from "~/api/compute-route.server";
import { methodNotAllowed, readJsonBody } from "~/api/json-request.server";
import { simulateInThread } from "~/compute/api-pool.server";
import type { Route } from "./+types/api.v1.simulate";

export async function loader({ request }: Route.LoaderArgs) {
  return methodNotAllowed(request);
}

export async function action({ request }: Route.ActionArgs) {
  return computeAction(request, "simulate", async (req) => {
    const body = await readJsonBody(req);
    if (!body.ok) return body.response;
    return simulateInThread(body.text, req.signal, SIMULATE_MAX_WALL_MS);
  });
}
