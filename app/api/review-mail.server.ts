/**
 * A curator's verdict on a proposed step, and the e-mail it sends: the proposal's author hears
 * that the step was approved or sent back, with the curator's note and a link to the step.
 *
 * The review is stored first (its own transaction in db/access/steps.server.ts); the mail goes
 * after the commit, so a mail failure never undoes the review. A failure is logged and written
 * to the audit log (action "mail.failed"), so it is not lost silently.
 */
import type { Knex } from "knex";
import { appUrl } from "~/auth/links.server";
import type { Actor } from "~/auth/policy.server";
import { reviewOutcomeMail, type ReviewOutcome } from "~/mail/templates.server";
import { sendMail } from "~/mail/transport.server";
import { audit } from "../../db/access/audit.server";
import { reviewStep } from "../../db/access/steps.server";

/** Whom a review outcome is mailed to: whoever proposed the step last (the owner when no proposal is recorded). */
async function proposalAuthor(db: Knex, stepId: number): Promise<{ id: number; email: string; name: string; label: string } | null> {
  const step = await db("steps as s").join("step_versions as v", "v.id", "s.current_version_id").where("s.id", stepId).first("s.owner_id", "v.label");
  if (!step) return null;
  const proposal = await db("step_reviews").where({ step_id: stepId, action: "propose" }).orderBy("id", "desc").first("actor_id");
  const user = await db("users").where({ id: proposal?.actor_id ?? step.owner_id, disabled: false }).first("id", "email", "name");
  return user ? { ...user, label: step.label } : null;
}

/**
 * Mails the proposal's author the outcome of a review. Resolves to true when a mail was sent,
 * false when there is nobody to tell (the curator reviewed their own proposal, or the author's
 * account is disabled) or the mail failed (then logged and audited); it never rejects.
 */
export async function notifyReviewOutcome(db: Knex, request: Request | undefined, reviewer: Actor & { name?: string }, stepId: number, outcome: ReviewOutcome, note?: string): Promise<boolean> {
  try {
    const author = await proposalAuthor(db, stepId);
    if (!author || author.id === reviewer.id) return false;
    const reviewerName = reviewer.name ?? (await db("users").where({ id: reviewer.id }).first("name"))?.name ?? "A curator";
    await sendMail(reviewOutcomeMail(author.email, author.name, { stepLabel: author.label, outcome, reviewer: reviewerName, note: note?.trim() || null, url: `${appUrl(request)}/steps/${stepId}` }));
    return true;
  } catch (e) {
    const reason = (e as Error).message;
    console.error(`The review mail for step ${stepId} could not be sent: ${reason}`);
    await audit(db, { userId: reviewer.id, action: "mail.failed", objectType: "step", objectId: stepId, detail: { mail: `review.${outcome}`, reason } }).catch((err) =>
      console.error(`The failed review mail for step ${stepId} could not be written to the audit log: ${(err as Error).message}`),
    );
    return false;
  }
}

/**
 * Stores a review (approve, request changes, deprecate) and, once committed, mails the author of
 * an approved or returned proposal; `mailed` says whether a mail went out.
 */
export async function reviewAndNotify(db: Knex, actor: Actor & { name?: string }, stepId: number, input: unknown, request?: Request) {
  const result = await reviewStep(db, actor, stepId, input);
  // reviewStep validated the input, so it is an object with a known action.
  const { action, comment } = input as { action: string; comment?: string };
  const mailed = action === "approve" || action === "request_changes" ? await notifyReviewOutcome(db, request, actor, stepId, action, comment) : false;
  return { review: result, mailed };
}
