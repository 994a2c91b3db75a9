/**
 * Concentration–time values as a table (@tanstack/react-table), paged, with a CSV download of
 * every row. Columns: time (s), T (K), then one column per series (mol/L). Several runs are
 * merged on their union of times (blank where a run has no value at that time).
 */
import { useMemo, useState } from "react";
import { flexRender, getCoreRowModel, getPaginationRowModel, useReactTable, type ColumnDef } from "@tanstack/react-table";
import { downloadBlob } from "./svg-export";
import { resultsCsv } from "./results-csv";
import { formatNumber } from "../format";

export interface TableSeries {
  key: string;
  /** The species' name (never its key in the mechanism). */
  label: string;
  /** The species' id in the mechanism and its formula, for the CSV's key. */
  id?: string;
  formula?: string;
  /** s */
  times: ArrayLike<number>;
  /** mol/L */
  values: ArrayLike<number | null>;
}

type Row = { t: number; T: number | null; v: (number | null)[] };

/** Blank for a missing value; otherwise six significant figures in the one number format of every page (the CSV keeps full precision). */
const fmt = (v: number | null | undefined) => (v == null || !Number.isFinite(v) ? "" : formatNumber(v, 6));

/** Rows on the union of all series' times (exact matches; series sharing a grid line up). */
export function mergeRows(series: TableSeries[], temperatures?: { times: ArrayLike<number>; values: ArrayLike<number> }): Row[] {
  const map = new Map<number, Row>();
  series.forEach((s, j) => {
    for (let k = 0; k < s.times.length; k++) {
      const t = s.times[k];
      let r = map.get(t);
      if (!r) map.set(t, (r = { t, T: null, v: new Array(series.length).fill(null) }));
      r.v[j] = s.values[k];
    }
  });
  if (temperatures) for (let k = 0; k < temperatures.times.length; k++) {
    const r = map.get(temperatures.times[k]);
    if (r) r.T = temperatures.values[k];
  }
  return [...map.values()].sort((a, b) => a.t - b.t);
}

/** The table as CSV (results-csv.ts layout: names and units in the header, a key to ids). */
export function rowsToCsv(series: TableSeries[], rows: Row[], title = "Saddlebook concentration–time values", withTemperature = true): string {
  return resultsCsv({
    title,
    columns: series.map((s) => ({ name: s.label, unit: "mol/L", id: s.id, formula: s.formula })),
    rows: rows.map((r) => [r.t, r.T, ...r.v]),
    withTemperature,
  });
}

export function ResultsTable({
  series,
  temperatures,
  filename = "saddlebook-results.csv",
  title,
}: {
  series: TableSeries[];
  temperatures?: { times: ArrayLike<number>; values: ArrayLike<number> };
  filename?: string;
  /** First comment line of the CSV, e.g. "Saddlebook run #12: …". */
  title?: string;
}) {
  const rows = useMemo(() => mergeRows(series, temperatures), [series, temperatures]);
  const [pageSize, setPageSize] = useState(25);
  const columns = useMemo<ColumnDef<Row>[]>(
    () => [
      { id: "t", header: "time (s)", accessorFn: (r) => r.t, cell: (c) => fmt(c.getValue<number>()) },
      { id: "T", header: "T (K)", accessorFn: (r) => r.T, cell: (c) => fmt(c.getValue<number | null>()) },
      ...series.map<ColumnDef<Row>>((s, j) => ({ id: `s${j}`, header: `${s.label} (mol/L)`, accessorFn: (r) => r.v[j], cell: (c) => fmt(c.getValue<number | null>()) })),
    ],
    [series],
  );
  const table = useReactTable({
    data: rows,
    columns,
    getCoreRowModel: getCoreRowModel(),
    getPaginationRowModel: getPaginationRowModel(),
    state: { pagination: { pageIndex: 0, pageSize }, columnVisibility: temperatures ? {} : { T: false } },
    autoResetPageIndex: false,
  });
  const [page, setPage] = useState(0);
  const pageCount = Math.max(1, Math.ceil(rows.length / pageSize));
  const visible = rows.slice(page * pageSize, (page + 1) * pageSize);
  const headers = table.getHeaderGroups()[0].headers;

  return (
    <div className="space-y-2" data-testid="results-table">
      <div className="flex flex-wrap items-center gap-2 text-sm">
        <button type="button" className="btn-quiet py-0.5" onClick={() => downloadBlob(new Blob([rowsToCsv(series, rows, title, !!temperatures)], { type: "text/csv;charset=utf-8" }), filename)}>
          Download CSV
        </button>
        <span className="text-ink-500">{rows.length} rows</span>
        <span className="ml-auto inline-flex items-center gap-1">
          <button type="button" className="btn-quiet py-0.5" disabled={page === 0} onClick={() => setPage(page - 1)} aria-label="Previous page">
            ‹
          </button>
          <span className="num text-xs">
            {page + 1} / {pageCount}
          </span>
          <button type="button" className="btn-quiet py-0.5" disabled={page + 1 >= pageCount} onClick={() => setPage(page + 1)} aria-label="Next page">
            ›
          </button>
          <select aria-label="Rows per page" className="field w-auto py-0.5" value={pageSize} onChange={(e) => (setPageSize(Number(e.target.value)), setPage(0))}>
            {[25, 100, 500].map((n) => (
              <option key={n} value={n}>
                {n} rows
              </option>
            ))}
          </select>
        </span>
      </div>
      <div className="max-h-[28rem] overflow-auto rounded border border-ink-100">
        <table className="w-full text-sm">
          <thead className="sticky top-0 bg-ink-50 text-left text-xs text-ink-600">
            <tr>
              {headers.map((h) => (
                <th key={h.id} className="px-2 py-1 font-semibold whitespace-nowrap">
                  {flexRender(h.column.columnDef.header, h.getContext())}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {visible.map((r, i) => (
              <tr key={i} className="border-t border-ink-100">
                {headers.map((h) => {
                  const v = h.id === "t" ? r.t : h.id === "T" ? r.T : r.v[Number(h.id.slice(1))];
                  return (
                    <td key={h.id} className="num px-2 py-0.5 whitespace-nowrap">
                      {fmt(v)}
                    </td>
                  );
                })}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
