/** The process-safety note on ensemble results: conversion and yield spreads invite use in scale-up decisions. */
export function EnsembleCaution({ heating }: { heating: boolean }) {
  return (
    <div role="note" data-testid="caution-note" className="rounded-md border border-copper-300 bg-amber-note p-3 text-sm text-ink-800">
      <p>
        <strong>Model estimate — not a safety assessment.</strong> These distributions reflect only the uncertainties and ranges entered here; the
        mechanism itself may be incomplete{heating ? ", and the conditions include heating" : ""}. Conversion, yield and heat-release figures for
        scale-up or thermal-hazard decisions need calorimetric data (e.g. reaction and adiabatic calorimetry) and the site's process-safety review;
        local codes and licensed practice govern.
      </p>
    </div>
  );
}
