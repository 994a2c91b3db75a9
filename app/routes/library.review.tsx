/**
 * The curators' review queue: proposed steps, oldest first, each with a note and its own
 * Approve / Send back buttons. A refused review answers with the row's step id, so its message
 * shows beside the buttons of that row, and the note typed there is kept.
 */
import { Form, Link, data, useActionData, useNavigation } from "react-router";
import type { Route } from "./+types/library.review";
import { requireUser } from "~/auth/current-user.server";
import { assertCsrf } from "~/auth/csrf.server";
import { mayReviewProposals } from "~/auth/policy.server";
import { CsrfInput } from "~/components/CsrfInput";
import { actionFailure } from "~/components/library/route-helpers.server";
import { reviewAndNotify } from "~/api/review-mail.server";
import { getDb } from "../../db/client.server";
import { reviewQueue } from "../../db/access/steps.server";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Review queue · Saddlebook" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  if (!mayReviewProposals(user)) throw data("Only curators review library steps.", { status: 403 });
  return { queue: await reviewQueue(getDb(), user) };
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request);
  const form = await request.formData();
  await assertCsrf(request, form);
  const stepId = Number(form.get("stepId"));
  const intent = String(form.get("intent") ?? "");
  const note = String(form.get("comment") ?? "");
  const row = { stepId: Number.isInteger(stepId) && stepId > 0 ? stepId : 0, intent, note };
  if (!row.stepId) return data({ ...row, ok: false as const, message: "Choose a step to review.", fields: {} }, { status: 400 });
  if (intent !== "approve" && intent !== "request_changes") return data({ ...row, ok: false as const, message: "Unknown action.", fields: {} }, { status: 400 });
  try {
    const { mailed } = await reviewAndNotify(getDb(), user, stepId, { action: intent, comment: note.trim() || undefined }, request);
    const told = mailed ? " The author has been e-mailed." : " No e-mail went to the author (their own review, or the mail could not be sent; see the audit log).";
    return { ...row, ok: true as const, message: (intent === "approve" ? "Approved for the library." : "Sent back to the author as a draft.") + told, fields: {} };
  } catch (e) {
    const failure = actionFailure(e);
    return data({ ...row, ...failure.data }, failure.init ?? undefined);
  }
}

export default function ReviewQueue({ loaderData }: Route.ComponentProps) {
  const result = useActionData<typeof action>();
  const nav = useNavigation();
  const busyRow = nav.state === "submitting" ? Number(nav.formData?.get("stepId")) : null;
  const done = result?.ok ? loaderData.queue.every((q) => q.id !== result.stepId) : false;
  return (
    <div className="space-y-3">
      <h1 className="text-2xl font-semibold tracking-tight">Review queue</h1>
      <p className="text-sm text-ink-700">
        Steps proposed for the shared library. Approve one, or send it back to its author with a note saying what to change; the author is told by e-mail. Open a step
        to read it in full or to deprecate it.
      </p>
      {result?.ok && done && (
        <p className="text-sm text-moss-700" role="status">
          {result.message}
        </p>
      )}
      {loaderData.queue.length === 0 ? (
        <p className="panel text-ink-600">Nothing waits for review.</p>
      ) : (
        <table className="panel w-full text-sm">
          <thead>
            <tr className="text-left text-xs text-ink-600">
              <th className="py-1">Step</th>
              <th>Owner</th>
              <th>Version</th>
              <th>Source</th>
              <th>Proposed</th>
              <th>Review</th>
            </tr>
          </thead>
          <tbody>
            {loaderData.queue.map((q) => {
              const mine = result && result.stepId === q.id ? result : null;
              const error = mine && !mine.ok ? [mine.message, ...Object.values(mine.fields ?? {})].join(" ") : null;
              return (
                <tr key={q.id} className="border-t border-ink-100 align-top" data-step-id={q.id}>
                  <td className="py-1">
                    <Link to={`/steps/${q.id}`} className="text-copper-700 hover:underline">
                      {q.label}
                    </Link>
                  </td>
                  <td>{q.owner}</td>
                  <td className="num">v{q.version}</td>
                  <td>{q.source_type}</td>
                  <td className="num">{new Date(q.proposed_at).toISOString().slice(0, 16).replace("T", " ")} UTC</td>
                  <td className="py-1">
                    <Form method="post" className="flex flex-wrap items-start gap-2" aria-label={`Review ${q.label}`}>
                      <CsrfInput />
                      <input type="hidden" name="stepId" value={q.id} />
                      <textarea
                        name="comment"
                        rows={1}
                        className="field min-w-48 flex-1"
                        placeholder="Note to the author (required to send back)"
                        aria-label={`Note on ${q.label}`}
                        defaultValue={mine?.note ?? ""}
                        aria-invalid={error ? true : undefined}
                      />
                      <button className="btn-primary" name="intent" value="approve" disabled={busyRow === q.id}>
                        Approve
                      </button>
                      <button className="btn-quiet" name="intent" value="request_changes" disabled={busyRow === q.id}>
                        Send back
                      </button>
                      {error && (
                        <p className="w-full text-brick-700" role="alert" data-testid={`review-error-${q.id}`}>
                          {error}
                        </p>
                      )}
                    </Form>
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      )}
    </div>
  );
}
