/** The audit log: who did what, to which object, when and from which address. */
import type { Knex } from "knex";

export interface AuditEntry {
  userId: number | null;
  action: string;
  objectType?: string | null;
  objectId?: string | number | null;
  detail?: Record<string, unknown> | null;
  ip?: string | null;
}

export interface AuditRow {
  id: number;
  userId: number | null;
  userEmail: string | null;
  action: string;
  objectType: string | null;
  objectId: string | null;
  detail: Record<string, unknown> | null;
  ip: string | null;
  createdAt: Date;
}

export async function audit(db: Knex, e: AuditEntry): Promise<void> {
  await db("audit_log").insert({
    user_id: e.userId,
    action: e.action,
    object_type: e.objectType ?? null,
    object_id: e.objectId == null ? null : String(e.objectId),
    detail: e.detail ? JSON.stringify(e.detail) : null,
    ip: e.ip ? e.ip.slice(0, 64) : null,
  });
}

function parseDetail(v: unknown): Record<string, unknown> | null {
  if (v == null) return null;
  if (typeof v === "object") return v as Record<string, unknown>;
  try {
    return JSON.parse(String(v)) as Record<string, unknown>;
  } catch {
    return null;
  }
}

/** Newest first; optionally only one action prefix (e.g. "sign-in") or one user. */
export async function listAudit(
  db: Knex,
  opts: { action?: string; prefixes?: string[]; userId?: number; limit?: number } = {},
): Promise<AuditRow[]> {
  const q = db("audit_log as a")
    .leftJoin("users as u", "u.id", "a.user_id")
    .select("a.id", "a.user_id", "u.email", "a.action", "a.object_type", "a.object_id", "a.detail", "a.ip", "a.created_at")
    .orderBy("a.id", "desc")
    .limit(opts.limit ?? 200);
  if (opts.action) q.where("a.action", "like", `${opts.action.replace(/[%_]/g, "")}%`);
  if (opts.prefixes?.length) {
    q.where((w) => {
      for (const p of opts.prefixes!) w.orWhere("a.action", "like", `${p.replace(/[%_]/g, "")}%`);
    });
  }
  if (opts.userId != null) q.where("a.user_id", opts.userId);
  const rows = await q;
  return rows.map((r: Record<string, unknown>) => ({
    id: Number(r.id),
    userId: r.user_id == null ? null : Number(r.user_id),
    userEmail: (r.email as string) ?? null,
    action: String(r.action),
    objectType: (r.object_type as string) ?? null,
    objectId: (r.object_id as string) ?? null,
    detail: parseDetail(r.detail),
    ip: (r.ip as string) ?? null,
    createdAt: new Date(r.created_at as string),
  }));
}
