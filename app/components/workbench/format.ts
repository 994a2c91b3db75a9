/** Display helpers for numbers with units on workbench screens. */
export function num(v: number | null | undefined, digits = 4): string {
  if (v == null || !Number.isFinite(v)) return "—";
  const a = Math.abs(v);
  if (a === 0) return "0";
  if (a < 1e-3 || a >= 1e6) return v.toExponential(digits - 1).replace("e+", "e");
  return Number(v.toPrecision(digits)).toString();
}

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
