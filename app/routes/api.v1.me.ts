/** GET /api/v1/me — the caller: id, e-mail, name, role and groups (token or session). */
import type { Route } from "./+types/api.v1.me";
import { requireApiUser } from "~/auth/api-auth.server";
import { apiError } from "~/api/errors.server";
import { getDb } from "../../db/client.server";
import { listGroupsOfUser } from "../../db/access/groups.server";

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireApiUser(request);
  const groups = await listGroupsOfUser(getDb(), user.id);
  return Response.json(
    {
      id: user.id,
      email: user.email,
      name: user.name,
      role: user.role,
      groups: groups.map((g) => ({ id: g.id, slug: g.slug, name: g.name, groupRole: g.groupRole })),
    },
    { headers: { "Cache-Control": "no-store" } },
  );
}

export async function action({ request }: Route.ActionArgs) {
  await requireApiUser(request);
  return apiError(405, "method_not_allowed", "GET /api/v1/me only reads; use GET.", undefined, { Allow: "GET" });
}
