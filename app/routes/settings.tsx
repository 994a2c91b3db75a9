/** Your account: name, password, and links to API tokens and groups. */
import { data, Form, Link } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/settings";
import { requireUser } from "~/auth/current-user.server";
import { assertCsrf } from "~/auth/csrf.server";
import { hashPassword, passwordSchema, PasswordHashingBusy, unlessBusy, verifyPassword } from "~/auth/password.server";
import { clientAddress } from "~/auth/client-address.server";
import { renewSession } from "~/auth/sign-in.server";
import { CsrfInput } from "~/components/CsrfInput";
import { Field, Notice } from "~/auth/ui/AuthCard";
import { getDb } from "../../db/client.server";
import { findUserById, setName, setPasswordHash } from "../../db/access/users.server";
import { listGroupsOfUser } from "../../db/access/groups.server";
import { audit } from "../../db/access/audit.server";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Settings · Saddlebook" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const db = getDb();
  const record = (await findUserById(db, user.id))!;
  const groups = await listGroupsOfUser(db, user.id);
  return {
    profile: { name: record.name, email: record.email, role: record.role, sso: !!record.oidcSubject, hasPassword: !!record.passwordHash },
    groups: groups.map((g) => ({ slug: g.slug, name: g.name, groupRole: g.groupRole })),
  };
}

const passwordChange = z
  .object({ current: z.string(), password: passwordSchema, confirm: z.string() })
  .refine((v) => v.password === v.confirm, { path: ["confirm"], message: "The two passwords differ." });

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request);
  const form = await request.formData();
  await assertCsrf(request, form);
  const db = getDb();
  const intent = form.get("intent");
  if (intent === "profile") {
    const name = z.string().trim().min(1, "Enter your name.").max(200, "Use at most 200 characters.").safeParse(form.get("name") ?? "");
    if (!name.success) return data({ intent, fields: { name: name.error.issues[0].message }, ok: null as string | null }, { status: 400 });
    await setName(db, user.id, name.data);
    return { intent, fields: {} as Record<string, string>, ok: "Your name is saved." };
  }
  if (intent === "password") {
    const parsed = passwordChange.safeParse({ current: form.get("current") ?? "", password: form.get("password") ?? "", confirm: form.get("confirm") ?? "" });
    if (!parsed.success) {
      const fields: Record<string, string> = {};
      for (const i of parsed.error.issues) fields[String(i.path[0])] ??= i.message;
      return data({ intent, fields, ok: null }, { status: 400 });
    }
    const record = await findUserById(db, user.id);
    const current = record?.passwordHash ? await unlessBusy(verifyPassword(parsed.data.current, record.passwordHash)) : true;
    if (current instanceof PasswordHashingBusy) return data({ intent, fields: { current: current.message }, ok: null }, current.init);
    if (!current) return data({ intent, fields: { current: "This is not your current password." }, ok: null }, { status: 400 });
    const hash = await unlessBusy(hashPassword(parsed.data.password));
    if (hash instanceof PasswordHashingBusy) return data({ intent, fields: { password: hash.message }, ok: null }, hash.init);
    await setPasswordHash(db, user.id, hash);
    await audit(db, { userId: user.id, action: "password.change", objectType: "user", objectId: user.id, ip: clientAddress(request) });
    // Other sessions end with the change; this one carries on.
    return data(
      { intent, fields: {}, ok: "Your password is changed. Other browsers signed in to your account are signed out." },
      { headers: { "Set-Cookie": await renewSession(request, user.id) } },
    );
  }
  return data({ intent, fields: {}, ok: null }, { status: 400 });
}

export default function Settings({ loaderData, actionData }: Route.ComponentProps) {
  const p = loaderData.profile;
  const f: Record<string, string | undefined> = actionData?.fields ?? {};
  return (
    <div className="mx-auto max-w-3xl space-y-6">
      <div>
        <h1 className="text-2xl font-semibold tracking-tight">Settings</h1>
        <p className="text-sm text-ink-600">
          {p.email} · role <strong>{p.role}</strong>
          {p.sso && " · signs in through single sign-on"}
        </p>
        <nav className="mt-3 flex gap-2 text-sm">
          <Link className="btn-quiet" to="/settings/tokens">
            API tokens
          </Link>
          <Link className="btn-quiet" to="/groups">
            Groups
          </Link>
        </nav>
      </div>
      <section className="panel">
        <h2 className="font-semibold">Profile</h2>
        {actionData?.intent === "profile" && actionData.ok && <Notice tone="ok">{actionData.ok}</Notice>}
        <Form method="post" className="mt-3 max-w-md">
          <CsrfInput />
          <Field label="Name" name="name" defaultValue={p.name} error={actionData?.intent === "profile" ? f.name : undefined} required />
          <button className="btn-primary" name="intent" value="profile" type="submit">
            Save name
          </button>
        </Form>
      </section>
      <section className="panel">
        <h2 className="font-semibold">{p.hasPassword ? "Change password" : "Set a password"}</h2>
        <p className="text-sm text-ink-600">For signing in with e-mail and password where single sign-on is not available.</p>
        {actionData?.intent === "password" && actionData.ok && <Notice tone="ok">{actionData.ok}</Notice>}
        <Form method="post" className="mt-3 max-w-md" noValidate>
          <CsrfInput />
          {p.hasPassword && (
            <Field label="Current password" name="current" type="password" autoComplete="current-password" error={actionData?.intent === "password" ? f.current : undefined} />
          )}
          <Field label="New password" name="password" type="password" autoComplete="new-password" error={actionData?.intent === "password" ? f.password : undefined} hint="At least 10 characters." />
          <Field label="New password again" name="confirm" type="password" autoComplete="new-password" error={actionData?.intent === "password" ? f.confirm : undefined} />
          <button className="btn-primary" name="intent" value="password" type="submit">
            Save password
          </button>
        </Form>
      </section>
      <section className="panel">
        <h2 className="font-semibold">Your groups</h2>
        {loaderData.groups.length === 0 ? (
          <p className="text-sm text-ink-600">You belong to no group yet; a group admin can invite you.</p>
        ) : (
          <ul className="mt-2 text-sm">
            {loaderData.groups.map((g) => (
              <li key={g.slug}>
                <Link className="text-copper-700 hover:underline" to={`/groups/${g.slug}`}>
                  {g.name}
                </Link>{" "}
                <span className="text-ink-500">({g.groupRole === "admin" ? "group admin" : "member"})</span>
              </li>
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}
