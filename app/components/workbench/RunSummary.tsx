/** The analysis summary of a finished run: conversion times, yields, selectivity, rate control, mass balance, solver statistics. */
import type { RunAnalysis, RunStatistics } from "~/compute/run-task";
import { duration, num, pct } from "./format";
import type { Names } from "../names";
import { StepName } from "../StepName";

/** How each integrator is named on the summary (solver/simulate.ts SimulationMethod). */
const INTEGRATOR_LABEL: Record<string, string> = {
  rosenbrock: "stiff (RODAS4, Rosenbrock)",
  bdf: "stiff (variable-order BDF)",
  nonstiff: "non-stiff (explicit extrapolation)",
};

/** Species and steps appear by `names` (from the run's snapshot), never by their keys. */
export function RunSummary({ analysis: a, statistics: s, warnings, names }: { analysis: RunAnalysis; statistics: RunStatistics; warnings: string[] | null; names: Names }) {
  const present = Object.entries(a.species).filter(([, v]) => v.initial > 0);
  const drc = a.rateControl ? Object.entries(a.rateControl.degree).sort((x, y) => Math.abs(y[1]) - Math.abs(x[1])) : [];
  return (
    <div className="grid gap-4 lg:grid-cols-2" data-testid="run-summary">
      <section className="panel">
        <h3 className="font-semibold">Conversion</h3>
        <table className="mt-2 w-full text-sm">
          <thead className="text-left text-xs text-ink-500">
            <tr>
              <th className="py-1">Species</th>
              <th>c₀ (mol/L)</th>
              <th>converted</th>
              <th>t½ (50 %)</th>
              <th>90 %</th>
              <th>99 %</th>
            </tr>
          </thead>
          <tbody>
            {present.map(([id, v]) => (
              <tr key={id} className="border-t border-ink-100">
                <td className="py-1">{names.speciesWithFormula(id)}</td>
                <td className="num">{num(v.initial)}</td>
                <td className="num">{pct(v.conversion)}</td>
                <td className="num" data-testid={`t50-${id}`}>{duration(v.t50)}</td>
                <td className="num">{duration(v.t90)}</td>
                <td className="num">{duration(v.t99)}</td>
              </tr>
            ))}
          </tbody>
        </table>
        <p className="mt-1 text-xs text-ink-500">
          Times located on the integrator's {a.eventsLocated === "dense-output" ? "dense output" : "output grid (linear interpolation)"}; conversion = 1 − c/c₀.
        </p>
      </section>

      <section className="panel">
        <h3 className="font-semibold">Yields and selectivity</h3>
        {a.yields && a.reactant ? (
          <>
            <p className="mt-1 text-sm">
              From <strong>{names.species(a.reactant)}</strong> at {duration(a.yields.time)}: conversion {pct(a.yields.conversion)}.
            </p>
            <table className="mt-2 w-full text-sm">
              <thead className="text-left text-xs text-ink-500">
                <tr>
                  <th className="py-1">Product</th>
                  <th>yield</th>
                  <th>selectivity</th>
                  <th>max c (mol/L)</th>
                </tr>
              </thead>
              <tbody>
                {a.products.map((p) => (
                  <tr key={p} className="border-t border-ink-100">
                    <td className="py-1">{names.speciesWithFormula(p)}</td>
                    <td className="num">{pct(a.yields!.yields[p])}</td>
                    <td className="num">{pct(a.yields!.selectivity[p])}</td>
                    <td className="num">{num(a.species[p]?.max)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
            <p className="mt-1 text-xs text-ink-500">
              yield = Δc(product)/c₀({names.species(a.reactant)}); selectivity = share among the listed products; unaccounted (intermediates, others): {pct(a.yields.unaccounted)}.
            </p>
          </>
        ) : (
          <p className="mt-1 text-sm text-ink-600">No product forms from a reactant present at t = 0.</p>
        )}
      </section>

      <section className="panel">
        <h3 className="font-semibold">Degree of rate control</h3>
        {a.rateControl ? (
          <>
            <p className="mt-1 text-sm">
              Formation of <strong>{names.species(a.rateControl.species)}</strong> at {duration(a.rateControl.time)}; rate {num(a.rateControl.rate)} mol L⁻¹ s⁻¹. Largest:{" "}
              <strong>{names.step(a.rateControl.rateDetermining)}</strong>.
            </p>
            <table className="mt-2 w-full text-sm" data-testid="drc-table">
              <tbody>
                {drc.slice(0, 12).map(([id, x]) => (
                  <tr key={id} className="border-t border-ink-100">
                    <td className="py-0.5">
                      <StepName names={names} id={id} />
                    </td>
                    <td className="num">{num(x, 3)}</td>
                    <td className="w-1/2">
                      <div className="h-2 rounded bg-copper-500" style={{ width: `${Math.min(100, Math.abs(x) * 100)}%`, opacity: x < 0 ? 0.45 : 1 }} />
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
            <p className="mt-1 text-xs text-ink-500">X_RC,i = ∂ln r/∂ln k_i with K_eq held (Campbell); Σ = {num(a.rateControl.sum, 3)} (1 at a steady state).</p>
          </>
        ) : (
          <p className="mt-1 text-sm text-ink-600">{a.rateControlNote ? names.text(a.rateControlNote) : "Not computed."}</p>
        )}
      </section>

      <section className="panel">
        <h3 className="font-semibold">Mass balance and solver</h3>
        <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-4 gap-y-0.5 text-sm">
          <dt>largest drift</dt>
          <dd className="num" data-testid="mass-drift">{a.massBalance ? num(a.massBalance.maxDrift, 2) : "—"} (relative)</dd>
          {a.massBalance?.elements.slice(0, 6).map((e) => (
            <FragmentRow key={e.element} k={`  ${e.element}`} v={`${num(e.maxRelDrift, 2)}`} />
          ))}
          <dt>method</dt>
          <dd>{INTEGRATOR_LABEL[s.integrator ?? ""] ?? (s.method === "stiff" ? "stiff (Rosenbrock)" : "non-stiff (explicit)")}</dd>
          <dt>steps</dt>
          <dd className="num">
            {s.accepted} accepted, {s.rejected} rejected
          </dd>
          <dt>evaluations</dt>
          <dd className="num">
            {s.rhsEvaluations} f, {s.jacobianEvaluations} J, {s.luDecompositions} LU
          </dd>
          <dt>wall time</dt>
          <dd className="num">
            {num(s.integrationMs, 3)} ms integration, {num(s.totalMs, 3)} ms with analysis
          </dd>
          <dt>size</dt>
          <dd className="num">
            {s.species} species, {s.reactions} steps, {s.points} output points
          </dd>
        </dl>
        {a.massBalance && a.massBalance.speciesWithoutFormula.length > 0 && (
          <p className="mt-1 text-xs text-ink-500">No formula (left out of element totals): {a.massBalance.speciesWithoutFormula.slice(0, 10).map(names.species).join(", ")}.</p>
        )}
        {warnings && warnings.length > 0 && (
          <ul className="mt-2 list-disc pl-5 text-xs text-brick-700">
            {warnings.map((w, i) => (
              <li key={i}>{names.text(w)}</li>
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}

function FragmentRow({ k, v }: { k: string; v: string }) {
  return (
    <>
      <dt className="pl-3 text-ink-500">{k}</dt>
      <dd className="num text-ink-600">{v}</dd>
    </>
  );
}
