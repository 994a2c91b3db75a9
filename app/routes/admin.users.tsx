/** Admin: every user in a sortable, filterable table; change global roles; disable and re-enable accounts; recent sign-in and role events. */
import { useMemo, useState } from "react";
import { data, Form, Link } from "react-router";
import {
  createColumnHelper,
  flexRender,
  getCoreRowModel,
  getFilteredRowModel,
  getSortedRowModel,
  useReactTable,
  type SortingState,
} from "@tanstack/react-table";
import { z } from "zod";
import type { Route } from "./+types/admin.users";
import { requireCan } from "~/auth/guard.server";
import { ROLES, type Role } from "~/auth/policy.server";
import { assertCsrf } from "~/auth/csrf.server";
import { clientAddress } from "~/auth/client-address.server";
import { CsrfInput } from "~/components/CsrfInput";
import { Notice } from "~/auth/ui/AuthCard";
import { getDb } from "../../db/client.server";
import { findUserById, listUsers, setDisabled, setRole } from "../../db/access/users.server";
import type { UserListRow } from "../../db/access/users.server";
import { audit, listAudit } from "../../db/access/audit.server";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Users · Saddlebook" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  const me = await requireCan(request, { do: "user.manage" }, "Only admins manage users.");
  const db = getDb();
  const events = await listAudit(db, {
    limit: 50,
    prefixes: ["sign-in.", "sign-out", "user.", "password.", "role.", "invitation.", "member.", "group.", "token."],
  });
  return {
    me: me.id,
    users: await listUsers(db),
    roles: [...ROLES],
    events: events.map((e) => ({ ...e, createdAt: e.createdAt.toISOString() })),
  };
}

type Outcome = { ok: string | null; error: string | null };
const refuse = (status: number, error: string) => data<Outcome>({ ok: null, error }, { status });

export async function action({ request }: Route.ActionArgs) {
  const me = await requireCan(request, { do: "user.manage" }, "Only admins manage users.");
  const form = await request.formData();
  await assertCsrf(request, form);
  const db = getDb();
  const userId = Number(form.get("userId"));
  const target = Number.isInteger(userId) && userId > 0 ? await findUserById(db, userId) : null;
  const intent = String(form.get("intent") ?? "role");
  if (intent === "disable" || intent === "enable") {
    if (!target) return refuse(404, "There is no such user.");
    const disable = intent === "disable";
    if (disable && target.id === me.id) return refuse(409, "You cannot disable your own account; ask another admin.");
    const changed = await db.transaction(async (trx) => {
      if (!(await setDisabled(trx, target.id, disable))) return false;
      await audit(trx, { userId: me.id, action: disable ? "user.disable" : "user.enable", objectType: "user", objectId: target.id, detail: { email: target.email }, ip: clientAddress(request) });
      return true;
    });
    if (!changed) return { ok: `${target.email} is already ${disable ? "disabled" : "enabled"}.`, error: null } satisfies Outcome;
    return {
      ok: disable ? `${target.email} is disabled: signed out everywhere, their API tokens refused, and they cannot sign in.` : `${target.email} is enabled again and can sign in.`,
      error: null,
    } satisfies Outcome;
  }
  if (intent !== "role") return refuse(400, "Unknown request.");
  const role = z.enum(ROLES as unknown as [Role, ...Role[]]).safeParse(form.get("role"));
  if (!role.success) return refuse(400, "Choose viewer, author, curator or admin.");
  if (!target) return refuse(404, "There is no such user.");
  if (target.id === me.id && role.data !== "admin") return refuse(409, "You cannot take away your own admin role; ask another admin.");
  if (target.role === role.data) return { ok: `${target.email} is already ${role.data}.`, error: null } satisfies Outcome;
  await db.transaction(async (trx) => {
    await setRole(trx, target.id, role.data);
    await audit(trx, { userId: me.id, action: "role.change", objectType: "user", objectId: target.id, detail: { role: { from: target.role, to: role.data } }, ip: clientAddress(request) });
  });
  return { ok: `${target.email} is now ${role.data}.`, error: null } satisfies Outcome;
}

const col = createColumnHelper<UserListRow>();

/** The account's state, with the button that disables or re-enables it (not for one's own account). */
function StateCell({ row, me }: { row: UserListRow; me: number }) {
  const state = row.disabled ? "disabled" : row.verified ? "confirmed" : "unconfirmed";
  return (
    <Form method="post" className="flex items-center gap-2">
      <CsrfInput />
      <input type="hidden" name="userId" value={row.id} />
      <span className={row.disabled ? "text-brick-700" : undefined}>{state}</span>
      {row.id !== me && (
        <button className="btn-quiet py-0.5" name="intent" value={row.disabled ? "enable" : "disable"} type="submit" aria-label={`${row.disabled ? "Enable" : "Disable"} ${row.email}`}>
          {row.disabled ? "Enable" : "Disable"}
        </button>
      )}
    </Form>
  );
}

