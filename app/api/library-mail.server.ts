/**
 * E-mails of the library and mechanisms: curators hear of a proposed step; a mechanism's
 * owner hears when someone forks it. Sent through app/mail; a mail failure never undoes
 * the change that caused it (callers catch and carry on).
 */
import type { Knex } from "knex";
import { sendMail } from "../mail/transport.server";

const esc = (s: string) => s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);

function baseUrl(): string {
  return (process.env.APP_URL || process.env.PUBLIC_URL || "http://127.0.0.1:3000").replace(/\/$/, "");
}

/** Tells every curator that a step awaits review. */
export async function notifyProposal(db: Knex, stepId: number): Promise<number> {
  const s = await db("steps as s").join("step_versions as v", "v.id", "s.current_version_id").join("users as u", "u.id", "s.owner_id").where("s.id", stepId).first("v.label", "u.name");
  if (!s) return 0;
  const curators = await db("users").whereIn("role", ["curator"]).where("disabled", false).select("email", "name");
  const url = `${baseUrl()}/library/review`;
  for (const c of curators) {
    await sendMail({
      to: c.email,
      subject: `Step proposed for the library: ${s.label}`,
      text: `${s.name} proposed the step "${s.label}" for the shared library.\n\nReview queue: ${url}\n`,
      html: `<p>${esc(s.name)} proposed the step “${esc(s.label)}” for the shared library.</p><p><a href="${esc(url)}">Open the review queue</a></p>`,
    });
  }
  return curators.length;
}

/** Tells the owner of the parent mechanism that it was forked. */
export async function notifyFork(db: Knex, forkId: number): Promise<boolean> {
  const f = await db("mechanisms as f")
    .join("mechanisms as p", "p.id", "f.forked_from_mechanism_id")
    .join("users as fo", "fo.id", "f.owner_id")
    .join("users as po", "po.id", "p.owner_id")
    .where("f.id", forkId)
    .first("f.name as fork", "f.forked_from_version as v", "p.id as pid", "p.name as parent", "fo.name as forker", "fo.id as forkerId", "po.id as ownerId", "po.email as ownerEmail");
  if (!f || f.forkerId === f.ownerId) return false;
  const url = `${baseUrl()}/mechanisms/${f.pid}`;
  await sendMail({
    to: f.ownerEmail,
    subject: `${f.forker} forked your mechanism "${f.parent}"`,
    text: `${f.forker} forked "${f.parent}" (version ${f.v}) as "${f.fork}".\n\nYour mechanism: ${url}\n`,
    html: `<p>${esc(f.forker)} forked “${esc(f.parent)}” (version ${Number(f.v)}) as “${esc(f.fork)}”.</p><p><a href="${esc(url)}">Open your mechanism</a></p>`,
  });
  return true;
}
