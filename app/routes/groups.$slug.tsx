/** One group: members with their roles, invitations; group admins invite, change roles, remove. */
import { data, Form, Link } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/groups.$slug";
import { requireUser } from "~/auth/current-user.server";
import { can, ROLES, type Role } from "~/auth/policy.server";
import { assertCsrf } from "~/auth/csrf.server";
import { clientAddress } from "~/auth/client-address.server";
import { inviteToGroup } from "~/auth/invitations.server";
import { CsrfInput } from "~/components/CsrfInput";
import { Notice } from "~/auth/ui/AuthCard";
import { MailProblem } from "~/mail/transport.server";
import { getDb } from "../../db/client.server";
import {
  countGroupAdmins,
  findGroupBySlug,
  listInvitations,
  listMembers,
  membership,
  removeMember,
  revokeInvitation,
  setGroupRole,
} from "../../db/access/groups.server";
import { findUserById, setRole } from "../../db/access/users.server";
import { audit } from "../../db/access/audit.server";

export function meta({ data: d }: Route.MetaArgs): Route.MetaDescriptors {
  return [{ title: `${d?.group.name ?? "Group"} · Saddlebook` }];
}

async function groupFor(request: Request, slug: string) {
  const user = await requireUser(request);
  const group = await findGroupBySlug(getDb(), slug);
  if (!group) throw data("There is no group with this address.", { status: 404 });
  if (!can(user, { do: "group.read", groupId: group.id })) throw data("Only members of this group can see it.", { status: 403 });
  return { user, group };
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const { user, group } = await groupFor(request, params.slug);
  const db = getDb();
  const manage = can(user, { do: "group.manage", groupId: group.id });
  const members = await listMembers(db, group.id);
  return {
    group,
    manage,
    me: user.id,
    members: members.map((m) => ({
      ...m,
      roleOptions: ROLES.filter((to) => to === m.role || can(user, { do: "member.setRole", groupId: group.id, from: m.role, to })),
    })),
    invitations: manage ? await listInvitations(db, group.id) : [],
  };
}

const inviteSchema = z.object({
  email: z.string().trim().toLowerCase().email("Enter a valid e-mail address.").max(254),
  groupRole: z.enum(["member", "admin"], { message: "Choose member or group admin." }),
  role: z.enum(["viewer", "author"], { message: "Choose viewer or author." }),
});

type Result = { ok: string | null; error: string | null; fields?: Record<string, string>; input?: Record<string, string> };

