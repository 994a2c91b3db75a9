/**
 * Measured concentration–time CSV files (NMR, HPLC, UV-vis exports): parsing with papaparse,
 * a column mapping (which column is time, which columns are which species) and row-level
 * validation with line numbers. Shared by the upload page (client preview) and the server.
 *
 * Line numbers are 1-based lines of the file (a header line counts); quoted fields spanning
 * lines are not expected in such exports.
 */
import Papa from "papaparse";
import { z } from "zod";
import { MAX_TEMPERATURE_K } from "../../../solver/units";

export const MAX_CSV_BYTES = 5_000_000;
export const MAX_DATA_ROWS = 100_000;

export interface ParsedCsv {
  header: string[];
  /** data rows (cells as text) with their file line numbers */
  rows: { line: number; cells: string[] }[];
  delimiter: string;
}

export type CsvOutcome = { ok: true; value: ParsedCsv } | { ok: false; message: string };

const NUMBER_RE = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

export function parseNumberCell(s: string): number | null | typeof NaN {
  const t = s.trim().replace(/\u2212/g, "-");
  if (t === "") return null;
  return NUMBER_RE.test(t) ? Number(t) : NaN;
}

/** CSV text → header and data rows. The first non-empty, non-comment line is the header. */
export function parseCsv(text: string): CsvOutcome {
  if (text.length > MAX_CSV_BYTES) return { ok: false, message: `The file is larger than ${MAX_CSV_BYTES / 1e6} MB.` };
  const clean = text.replace(/^\uFEFF/, "");
  const res = Papa.parse<string[]>(clean, { skipEmptyLines: false, delimiter: "" });
  const data = res.data;
  let header: string[] | null = null;
  const rows: ParsedCsv["rows"] = [];
  for (let i = 0; i < data.length; i++) {
    const cells = data[i];
    const line = i + 1;
    if (cells.length === 0 || cells.every((c) => c.trim() === "")) continue;
    if (cells[0].trim().startsWith("#")) continue;
    if (!header) {
      header = cells.map((c, j) => c.trim() || `column ${j + 1}`);
      continue;
    }
    rows.push({ line, cells });
  }
  if (!header) return { ok: false, message: "The file has no header line." };
  if (header.length < 2) return { ok: false, message: "The file needs at least two columns: time and one concentration." };
  if (rows.length === 0) return { ok: false, message: "The file has a header but no data rows." };
  if (rows.length > MAX_DATA_ROWS) return { ok: false, message: `The file has more than ${MAX_DATA_ROWS} data rows.` };
  return { ok: true, value: { header, rows, delimiter: res.meta.delimiter } };
}

/** Why a dataset's temperature (K) cannot be stored, or null: above 0 K and at most MAX_TEMPERATURE_K. */
export function datasetTemperatureProblem(TK: number): { message: string; field: string } | null {
  if (!(TK > 0)) return { message: "The temperature must be above absolute zero.", field: "must be above 0 K" };
  if (TK > MAX_TEMPERATURE_K) return { message: `The temperature must be at most ${MAX_TEMPERATURE_K} K.`, field: `must be at most ${MAX_TEMPERATURE_K} K` };
  return null;
}

export const DatasetMetaSchema = z.object({
  name: z.string().trim().min(1, "Give the dataset a name.").max(300, "The name is at most 300 characters."),
  notes: z.string().max(10_000).optional(),
  temperature: z.coerce.number({ message: "The temperature must be a number." }).refine(Number.isFinite, "The temperature must be a number."),
  temperatureUnit: z.enum(["K", "degC"]),
  timeUnit: z.enum(["s", "min", "h"], { message: "Choose the time unit of the time column." }),
  concentrationUnit: z.enum(["mol/L", "mmol/L", "umol/L"], { message: "Choose the concentration unit." }),
  mechanismId: z.coerce.number().int().positive().optional(),
});

export const MappingSchema = z.object({
  time: z.string().min(1, "Choose the time column."),
  /** column name → species id; columns not listed are ignored */
  species: z.record(z.string(), z.string().trim().min(1).max(200)).refine((m) => Object.keys(m).length > 0, "Map at least one column to a species."),
});
export type Mapping = z.infer<typeof MappingSchema>;

