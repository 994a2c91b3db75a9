/** GET /api/v1/openapi.json — the OpenAPI description, generated from the zod schemas. */
import { openApiDocument } from "~/api/library-openapi.server";
import { jsonResponse, methodNotAllowed } from "~/api/json-request.server";
import type { Route } from "./+types/api.v1.openapi[.]json";

let cached: Record<string, unknown> | undefined;

export async function loader(_args: Route.LoaderArgs) {
  cached ??= openApiDocument();
  return jsonResponse(cached, { headers: { "Cache-Control": "public, max-age=300" } });
}

export async function action({ request }: Route.ActionArgs) {
  return methodNotAllowed(request, "GET");
}
