"use client";

import {
  createColumnHelper,
  flexRender,
  getCoreRowModel,
  getFilteredRowModel,
  getSortedRowModel,
  useReactTable,
  type SortingState,
} from "@tanstack/react-table";
import Link from "next/link";
import { useState } from "react";
import { Field, Input } from "@/components/ui/input";
import type { SiteStationRow } from "@/lib/sites/service";

const col = createColumnHelper<SiteStationRow>();

export type StationsTableProps = { stations: SiteStationRow[]; linkStations: boolean };

/** The site's stations: sortable by any column, filterable by name or status. */
export function StationsTable({ stations, linkStations }: StationsTableProps) {
  const [sorting, setSorting] = useState<SortingState>([{ id: "name", desc: false }]);
  const [filter, setFilter] = useState("");
  const columns = [
    col.accessor("name", {
      header: "Station",
      cell: (c) =>
        linkStations ? (
          <Link className="font-bold text-accent underline" href={`/stations/${c.row.original.slug}`}>
            {c.getValue()}
          </Link>
        ) : (
          <span className="font-bold">{c.getValue()}</span>
        ),
    }),
    col.accessor("status", {
      header: "Status",
      cell: (c) => `${c.getValue()}${c.row.original.approval !== "approved" ? ` · ${c.row.original.approval}` : ""}`,
    }),
    col.accessor("lastReadingAt", {
      header: "Last reading",
      cell: (c) => (c.getValue() ? new Date(c.getValue()!).toISOString().slice(0, 16).replace("T", " ") + " UTC" : "—"),
      sortUndefined: "last",
    }),
    col.accessor("nightsReported", { header: "Usable nights", cell: (c) => c.getValue() }),
    col.accessor("medianMag", { header: "30-night median", cell: (c) => (c.getValue() === null ? "—" : c.getValue()!.toFixed(2)) }),
    col.accessor("calibrationOffsetMag", {
      header: "Calibration offset",
      cell: (c) => `${c.getValue() >= 0 ? "+" : "−"}${Math.abs(c.getValue()).toFixed(2)} mag`,
    }),
  ];
  const table = useReactTable({
    data: stations,
    columns,
    state: { sorting, globalFilter: filter },
    onSortingChange: setSorting,
    onGlobalFilterChange: setFilter,
    globalFilterFn: (row, _id, value: string) => {
      const v = value.toLowerCase();
      return row.original.name.toLowerCase().includes(v) || row.original.status.includes(v) || row.original.approval.includes(v);
    },
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
  });
  return (
    <div className="flex flex-col gap-3">
      <div className="max-w-xs">
        <Field label="Filter stations" htmlFor="station-filter" hint="Name, status or approval">
          <Input id="station-filter" type="search" value={filter} onChange={(e) => setFilter(e.target.value)} />
        </Field>
      </div>
      <div className="overflow-x-auto">
        <table className="w-full min-w-[40rem] text-left text-sm" data-testid="stations-table">
          <thead>
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id} className="border-b border-line">
                {hg.headers.map((h) => {
                  const sorted = h.column.getIsSorted();
                  return (
                    <th key={h.id} scope="col" aria-sort={sorted === "asc" ? "ascending" : sorted === "desc" ? "descending" : "none"} className="py-1 pr-3">
                      <button type="button" onClick={h.column.getToggleSortingHandler()} className="flex min-h-11 items-center gap-1 font-bold hover:text-accent">
                        {flexRender(h.column.columnDef.header, h.getContext())}
                        <span aria-hidden className="text-muted">
                          {sorted === "asc" ? "▲" : sorted === "desc" ? "▼" : "↕"}
                        </span>
                      </button>
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((r) => (
              <tr key={r.id} className="border-b border-line/60">
                {r.getVisibleCells().map((c) => (
                  <td key={c.id} className="py-2 pr-3 font-mono tabular-nums first:font-sans">
                    {flexRender(c.column.columnDef.cell, c.getContext())}
                  </td>
                ))}
              </tr>
            ))}
            {table.getRowModel().rows.length === 0 ? (
              <tr>
                <td colSpan={columns.length} className="py-4 text-muted">
                  No station matches.
                </td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </div>
    </div>
  );
}
