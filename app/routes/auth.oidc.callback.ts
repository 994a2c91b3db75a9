/** GET /auth/oidc/callback: the provider sends the person back here with a code. */
import { redirect } from "react-router";
import type { Route } from "./+types/auth.oidc.callback";
import { getAuthenticator } from "~/auth/authenticator.server";
import { ssoProblem, signInProblemPath } from "~/auth/sign-in-problems.server";
import { safeNext, startSession } from "~/auth/sign-in.server";
import { getSession } from "~/auth/session.server";

const CLEAR_STATE = "__saddlebook_oidc=; Path=/; Max-Age=0; HttpOnly; SameSite=Lax";

export async function loader({ request }: Route.LoaderArgs) {
  const session = await getSession(request);
  const next = safeNext(session.get("oidcNext") ?? "/");
  try {
    const auth = await getAuthenticator();
    const result = await auth.authenticate("oidc", request);
    const response = await startSession(request, result.userId, result.method, next);
    response.headers.append("Set-Cookie", CLEAR_STATE);
    return response;
  } catch (e) {
    if (e instanceof Response) throw e;
    const problem = ssoProblem(e);
    // The provider's own words go to the server log, never into the page address.
    if (problem === "sso-failed" || problem === "sso-refused" || problem === "sso-token") console.error("OIDC callback:", e instanceof Error ? e.message : e);
    return redirect(signInProblemPath(problem), { headers: { "Set-Cookie": CLEAR_STATE } });
  }
}
