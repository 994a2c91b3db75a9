/** Groups, memberships and invitations to join a group. */
import type { Knex } from "knex";
import { normalizeEmail, type Role } from "./users.server";

export type GroupRole = "member" | "admin";

export interface GroupRow {
  id: number;
  slug: string;
  name: string;
  description: string | null;
  memberCount: number;
}

export interface MemberRow {
  userId: number;
  email: string;
  name: string;
  role: Role;
  groupRole: GroupRole;
  joinedAt: string;
}

export interface InvitationRow {
  id: number;
  groupId: number;
  email: string;
  groupRole: GroupRole;
  role: "viewer" | "author";
  invitedBy: string | null;
  expiresAt: string;
  acceptedAt: string | null;
  revokedAt: string | null;
  createdAt: string;
}

const iso = (v: unknown) => (v ? new Date(v as string).toISOString() : null);

function toGroup(r: Record<string, unknown>): GroupRow {
  return {
    id: Number(r.id),
    slug: String(r.slug),
    name: String(r.name),
    description: (r.description as string) ?? null,
    memberCount: Number(r.member_count ?? 0),
  };
}

function groupsQuery(db: Knex) {
  return db("groups as g")
    .leftJoin("memberships as m", "m.group_id", "g.id")
    .groupBy("g.id", "g.slug", "g.name", "g.description")
    .select("g.id", "g.slug", "g.name", "g.description")
    .count({ member_count: "m.user_id" })
    .orderBy("g.name");
}

export async function listGroups(db: Knex): Promise<GroupRow[]> {
  return (await groupsQuery(db)).map(toGroup);
}

export async function listGroupsOfUser(db: Knex, userId: number): Promise<Array<GroupRow & { groupRole: GroupRole }>> {
  const mine = await db("memberships").where({ user_id: userId }).select("group_id", "group_role");
  const roleBy = new Map(mine.map((m: { group_id: number; group_role: GroupRole }) => [Number(m.group_id), m.group_role]));
  const all = (await groupsQuery(db).whereIn("g.id", [...roleBy.keys()])).map(toGroup);
  return all.map((g: GroupRow) => ({ ...g, groupRole: roleBy.get(g.id)! }));
}

export async function findGroupBySlug(db: Knex, slug: string): Promise<GroupRow | null> {
  const r = await groupsQuery(db).where("g.slug", slug).first();
  return r ? toGroup(r) : null;
}

export async function findGroupById(db: Knex, id: number): Promise<GroupRow | null> {
  const r = await groupsQuery(db).where("g.id", id).first();
  return r ? toGroup(r) : null;
}

export async function createGroup(db: Knex, g: { slug: string; name: string; description?: string | null }): Promise<number> {
  const [id] = await db("groups").insert({ slug: g.slug, name: g.name.trim(), description: g.description ?? null });
  return Number(id);
}

export async function listMembers(db: Knex, groupId: number): Promise<MemberRow[]> {
  const rows = await db("memberships as m")
    .join("users as u", "u.id", "m.user_id")
    .where("m.group_id", groupId)
    .select("u.id", "u.email", "u.name", "u.role", "m.group_role", "m.created_at")
    .orderBy("u.name");
  return rows.map((r: Record<string, unknown>) => ({
    userId: Number(r.id),
    email: String(r.email),
    name: String(r.name),
    role: r.role as Role,
    groupRole: r.group_role as GroupRole,
    joinedAt: iso(r.created_at)!,
  }));
}

export async function membership(db: Knex, groupId: number, userId: number): Promise<GroupRole | null> {
  const r = await db("memberships").where({ group_id: groupId, user_id: userId }).first();
  return r ? (r.group_role as GroupRole) : null;
}

/** Adds the user to the group, or changes their group role when already a member. */
export async function addMember(db: Knex, groupId: number, userId: number, groupRole: GroupRole): Promise<void> {
  await db.raw("INSERT INTO memberships (user_id, group_id, group_role) VALUES (?, ?, ?) ON DUPLICATE KEY UPDATE group_role = VALUES(group_role)", [
    userId,
    groupId,
    groupRole,
  ]);
}

export async function setGroupRole(db: Knex, groupId: number, userId: number, groupRole: GroupRole): Promise<boolean> {
  return (await db("memberships").where({ group_id: groupId, user_id: userId }).update({ group_role: groupRole })) > 0;
}

export async function removeMember(db: Knex, groupId: number, userId: number): Promise<boolean> {
  return (await db("memberships").where({ group_id: groupId, user_id: userId }).del()) > 0;
}

export async function countGroupAdmins(db: Knex, groupId: number): Promise<number> {
  const r = await db("memberships").where({ group_id: groupId, group_role: "admin" }).count<{ n: number }[]>({ n: "*" }).first();
  return Number(r?.n ?? 0);
}

export async function createInvitation(
  db: Knex,
  inv: { groupId: number; email: string; groupRole: GroupRole; role: "viewer" | "author"; invitedBy: number; expiresAt: Date },
): Promise<number> {
  const [id] = await db("invitations").insert({
    group_id: inv.groupId,
    email: normalizeEmail(inv.email),
    group_role: inv.groupRole,
    role: inv.role,
    invited_by: inv.invitedBy,
    expires_at: inv.expiresAt,
  });
  return Number(id);
}

function toInvitation(r: Record<string, unknown>): InvitationRow {
  return {
    id: Number(r.id),
    groupId: Number(r.group_id),
    email: String(r.email),
    groupRole: r.group_role as GroupRole,
    role: r.role as "viewer" | "author",
    invitedBy: (r.inviter_name as string) ?? null,
    expiresAt: iso(r.expires_at)!,
    acceptedAt: iso(r.accepted_at),
    revokedAt: iso(r.revoked_at),
    createdAt: iso(r.created_at)!,
  };
}

export async function findInvitation(db: Knex, id: number): Promise<InvitationRow | null> {
  const r = await db("invitations as i").leftJoin("users as u", "u.id", "i.invited_by").where("i.id", id).select("i.*", "u.name as inviter_name").first();
  return r ? toInvitation(r) : null;
}

export async function listInvitations(db: Knex, groupId: number): Promise<InvitationRow[]> {
  const rows = await db("invitations as i")
    .leftJoin("users as u", "u.id", "i.invited_by")
    .where("i.group_id", groupId)
    .select("i.*", "u.name as inviter_name")
    .orderBy("i.id", "desc")
    .limit(100);
  return rows.map(toInvitation);
}

export async function markInvitationAccepted(db: Knex, id: number, userId: number): Promise<void> {
  await db("invitations").where({ id }).update({ accepted_at: db.fn.now(3), accepted_by: userId });
}

export async function revokeInvitation(db: Knex, groupId: number, id: number): Promise<boolean> {
  const n = await db("invitations").where({ id, group_id: groupId }).whereNull("accepted_at").whereNull("revoked_at").update({ revoked_at: db.fn.now(3) });
  if (n > 0) await db("one_time_tokens").where({ invitation_id: id }).whereNull("used_at").update({ used_at: db.fn.now(3) });
  return n > 0;
}
