/**
 * Concentration against time on a canvas (uPlot): log or linear axes on both, species toggles,
 * a hover read-out, drag-to-zoom (double-click resets), PNG download. Lines are simulated
 * series; `markers` series (measured data) are drawn as points only. Series may have their own
 * time grids; they are aligned with uPlot.join.
 *
 * Units: time in the chosen display unit (converted from s), concentrations in the chosen unit
 * (converted from mol/L).
 */
import { useEffect, useMemo, useRef, useState } from "react";
import type uPlotType from "uplot";
import "uplot/dist/uPlot.min.css";
import { seriesColour } from "./palette";
import { downloadBlob } from "./svg-export";
import { formatNumber } from "../format";

export interface PlotSeries {
  /** Unique key, e.g. "A" or "run12:A". */
  key: string;
  /** Shown in the legend: the species' name, never its key. */
  label: string;
  /** The species' id in the mechanism and its formula (for exports' keys). */
  id?: string;
  formula?: string;
  /** s */
  times: ArrayLike<number>;
  /** mol/L */
  values: ArrayLike<number | null>;
  colour?: string;
  dash?: number[];
  markers?: boolean;
}

const TIME_UNITS = { s: 1, min: 60, h: 3600, d: 86400 } as const;
const CONC_UNITS = { "mol/L": 1, "mmol/L": 1e-3, "µmol/L": 1e-6 } as const;
type TimeUnit = keyof typeof TIME_UNITS;
type ConcUnit = keyof typeof CONC_UNITS;

/** Four significant figures in the one number format of every page. */
const fmt = (v: number | null | undefined) => formatNumber(v, 4);

