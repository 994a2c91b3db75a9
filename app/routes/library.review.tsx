/** The curators' review queue: proposed steps, oldest first. */
import { Link } from "react-router";
import type { Route } from "./+types/library.review";
import { requireUser } from "~/auth/current-user.server";
import { can } from "~/auth/policy.server";
import { getDb } from "../../db/client.server";
import { reviewQueue } from "../../db/access/steps.server";
import { data } from "react-router";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Review queue · Saddlebook" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  if (!can(user, { do: "step.review", object: { ownerId: -1, status: "proposed" } })) throw data("Only curators review library steps.", { status: 403 });
  return { queue: await reviewQueue(getDb(), user) };
}

export default function ReviewQueue({ loaderData }: Route.ComponentProps) {
  return (
    <div className="space-y-3">
      <h1 className="text-2xl font-semibold tracking-tight">Review queue</h1>
      <p className="text-sm text-ink-700">Steps proposed for the shared library. Open one to approve it, request changes (with a comment) or deprecate it.</p>
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
            </tr>
          </thead>
          <tbody>
            {loaderData.queue.map((q) => (
              <tr key={q.id} className="border-t border-ink-100">
                <td className="py-1">
                  <Link to={`/steps/${q.id}`} className="text-copper-700 hover:underline">
                    {q.label}
                  </Link>
                </td>
                <td>{q.owner}</td>
                <td className="num">v{q.version}</td>
                <td>{q.source_type}</td>
                <td className="num">{new Date(q.proposed_at).toISOString().slice(0, 16).replace("T", " ")} UTC</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </div>
  );
}
