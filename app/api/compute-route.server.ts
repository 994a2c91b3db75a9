/**
 * The shape every compute endpoint's route module shares: POST only (GET and other methods get
 * 405 with Allow: POST), a signed-in caller (token or session; a refusal is a thrown 401 JSON
 * response), the per-user compute limit of its kind (429), then the handler.
 */
import { requireApiUser } from "~/auth/api-auth.server";
import { computeRateLimit, type ComputeKind } from "~/security/compute-limit.server";
import { methodNotAllowed } from "./json-request.server";

export async function computeAction(request: Request, kind: ComputeKind, handle: (request: Request) => Promise<Response>): Promise<Response> {
  if (request.method !== "POST") return methodNotAllowed(request);
  const user = await requireApiUser(request);
  const limited = await computeRateLimit(user.id, kind);
  if (limited) return limited;
  return handle(request);
}
