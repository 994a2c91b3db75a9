/**
 * POST /api/v1/simulate — concentrations against time; see app/api/compute-simulate.server.ts.
 * The body is read here; the simulation runs in a compute thread (app/compute/api-pool.server.ts).
 */
import { requireApiUser } from "~/auth/api-auth.server";
import { computeRateLimit } from "~/security/compute-limit.server";
import { SIMULATE_MAX_WALL_MS } from "~/api/compute-simulate.server";
import { methodNotAllowed, readJsonBody } from "~/api/json-request.server";
import { simulateInThread } from "~/compute/api-pool.server";
import type { Route } from "./+types/api.v1.simulate";

export async function loader({ request }: Route.LoaderArgs) {
  return methodNotAllowed(request);
}

export async function action({ request }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed(request);
  const user = await requireApiUser(request); // token or session; a refusal is a thrown 401 JSON response
  const limited = await computeRateLimit(user.id, "simulate");
  if (limited) return limited;
  const body = await readJsonBody(request);
  if (!body.ok) return body.response;
  return simulateInThread(body.text, request.signal, SIMULATE_MAX_WALL_MS);
}
