/** The shared step library: typo-tolerant search as you type, filters, a sortable paginated table with k at a chosen T. */
import { useMemo, useRef, useState } from "react";
import { Form, Link, useNavigation, useSubmit } from "react-router";
import { flexRender, getCoreRowModel, getPaginationRowModel, getSortedRowModel, useReactTable, type ColumnDef, type SortingState } from "@tanstack/react-table";
import type { Route } from "./+types/library";
import { requireUser } from "~/auth/current-user.server";
import { can } from "~/auth/policy.server";
import { getDb } from "../../db/client.server";
import { searchSteps, type StepSearchItem } from "../../db/access/steps.server";
import { InputError } from "../../db/access/library-errors";
import { SOURCE_TYPES, STEP_STATUSES, type SourceType, type StepStatus } from "~/components/library/step-schema";
import { StatusBadge, IllustrativeNote } from "~/components/library/StatusBadge";
import { sig, temperatureText, unitLabel } from "~/components/library/format";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Library · Saddlebook" }];
}

function num(v: string | null): number | undefined {
  if (v === null || v.trim() === "") return undefined;
  const n = Number(v);
  return Number.isFinite(n) ? n : undefined;
}

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const url = new URL(request.url);
  const p = url.searchParams;
  const tUnit = p.get("Tunit") === "C" ? "C" : "K";
  const toK = (v: number | undefined) => (v === undefined ? undefined : tUnit === "C" ? v + 273.15 : v);
  const Tin = num(p.get("T")) ?? (tUnit === "C" ? 25 : 298.15);
  let T = toK(Tin)!;
  const problems: string[] = [];
  if (!(T > 0)) {
    problems.push("The temperature must be above absolute zero; showing k at 298.15 K.");
    T = 298.15;
  }
  const query = {
    q: p.get("q") ?? "",
    status: p.getAll("status").filter((s): s is StepStatus => (STEP_STATUSES as readonly string[]).includes(s)),
    molecularity: p.getAll("m").map(Number).filter((m) => m >= 1 && m <= 3),
    source: p.getAll("source").filter((s): s is SourceType => (SOURCE_TYPES as readonly string[]).includes(s)),
    tags: (p.get("tag") ?? "").split(",").map((t) => t.trim()).filter(Boolean),
    tmin: toK(num(p.get("tmin"))),
    tmax: toK(num(p.get("tmax"))),
    T,
    mine: p.get("mine") === "1",
  };
  let result: Awaited<ReturnType<typeof searchSteps>> = { items: [], nextCursor: null, candidates: 0 };
  try {
    result = await searchSteps(getDb(), user, { ...query, limit: 100, cursor: p.get("cursor") });
  } catch (e) {
    if (e instanceof InputError) problems.push(e.message);
    else throw e;
  }
  return {
    items: result.items,
    nextCursor: result.nextCursor,
    query: { ...query, Tin, tUnit, tminIn: num(p.get("tmin")), tmaxIn: num(p.get("tmax")) },
    problems,
    canCreate: can(user, { do: "step.create" }),
    canReview: can(user, { do: "step.review", object: { ownerId: -1, status: "proposed" } }),
  };
}

type Row = StepSearchItem;