export async function action({ request, params }: Route.ActionArgs) {
  const { user, group } = await groupFor(request, params.slug);
  const form = await request.formData();
  await assertCsrf(request, form);
  const db = getDb();
  const ip = clientAddress(request);
  const intent = String(form.get("intent") ?? "");
  const fail = (status: number, error: string, extra: Partial<Result> = {}) => data<Result>({ ok: null, error, ...extra }, { status });
  if (!can(user, { do: "group.manage", groupId: group.id }) && intent !== "set-role") {
    return fail(403, "Only group admins can change this group.");
  }
  if (intent === "invite") {
    const input = { email: String(form.get("email") ?? ""), groupRole: String(form.get("groupRole") ?? "member"), role: String(form.get("role") ?? "author") };
    const parsed = inviteSchema.safeParse(input);
    if (!parsed.success) {
      const fields: Record<string, string> = {};
      for (const i of parsed.error.issues) fields[String(i.path[0])] ??= i.message;
      return fail(400, "Check the invitation.", { fields, input });
    }
    const existing = (await listMembers(db, group.id)).find((m) => m.email === parsed.data.email);
    if (existing) return fail(409, `${parsed.data.email} is already a member of this group.`, { input });
    try {
      await inviteToGroup(db, request, { group, email: parsed.data.email, groupRole: parsed.data.groupRole, role: parsed.data.role, inviter: user, ip });
    } catch (e) {
      if (e instanceof MailProblem) return fail(503, e.message, { input });
      throw e;
    }
    return data<Result>({ ok: `Invitation sent to ${parsed.data.email}; the link works for 7 days.`, error: null });
  }
  if (intent === "revoke-invitation") {
    const id = Number(form.get("id"));
    if (!(await revokeInvitation(db, group.id, id))) return fail(404, "That invitation is already accepted, revoked or gone.");
    await audit(db, { userId: user.id, action: "invitation.revoke", objectType: "group", objectId: group.id, detail: { invitationId: id }, ip });
    return data<Result>({ ok: "Invitation revoked.", error: null });
  }
  const memberId = Number(form.get("userId"));
  const current = Number.isInteger(memberId) ? await membership(db, group.id, memberId) : null;
  if (!current) return fail(404, "That person is not a member of this group.");
  if (intent === "set-group-role") {
    const to = z.enum(["member", "admin"]).safeParse(form.get("groupRole"));
    if (!to.success) return fail(400, "Choose member or group admin.");
    if (current === "admin" && to.data === "member" && (await countGroupAdmins(db, group.id)) <= 1) {
      return fail(409, "A group needs at least one group admin: make someone else group admin first.");
    }
    await db.transaction(async (trx) => {
      await setGroupRole(trx, group.id, memberId, to.data);
      await audit(trx, { userId: user.id, action: "role.change", objectType: "user", objectId: memberId, detail: { groupId: group.id, groupRole: { from: current, to: to.data } }, ip });
    });
    return data<Result>({ ok: "Group role changed.", error: null });
  }
  if (intent === "set-role") {
    const to = z.enum(ROLES as unknown as [Role, ...Role[]]).safeParse(form.get("role"));
    if (!to.success) return fail(400, "Choose viewer, author, curator or admin.");
    const target = await findUserById(db, memberId);
    if (!target) return fail(404, "That person no longer has an account.");
    if (!can(user, { do: "member.setRole", groupId: group.id, from: target.role, to: to.data })) {
      return fail(403, "Site-wide roles (viewer, author, curator, admin) are changed by a site admin only; a group admin manages group roles.");
    }
    if (target.role === to.data) return data<Result>({ ok: "No change.", error: null });
    await db.transaction(async (trx) => {
      await setRole(trx, memberId, to.data);
      await audit(trx, { userId: user.id, action: "role.change", objectType: "user", objectId: memberId, detail: { groupId: group.id, role: { from: target.role, to: to.data } }, ip });
    });
    return data<Result>({ ok: `Role changed to ${to.data}.`, error: null });
  }
  if (intent === "remove") {
    if (current === "admin" && (await countGroupAdmins(db, group.id)) <= 1) {
      return fail(409, "This is the group's only group admin: make someone else group admin first.");
    }
    await db.transaction(async (trx) => {
      await removeMember(trx, group.id, memberId);
      await audit(trx, { userId: user.id, action: "member.remove", objectType: "user", objectId: memberId, detail: { groupId: group.id }, ip });
    });
    return data<Result>({ ok: "Removed from the group.", error: null });
  }
  return fail(400, "Unknown request.");
}

