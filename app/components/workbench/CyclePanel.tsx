/**
 * The catalytic cycle under the free-energy profile: TOF (s⁻¹ at T) from the energetic span
 * model, the TOF-determining transition state and intermediate by name, δE and ΔG_r (kJ/mol,
 * 1 mol/L), and each state's degree of TOF control; or why it cannot be computed.
 */
import { formatNumber } from "../format";
import type { CycleSummary } from "./cycle-summary";

const kJ = (J: number) => (J / 1000).toFixed(1);

export function CyclePanel({ summary, T }: { summary: CycleSummary; T: number }) {
  if (summary.kind === "none")
    return (
      <p className="text-xs text-ink-600" data-testid="cycle-summary">
        The pathway is not a closed catalytic cycle (no species taken by its first step comes back unchanged at its end); TOF needs one.
      </p>
    );
  if (summary.kind === "unknown")
    return (
      <p className="text-sm text-brick-700" role="status" data-testid="cycle-summary">
        Catalytic cycle with catalyst {summary.catalyst}: the turnover frequency needs every step's energies — {summary.reason}.
      </p>
    );
  const r = summary.result;
  return (
    <div className="space-y-2 rounded-md border border-ink-200 p-3 text-sm" data-testid="cycle-summary">
      <h3 className="font-semibold">Catalytic cycle (catalyst {summary.catalyst}), energetic span model</h3>
      <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1">
        <dt>TOF at {Number(T.toPrecision(6))} K</dt>
        <dd className="num" data-testid="cycle-tof">
          {formatNumber(r.tof, 3)} s⁻¹
        </dd>
        <dt>TOF-determining transition state (TDTS)</dt>
        <dd data-testid="cycle-tdts">{summary.tdts}</dd>
        <dt>TOF-determining intermediate (TDI)</dt>
        <dd data-testid="cycle-tdi">{summary.tdi}</dd>
        <dt>energetic span δE</dt>
        <dd className="num" data-testid="cycle-span">
          {kJ(r.span)} kJ/mol{r.tdtsBeforeTdi ? " (TDTS before TDI: includes ΔG_r)" : ""}
        </dd>
        <dt>ΔG_r of one turnover</dt>
        <dd className="num">{kJ(summary.reactionEnergy)} kJ/mol</dd>
        <dt>(k_B T/h)·e^(−δE/RT)</dt>
        <dd className="num">{formatNumber(r.tofApprox, 3)} s⁻¹</dd>
      </dl>
      {r.warning && (
        <p className="text-brick-700" role="status">
          {r.warning}
        </p>
      )}
      <table className="text-xs">
        <thead>
          <tr>
            <th className="pr-3 text-left">state</th>
            <th className="pr-3 text-right">G (kJ/mol)</th>
            <th className="text-right">degree of TOF control</th>
          </tr>
        </thead>
        <tbody>
          {summary.states.map((s, i) => (
            <tr key={i}>
              <td className="pr-3">{s.label}</td>
              <td className="num pr-3 text-right">{kJ(s.G)}</td>
              <td className="num text-right">{s.control.toFixed(3)}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="text-xs text-ink-600">
        Exact TOF of the cycle at steady state with every species at 1 mol/L (Kozuch &amp; Shaik, Acc. Chem. Res. 2011, 44, 101–110); concentrations other than
        the standard state, off-cycle species and catalyst deactivation change it. An estimate: for heating or scale-up, calorimetry and the site's process-safety
        review decide, and local codes and licensed practice govern.
      </p>
    </div>
  );
}
