/**
 * An observable of an ensemble against time, as SVG: the median as a line, the 25–75 % band
 * darker and the 5–95 % band lighter. Fractions on y; time on a log or linear axis in the display
 * unit that suits the end time (converted from s).
 */
import type { Distribution } from "../../../solver/ensemble";
import { niceTicks, padRange, tickLabel } from "../plots/ticks";

const UNITS: [string, number][] = [["d", 86400], ["h", 3600], ["min", 60], ["s", 1]];

export function BandPlot({ title, times, series, logX, colour = "#1f5f8b", width = 620, height = 260, testId }: { title: string; times: number[]; series: (Distribution | null)[]; logX: boolean; colour?: string; width?: number; height?: number; testId?: string }) {
  const m = { l: 56, r: 14, t: 10, b: 40 };
  const pw = width - m.l - m.r, ph = height - m.t - m.b;
  const tEnd = times[times.length - 1] ?? 1;
  const [unit, factor] = UNITS.find(([, f]) => tEnd / f >= 2) ?? ["s", 1];
  const pts = times.map((t, k) => ({ x: t / factor, d: series[k] })).filter((p): p is { x: number; d: Distribution } => !!p.d && (!logX || p.x > 0));
  if (pts.length === 0) return <p className="text-sm text-ink-600">No member has a value for {title.toLowerCase()}.</p>;
  const fx = (x: number) => (logX ? Math.log10(x) : x);
  const [x0, x1] = [fx(pts[0].x), fx(pts[pts.length - 1].x)];
  const [y0, y1] = padRange(Math.min(...pts.map((p) => p.d.p5)), Math.max(...pts.map((p) => p.d.p95)));
  const yr = y1 > y0 ? [y0, y1] : [y0 - 0.05, y1 + 0.05];
  const sx = (x: number) => m.l + (x1 > x0 ? ((fx(x) - x0) / (x1 - x0)) * pw : pw / 2);
  const sy = (y: number) => m.t + ph - ((y - yr[0]) / (yr[1] - yr[0])) * ph;
  const band = (lo: keyof Distribution, hi: keyof Distribution) =>
    [...pts.map((p) => `${sx(p.x)},${sy(p.d[hi])}`), ...[...pts].reverse().map((p) => `${sx(p.x)},${sy(p.d[lo])}`)].join(" ");
  const xt = logX ? niceTicks(x0, x1, 5).filter((v) => Number.isInteger(v)).map((v) => 10 ** v) : niceTicks(pts[0].x, pts[pts.length - 1].x, 6);
  const yt = niceTicks(yr[0], yr[1], 5).filter((v) => v >= yr[0] && v <= yr[1]);
  return (
    <figure className="space-y-1" data-testid={testId}>
      <figcaption className="text-sm font-semibold">{title}</figcaption>
      <svg viewBox={`0 0 ${width} ${height}`} width={width} height={height} role="img" aria-label={`${title}: median with 25–75 % and 5–95 % bands against time`} className="max-w-full">
        <rect x={m.l} y={m.t} width={pw} height={ph} fill="#f8fafb" stroke="#c6d2dc" />
        {xt.map((v) => (
          <g key={`x${v}`}>
            <line x1={sx(v)} x2={sx(v)} y1={m.t} y2={m.t + ph} stroke="#e3e9ee" />
            <text x={sx(v)} y={m.t + ph + 14} fontSize={10.5} textAnchor="middle" fill="#3b5063">
              {tickLabel(v)}
            </text>
          </g>
        ))}
        {yt.map((v) => (
          <g key={`y${v}`}>
            <line x1={m.l} x2={m.l + pw} y1={sy(v)} y2={sy(v)} stroke="#e3e9ee" />
            <text x={m.l - 5} y={sy(v) + 3.5} fontSize={10.5} textAnchor="end" fill="#3b5063">
              {tickLabel(v)}
            </text>
          </g>
        ))}
        <polygon points={band("p5", "p95")} fill={colour} fillOpacity={0.15} />
        <polygon points={band("p25", "p75")} fill={colour} fillOpacity={0.3} />
        <polyline points={pts.map((p) => `${sx(p.x)},${sy(p.d.p50)}`).join(" ")} fill="none" stroke={colour} strokeWidth={2} />
        <text x={m.l + pw / 2} y={height - 6} fontSize={11.5} textAnchor="middle" fill="#223040">
          time / {unit}
          {logX ? " (log scale)" : ""}
        </text>
        <text transform={`translate(14 ${m.t + ph / 2}) rotate(-90)`} fontSize={11.5} textAnchor="middle" fill="#223040">
          fraction
        </text>
      </svg>
      <p className="text-xs text-ink-600">Line: median; dark band: 25–75 %; light band: 5–95 % of the members.</p>
    </figure>
  );
}
