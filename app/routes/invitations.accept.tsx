/**
 * /invitations/accept?token=…: join a group through an invitation link. Signed in as the
 * invited address: one click. With no account yet: name and password create one (the
 * link proves the address). The link works once and expires.
 */
import { data, Form, Link, redirect } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/invitations.accept";
import { getOptionalUser } from "~/auth/current-user.server";
import { assertCsrf } from "~/auth/csrf.server";
import { clientAddress } from "~/auth/client-address.server";
import { hashPassword, passwordSchema, PasswordHashingBusy, unlessBusy } from "~/auth/password.server";
import { startSession } from "~/auth/sign-in.server";
import { CsrfInput } from "~/components/CsrfInput";
import { AuthCard, Field, Notice } from "~/auth/ui/AuthCard";
import { getDb } from "../../db/client.server";
import { checkOneTimeToken, consumeOneTimeToken, LINK_PROBLEM } from "../../db/access/tokens.server";
import { addMember, findGroupById, findInvitation, markInvitationAccepted } from "../../db/access/groups.server";
import { createUser, findUserByEmail, markEmailVerified } from "../../db/access/users.server";
import { audit } from "../../db/access/audit.server";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Invitation · Saddlebook" }];
}

async function lookup(token: string) {
  const db = getDb();
  const r = await checkOneTimeToken(db, "invitation", token);
  if (!r.ok) return { problem: LINK_PROBLEM[r.reason] } as const;
  const inv = r.token.invitationId != null ? await findInvitation(db, r.token.invitationId) : null;
  if (!inv || inv.revokedAt) return { problem: "This invitation has been withdrawn. Ask the group admin for a new one." } as const;
  const group = await findGroupById(db, inv.groupId);
  if (!group) return { problem: "The group of this invitation no longer exists." } as const;
  return { inv, group, hasAccount: !!(await findUserByEmail(db, inv.email)) } as const;
}

export async function loader({ request }: Route.LoaderArgs) {
  const url = new URL(request.url);
  const token = url.searchParams.get("token") ?? "";
  const user = await getOptionalUser(request);
  const found = await lookup(token);
  if ("problem" in found) return { token, problem: found.problem, invitation: null, signedInAs: user?.email ?? null, hasAccount: false };
  return {
    token,
    problem: null,
    invitation: { email: found.inv.email, group: found.group.name, invitedBy: found.inv.invitedBy, role: found.inv.role, groupRole: found.inv.groupRole },
    signedInAs: user?.email ?? null,
    hasAccount: found.hasAccount,
    next: url.pathname + url.search,
  };
}

const newAccount = z
  .object({ name: z.string().trim().min(1, "Enter your name.").max(200), password: passwordSchema, confirm: z.string() })
  .refine((v) => v.password === v.confirm, { path: ["confirm"], message: "The two passwords differ." });

