/** The process-safety note on runs with heating programs or concentrated mixtures. */
export function CautionNote({ heating, concentrated }: { heating: boolean; concentrated: boolean }) {
  if (!heating && !concentrated) return null;
  const why = [heating ? "a heating program" : null, concentrated ? "high initial concentrations" : null].filter(Boolean).join(" and ");
  return (
    <div role="note" data-testid="caution-note" className="rounded-md border border-copper-300 bg-amber-note p-3 text-sm text-ink-800">
      <p>
        <strong>Model estimate — not a safety assessment.</strong> This run has {why}. Thermal-hazard and scale-up decisions need calorimetric
        data (e.g. reaction and adiabatic calorimetry) and the site's process-safety review; local codes and licensed practice govern.
      </p>
    </div>
  );
}
