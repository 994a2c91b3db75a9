/** Any unknown /api/v1 address answers with the API's JSON error body. */
import { apiError } from "~/api/errors.server";
import type { Route } from "./+types/api.v1.not-found";

function notFound(request: Request) {
  return apiError(404, "not_found", `No API endpoint at ${new URL(request.url).pathname} for ${request.method}.`);
}

export async function loader({ request }: Route.LoaderArgs) {
  return notFound(request);
}

export async function action({ request }: Route.ActionArgs) {
  return notFound(request);
}
