import { formatNumber } from "../format";

/** "Nice" axis ticks (1, 2, 5 × 10^n steps) for linear axes, and decade ticks for log axes. */
export function niceTicks(min: number, max: number, target = 6): number[] {
  if (!Number.isFinite(min) || !Number.isFinite(max)) return [];
  if (min === max) {
    const d = Math.abs(min) || 1;
    min -= d * 0.1;
    max += d * 0.1;
  }
  const span = max - min;
  const raw = span / Math.max(1, target);
  const mag = Math.pow(10, Math.floor(Math.log10(raw)));
  const norm = raw / mag;
  const step = (norm < 1.5 ? 1 : norm < 3 ? 2 : norm < 7 ? 5 : 10) * mag;
  const out: number[] = [];
  for (let v = Math.ceil(min / step) * step; v <= max + step * 1e-9; v += step) out.push(Math.abs(v) < step * 1e-9 ? 0 : Number(v.toPrecision(12)));
  return out;
}

export function padRange(min: number, max: number, frac = 0.06): [number, number] {
  if (min === max) {
    const d = Math.abs(min) * 0.05 || 1;
    return [min - d, max + d];
  }
  const p = (max - min) * frac;
  return [min - p, max + p];
}

/** Compact tick label, in the one number format of every page. */
export function tickLabel(v: number): string {
  const a = Math.abs(v);
  return formatNumber(v, a >= 1e-3 && a < 1e5 ? 6 : 2);
}
