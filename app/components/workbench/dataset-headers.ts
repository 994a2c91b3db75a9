/**
 * What a concentration–time CSV says about itself in its header line and comment lines: the
 * concentration unit of a column ("A (mmol/L)", "[B] / µM", "C, M"), the experiment's temperature
 * from a comment line ("# T = 25 °C", "# temperature: 298.15 K") or a temperature column
 * ("T (K)", "temp / °C", constant within 0.5 K), and which species of a mechanism each column
 * names (by its name or formula, case and spacing aside). Pure: the upload page's preview and the
 * server read a file the same way. Units: temperatures returned in K (T/K = t/°C + 273.15).
 */

export type ConcentrationUnit = "mol/L" | "mmol/L" | "umol/L";

/** The unit in a column header's brackets or after a slash or comma, or null when it names none. */
export function guessConcentrationUnit(header: string): ConcentrationUnit | null {
  const m = /(?:\(|\[|\/|,)\s*([mµμu]?mol\s*\/\s*(?:L|dm3|dm\^3)|[mµμu]?mol\s*L\s*(?:-1|⁻¹)|[mµμu]?M)\s*[)\]]?\s*$/.exec(header.trim());
  if (!m) return null;
  const u = m[1].replace(/\s+/g, "");
  const prefix = /^[µμu]/.test(u) ? "u" : /^m(?!ol)/.test(u) ? "m" : "";
  return prefix === "u" ? "umol/L" : prefix === "m" ? "mmol/L" : "mol/L";
}

/** A column header's name without its unit: "benzyl alcohol (mmol/L)" → "benzyl alcohol", "[A] / M" → "A". */
export function headerName(header: string): string {
  const h = header
    .trim()
    .replace(/\s*(?:\(|\[)[^()[\]]*(?:\)|\])\s*$/, "")
    .replace(/\s*(?:\/|,)\s*[^/,]*$/, "")
    .trim();
  const bracketed = /^\[(.+)\]$/.exec(h);
  return (bracketed ? bracketed[1] : h).trim() || header.trim();
}

export interface TemperatureReading {
  /** K */
  K: number;
  /** where it was read, in words: "comment line 1" or "column “T (K)”" */
  from: string;
}

const TEMP_COMMENT = /^#\s*(?:T|temp|temperature)\s*[=:]\s*([+-]?\d+(?:[.,]\d+)?)\s*(°\s*C|degC|C|K)(?![A-Za-z])/i;
const TEMP_COLUMN = /^\s*(?:T|temp|temperature)\s*(?:\(|\[|\/)\s*(°\s*C|degC|K)\s*[)\]]?\s*$/i;

const toK = (v: number, unit: string) => (/K/.test(unit) ? v : v + 273.15);

/**
 * The experiment's temperature: a comment line first, else a temperature column whose values
 * agree within 0.5 K (their mean), else null. A column that varies more is a problem, not a guess.
 */
export function readTemperature(text: string, header: string[], rows: { line: number; cells: string[] }[]): { ok: true; value: TemperatureReading | null } | { ok: false; message: string } {
  const lines = text.replace(/^\uFEFF/, "").split(/\r?\n/);
  for (let i = 0; i < lines.length; i++) {
    const m = TEMP_COMMENT.exec(lines[i].trim());
    if (m) return { ok: true, value: { K: toK(Number(m[1].replace(",", ".")), m[2]), from: `comment line ${i + 1}` } };
  }
  const j = header.findIndex((h) => TEMP_COLUMN.test(h));
  if (j < 0) return { ok: true, value: null };
  const unit = TEMP_COLUMN.exec(header[j])![1];
  const vals: number[] = [];
  for (const r of rows) {
    const s = (r.cells[j] ?? "").trim();
    if (s === "") continue;
    const v = Number(s.replace(",", "."));
    if (!Number.isFinite(v)) return { ok: false, message: `Line ${r.line}: the temperature "${s}" in column "${header[j]}" is not a number.` };
    vals.push(toK(v, unit));
  }
  if (!vals.length) return { ok: true, value: null };
  const lo = Math.min(...vals), hi = Math.max(...vals);
  if (hi - lo > 0.5) return { ok: false, message: `The temperature column "${header[j]}" varies from ${lo.toFixed(2)} K to ${hi.toFixed(2)} K; a dataset is stored at one temperature.` };
  return { ok: true, value: { K: vals.reduce((a, b) => a + b, 0) / vals.length, from: `column “${header[j]}”` } };
}

/** Is this header the temperature column? (It is then neither time nor a species.) */
export const isTemperatureColumn = (header: string) => TEMP_COLUMN.test(header);

export interface SpeciesChoice {
  id: string;
  label: string;
  formula?: string | null;
}

const norm = (s: string) => s.toLowerCase().replace(/[\s_\-·.]+/g, "");

/** The mechanism species a column names (by name, then formula), or null. */
export function matchSpecies(header: string, species: SpeciesChoice[]): string | null {
  const name = norm(headerName(header));
  if (!name) return null;
  const byLabel = species.find((s) => norm(s.label) === name);
  if (byLabel) return byLabel.id;
  const byFormula = species.find((s) => s.formula && norm(s.formula) === name);
  return byFormula ? byFormula.id : null;
}
