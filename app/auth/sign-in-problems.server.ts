/**
 * Why a sign-in through the provider did not complete, as the short codes the sign-on routes
 * put in `/sign-in?error=<code>`. The sign-in page shows the sentence of a known code and
 * nothing for anything else, so a link can never make the page say words of its own.
 */
import { OAuth2RequestError } from "remix-auth-oauth2";
import { SignInError } from "./authenticator.server";
import { IdTokenProblem } from "./oidc.server";

export const SIGN_IN_PROBLEMS = {
  "sso-off": "Single sign-on is not configured on this server; sign in with e-mail and password.",
  "sso-unavailable": "The single sign-on provider is not answering; try again, or sign in with e-mail and password.",
  "sso-start": "Single sign-on could not start; try again.",
  "sso-expired": "The sign-in took too long or was started in another window; start again.",
  "sso-refused": "The sign-in provider refused the sign-in; try again, or ask your administrator.",
  "sso-token": "The sign-in provider's answer did not pass Saddlebook's checks (signature, issuer, audience, expiry, nonce, subject or e-mail address); start again, or ask your administrator.",
  "sso-unconfirmed": "The sign-in provider has not confirmed this e-mail address, so it cannot be linked to the existing account.",
  "sso-other-subject": "This account is linked to a different single sign-on identity; sign in with that one, or with e-mail and password.",
  "sso-failed": "Single sign-on did not complete; try again.",
  disabled: "This account is disabled; ask an administrator.",
} as const;

export type SignInProblem = keyof typeof SIGN_IN_PROBLEMS;

/** The sentence for a code from the address, or null for an unknown one. */
export function signInProblemMessage(code: string | null): string | null {
  return code !== null && Object.hasOwn(SIGN_IN_PROBLEMS, code) ? SIGN_IN_PROBLEMS[code as SignInProblem] : null;
}

export function signInProblemPath(code: SignInProblem): string {
  return `/sign-in?error=${code}`;
}

/** The code for an error thrown while single sign-on ran. */
export function ssoProblem(e: unknown): SignInProblem {
  if (e instanceof SignInError) {
    const byCode: Partial<Record<SignInError["code"], SignInProblem>> = {
      disabled: "disabled",
      unavailable: "sso-unavailable",
      "unconfirmed-email": "sso-unconfirmed",
      "other-subject": "sso-other-subject",
      "no-subject": "sso-token",
    };
    return byCode[e.code] ?? "sso-failed";
  }
  if (e instanceof IdTokenProblem) return "sso-token";
  if (e instanceof OAuth2RequestError) return "sso-refused";
  // remix-auth-oauth2's refusals of a missing or foreign state cookie.
  if (e instanceof Error && /state/i.test(e.message)) return "sso-expired";
  return "sso-failed";
}
