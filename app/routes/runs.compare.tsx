/**
 * /runs/compare?run=A&run=B — two finished runs on one plot (solid: first, dashed: second) and in
 * one table, with their key outcomes side by side (e.g. a fork against its parent, or two
 * temperatures).
 */
import { useMemo } from "react";
import { Link } from "react-router";
import type { Route } from "./+types/runs.compare";
import { requireUser } from "~/auth/current-user.server";
import { readableRun, runNameKey } from "~/compute/run-api.server";
import { namer, type NameKey } from "~/components/names";
import { describeTemperature } from "~/compute/run-request";
import { ConcentrationPlot, type PlotSeries } from "~/components/plots/ConcentrationPlot";
import { ResultsTable } from "~/components/plots/ResultsTable";
import { seriesColour } from "~/components/plots/palette";
import { duration, num, pct } from "~/components/workbench/format";
import { getDb } from "../../db/client.server";
import { getRunSeries } from "../../db/access/runs.server";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Compare runs · Saddlebook" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const url = new URL(request.url);
  const ids = url.searchParams.getAll("run").concat(url.searchParams.getAll("a"), url.searchParams.getAll("b")).filter(Boolean);
  if (ids.length !== 2) return { problem: "Tick exactly two finished runs to compare.", runs: [] };
  const db = getDb();
  const runs = [];
  for (const id of ids) {
    const r = await readableRun(db, user, id);
    if (!r.ok) return { problem: `There is no run ${id} that you can see.`, runs: [] };
    if (r.run.status !== "done") return { problem: `Run #${r.run.id} has no results (${r.run.status}).`, runs: [] };
    const s = await getRunSeries(db, r.run.id);
    if (!s) return { problem: `Run #${r.run.id} has no results.`, runs: [] };
    runs.push({
      id: r.run.id,
      name: r.run.name,
      temperature: describeTemperature(r.run.conditions),
      snapshotHash: r.run.snapshotHash,
      names: runNameKey(r.run),
      analysis: r.run.analysis!,
      speciesIds: s.speciesIds,
      times: Array.from(s.times),
      conc: s.conc.map((c) => Array.from(c)),
    });
  }
  return { problem: null, runs };
}

export default function Compare({ loaderData }: Route.ComponentProps) {
  const { problem, runs } = loaderData;
  const allSpecies = useMemo(() => [...new Set(runs.flatMap((r) => r.speciesIds))], [runs]);
  // Names from both snapshots (the first run's name wins where a fork renamed a species).
  const names = useMemo(() => {
    const key: NameKey = { species: {}, steps: {} };
    for (const r of [...runs].reverse()) Object.assign(key.species, r.names.species), Object.assign(key.steps, r.names.steps);
    return { key, n: namer(key) };
  }, [runs]);
  const series = useMemo<PlotSeries[]>(
    () =>
      runs.flatMap((r, j) =>
        r.speciesIds.map((id, i) => ({
          key: `${r.id}:${id}`,
          label: `${names.n.species(id)} · run #${r.id}`,
          id,
          formula: names.key.species[id]?.[1] || undefined,
          times: r.times,
          values: r.conc[i],
          colour: seriesColour(allSpecies.indexOf(id)),
          dash: j === 1 ? [6, 4] : undefined,
        })),
      ),
    [runs, allSpecies, names],
  );
  if (problem) {
    return (
      <div className="space-y-3">
        <h1 className="text-2xl font-semibold tracking-tight">Compare runs</h1>
        <p role="alert" className="text-brick-700">
          {problem}
        </p>
        <Link to="/runs" className="btn-quiet">
          Back to runs
        </Link>
      </div>
    );
  }
  const [a, b] = runs;
  const same = a.snapshotHash === b.snapshotHash;
  return (
    <div className="space-y-4" data-testid="compare-page">
      <h1 className="text-2xl font-semibold tracking-tight">
        Compare run #{a.id} and run #{b.id}
      </h1>
      <p className="text-sm text-ink-600">
        Solid lines: #{a.id} ({a.temperature}); dashed: #{b.id} ({b.temperature}). {same ? "Both ran the same mechanism snapshot." : "The mechanism snapshots differ."}
      </p>
      <section className="panel">
        <ConcentrationPlot series={series} defaultLogX filename={`saddlebook-compare-${a.id}-${b.id}.png`} />
      </section>
      <section className="panel overflow-x-auto">
        <h2 className="font-semibold">Outcomes</h2>
        <table className="mt-2 w-full text-sm" data-testid="compare-table">
          <thead className="text-left text-xs text-ink-500">
            <tr>
              <th className="py-1">Species</th>
              <th>
                t½ #{a.id}
              </th>
              <th>
                t½ #{b.id}
              </th>
              <th>
                final c #{a.id} (mol/L)
              </th>
              <th>
                final c #{b.id} (mol/L)
              </th>
              <th>
                yield #{a.id}
              </th>
              <th>
                yield #{b.id}
              </th>
            </tr>
          </thead>
          <tbody>
            {allSpecies.map((id) => {
              const sa = a.analysis.species[id], sb = b.analysis.species[id];
              return (
                <tr key={id} className="border-t border-ink-100">
                  <td className="py-0.5">{names.n.speciesWithFormula(id)}</td>
                  <td className="num">{sa?.initial ? duration(sa.t50) : "—"}</td>
                  <td className="num">{sb?.initial ? duration(sb.t50) : "—"}</td>
                  <td className="num">{num(sa?.final)}</td>
                  <td className="num">{num(sb?.final)}</td>
                  <td className="num">{a.analysis.yields?.yields[id] !== undefined ? pct(a.analysis.yields.yields[id]) : "—"}</td>
                  <td className="num">{b.analysis.yields?.yields[id] !== undefined ? pct(b.analysis.yields.yields[id]) : "—"}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </section>
      <section className="panel">
        <h2 className="mb-2 font-semibold">Values of both runs</h2>
        <ResultsTable
          series={series.map((s) => ({ key: s.key, label: s.label, id: s.id, formula: s.formula, times: s.times, values: s.values }))}
          filename={`saddlebook-compare-${a.id}-${b.id}.csv`}
          title={`Saddlebook runs #${a.id} (${a.name}) and #${b.id} (${b.name})`}
        />
      </section>
    </div>
  );
}
