/** Choose a new password through a one-time link (GET shows the form, POST uses the link). */
import { data, Form, Link, redirect } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/reset-password";
import { assertCsrf } from "~/auth/csrf.server";
import { hashPassword, passwordSchema, PasswordHashingBusy, unlessBusy } from "~/auth/password.server";
import { clientAddress } from "~/auth/client-address.server";
import { CsrfInput } from "~/components/CsrfInput";
import { AuthCard, Field, Notice } from "~/auth/ui/AuthCard";
import { getDb } from "../../db/client.server";
import { checkOneTimeToken, consumeOneTimeToken, LINK_PROBLEM } from "../../db/access/tokens.server";
import { markEmailVerified, setPasswordHash } from "../../db/access/users.server";
import { audit } from "../../db/access/audit.server";

export function meta(): Route.MetaDescriptors {
  return [{ title: "New password · Saddlebook" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  const token = new URL(request.url).searchParams.get("token") ?? "";
  const r = await checkOneTimeToken(getDb(), "reset-password", token);
  return { token, problem: r.ok ? null : LINK_PROBLEM[r.reason] };
}

const schema = z
  .object({ password: passwordSchema, confirm: z.string() })
  .refine((v) => v.password === v.confirm, { path: ["confirm"], message: "The two passwords differ." });

export async function action({ request }: Route.ActionArgs) {
  const form = await request.formData();
  await assertCsrf(request, form);
  const token = String(form.get("token") ?? "");
  const parsed = schema.safeParse({ password: form.get("password") ?? "", confirm: form.get("confirm") ?? "" });
  if (!parsed.success) {
    const fields: Record<string, string> = {};
    for (const i of parsed.error.issues) fields[String(i.path[0])] ??= i.message;
    return data({ fields, problem: null as string | null }, { status: 400 });
  }
  const hash = await unlessBusy(hashPassword(parsed.data.password));
  // The link is not used up: the same form can be sent again in a moment.
  if (hash instanceof PasswordHashingBusy) return data({ fields: { password: hash.message } as Record<string, string>, problem: null }, hash.init);
  const result = await getDb().transaction(async (trx) => {
    const r = await consumeOneTimeToken(trx, "reset-password", token);
    if (!r.ok || r.token.userId == null) return LINK_PROBLEM[r.ok ? "unknown" : r.reason];
    await setPasswordHash(trx, r.token.userId, hash);
    // Whoever holds the mailbox has shown it: the address counts as confirmed.
    await markEmailVerified(trx, r.token.userId);
    await audit(trx, { userId: r.token.userId, action: "password.reset", objectType: "user", objectId: r.token.userId, ip: clientAddress(request) });
    return null;
  });
  if (result) return data({ fields: {} as Record<string, string>, problem: result }, { status: 410 });
  return redirect("/sign-in?notice=password-reset");
}

export default function ResetPassword({ loaderData, actionData }: Route.ComponentProps) {
  const problem = actionData?.problem ?? loaderData.problem;
  const f: Record<string, string | undefined> = actionData?.fields ?? {};
  return (
    <AuthCard title="Choose a new password">
      {problem ? (
        <>
          <Notice tone="error">{problem}</Notice>
          <Link className="btn-quiet" to="/forgot-password">
            Ask for a new link
          </Link>
        </>
      ) : (
        <Form method="post" noValidate>
          <CsrfInput />
          <input type="hidden" name="token" value={loaderData.token} />
          <Field label="New password" name="password" type="password" autoComplete="new-password" error={f.password} hint="At least 10 characters." required />
          <Field label="New password again" name="confirm" type="password" autoComplete="new-password" error={f.confirm} required />
          <button className="btn-primary" type="submit">
            Set password
          </button>
        </Form>
      )}
    </AuthCard>
  );
}
