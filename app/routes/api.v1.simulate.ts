/** POST /api/v1/simulate — concentrations against time; see app/api/compute-simulate.server.ts. */
import { requireApiUser } from "~/auth/api-auth.server";
import { computeRateLimit } from "~/security/compute-limit.server";
import { handleSimulate } from "~/api/compute-simulate.server";
import { methodNotAllowed } from "~/api/json-request.server";
import type { Route } from "./+types/api.v1.simulate";

export async function loader({ request }: Route.LoaderArgs) {
  return methodNotAllowed(request);
}

export async function action({ request }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed(request);
  const user = await requireApiUser(request); // token or session; a refusal is a thrown 401 JSON response
  const limited = await computeRateLimit(user.id, "simulate");
  if (limited) return limited;
  return handleSimulate(request);
}
