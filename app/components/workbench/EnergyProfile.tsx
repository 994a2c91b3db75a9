/**
 * Free-energy profile along a chosen pathway, drawn as SVG: minima as short level bars,
 * transition states as open bars, joined by eased curves; each level labelled with its species
 * (or step) and its relative free energy at T. Unknown levels (no ΔG°rxn) are left blank with a
 * note. Exports to SVG and PNG.
 */
import { forwardRef } from "react";
import type { ProfilePoint } from "./step-rates";
import { niceTicks, tickLabel } from "../plots/ticks";

export const EnergyProfile = forwardRef<SVGSVGElement, { points: ProfilePoint[]; T: number; width?: number; height?: number }>(function EnergyProfile({ points, T, width = 760, height = 340 }, ref) {
  const m = { l: 58, r: 20, t: 24, b: 40 };
  const known = points.filter((p) => p.G !== null).map((p) => p.G! / 1000);
  const lo = Math.min(0, ...known), hi = Math.max(0, ...known);
  const pad = Math.max(5, (hi - lo) * 0.15);
  const y0 = lo - pad, y1 = hi + pad;
  const pw = width - m.l - m.r, ph = height - m.t - m.b;
  const slot = pw / Math.max(1, points.length);
  const bar = Math.min(46, slot * 0.5);
  const sx = (i: number) => m.l + slot * (i + 0.5);
  const sy = (g: number) => m.t + ph - ((g - y0) / (y1 - y0)) * ph;
  const ticks = niceTicks(y0, y1, 6).filter((v) => v >= y0 && v <= y1);
  const segs: string[] = [];
  for (let i = 0; i + 1 < points.length; i++) {
    const a = points[i], b = points[i + 1];
    if (a.G === null || b.G === null) continue;
    const xa = sx(i) + bar / 2, xb = sx(i + 1) - bar / 2, ya = sy(a.G / 1000), yb = sy(b.G / 1000);
    const mid = (xa + xb) / 2;
    segs.push(`M${xa},${ya} C${mid},${ya} ${mid},${yb} ${xb},${yb}`);
  }
  return (
    <svg ref={ref} viewBox={`0 0 ${width} ${height}`} width="100%" role="img" aria-label="Free-energy profile" data-testid="energy-profile" style={{ maxWidth: width }}>
      <text x={m.l} y={15} fontSize={12} fill="#223040" fontWeight={600}>
        Relative free energy at {Number(T.toPrecision(6))} K, 1 mol/L standard state (kJ/mol)
      </text>
      {ticks.map((v) => (
        <g key={v}>
          <line x1={m.l} x2={m.l + pw} y1={sy(v)} y2={sy(v)} stroke="#eef2f5" />
          <text x={m.l - 6} y={sy(v) + 3.5} fontSize={10.5} textAnchor="end" fill="#3b5063">
            {tickLabel(v)}
          </text>
        </g>
      ))}
      <line x1={m.l} x2={m.l} y1={m.t} y2={m.t + ph} stroke="#9fb2c2" />
      {segs.map((d, i) => (
        <path key={i} d={d} fill="none" stroke="#9fb2c2" strokeWidth={1.4} strokeDasharray="4 3" />
      ))}
      {points.map((p, i) => {
        const x = sx(i);
        if (p.G === null)
          return (
            <text key={i} x={x} y={m.t + ph - 4} fontSize={11} textAnchor="middle" fill="#8a2f25">
              <title>{`${p.label}: unknown${p.unknown ? ` (${p.unknown})` : ""}`}</title>?
            </text>
          );
        const y = sy(p.G / 1000);
        const ts = p.kind === "ts";
        return (
          <g key={i}>
            <title>{`${p.label}: ${(p.G / 1000).toFixed(1)} kJ/mol`}</title>
            <line x1={x - bar / 2} x2={x + bar / 2} y1={y} y2={y} stroke={ts ? "#a65a2b" : "#172230"} strokeWidth={ts ? 2 : 3} strokeLinecap="round" />
            <text x={x} y={y - 6} fontSize={10.5} textAnchor="middle" fill={ts ? "#844624" : "#172230"} fontWeight={600}>
              {(p.G / 1000).toFixed(1)}
            </text>
            <text x={x} y={y + 14} fontSize={9.5} textAnchor="middle" fill="#3b5063">
              {p.label.length > 22 ? `${p.label.slice(0, 21)}…` : p.label}
            </text>
          </g>
        );
      })}
      <text x={m.l + pw / 2} y={height - 8} fontSize={11} textAnchor="middle" fill="#3b5063">
        reaction coordinate (pathway in the chosen order; copper levels = transition states, 1 mol/L)
        {points.some((p) => p.G === null) ? " · ?: level unknown (a step before it has no ΔG°rxn)" : ""}
      </text>
    </svg>
  );
});
