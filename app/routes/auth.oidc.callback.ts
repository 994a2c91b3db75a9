/** GET /auth/oidc/callback: the provider sends the person back here with a code. */
import { redirect } from "react-router";
import type { Route } from "./+types/auth.oidc.callback";
import { getAuthenticator, SignInError } from "~/auth/authenticator.server";
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
    let message = "Single sign-on did not complete; try again.";
    if (e instanceof SignInError) message = e.message;
    else if (e instanceof Error && /state/i.test(e.message)) message = "The sign-in took too long or was started in another window; start again.";
    else if (e instanceof Error && e.name === "OAuth2RequestError") message = `The sign-in provider refused: ${e.message}`;
    else console.error("OIDC callback:", e);
    return redirect("/sign-in?error=" + encodeURIComponent(message), { headers: { "Set-Cookie": CLEAR_STATE } });
  }
}
