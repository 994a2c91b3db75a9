/**
 * CSRF protection for every state-changing form post: a per-session token rendered in
 * forms (<CsrfInput/>, from the root loader's `csrf`) and checked by actions.
 * (The sign-in work fills in the session-bound token; the signatures are the contract.)
 */
import { data } from "react-router";

export async function csrfToken(_request: Request): Promise<string> {
  return "";
}

/** Throws 403 when the form's `csrf` field does not match the session's token. */
export async function assertCsrf(request: Request, form: FormData): Promise<void> {
  const expected = await csrfToken(request);
  if (expected && form.get("csrf") !== expected) {
    throw data("The form was out of date; reload the page and try again.", { status: 403 });
  }
}