export default function Library({ loaderData }: Route.ComponentProps) {
  const { items, query, problems, nextCursor } = loaderData;
  const submit = useSubmit();
  const navigation = useNavigation();
  const formRef = useRef<HTMLFormElement>(null);
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);
  const [sorting, setSorting] = useState<SortingState>([]);
  const searching = navigation.state === "loading" && navigation.location?.pathname === "/library";

  const onChange = () => {
    if (timer.current) clearTimeout(timer.current);
    timer.current = setTimeout(() => formRef.current && submit(formRef.current, { replace: true, preventScrollReset: true }), 200);
  };

  const columns = useMemo<ColumnDef<Row>[]>(
    () => [
      {
        id: "reaction",
        header: "Step",
        accessorFn: (r) => r.label,
        cell: ({ row }) => (
          <div>
            <Link to={`/steps/${row.original.id}`} className="font-medium text-copper-700 hover:underline">
              {row.original.label}
            </Link>
            <div className="text-xs text-ink-600">{row.original.reaction}</div>
          </div>
        ),
      },
      {
        id: "barrier",
        header: "Barrier (as entered)",
        accessorFn: (r) => r.dg298 ?? Infinity,
        cell: ({ row }) => (
          <span className="num text-xs">
            {row.original.barrier.symbol} = {sig(row.original.barrier.value, 4)} {unitLabel(row.original.barrier.unit)}
          </span>
        ),
      },
      {
        id: "k",
        header: `k at ${temperatureText(query.T, query.tUnit as "K" | "C")}`,
        accessorFn: (r) => r.k ?? -1,
        cell: ({ row }) => (
          <span className="num text-xs" title={row.original.extrapolated ? "Outside the reference temperature: ΔG‡ held constant." : undefined}>
            {sig(row.original.k, 3)} {row.original.kUnit}
            {row.original.extrapolated ? " *" : ""}
          </span>
        ),
      },
      { id: "m", header: "m", accessorFn: (r) => r.molecularity, cell: ({ getValue }) => <span className="num">{String(getValue())}</span> },
      {
        id: "source",
        header: "Source",
        accessorFn: (r) => r.source ?? "",
        cell: ({ row }) => (
          <div className="text-xs">
            {row.original.source}
            <div className="max-w-56 truncate text-ink-500" title={row.original.method ?? ""}>
              {row.original.method}
            </div>
          </div>
        ),
      },
      { id: "status", header: "Status", accessorFn: (r) => r.status, cell: ({ row }) => <StatusBadge status={row.original.status} /> },
      {
        id: "range",
        header: "Valid range",
        accessorFn: (r) => r.tMin ?? 0,
        cell: ({ row }) => <span className="num text-xs">{row.original.tMin ? `${sig(row.original.tMin, 5)}–${sig(row.original.tMax, 5)} K` : "—"}</span>,
      },
    ],
    [query.T, query.tUnit],
  );

  const table = useReactTable({
    data: items,
    columns,
    state: { sorting },
    onSortingChange: setSorting,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getPaginationRowModel: getPaginationRowModel(),
    initialState: { pagination: { pageSize: 25 } },
  });

  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-end gap-3">
        <h1 className="text-2xl font-semibold tracking-tight">Step library</h1>
        <div className="ml-auto flex gap-2">
          {loaderData.canReview && (
            <Link to="/library/review" className="btn-quiet">
              Review queue
            </Link>
          )}
          {loaderData.canCreate && (
            <Link to="/library/new" className="btn-primary">
              New step
            </Link>
          )}
        </div>
      </div>
      <IllustrativeNote />
      <Form ref={formRef} method="get" className="panel grid gap-3 md:grid-cols-6" onChange={onChange} role="search">
        <div className="md:col-span-3">
          <label className="label" htmlFor="q">
            Search species, formulas, tags, method, citation, notes
          </label>
          <input id="q" name="q" type="search" className="field" defaultValue={query.q} placeholder="e.g. benzyl alcohol, C7H8O, ketene, DFT" autoComplete="off" />
        </div>
        <div>
          <label className="label" htmlFor="T">
            k at T
          </label>
          <div className="flex gap-1">
            <input id="T" name="T" className="field num" inputMode="decimal" defaultValue={String(query.Tin)} />
            <select name="Tunit" className="field w-20" defaultValue={query.tUnit} aria-label="Temperature unit">
              <option value="K">K</option>
              <option value="C">°C</option>
            </select>
          </div>
        </div>
        <div>
          <label className="label" htmlFor="tmin">
            Valid from
          </label>
          <input id="tmin" name="tmin" className="field num" inputMode="decimal" defaultValue={query.tminIn ?? ""} placeholder={query.tUnit === "C" ? "°C" : "K"} />
        </div>
        <div>
          <label className="label" htmlFor="tmax">
            Valid to
          </label>
          <input id="tmax" name="tmax" className="field num" inputMode="decimal" defaultValue={query.tmaxIn ?? ""} placeholder={query.tUnit === "C" ? "°C" : "K"} />
        </div>
        <fieldset className="md:col-span-2">
          <legend className="label">Status</legend>
          <div className="flex flex-wrap gap-3 text-sm">
            {STEP_STATUSES.map((s) => (
              <label key={s} className="flex items-center gap-1">
                <input type="checkbox" name="status" value={s} defaultChecked={query.status.includes(s)} /> {s}
              </label>
            ))}
          </div>
        </fieldset>
        <fieldset className="md:col-span-2">
          <legend className="label">Source</legend>
          <div className="flex flex-wrap gap-3 text-sm">
            {SOURCE_TYPES.map((s) => (
              <label key={s} className="flex items-center gap-1">
                <input type="checkbox" name="source" value={s} defaultChecked={query.source.includes(s)} /> {s}
              </label>
            ))}
          </div>
        </fieldset>
        <fieldset>
          <legend className="label">Molecularity</legend>
          <div className="flex gap-3 text-sm">
            {[1, 2, 3].map((m) => (
              <label key={m} className="flex items-center gap-1">
                <input type="checkbox" name="m" value={m} defaultChecked={query.molecularity.includes(m)} /> {m}
              </label>
            ))}
          </div>
        </fieldset>
        <div>
          <label className="label" htmlFor="tag">
            Tags
          </label>
          <input id="tag" name="tag" className="field" defaultValue={query.tags.join(", ")} placeholder="comma-separated" />
        </div>
        <noscript>
          <button className="btn-primary">Search</button>
        </noscript>
      </Form>
      {problems.map((p) => (
        <p key={p} className="text-sm text-brick-700" role="alert">
          {p}
        </p>
      ))}
      <div className="panel overflow-x-auto p-0">
        <p className="px-4 pt-3 text-xs text-ink-600" aria-live="polite">
          {searching ? "Searching…" : `${items.length} step(s)${nextCursor ? " (the best 100 shown; narrow the search for more)" : ""}. k in mol/L units, Eyring with κ and the step's standard state; * = ΔG‡ held constant away from its reference T.`}
        </p>
        <table className="mt-2 w-full text-sm">
          <thead>
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id} className="border-b border-ink-200 text-left text-xs text-ink-600">
                {hg.headers.map((h) => (
                  <th key={h.id} className="px-3 py-2">
                    <button type="button" className="font-semibold hover:text-copper-700" onClick={h.column.getToggleSortingHandler()}>
                      {flexRender(h.column.columnDef.header, h.getContext())}
                      {{ asc: " ▲", desc: " ▼" }[h.column.getIsSorted() as string] ?? ""}
                    </button>
                  </th>
                ))}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((r) => (
              <tr key={r.id} className="border-b border-ink-100 align-top hover:bg-ink-50">
                {r.getVisibleCells().map((c) => (
                  <td key={c.id} className="px-3 py-2">
                    {flexRender(c.column.columnDef.cell, c.getContext())}
                  </td>
                ))}
              </tr>
            ))}
            {items.length === 0 && (
              <tr>
                <td colSpan={7} className="px-3 py-6 text-center text-ink-600">
                  No steps match. Try fewer words or fewer filters.
                </td>
              </tr>
            )}
          </tbody>
        </table>
        <div className="flex items-center gap-2 px-4 py-2 text-sm">
          <button type="button" className="btn-quiet" onClick={() => table.previousPage()} disabled={!table.getCanPreviousPage()}>
            Previous
          </button>
          <span>
            Page {table.getState().pagination.pageIndex + 1} of {Math.max(table.getPageCount(), 1)}
          </span>
          <button type="button" className="btn-quiet" onClick={() => table.nextPage()} disabled={!table.getCanNextPage()}>
            Next
          </button>
        </div>
      </div>
    </div>
  );
}
