/** POST /api/v1/activation-parameters — Eyring and Arrhenius regression of k(T); see app/api/compute-activation.server.ts. */
import { handleActivationParameters } from "~/api/compute-activation.server";
import { computeAction } from "~/api/compute-route.server";
import { methodNotAllowed } from "~/api/json-request.server";
import type { Route } from "./+types/api.v1.activation-parameters";

export async function loader({ request }: Route.LoaderArgs) {
  return methodNotAllowed(request);
}

export async function action({ request }: Route.ActionArgs) {
  // A regression costs about what a rate-constant request does: it shares that limit.
  return computeAction(request, "rates", handleActivationParameters);
}
