/**
 * The one number format of every page: significant figures, plain decimals from 0.001 up to
 * 100 000, and powers of ten written as a kineticist writes them beyond ("1.23×10⁻⁵"), never the
 * programmer's "1.23e-5". Exports (CSV, JSON) keep full machine precision; this is for reading.
 * Pure: runs in the browser and on the server.
 */

const SUP: Record<string, string> = { "-": "⁻", "0": "⁰", "1": "¹", "2": "²", "3": "³", "4": "⁴", "5": "⁵", "6": "⁶", "7": "⁷", "8": "⁸", "9": "⁹" };
const UNSUP: Record<string, string> = Object.fromEntries(Object.entries(SUP).map(([k, v]) => [v, k]));

/** An integer in superscript digits: −5 → "⁻⁵". */
export function superscript(n: number): string {
  return String(n)
    .split("")
    .map((c) => SUP[c] ?? c)
    .join("");
}

/** `v` to `digits` significant figures; "—" for a missing or non-finite value. */
export function formatNumber(v: number | null | undefined, digits = 4): string {
  if (v == null || !Number.isFinite(v)) return "—";
  if (v === 0) return "0";
  const a = Math.abs(v);
  if (a >= 1e-3 && a < 1e5) {
    const p = Number(v.toPrecision(digits));
    if (Math.abs(p) < 1e5) return p.toString();
  }
  const [m, e] = v.toExponential(Math.max(0, digits - 1)).split("e");
  return `${Number(m)}×10${superscript(Number(e))}`;
}

/** Reads a number written by formatNumber (or plainly) back: "1.23×10⁻⁵" → 1.23e-5; NaN when it is not one. */
export function parseFormatted(text: string): number {
  const t = text.trim().replace(/−/g, "-");
  const m = /^(-?[\d.]+)×10([⁻⁰¹²³⁴⁵⁶⁷⁸⁹]+)/.exec(t);
  if (m) return Number(m[1]) * 10 ** Number(m[2].split("").map((c) => UNSUP[c]).join(""));
  const plain = /^-?[\d.]+(e[-+]?\d+)?/i.exec(t);
  return plain ? Number(plain[0]) : NaN;
}