function RoleCell({ row, roles }: { row: UserListRow; roles: string[] }) {
  return (
    <Form method="post" className="flex gap-1">
      <CsrfInput />
      <input type="hidden" name="intent" value="role" />
      <input type="hidden" name="userId" value={row.id} />
      <select name="role" defaultValue={row.role} className="field w-28 py-0.5" aria-label={`Role of ${row.email}`}>
        {roles.map((r) => (
          <option key={r}>{r}</option>
        ))}
      </select>
      <button className="btn-quiet py-0.5" type="submit">
        Set
      </button>
    </Form>
  );
}

export default function AdminUsers({ loaderData, actionData }: Route.ComponentProps) {
  const [sorting, setSorting] = useState<SortingState>([{ id: "email", desc: false }]);
  const [filter, setFilter] = useState("");
  const [roleFilter, setRoleFilter] = useState("");
  const rows = useMemo(() => loaderData.users.filter((u) => !roleFilter || u.role === roleFilter), [loaderData.users, roleFilter]);
  const columns = useMemo(
    () => [
      col.accessor("name", { header: "Name" }),
      col.accessor("email", { header: "E-mail", cell: (c) => <span className="num">{c.getValue()}</span> }),
      col.accessor("role", { header: "Role", cell: (c) => <RoleCell row={c.row.original} roles={loaderData.roles} /> }),
      col.accessor((u) => u.groups.join(", "), { id: "groups", header: "Groups" }),
      col.accessor((u) => (u.disabled ? "disabled" : u.verified ? "confirmed" : "unconfirmed"), { id: "state", header: "State", cell: (c) => <StateCell row={c.row.original} me={loaderData.me} /> }),
      col.accessor((u) => (u.sso ? "single sign-on" : "password"), { id: "signin", header: "Signs in with" }),
      col.accessor("lastSignInAt", {
        header: "Last sign-in",
        sortUndefined: "last",
        cell: (c) => <span className="num">{c.getValue() ? c.getValue()!.replace("T", " ").slice(0, 16) : "—"}</span>,
      }),
    ],
    [loaderData.roles, loaderData.me],
  );
  const table = useReactTable({
    data: rows,
    columns,
    state: { sorting, globalFilter: filter },
    onSortingChange: setSorting,
    onGlobalFilterChange: setFilter,
    globalFilterFn: "includesString",
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
  });
  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1 className="text-2xl font-semibold tracking-tight">Users</h1>
          <p className="text-sm text-ink-600">
            Global roles: viewer reads, author creates mechanisms and proposes steps, curator reviews the library, admin manages people.{" "}
            <Link className="text-copper-700 hover:underline" to="/groups">
              Groups
            </Link>
          </p>
        </div>
        <div className="flex gap-2">
          <input className="field w-64" placeholder="Filter by name, e-mail, group…" aria-label="Filter users" value={filter} onChange={(e) => setFilter(e.target.value)} />
          <select className="field w-36" aria-label="Only role" value={roleFilter} onChange={(e) => setRoleFilter(e.target.value)}>
            <option value="">all roles</option>
            {loaderData.roles.map((r) => (
              <option key={r}>{r}</option>
            ))}
          </select>
        </div>
      </div>
      {actionData?.ok && <Notice tone="ok">{actionData.ok}</Notice>}
      {actionData?.error && <Notice tone="error">{actionData.error}</Notice>}
      <div className="panel overflow-x-auto p-0">
        <table className="w-full text-sm" aria-label="Users">
          <thead className="bg-ink-50 text-left text-xs text-ink-600">
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => {
                  const dir = h.column.getIsSorted();
                  return (
                    <th key={h.id} className="px-3 py-2" aria-sort={dir === "asc" ? "ascending" : dir === "desc" ? "descending" : "none"}>
                      <button type="button" className="hover:text-ink-900" onClick={h.column.getToggleSortingHandler()}>
                        {flexRender(h.column.columnDef.header, h.getContext())}
                        {dir === "asc" ? " ▲" : dir === "desc" ? " ▼" : ""}
                      </button>
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((r) => (
              <tr key={r.id} className="border-t border-ink-100">
                {r.getVisibleCells().map((c) => (
                  <td key={c.id} className="px-3 py-1.5">
                    {flexRender(c.column.columnDef.cell, c.getContext())}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
        <p className="px-3 py-2 text-xs text-ink-500">
          {table.getRowModel().rows.length} of {loaderData.users.length} users
        </p>
      </div>
      <section className="panel overflow-x-auto">
        <h2 className="font-semibold">Recent account events</h2>
        <table className="mt-2 w-full text-sm">
          <thead className="text-left text-xs text-ink-500">
            <tr>
              <th className="py-1">When (UTC)</th>
              <th>Who</th>
              <th>What</th>
              <th>Detail</th>
              <th>From</th>
            </tr>
          </thead>
          <tbody>
            {loaderData.events.map((e) => (
              <tr key={e.id} className="border-t border-ink-100">
                <td className="num py-1">{e.createdAt.replace("T", " ").slice(0, 19)}</td>
                <td>{e.userEmail ?? "—"}</td>
                <td>{e.action}</td>
                <td className="num text-xs text-ink-600">{e.detail ? JSON.stringify(e.detail) : ""}</td>
                <td className="num">{e.ip ?? ""}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </section>
    </div>
  );
}
