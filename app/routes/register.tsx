/** Create an account with e-mail and password; the account works once the address is confirmed. */
import { data, Form, Link, redirect } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/register";
import { assertCsrf } from "~/auth/csrf.server";
import { getOptionalUser } from "~/auth/current-user.server";
import { hashPassword, passwordSchema, PasswordHashingBusy, unlessBusy } from "~/auth/password.server";
import { defaultRole } from "~/auth/authenticator.server";
import { sendVerificationLink } from "~/auth/links.server";
import { clientAddress } from "~/auth/client-address.server";
import { CsrfInput } from "~/components/CsrfInput";
import { AuthCard, Field, Notice } from "~/auth/ui/AuthCard";
import { MailProblem } from "~/mail/transport.server";
import { getDb } from "../../db/client.server";
import { createUser, findUserByEmail } from "../../db/access/users.server";
import { audit } from "../../db/access/audit.server";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Create an account · Saddlebook" }];
}

const schema = z
  .object({
    name: z.string().trim().min(1, "Enter your name.").max(200, "Use at most 200 characters."),
    email: z.string().trim().toLowerCase().email("Enter a valid e-mail address.").max(254),
    password: passwordSchema,
    confirm: z.string(),
  })
  .refine((v) => v.password === v.confirm, { path: ["confirm"], message: "The two passwords differ." });

export async function loader({ request }: Route.LoaderArgs) {
  if (await getOptionalUser(request)) throw redirect("/");
  return null;
}

export async function action({ request }: Route.ActionArgs) {
  const form = await request.formData();
  await assertCsrf(request, form);
  const input = { name: String(form.get("name") ?? ""), email: String(form.get("email") ?? "") };
  const parsed = schema.safeParse({ ...input, password: form.get("password") ?? "", confirm: form.get("confirm") ?? "" });
  if (!parsed.success) {
    const fields: Record<string, string> = {};
    for (const i of parsed.error.issues) fields[String(i.path[0])] ??= i.message;
    return data({ fields, input, error: null as string | null }, { status: 400 });
  }
  const db = getDb();
  if (await findUserByEmail(db, parsed.data.email)) {
    return data(
      { fields: { email: "An account with this address exists already: sign in, or reset its password." }, input, error: null },
      { status: 409 },
    );
  }
  const hash = await unlessBusy(hashPassword(parsed.data.password));
  if (hash instanceof PasswordHashingBusy) return data({ fields: { password: hash.message }, input, error: null }, hash.init);
  try {
    await db.transaction(async (trx) => {
      const id = await createUser(trx, { email: parsed.data.email, name: parsed.data.name, role: defaultRole(), passwordHash: hash });
      await audit(trx, { userId: id, action: "user.register", objectType: "user", objectId: id, detail: { method: "password" }, ip: clientAddress(request) });
      await sendVerificationLink(trx, request, { id, email: parsed.data.email, name: parsed.data.name });
    });
  } catch (e) {
    if (e instanceof MailProblem) return data({ fields: {}, input, error: e.message }, { status: 503 });
    if ((e as { code?: string }).code === "ER_DUP_ENTRY") {
      return data({ fields: { email: "An account with this address exists already: sign in, or reset its password." }, input, error: null }, { status: 409 });
    }
    throw e;
  }
  return redirect("/sign-in?notice=registered");
}

export default function Register({ actionData }: Route.ComponentProps) {
  const f: Record<string, string | undefined> = actionData?.fields ?? {};
  const v = actionData?.input;
  return (
    <AuthCard title="Create a Saddlebook account" lead="For colleagues without single sign-on. We send a link to confirm your address.">
      {actionData?.error && <Notice tone="error">{actionData.error}</Notice>}
      <Form method="post" noValidate>
        <CsrfInput />
        <Field label="Name" name="name" autoComplete="name" defaultValue={v?.name} error={f.name} required />
        <Field label="E-mail" name="email" type="email" autoComplete="email" defaultValue={v?.email} error={f.email} required />
        <Field label="Password" name="password" type="password" autoComplete="new-password" error={f.password} hint="At least 10 characters." required />
        <Field label="Password again" name="confirm" type="password" autoComplete="new-password" error={f.confirm} required />
        <button className="btn-primary" type="submit">
          Create account
        </button>
      </Form>
      <p className="mt-4 text-sm text-ink-600">
        Have an account?{" "}
        <Link className="text-copper-700 hover:underline" to="/sign-in">
          Sign in
        </Link>
        .
      </p>
    </AuthCard>
  );
}
