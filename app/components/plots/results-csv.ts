/**
 * CSV of concentration–time results, the one layout every download and the results API share:
 * `#` comment lines first (what the file is, its units, and a key from each column to the
 * species' name, formula and id in the mechanism), then one header row of names with units in
 * parentheses — "time (s)", "T (K)", "Cyclohexanone (mol/L)" — then the values. Spreadsheets
 * show the comments as rows; most CSV readers skip them with their comment option (`#`).
 * Pure: runs in the browser and on the server.
 */

export interface CsvSeriesColumn {
  /** What a kineticist calls it: the species' name (with a run number when several runs share a file). */
  name: string;
  /** Unit of the values, e.g. "mol/L". */
  unit: string;
  /** The species' id in the mechanism (for the key). */
  id?: string;
  formula?: string;
  /** Extra words for the key, e.g. "run #12". */
  note?: string;
}

/** A text cell, quoted when it holds a comma, quote or line break. */
export const esc = (v: string) => (/[",\n\r]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v);
/** A number cell at full precision; empty for a missing or non-finite value. */
export const cell = (x: number | null | undefined) => (x == null || !Number.isFinite(x) ? "" : String(x));
/** Comment text on one line. */
export const flat = (v: string) => v.replace(/[\r\n]+/g, " ");

/** Header texts "name (unit)", made unique by appending " [2]", " [3]" … to repeats. */
export function columnHeaders(columns: CsvSeriesColumn[]): string[] {
  const seen = new Map<string, number>();
  return columns.map((c) => {
    const base = `${c.name} (${c.unit})`;
    const n = (seen.get(base) ?? 0) + 1;
    seen.set(base, n);
    return n === 1 ? base : `${c.name} [${n}] (${c.unit})`;
  });
}

/**
 * The CSV text. `rows` are [time (s), T (K) or null, ...values] in column order; `withTemperature`
 * false leaves the T column out (datasets without one).
 */
export function resultsCsv(opts: { title: string; columns: CsvSeriesColumn[]; rows: Iterable<ReadonlyArray<number | null | undefined>>; withTemperature?: boolean }): string {
  const withT = opts.withTemperature !== false;
  const heads = columnHeaders(opts.columns);
  const lead = withT ? ["time (s)", "T (K)"] : ["time (s)"];
  const lines = [
    `# ${flat(opts.title)}`,
    `# Units are in each column header: time in s${withT ? ", temperature T in K" : ""}, concentrations as stated.`,
    "# Key: column header = species in the mechanism (id, formula).",
    ...opts.columns.map((c, i) => {
      const bits = [c.id ? `id ${c.id}` : null, c.formula ? `formula ${c.formula}` : null, c.note ?? null].filter(Boolean);
      return `# ${flat(heads[i])} = ${flat(c.name)}${bits.length ? ` (${flat(bits.join(", "))})` : ""}`;
    }),
    [...lead, ...heads].map(esc).join(","),
  ];
  for (const r of opts.rows) lines.push((withT ? r : [r[0], ...r.slice(2)]).map(cell).join(","));
  return lines.join("\n") + "\n";
}