export interface RowError {
  line: number;
  message: string;
}

export interface MappedData {
  times: number[];
  series: Record<string, (number | null)[]>;
}

/** Applies a mapping; every bad cell becomes an error naming its line and column. */
export function applyMapping(csv: ParsedCsv, mapping: Mapping): { ok: true; value: MappedData } | { ok: false; errors: RowError[]; message: string } {
  const errors: RowError[] = [];
  const col = (name: string) => csv.header.indexOf(name);
  const ti = col(mapping.time);
  if (ti < 0) return { ok: false, errors: [], message: `The time column "${mapping.time}" is not in the file.` };
  const spCols: [number, string, string][] = [];
  const seen = new Set<string>();
  for (const [c, id] of Object.entries(mapping.species)) {
    const j = col(c);
    if (j < 0) return { ok: false, errors: [], message: `The column "${c}" is not in the file.` };
    if (j === ti) return { ok: false, errors: [], message: `The column "${c}" is the time column; it cannot also be a species.` };
    if (seen.has(id)) return { ok: false, errors: [], message: `Two columns are mapped to species "${id}".` };
    seen.add(id);
    spCols.push([j, c, id]);
  }
  const times: number[] = [];
  const series: Record<string, (number | null)[]> = {};
  for (const [, , id] of spCols) series[id] = [];
  let prev = -Infinity;
  for (const r of csv.rows) {
    const t = parseNumberCell(r.cells[ti] ?? "");
    if (t === null || Number.isNaN(t)) {
      errors.push({ line: r.line, message: `Line ${r.line}: the time "${(r.cells[ti] ?? "").trim()}" in column "${mapping.time}" is not a number.` });
      continue;
    }
    if (t < 0) {
      errors.push({ line: r.line, message: `Line ${r.line}: the time ${t} is negative.` });
      continue;
    }
    if (t < prev) {
      errors.push({ line: r.line, message: `Line ${r.line}: the time ${t} is earlier than the line before; sort the rows by time.` });
      continue;
    }
    let rowOk = true;
    const vals: (number | null)[] = [];
    for (const [j, c] of spCols) {
      const v = parseNumberCell(r.cells[j] ?? "");
      if (v !== null && Number.isNaN(v)) {
        errors.push({ line: r.line, message: `Line ${r.line}: "${(r.cells[j] ?? "").trim()}" in column "${c}" is not a number.` });
        rowOk = false;
        break;
      }
      if (v !== null && v < 0) {
        errors.push({ line: r.line, message: `Line ${r.line}: the concentration ${v} in column "${c}" is negative.` });
        rowOk = false;
        break;
      }
      vals.push(v);
    }
    if (!rowOk) continue;
    prev = t;
    times.push(t);
    spCols.forEach(([, , id], k) => series[id].push(vals[k]));
  }
  if (errors.length) {
    const n = errors.length;
    return { ok: false, errors, message: n === 1 ? errors[0].message : `${n} lines are not usable; the first is line ${errors[0].line}: ${errors[0].message.replace(/^Line \d+: /, "")}` };
  }
  if (times.length < 2) return { ok: false, errors: [], message: "A dataset needs at least two time points." };
  return { ok: true, value: { times, series } };
}

/** Default mapping: the first column whose name mentions time (else the first) is time; every other column a species named after it. */
export function guessMapping(header: string[]): Mapping {
  const ti = Math.max(0, header.findIndex((h) => /^(t|time|zeit|temps|minutes?|min|s|sec|seconds?|hours?|h)\b/i.test(h.trim())));
  const species: Record<string, string> = {};
  header.forEach((h, j) => {
    if (j !== ti) species[h] = h.replace(/\s*[([].*$/, "").trim() || h;
  });
  return { time: header[ti], species };
}

/** A time unit read from the time column's header ("t / min", "time (h)"), if any. */
export function guessTimeUnit(header: string): "s" | "min" | "h" | null {
  const m = /(?:\/|\(|\[)\s*(s|sec|min|h|hr|hours?)\s*[)\]]?\s*$/i.exec(header);
  if (!m) return null;
  const u = m[1].toLowerCase();
  return u.startsWith("s") ? "s" : u.startsWith("min") ? "min" : "h";
}
