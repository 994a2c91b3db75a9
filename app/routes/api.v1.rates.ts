/** POST /api/v1/rates — rate constants and derived barrier forms; see app/api/compute-rates.server.ts. */
import { requireApiUser } from "~/auth/api-auth.server";
import { computeRateLimit } from "~/security/compute-limit.server";
import { handleRates } from "~/api/compute-rates.server";
import { methodNotAllowed } from "~/api/json-request.server";
import type { Route } from "./+types/api.v1.rates";

export async function loader({ request }: Route.LoaderArgs) {
  return methodNotAllowed(request);
}

export async function action({ request }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed(request);
  const user = await requireApiUser(request); // token or session; a refusal is a thrown 401 JSON response
  const limited = await computeRateLimit(user.id, "rates");
  if (limited) return limited;
  return handleRates(request);
}
