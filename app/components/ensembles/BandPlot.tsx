/**
 * An observable of an ensemble against time on a canvas (uPlot): the median as a line, the
 * 25–75 % band darker and the 5–95 % band lighter. Fractions (0–1) on y; time in the display
 * unit that suits the end time (converted from s).
 */
import { useEffect, useRef, useState } from "react";
import type uPlotType from "uplot";
import "uplot/dist/uPlot.min.css";
import type { Distribution } from "../../../solver/ensemble";
import { formatNumber } from "../format";

const UNITS: [string, number][] = [["d", 86400], ["h", 3600], ["min", 60], ["s", 1]];

export function BandPlot({ title, times, series, logX, colour = "#1f5f8b", testId }: { title: string; times: number[]; series: (Distribution | null)[]; logX: boolean; colour?: string; testId?: string }) {
  const holder = useRef<HTMLDivElement>(null);
  const [width, setWidth] = useState(560);
  const tEnd = times[times.length - 1] ?? 1;
  const [unit, factor] = UNITS.find(([, f]) => tEnd / f >= 2) ?? ["s", 1];

  useEffect(() => {
    const el = holder.current;
    if (!el) return;
    const ro = new ResizeObserver(() => setWidth(Math.max(300, el.clientWidth)));
    ro.observe(el);
    setWidth(Math.max(300, el.clientWidth));
    return () => ro.disconnect();
  }, []);

  useEffect(() => {
    let u: uPlotType | null = null;
    let cancelled = false;
    void import("uplot").then(({ default: uPlot }) => {
      if (cancelled || !holder.current) return;
      const pick = (k: keyof Distribution) => series.map((d) => (d ? d[k] : null));
      const data = [times.map((t) => t / factor), pick("p5"), pick("p25"), pick("p50"), pick("p75"), pick("p95")] as uPlotType.AlignedData;
      const edge = { stroke: "transparent", width: 0, points: { show: false } };
      u = new uPlot(
        {
          width,
          height: 260,
          legend: { show: false },
          cursor: { points: { size: 5 } },
          scales: { x: { time: false, distr: logX ? 3 : 1, log: 10 }, y: { auto: true } },
          axes: [
            { label: `time / ${unit}`, stroke: "#223040", grid: { stroke: "#e3e9ee" }, size: 40, values: (_u, v) => v.map((x) => (x == null ? "" : formatNumber(x, 3))) },
            { label: "fraction", stroke: "#223040", grid: { stroke: "#e3e9ee" }, size: 56, values: (_u, v) => v.map((x) => (x == null ? "" : formatNumber(x, 3))) },
          ],
          series: [{ label: "time" }, { label: "5 %", ...edge }, { label: "25 %", ...edge }, { label: "median", stroke: colour, width: 2 }, { label: "75 %", ...edge }, { label: "95 %", ...edge }],
          bands: [
            { series: [5, 1], fill: `${colour}26` },
            { series: [4, 2], fill: `${colour}4d` },
          ],
        },
        data,
        holder.current,
      );
    });
    return () => {
      cancelled = true;
      u?.destroy();
    };
  }, [times, series, logX, width, unit, factor, colour]);

  return (
    <figure className="space-y-1" data-testid={testId}>
      <figcaption className="text-sm font-semibold">{title}</figcaption>
      <div ref={holder} role="img" aria-label={`${title}: median with 25–75 % and 5–95 % bands against time`} />
      <p className="text-xs text-ink-600">Line: median; dark band: 25–75 %; light band: 5–95 % of the members.</p>
    </figure>
  );
}