export function ConcentrationPlot({
  series,
  title,
  height = 380,
  defaultLogX = false,
  defaultLogY = false,
  filename = "saddlebook-concentrations.png",
  testId = "conc-plot",
}: {
  series: PlotSeries[];
  title?: string;
  height?: number;
  defaultLogX?: boolean;
  defaultLogY?: boolean;
  filename?: string;
  testId?: string;
}) {
  const holder = useRef<HTMLDivElement>(null);
  const plot = useRef<uPlotType | null>(null);
  const [logX, setLogX] = useState(defaultLogX);
  const [logY, setLogY] = useState(defaultLogY);
  const [tUnit, setTUnit] = useState<TimeUnit>(() => pickTimeUnit(series));
  const [cUnit, setCUnit] = useState<ConcUnit>("mol/L");
  const [hidden, setHidden] = useState<Set<string>>(() => new Set());
  const [readout, setReadout] = useState<{ t: number; values: (number | null)[] } | null>(null);
  const [ready, setReady] = useState(false);
  const [width, setWidth] = useState(800);
  const colours = useMemo(() => series.map((s, i) => s.colour ?? seriesColour(i)), [series]);

  // Aligned data in display units; log axes drop non-positive values.
  const data = useMemo(() => {
    const tf = TIME_UNITS[tUnit], cf = CONC_UNITS[cUnit];
    const tables = series.map((s) => {
      const xs: number[] = [], ys: (number | null)[] = [];
      for (let k = 0; k < s.times.length; k++) {
        const x = s.times[k] / tf;
        if (logX && !(x > 0)) continue;
        const v = s.values[k];
        const y = v == null || !Number.isFinite(v) ? null : v / cf;
        xs.push(x);
        ys.push(logY && y !== null && !(y > 0) ? null : y);
      }
      return [xs, ys] as [number[], (number | null)[]];
    });
    return tables;
  }, [series, tUnit, cUnit, logX, logY]);

  useEffect(() => {
    const el = holder.current;
    if (!el) return;
    const ro = new ResizeObserver(() => setWidth(Math.max(320, el.clientWidth)));
    ro.observe(el);
    setWidth(Math.max(320, el.clientWidth));
    return () => ro.disconnect();
  }, []);

  useEffect(() => {
    let cancelled = false;
    let u: uPlotType | null = null;
    void import("uplot").then(({ default: uPlot }) => {
      if (cancelled || !holder.current) return;
      const joined = data.length === 1 ? (data[0] as unknown as uPlotType.AlignedData) : uPlot.join(data as unknown as uPlotType.AlignedData[]);
      const opts: uPlotType.Options = {
        width,
        height,
        legend: { show: false },
        cursor: { drag: { x: true, y: true, uni: 40 }, points: { size: 6 } },
        scales: {
          x: { time: false, distr: logX ? 3 : 1, log: 10 },
          y: { distr: logY ? 3 : 1, log: 10, auto: true },
        },
        axes: [
          { label: `time / ${tUnit}`, stroke: "#223040", grid: { stroke: "#e3e9ee" }, ticks: { stroke: "#c6d2dc" }, size: 40, values: (_u, vals) => vals.map((v) => (v == null ? "" : fmt(v))) },
          { label: `concentration / ${cUnit}`, stroke: "#223040", grid: { stroke: "#e3e9ee" }, ticks: { stroke: "#c6d2dc" }, size: 70, values: (_u, vals) => vals.map((v) => (v == null ? "" : fmt(v))) },
        ],
        series: [
          { label: "time" },
          ...series.map((s, i) => ({
            label: s.label,
            stroke: colours[i],
            width: s.markers ? 0 : 1.6,
            dash: s.dash,
            spanGaps: true,
            show: !hidden.has(s.key),
            points: s.markers ? { show: true, size: 7, stroke: colours[i], fill: "#ffffff", width: 1.5 } : { show: false },
            paths: s.markers ? () => null : undefined,
          })),
        ],
        hooks: {
          setCursor: [
            (pl) => {
              const idx = pl.cursor.idx;
              if (idx == null) return setReadout(null);
              setReadout({ t: pl.data[0][idx] as number, values: series.map((_, i) => (pl.data[i + 1]?.[idx] as number | null) ?? null) });
            },
          ],
        },
      };
      u = new uPlot(opts, joined, holder.current);
      plot.current = u;
      setReady(true);
    });
    return () => {
      cancelled = true;
      u?.destroy();
      plot.current = null;
    };
    // hidden is applied by setSeries below without a rebuild
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [data, width, height, logX, logY, colours]);

  function toggle(key: string, i: number) {
    const next = new Set(hidden);
    if (next.has(key)) next.delete(key);
    else next.add(key);
    setHidden(next);
    plot.current?.setSeries(i + 1, { show: !next.has(key) });
  }

  function downloadPng() {
    const u = plot.current;
    if (!u) return;
    const src = u.ctx.canvas;
    const legendH = 22 + Math.ceil(series.length / 4) * 18;
    const c = document.createElement("canvas");
    c.width = src.width;
    c.height = src.height + legendH * devicePixelRatio;
    const ctx = c.getContext("2d")!;
    ctx.fillStyle = "#ffffff";
    ctx.fillRect(0, 0, c.width, c.height);
    ctx.drawImage(src, 0, 0);
    ctx.scale(devicePixelRatio, devicePixelRatio);
    ctx.font = "12px Noto Sans, sans-serif";
    const y0 = src.height / devicePixelRatio + 16;
    series.forEach((s, i) => {
      if (hidden.has(s.key)) return;
      const x = 12 + (i % 4) * (src.width / devicePixelRatio / 4);
      const y = y0 + Math.floor(i / 4) * 18;
      ctx.fillStyle = colours[i];
      ctx.fillRect(x, y - 8, 14, 3);
      ctx.fillStyle = "#172230";
      ctx.fillText(s.label, x + 20, y - 3);
    });
    c.toBlob((b) => b && downloadBlob(b, filename), "image/png");
  }

  function resetZoom() {
    const u = plot.current;
    if (!u) return;
    u.setData(u.data, true);
  }

  return (
    <div className="space-y-2" data-testid={testId} data-ready={ready ? "1" : "0"}>
      <div className="flex flex-wrap items-center gap-2 text-sm">
        {title && <h3 className="mr-2 font-semibold">{title}</h3>}
        <label className="inline-flex items-center gap-1">
          <input type="checkbox" checked={logX} onChange={(e) => setLogX(e.target.checked)} /> log time
        </label>
        <label className="inline-flex items-center gap-1">
          <input type="checkbox" checked={logY} onChange={(e) => setLogY(e.target.checked)} /> log concentration
        </label>
        <select aria-label="Time unit" className="field w-auto py-0.5" value={tUnit} onChange={(e) => setTUnit(e.target.value as TimeUnit)}>
          {Object.keys(TIME_UNITS).map((u) => (
            <option key={u}>{u}</option>
          ))}
        </select>
        <select aria-label="Concentration unit" className="field w-auto py-0.5" value={cUnit} onChange={(e) => setCUnit(e.target.value as ConcUnit)}>
          {Object.keys(CONC_UNITS).map((u) => (
            <option key={u}>{u}</option>
          ))}
        </select>
        <button type="button" className="btn-quiet py-0.5" onClick={resetZoom}>
          Reset zoom
        </button>
        <button type="button" className="btn-quiet py-0.5" onClick={downloadPng}>
          Download PNG
        </button>
      </div>
      <div ref={holder} className="w-full" />
      <div className="flex flex-wrap gap-x-3 gap-y-1 text-xs" aria-label="Series">
        {series.map((s, i) => (
          <label key={s.key} className="inline-flex cursor-pointer items-center gap-1">
            <input type="checkbox" checked={!hidden.has(s.key)} onChange={() => toggle(s.key, i)} />
            <span className="inline-block h-0.5 w-4" style={{ background: colours[i], height: s.markers ? 6 : 2, borderRadius: s.markers ? 3 : 0 }} />
            <span>{s.label}</span>
            {readout && <span className="num text-ink-500">{fmt(readout.values[i])}</span>}
          </label>
        ))}
      </div>
      <p className="num text-xs text-ink-500" aria-live="polite" data-testid="plot-readout">
        {readout ? `t = ${fmt(readout.t)} ${tUnit}` : "Hover for values; drag to zoom, double-click to reset."}
      </p>
    </div>
  );
}

function pickTimeUnit(series: PlotSeries[]): TimeUnit {
  let tMax = 0;
  for (const s of series) if (s.times.length) tMax = Math.max(tMax, s.times[s.times.length - 1]);
  if (tMax >= 3 * 86400) return "d";
  if (tMax >= 3 * 3600) return "h";
  if (tMax >= 180) return "min";
  return "s";
}
