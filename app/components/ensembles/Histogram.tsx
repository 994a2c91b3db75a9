/** Counts of an observable's values at one time across the members of an ensemble, as SVG bars. */
import type { HistogramBin } from "../../../solver/ensemble";
import { formatNumber } from "../format";

export function Histogram({ title, bins, width = 300, height = 170, testId }: { title: string; bins: HistogramBin[]; width?: number; height?: number; testId?: string }) {
  const m = { l: 36, r: 8, t: 22, b: 30 };
  const pw = width - m.l - m.r, ph = height - m.t - m.b;
  const max = Math.max(1, ...bins.map((b) => b.count));
  const lo = bins[0]?.from ?? 0, hi = bins[bins.length - 1]?.to ?? 1;
  const span = hi > lo ? hi - lo : 1;
  // enough digits to tell the ends apart on a narrow range
  const digits = Math.min(12, Math.max(3, Math.ceil(Math.log10(Math.max(Math.abs(lo), Math.abs(hi), 1e-300) / span)) + 2));
  const x = (v: number) => m.l + (bins.length === 1 ? 0.5 * pw : ((v - lo) / span) * pw);
  return (
    <svg viewBox={`0 0 ${width} ${height}`} width={width} height={height} role="img" aria-label={title} data-testid={testId} className="max-w-full">
      <text x={m.l} y={14} fontSize={11.5} fontWeight={600} fill="#172230">
        {title}
      </text>
      <rect x={m.l} y={m.t} width={pw} height={ph} fill="#f8fafb" stroke="#c6d2dc" />
      {bins.map((b, i) => {
        const x0 = bins.length === 1 ? m.l + pw * 0.4 : x(b.from);
        const w = bins.length === 1 ? pw * 0.2 : Math.max(1, x(b.to) - x(b.from) - 1);
        const h = (b.count / max) * ph;
        return (
          <rect key={i} x={x0} y={m.t + ph - h} width={w} height={h} fill="#1f5f8b">
            <title>{`${formatNumber(b.from)} – ${formatNumber(b.to)}: ${b.count}`}</title>
          </rect>
        );
      })}
      <text x={m.l} y={height - 14} fontSize={10} fill="#3b5063">
        {formatNumber(lo, digits)}
      </text>
      <text x={m.l + pw} y={height - 14} fontSize={10} textAnchor="end" fill="#3b5063">
        {formatNumber(hi, digits)}
      </text>
      <text x={m.l + pw / 2} y={height - 3} fontSize={10.5} textAnchor="middle" fill="#223040">
        fraction
      </text>
      <text x={m.l - 4} y={m.t + 8} fontSize={10} textAnchor="end" fill="#3b5063">
        {max}
      </text>
      <text transform={`translate(10 ${m.t + ph / 2}) rotate(-90)`} fontSize={10.5} textAnchor="middle" fill="#223040">
        members
      </text>
    </svg>
  );
}
