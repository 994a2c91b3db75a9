/** GET /auth/oidc starts single sign-on: a redirect to the provider (PKCE, state cookie). */
import { redirect } from "react-router";
import type { Route } from "./+types/auth.oidc";
import { getAuthenticator, SignInError } from "~/auth/authenticator.server";
import { oidcConfig } from "~/auth/oidc.server";
import { safeNext } from "~/auth/sign-in.server";
import { signInProblemPath, ssoProblem } from "~/auth/sign-in-problems.server";
import { commitSession, getSession } from "~/auth/session.server";

export async function loader({ request }: Route.LoaderArgs) {
  if (!oidcConfig()) return redirect(signInProblemPath("sso-off"));
  const next = safeNext(new URL(request.url).searchParams.get("next"));
  try {
    const auth = await getAuthenticator();
    await auth.authenticate("oidc", request);
  } catch (e) {
    if (e instanceof Response) {
      // Remember where to return after the provider sends the person back.
      const session = await getSession(request);
      session.set("oidcNext", next);
      e.headers.append("Set-Cookie", await commitSession(session));
      throw e;
    }
    if (!(e instanceof SignInError)) console.error("OIDC start:", e);
    return redirect(signInProblemPath(e instanceof SignInError ? ssoProblem(e) : "sso-start"));
  }
  return redirect("/");
}
