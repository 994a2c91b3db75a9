/** POST /sign-out ends the session (CSRF-checked); a GET just goes home. */
import { redirect } from "react-router";
import type { Route } from "./+types/sign-out";
import { assertCsrf } from "~/auth/csrf.server";
import { endSession } from "~/auth/sign-in.server";
import { getOptionalUser } from "~/auth/current-user.server";
import { clientAddress } from "~/auth/client-address.server";
import { getDb } from "../../db/client.server";
import { audit } from "../../db/access/audit.server";

export async function loader() {
  return redirect("/");
}

export async function action({ request }: Route.ActionArgs) {
  await assertCsrf(request, await request.formData());
  const user = await getOptionalUser(request);
  if (user) await audit(getDb(), { userId: user.id, action: "sign-out", objectType: "user", objectId: user.id, ip: clientAddress(request) });
  return endSession(request, "/sign-in?notice=signed-out");
}
