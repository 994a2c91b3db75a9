/** Ask for a password-reset link; the answer is the same whether or not the address has an account. */
import { data, Form } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/forgot-password";
import { assertCsrf } from "~/auth/csrf.server";
import { sendResetLink } from "~/auth/links.server";
import { clientAddress } from "~/auth/client-address.server";
import { CsrfInput } from "~/components/CsrfInput";
import { AuthCard, Field, Notice } from "~/auth/ui/AuthCard";
import { MailProblem } from "~/mail/transport.server";
import { getDb } from "../../db/client.server";
import { findUserByEmail } from "../../db/access/users.server";
import { audit } from "../../db/access/audit.server";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Forgot password · Saddlebook" }];
}

export async function action({ request }: Route.ActionArgs) {
  const form = await request.formData();
  await assertCsrf(request, form);
  const email = String(form.get("email") ?? "");
  const parsed = z.string().trim().toLowerCase().email().max(254).safeParse(email);
  if (!parsed.success) return data({ sent: false, email, error: "Enter a valid e-mail address." }, { status: 400 });
  const db = getDb();
  const user = await findUserByEmail(db, parsed.data);
  if (user && !user.disabled) {
    try {
      const sent = await sendResetLink(db, request, user);
      await audit(db, { userId: user.id, action: "password.reset-requested", objectType: "user", objectId: user.id, detail: { sent }, ip: clientAddress(request) });
    } catch (e) {
      if (e instanceof MailProblem) return data({ sent: false, email, error: e.message }, { status: 503 });
      throw e;
    }
  }
  return { sent: true, email, error: null as string | null };
}

export default function ForgotPassword({ actionData }: Route.ComponentProps) {
  return (
    <AuthCard title="Forgot your password?" lead="We send a link to choose a new one. It works once, within an hour.">
      {actionData?.sent && <Notice tone="ok">If {actionData.email} has a Saddlebook account, the link is on its way. Check your inbox.</Notice>}
      <Form method="post" noValidate>
        <CsrfInput />
        <Field label="E-mail" name="email" type="email" autoComplete="email" defaultValue={actionData?.email} error={actionData?.error ?? undefined} required />
        <button className="btn-primary" type="submit">
          Send the link
        </button>
      </Form>
    </AuthCard>
  );
}
