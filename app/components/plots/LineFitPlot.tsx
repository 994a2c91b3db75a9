/**
 * A scatter of (x, y) points with a fitted straight line y = intercept + slope·x, drawn as SVG
 * (Eyring and Arrhenius plots). Axis titles carry the quantity and its unit.
 */
import { forwardRef } from "react";
import { niceTicks, padRange, tickLabel } from "./ticks";

export interface LineFitPlotProps {
  title: string;
  xLabel: string;
  yLabel: string;
  x: number[];
  y: number[];
  slope: number;
  intercept: number;
  /** Scale applied to x tick labels only (e.g. 1000 to show 10³/T). */
  xTickScale?: number;
  width?: number;
  height?: number;
  testId?: string;
}

export const LineFitPlot = forwardRef<SVGSVGElement, LineFitPlotProps>(function LineFitPlot(
  { title, xLabel, yLabel, x, y, slope, intercept, xTickScale = 1, width = 460, height = 320, testId },
  ref,
) {
  const m = { l: 64, r: 16, t: 30, b: 48 };
  const [x0, x1] = padRange(Math.min(...x), Math.max(...x));
  const fitY = [intercept + slope * x0, intercept + slope * x1];
  const [y0, y1] = padRange(Math.min(...y, ...fitY), Math.max(...y, ...fitY));
  const pw = width - m.l - m.r;
  const ph = height - m.t - m.b;
  const sx = (v: number) => m.l + ((v - x0) / (x1 - x0)) * pw;
  const sy = (v: number) => m.t + ph - ((v - y0) / (y1 - y0)) * ph;
  const xt = niceTicks(x0 * xTickScale, x1 * xTickScale, 5).map((v) => v / xTickScale).filter((v) => v >= x0 && v <= x1);
  const yt = niceTicks(y0, y1, 5).filter((v) => v >= y0 && v <= y1);
  return (
    <svg ref={ref} viewBox={`0 0 ${width} ${height}`} width={width} height={height} role="img" aria-label={title} data-testid={testId} className="max-w-full">
      <text x={m.l} y={18} fontSize={13} fontWeight={600} fill="#172230">
        {title}
      </text>
      <rect x={m.l} y={m.t} width={pw} height={ph} fill="#f8fafb" stroke="#c6d2dc" />
      {xt.map((v) => (
        <g key={`x${v}`}>
          <line x1={sx(v)} x2={sx(v)} y1={m.t} y2={m.t + ph} stroke="#e3e9ee" />
          <text x={sx(v)} y={m.t + ph + 15} fontSize={10.5} textAnchor="middle" fill="#3b5063">
            {tickLabel(v * xTickScale)}
          </text>
        </g>
      ))}
      {yt.map((v) => (
        <g key={`y${v}`}>
          <line x1={m.l} x2={m.l + pw} y1={sy(v)} y2={sy(v)} stroke="#e3e9ee" />
          <text x={m.l - 6} y={sy(v) + 3.5} fontSize={10.5} textAnchor="end" fill="#3b5063">
            {tickLabel(v)}
          </text>
        </g>
      ))}
      <line x1={sx(x0)} y1={sy(fitY[0])} x2={sx(x1)} y2={sy(fitY[1])} stroke="#a65a2b" strokeWidth={1.8} />
      {x.map((v, i) => (
        <circle key={i} cx={sx(v)} cy={sy(y[i])} r={4} fill="#2e3f4f" stroke="#ffffff" strokeWidth={1} />
      ))}
      <text x={m.l + pw / 2} y={height - 8} fontSize={11.5} textAnchor="middle" fill="#223040">
        {xLabel}
      </text>
      <text transform={`translate(14 ${m.t + ph / 2}) rotate(-90)`} fontSize={11.5} textAnchor="middle" fill="#223040">
        {yLabel}
      </text>
    </svg>
  );
});
