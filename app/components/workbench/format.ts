/** Display helpers for numbers with units on workbench screens, in the one number format of every page (../format.ts). */
import { formatNumber } from "../format";

export const num = formatNumber;

/** A duration in s shown in the largest unit that keeps it ≥ 1 (s, min, h, d). */
export function duration(s: number | null | undefined): string {
  if (s == null || !Number.isFinite(s)) return "not reached";
  if (s < 120) return `${num(s)} s`;
  if (s < 7200) return `${num(s / 60)} min`;
  if (s < 2 * 86400) return `${num(s / 3600)} h`;
  return `${num(s / 86400)} d`;
}

export function pct(f: number | null | undefined, digits = 3): string {
  if (f == null || !Number.isFinite(f)) return "—";
  if (Math.abs(f) < 1e-9) return "0 %";
  return `${Number((f * 100).toPrecision(digits))} %`;
}