export async function action({ request }: Route.ActionArgs) {
  const form = await request.formData();
  await assertCsrf(request, form);
  const token = String(form.get("token") ?? "");
  const ip = clientAddress(request);
  const user = await getOptionalUser(request);
  const found = await lookup(token);
  if ("problem" in found) return data({ error: found.problem, fields: {} as Record<string, string>, name: "" }, { status: 410 });
  const { inv, group } = found;
  const db = getDb();
  if (user) {
    if (user.email !== inv.email) {
      return data({ error: `This invitation is for ${inv.email}; you are signed in as ${user.email}. Sign out and open the link again.`, fields: {}, name: "" }, { status: 403 });
    }
    const problem = await db.transaction(async (trx) => {
      const r = await consumeOneTimeToken(trx, "invitation", token);
      if (!r.ok) return LINK_PROBLEM[r.reason];
      await addMember(trx, group.id, user.id, inv.groupRole);
      await markInvitationAccepted(trx, inv.id, user.id);
      await markEmailVerified(trx, user.id);
      await audit(trx, { userId: user.id, action: "invitation.accept", objectType: "group", objectId: group.id, detail: { invitationId: inv.id }, ip });
      return null;
    });
    if (problem) return data({ error: problem, fields: {}, name: "" }, { status: 410 });
    return redirect(`/groups/${group.slug}`);
  }
  if (found.hasAccount) return data({ error: "An account with this address exists: sign in first, then accept.", fields: {}, name: "" }, { status: 409 });
  const name = String(form.get("name") ?? "");
  const parsed = newAccount.safeParse({ name, password: form.get("password") ?? "", confirm: form.get("confirm") ?? "" });
  if (!parsed.success) {
    const fields: Record<string, string> = {};
    for (const i of parsed.error.issues) fields[String(i.path[0])] ??= i.message;
    return data({ error: null, fields, name }, { status: 400 });
  }
  const hash = await unlessBusy(hashPassword(parsed.data.password));
  if (hash instanceof PasswordHashingBusy) return data({ error: null, fields: { password: hash.message } as Record<string, string>, name }, hash.init);
  const result = await db.transaction(async (trx) => {
    const r = await consumeOneTimeToken(trx, "invitation", token);
    if (!r.ok) return { problem: LINK_PROBLEM[r.reason] };
    const id = await createUser(trx, { email: inv.email, name: parsed.data.name, role: inv.role, passwordHash: hash, verified: true });
    await addMember(trx, group.id, id, inv.groupRole);
    await markInvitationAccepted(trx, inv.id, id);
    await audit(trx, { userId: id, action: "user.register", objectType: "user", objectId: id, detail: { method: "invitation", role: inv.role }, ip });
    await audit(trx, { userId: id, action: "invitation.accept", objectType: "group", objectId: group.id, detail: { invitationId: inv.id }, ip });
    return { id };
  });
  if ("problem" in result) return data({ error: result.problem ?? "", fields: {}, name }, { status: 410 });
  return startSession(request, result.id, "invitation", `/groups/${group.slug}`);
}

export default function AcceptInvitation({ loaderData, actionData }: Route.ComponentProps) {
  const d = loaderData;
  const f: Record<string, string | undefined> = actionData?.fields ?? {};
  if (d.problem || !d.invitation) {
    return (
      <AuthCard title="Invitation">
        <Notice tone="error">{d.problem}</Notice>
      </AuthCard>
    );
  }
  const inv = d.invitation;
  return (
    <AuthCard title={`Join ${inv.group}`} lead={`${inv.invitedBy ?? "A group admin"} invited ${inv.email} as ${inv.groupRole === "admin" ? "group admin" : "member"}.`}>
      {actionData?.error && <Notice tone="error">{actionData.error}</Notice>}
      {d.signedInAs ? (
        <Form method="post">
          <CsrfInput />
          <input type="hidden" name="token" value={d.token} />
          <p className="mb-3 text-sm text-ink-600">Signed in as {d.signedInAs}.</p>
          <button className="btn-primary" type="submit">
            Accept and join
          </button>
        </Form>
      ) : d.hasAccount ? (
        <Link className="btn-primary" to={`/sign-in?next=${encodeURIComponent(d.next ?? "/")}`}>
          Sign in to accept
        </Link>
      ) : (
        <Form method="post" noValidate>
          <CsrfInput />
          <input type="hidden" name="token" value={d.token} />
          <p className="mb-3 text-sm text-ink-600">Create your account for {inv.email} (role: {inv.role}).</p>
          <Field label="Name" name="name" autoComplete="name" defaultValue={actionData?.name} error={f.name} />
          <Field label="Password" name="password" type="password" autoComplete="new-password" error={f.password} hint="At least 10 characters." />
          <Field label="Password again" name="confirm" type="password" autoComplete="new-password" error={f.confirm} />
          <button className="btn-primary" type="submit">
            Create account and join
          </button>
        </Form>
      )}
    </AuthCard>
  );
}
