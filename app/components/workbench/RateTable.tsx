/** All steps with k_fwd and k_rev at the chosen temperature, units, half-lives of unimolecular steps and the barrier form entered. */
import { useMemo, useState } from "react";
import { flexRender, getCoreRowModel, getSortedRowModel, useReactTable, type ColumnDef, type SortingState } from "@tanstack/react-table";
import type { StepNumbers } from "./step-rates";
import { duration, num } from "./format";

const FORM_LABEL: Record<string, string> = { dG: "ΔG‡ at T", dHdS: "ΔH‡, ΔS‡", thermal: "Ea, ΔS‡, Δn‡", arrhenius: "Arrhenius A, Ea", measured: "measured k" };

export function RateTable({ numbers, onSelect }: { numbers: StepNumbers[]; onSelect?: (id: string) => void }) {
  const [sorting, setSorting] = useState<SortingState>([]);
  const columns = useMemo<ColumnDef<StepNumbers>[]>(
    () => [
      { id: "step", header: "Step", accessorFn: (r) => r.label, cell: (c) => <button type="button" className="text-left underline decoration-ink-200" onClick={() => onSelect?.(c.row.original.id)}>{c.getValue<string>()}{c.row.original.reaction !== c.getValue<string>() && <span className="ml-1 text-xs text-ink-500">{c.row.original.reaction}</span>}</button> },
      { id: "kf", header: "k_fwd", accessorFn: (r) => r.kf, cell: (c) => <span className="num">{num(c.getValue<number | null>())} {c.row.original.kfUnit}</span> },
      { id: "kr", header: "k_rev", accessorFn: (r) => r.kr, cell: (c) => <span className="num">{c.row.original.kr === null ? (c.row.original.reversible ? "needs ΔG°rxn" : "—") : `${num(c.row.original.kr)} ${c.row.original.krUnit}`}</span> },
      { id: "dG", header: "ΔG‡ (kJ/mol)", accessorFn: (r) => r.dG, cell: (c) => <span className="num">{c.getValue<number | null>() === null ? "—" : num(c.getValue<number>() / 1000, 4)}</span> },
      { id: "t12", header: "t½ (unimolecular)", accessorFn: (r) => r.halfLife, cell: (c) => <span className="num">{c.row.original.molecularity === 1 ? duration(c.getValue<number | null>()) : "—"}</span> },
      { id: "form", header: "Barrier entered as", accessorFn: (r) => FORM_LABEL[r.form] ?? r.form, cell: (c) => <span>{c.getValue<string>()}{c.row.original.extrapolated ? " (outside its T range)" : ""}</span> },
    ],
    [onSelect],
  );
  const table = useReactTable({ data: numbers, columns, state: { sorting }, onSortingChange: setSorting, getCoreRowModel: getCoreRowModel(), getSortedRowModel: getSortedRowModel() });
  return (
    <div className="max-h-[26rem] overflow-auto">
      <table className="w-full text-sm" data-testid="rate-table">
        <thead className="sticky top-0 bg-white text-left text-xs text-ink-500">
          {table.getHeaderGroups().map((hg) => (
            <tr key={hg.id}>
              {hg.headers.map((h) => (
                <th key={h.id} className="cursor-pointer py-1 pr-3 whitespace-nowrap select-none" onClick={h.column.getToggleSortingHandler()}>
                  {flexRender(h.column.columnDef.header, h.getContext())}
                  {{ asc: " ▲", desc: " ▼" }[h.column.getIsSorted() as string] ?? ""}
                </th>
              ))}
            </tr>
          ))}
        </thead>
        <tbody>
          {table.getRowModel().rows.map((r) => (
            <tr key={r.id} className="border-t border-ink-100">
              {r.getVisibleCells().map((c) => (
                <td key={c.id} className="py-0.5 pr-3 whitespace-nowrap">
                  {flexRender(c.column.columnDef.cell, c.getContext())}
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
      {numbers.some((n) => n.problem || n.caution) && (
        <ul className="mt-2 text-xs text-brick-700" data-testid="rate-table-notes">
          {numbers
            .filter((n) => n.problem || n.caution)
            .map((n) => (
              <li key={n.id}>
                {n.label}: {[n.problem, n.caution].filter(Boolean).join(" ")}
              </li>
            ))}
        </ul>
      )}
    </div>
  );
}
