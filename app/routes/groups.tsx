/** Groups you belong to (admins see and create all groups). */
import { data, Form, Link, redirect } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/groups";
import { requireUser } from "~/auth/current-user.server";
import { can } from "~/auth/policy.server";
import { assertCsrf } from "~/auth/csrf.server";
import { clientAddress } from "~/auth/client-address.server";
import { requireCan } from "~/auth/guard.server";
import { CsrfInput } from "~/components/CsrfInput";
import { Field } from "~/auth/ui/AuthCard";
import { getDb } from "../../db/client.server";
import { addMember, createGroup, findGroupBySlug, listGroups, listGroupsOfUser } from "../../db/access/groups.server";
import { audit } from "../../db/access/audit.server";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Groups · Saddlebook" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const db = getDb();
  const mine = await listGroupsOfUser(db, user.id);
  const canCreate = can(user, { do: "group.create" });
  const all = canCreate ? await listGroups(db) : [];
  const mineIds = new Set(mine.map((g) => g.id));
  return {
    mine,
    others: all.filter((g) => !mineIds.has(g.id)),
    canCreate,
  };
}

const schema = z.object({
  name: z.string().trim().min(2, "Give the group a name.").max(200),
  slug: z
    .string()
    .trim()
    .toLowerCase()
    .regex(/^[a-z0-9][a-z0-9-]{1,78}$/, "Use 2–79 lower-case letters, digits and hyphens."),
});

export async function action({ request }: Route.ActionArgs) {
  const user = await requireCan(request, { do: "group.create" });
  const form = await request.formData();
  await assertCsrf(request, form);
  const input = { name: String(form.get("name") ?? ""), slug: String(form.get("slug") ?? "") };
  const parsed = schema.safeParse(input);
  if (!parsed.success) {
    const fields: Record<string, string> = {};
    for (const i of parsed.error.issues) fields[String(i.path[0])] ??= i.message;
    return data({ fields, input }, { status: 400 });
  }
  const db = getDb();
  if (await findGroupBySlug(db, parsed.data.slug)) return data({ fields: { slug: "A group with this short name exists already." } as Record<string, string>, input }, { status: 409 });
  await db.transaction(async (trx) => {
    const id = await createGroup(trx, parsed.data);
    await addMember(trx, id, user.id, "admin");
    await audit(trx, { userId: user.id, action: "group.create", objectType: "group", objectId: id, detail: parsed.data, ip: clientAddress(request) });
  });
  return redirect(`/groups/${parsed.data.slug}`);
}

export default function Groups({ loaderData, actionData }: Route.ComponentProps) {
  const row = (g: { slug: string; name: string; memberCount: number; groupRole?: string }) => (
    <li key={g.slug} className="flex items-center justify-between border-t border-ink-100 py-2">
      <Link className="text-copper-700 hover:underline" to={`/groups/${g.slug}`}>
        {g.name}
      </Link>
      <span className="text-sm text-ink-500">
        {g.memberCount} member{g.memberCount === 1 ? "" : "s"}
        {g.groupRole ? ` · you: ${g.groupRole === "admin" ? "group admin" : "member"}` : ""}
      </span>
    </li>
  );
  return (
    <div className="mx-auto max-w-3xl space-y-6">
      <h1 className="text-2xl font-semibold tracking-tight">Groups</h1>
      <section className="panel">
        <h2 className="font-semibold">Your groups</h2>
        {loaderData.mine.length === 0 ? <p className="text-sm text-ink-600">None yet: a group admin can invite you.</p> : <ul className="mt-2">{loaderData.mine.map(row)}</ul>}
      </section>
      {loaderData.canCreate && (
        <>
          {loaderData.others.length > 0 && (
            <section className="panel">
              <h2 className="font-semibold">Other groups</h2>
              <ul className="mt-2">{loaderData.others.map(row)}</ul>
            </section>
          )}
          <section className="panel">
            <h2 className="font-semibold">New group</h2>
            <Form method="post" className="mt-3 max-w-md" noValidate>
              <CsrfInput />
              <Field label="Name" name="name" defaultValue={actionData?.input.name} error={actionData?.fields.name} />
              <Field label="Short name (in addresses)" name="slug" defaultValue={actionData?.input.slug} error={actionData?.fields.slug} hint="e.g. hydroformylation-team" />
              <button className="btn-primary" type="submit">
                Create group
              </button>
            </Form>
          </section>
        </>
      )}
    </div>
  );
}
