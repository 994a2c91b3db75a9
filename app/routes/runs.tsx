/** /runs — the runs you can see: status and progress, links to results, pick two to compare. */
import { useEffect } from "react";
import { Form, Link, useRevalidator } from "react-router";
import type { Route } from "./+types/runs";
import { requireUser } from "~/auth/current-user.server";
import { getDb } from "../../db/client.server";
import { listRuns } from "../../db/access/runs.server";
import { describeTemperature } from "~/compute/run-request";
import { duration } from "~/components/workbench/format";
import { StatusBadge } from "~/components/workbench/StatusBadge";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Runs · Saddlebook" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const runs = await listRuns(getDb(), user, { limit: 200 });
  return {
    runs: runs.map((r) => ({
      id: r.id,
      name: r.name,
      owner: r.ownerName ?? "",
      mine: r.ownerId === user.id,
      status: r.status,
      reason: r.statusReason,
      fraction: r.tEnd > 0 ? Math.min(1, r.progressTime / r.tEnd) : 0,
      temperature: describeTemperature(r.conditions),
      tEnd: r.tEnd,
      mechanismId: r.mechanismId,
      mechanismVersion: r.mechanismVersion,
      createdAt: r.createdAt.toISOString(),
    })),
  };
}

export default function RunsPage({ loaderData }: Route.ComponentProps) {
  const { runs } = loaderData;
  const revalidator = useRevalidator();
  const active = runs.some((r) => r.status === "queued" || r.status === "running");
  useEffect(() => {
    if (!active) return;
    const t = setInterval(() => revalidator.state === "idle" && void revalidator.revalidate(), 1500);
    return () => clearInterval(t);
  }, [active, revalidator]);
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-center gap-3">
        <h1 className="text-2xl font-semibold tracking-tight">Runs</h1>
        <Link to="/runs/new" className="btn-primary ml-auto">
          New run from a mechanism file
        </Link>
      </div>
      {runs.length === 0 ? (
        <p className="text-ink-600">No simulation runs yet. Start one from a mechanism's workbench or from a mechanism file.</p>
      ) : (
        <Form method="get" action="/runs/compare" className="panel overflow-x-auto">
          <table className="w-full text-sm" data-testid="runs-list">
            <thead className="text-left text-xs text-ink-500">
              <tr>
                <th className="py-1 pr-2">Compare</th>
                <th className="pr-2">Run</th>
                <th className="pr-2">Status</th>
                <th className="pr-2">Temperature</th>
                <th className="pr-2">End time</th>
                <th className="pr-2">Owner</th>
                <th className="pr-2">Started</th>
              </tr>
            </thead>
            <tbody>
              {runs.map((r) => (
                <tr key={r.id} className="border-t border-ink-100">
                  <td className="py-1 pr-2">
                    <input type="checkbox" name="run" value={r.id} aria-label={`Compare run ${r.id}`} disabled={r.status !== "done"} />
                  </td>
                  <td className="pr-2">
                    <Link to={`/runs/${r.id}`} className="font-medium text-ink-900 underline decoration-ink-300 hover:decoration-copper-500">
                      #{r.id} {r.name}
                    </Link>
                    {r.mechanismId && (
                      <span className="ml-1 text-xs text-ink-500">
                        (mechanism {r.mechanismId} v{r.mechanismVersion})
                      </span>
                    )}
                  </td>
                  <td className="pr-2">
                    <StatusBadge status={r.status} fraction={r.fraction} />
                  </td>
                  <td className="pr-2">{r.temperature}</td>
                  <td className="num pr-2">{duration(r.tEnd)}</td>
                  <td className="pr-2">{r.mine ? "you" : r.owner}</td>
                  <td className="num pr-2 text-xs">{r.createdAt.slice(0, 16).replace("T", " ")}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <button type="submit" className="btn-quiet mt-3">
            Compare the two ticked runs
          </button>
        </Form>
      )}
    </div>
  );
}