export default function GroupPage({ loaderData, actionData }: Route.ComponentProps) {
  const { group, manage, members, invitations } = loaderData;
  const now = Date.now();
  return (
    <div className="mx-auto max-w-5xl space-y-6">
      <div>
        <Link className="text-sm text-copper-700 hover:underline" to="/groups">
          ← Groups
        </Link>
        <h1 className="text-2xl font-semibold tracking-tight">{group.name}</h1>
        {group.description && <p className="text-sm text-ink-600">{group.description}</p>}
      </div>
      {actionData?.ok && <Notice tone="ok">{actionData.ok}</Notice>}
      {actionData?.error && <Notice tone="error">{actionData.error}</Notice>}
      <section className="panel overflow-x-auto">
        <h2 className="font-semibold">Members</h2>
        <table className="mt-2 w-full text-sm">
          <thead className="text-left text-xs text-ink-500">
            <tr>
              <th className="py-1">Name</th>
              <th>E-mail</th>
              <th>Role</th>
              <th>In this group</th>
              {manage && <th />}
            </tr>
          </thead>
          <tbody>
            {members.map((m) => (
              <tr key={m.userId} className="border-t border-ink-100" data-member={m.email}>
                <td className="py-1.5">{m.name}</td>
                <td className="num">{m.email}</td>
                <td>
                  {m.roleOptions.length > 1 ? (
                    <Form method="post" className="flex gap-1">
                      <CsrfInput />
                      <input type="hidden" name="userId" value={m.userId} />
                      <select name="role" defaultValue={m.role} className="field w-28 py-0.5" aria-label={`Role of ${m.name}`}>
                        {m.roleOptions.map((r) => (
                          <option key={r}>{r}</option>
                        ))}
                      </select>
                      <button className="btn-quiet py-0.5" name="intent" value="set-role" type="submit">
                        Set
                      </button>
                    </Form>
                  ) : (
                    m.role
                  )}
                </td>
                <td>
                  {manage ? (
                    <Form method="post" className="flex gap-1">
                      <CsrfInput />
                      <input type="hidden" name="userId" value={m.userId} />
                      <select name="groupRole" defaultValue={m.groupRole} className="field w-32 py-0.5" aria-label={`Group role of ${m.name}`}>
                        <option value="member">member</option>
                        <option value="admin">group admin</option>
                      </select>
                      <button className="btn-quiet py-0.5" name="intent" value="set-group-role" type="submit">
                        Set
                      </button>
                    </Form>
                  ) : m.groupRole === "admin" ? (
                    "group admin"
                  ) : (
                    "member"
                  )}
                </td>
                {manage && (
                  <td className="text-right">
                    <Form method="post">
                      <CsrfInput />
                      <input type="hidden" name="userId" value={m.userId} />
                      <button className="btn-quiet py-0.5 text-brick-700" name="intent" value="remove" type="submit" aria-label={`Remove ${m.name}`}>
                        Remove
                      </button>
                    </Form>
                  </td>
                )}
              </tr>
            ))}
          </tbody>
        </table>
      </section>
      {manage && (
        <section className="panel">
          <h2 className="font-semibold">Invite a colleague</h2>
          <p className="text-sm text-ink-600">They get an e-mail with a link that works once, for 7 days. Without an account yet, they create one from the link.</p>
          <Form method="post" className="mt-3 flex flex-wrap items-end gap-2" noValidate>
            <CsrfInput />
            <div className="min-w-64 flex-1">
              <label className="label" htmlFor="inv-email">
                E-mail
              </label>
              <input
                id="inv-email"
                name="email"
                type="email"
                defaultValue={actionData?.input?.email}
                className={`field ${actionData?.fields?.email ? "field-error" : ""}`}
              />
              {actionData?.fields?.email && <p className="mt-1 text-xs text-brick-700">{actionData.fields.email}</p>}
            </div>
            <div>
              <label className="label" htmlFor="inv-role">
                Role for a new account
              </label>
              <select id="inv-role" name="role" className="field" defaultValue={actionData?.input?.role ?? "author"}>
                <option value="author">author</option>
                <option value="viewer">viewer</option>
              </select>
            </div>
            <div>
              <label className="label" htmlFor="inv-grole">
                In this group
              </label>
              <select id="inv-grole" name="groupRole" className="field" defaultValue={actionData?.input?.groupRole ?? "member"}>
                <option value="member">member</option>
                <option value="admin">group admin</option>
              </select>
            </div>
            <button className="btn-primary" name="intent" value="invite" type="submit">
              Send invitation
            </button>
          </Form>
          {invitations.length > 0 && (
            <table className="mt-4 w-full text-sm">
              <thead className="text-left text-xs text-ink-500">
                <tr>
                  <th className="py-1">Invited</th>
                  <th>By</th>
                  <th>State</th>
                  <th />
                </tr>
              </thead>
              <tbody>
                {invitations.map((i) => {
                  const expired = new Date(i.expiresAt).getTime() < now;
                  const state = i.acceptedAt ? "accepted" : i.revokedAt ? "revoked" : expired ? "expired" : `open until ${i.expiresAt.slice(0, 10)}`;
                  return (
                    <tr key={i.id} className="border-t border-ink-100">
                      <td className="num py-1.5">{i.email}</td>
                      <td>{i.invitedBy ?? "—"}</td>
                      <td>{state}</td>
                      <td className="text-right">
                        {!i.acceptedAt && !i.revokedAt && !expired && (
                          <Form method="post">
                            <CsrfInput />
                            <input type="hidden" name="id" value={i.id} />
                            <button className="btn-quiet py-0.5" name="intent" value="revoke-invitation" type="submit">
                              Revoke
                            </button>
                          </Form>
                        )}
                      </td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          )}
        </section>
      )}
    </div>
  );
}
