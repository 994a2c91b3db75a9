/** Sign-in: single sign-on through the organisation's provider, or e-mail and password. */
import { data, Form, Link, redirect, useNavigation } from "react-router";
import type { Route } from "./+types/sign-in";
import { getOptionalUser } from "~/auth/current-user.server";
import { assertCsrf } from "~/auth/csrf.server";
import { getAuthenticator, SignInError } from "~/auth/authenticator.server";
import { oidcConfig, oidcProviderName } from "~/auth/oidc.server";
import { safeNext, startSession } from "~/auth/sign-in.server";
import { signInProblemMessage } from "~/auth/sign-in-problems.server";
import { sendVerificationLink } from "~/auth/links.server";
import { CsrfInput } from "~/components/CsrfInput";
import { AuthCard, Field, Notice } from "~/auth/ui/AuthCard";
import { getDb } from "../../db/client.server";
import { findUserByEmail } from "../../db/access/users.server";
import { MailProblem } from "~/mail/transport.server";
import { mailboxEnabled } from "~/mail/mailbox.server";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Sign in · Saddlebook" }];
}

const NOTICES: Record<string, string> = {
  "signed-out": "You are signed out.",
  verified: "Your e-mail address is confirmed. Sign in to continue.",
  "password-reset": "Your password has been changed. Sign in with the new one.",
  registered: "Check your inbox: we sent a link to confirm your e-mail address.",
};

export async function loader({ request }: Route.LoaderArgs) {
  const url = new URL(request.url);
  const next = safeNext(url.searchParams.get("next"));
  if (await getOptionalUser(request)) throw redirect(next);
  return {
    next,
    sso: oidcConfig() ? oidcProviderName() : null,
    notice: NOTICES[url.searchParams.get("notice") ?? ""] ?? null,
    // Only the sentence of a known code: the address cannot put words of its own on the page.
    error: signInProblemMessage(url.searchParams.get("error")),
    mailbox: mailboxEnabled(),
  };
}

export async function action({ request }: Route.ActionArgs) {
  const form = await request.clone().formData();
  await assertCsrf(request, form);
  const next = safeNext(form.get("next"));
  const email = String(form.get("email") ?? "").slice(0, 254);
  if (form.get("intent") === "resend") {
    const db = getDb();
    const user = await findUserByEmail(db, email);
    try {
      if (user && !user.emailVerifiedAt) await sendVerificationLink(db, request, user);
    } catch (e) {
      if (e instanceof MailProblem) return data({ error: e.message, email, resent: false, code: "" }, { status: 503 });
      throw e;
    }
    // The same answer whether or not the address has an account.
    return { error: null, email, resent: true, code: "" };
  }
  try {
    const auth = await getAuthenticator();
    const result = await auth.authenticate("password", request);
    return await startSession(request, result.userId, result.method, next);
  } catch (e) {
    if (e instanceof SignInError) {
      const status = e.code === "limited" ? 429 : e.code === "busy" ? 503 : 400;
      const headers: Record<string, string> = e.retryAfterSeconds ? { "Retry-After": String(e.retryAfterSeconds) } : {};
      return data({ error: e.message, email, resent: false, code: e.code }, { status, headers });
    }
    throw e;
  }
}

export default function SignIn({ loaderData, actionData }: Route.ComponentProps) {
  const nav = useNavigation();
  const busy = nav.state === "submitting";
  const email = actionData?.email ?? "";
  return (
    <AuthCard title="Sign in to Saddlebook" lead="Your group's steps, mechanisms and runs.">
      {loaderData.notice && <Notice tone="ok">{loaderData.notice}</Notice>}
      {loaderData.mailbox && (
        <p className="mb-3 text-xs text-ink-500">Local stand-in: mail is caught on this machine, not delivered; an admin reads it in the mailbox.</p>
      )}
      {loaderData.error && <Notice tone="error">{loaderData.error}</Notice>}
      {loaderData.sso && (
        <>
          <a className="btn-primary w-full justify-center" href={`/auth/oidc?next=${encodeURIComponent(loaderData.next)}`}>
            Sign in with {loaderData.sso}
          </a>
          <div className="my-4 flex items-center gap-2 text-xs text-ink-500">
            <span className="h-px flex-1 bg-ink-200" /> or with e-mail and password <span className="h-px flex-1 bg-ink-200" />
          </div>
        </>
      )}
      {actionData?.error && <Notice tone="error">{actionData.error}</Notice>}
      {actionData?.resent && <Notice tone="ok">If that address has an unconfirmed account, a new confirmation link is on its way.</Notice>}
      <Form method="post" aria-label="Sign in with e-mail and password">
        <CsrfInput />
        <input type="hidden" name="next" value={loaderData.next} />
        <Field label="E-mail" name="email" type="email" autoComplete="username" defaultValue={email} required />
        <Field label="Password" name="password" type="password" autoComplete="current-password" required />
        <div className="flex items-center justify-between">
          <button className="btn-primary" type="submit" name="intent" value="password" disabled={busy}>
            {busy ? "Signing in…" : "Sign in"}
          </button>
          <Link className="text-sm text-copper-700 hover:underline" to="/forgot-password">
            Forgot your password?
          </Link>
        </div>
        {actionData?.code === "unverified" && (
          <button className="btn-quiet mt-3" type="submit" name="intent" value="resend" formNoValidate>
            Send the confirmation link again
          </button>
        )}
      </Form>
      <p className="mt-4 text-sm text-ink-600">
        No account and no single sign-on?{" "}
        <Link className="text-copper-700 hover:underline" to="/register">
          Create one
        </Link>
        .
      </p>
    </AuthCard>
  );
}
