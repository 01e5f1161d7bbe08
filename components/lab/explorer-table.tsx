"use client";

// A TanStack table with search, column filters, sorting and paging, all in the browser: for the lab's lists.
import {
  flexRender,
  getCoreRowModel,
  getFilteredRowModel,
  getPaginationRowModel,
  getSortedRowModel,
  useReactTable,
  type ColumnDef,
  type ColumnFiltersState,
  type SortingState,
} from "@tanstack/react-table";
import { useId, useState } from "react";
import { Button, Field, Input, Select, Table, TBody, TD, TH, THead, TR } from "@/components/ui";

export interface ExplorerFilter {
  columnId: string;
  label: string;
  options: { value: string; label: string }[];
}

const sortState = (dir: false | "asc" | "desc") => (dir === "asc" ? "ascending" : dir === "desc" ? "descending" : "none");

export function ExplorerTable<T>({
  data,
  columns,
  caption,
  searchLabel,
  filters = [],
  emptyMessage,
  initialSorting = [],
  pageSize = 10,
}: {
  data: T[];
  columns: ColumnDef<T, any>[];
  caption: string;
  searchLabel: string;
  filters?: ExplorerFilter[];
  emptyMessage: string;
  initialSorting?: SortingState;
  pageSize?: number;
}) {
  const [sorting, setSorting] = useState<SortingState>(initialSorting);
  const [globalFilter, setGlobalFilter] = useState("");
  const [columnFilters, setColumnFilters] = useState<ColumnFiltersState>([]);
  const table = useReactTable({
    data,
    columns,
    state: { sorting, globalFilter, columnFilters },
    onSortingChange: setSorting,
    onGlobalFilterChange: setGlobalFilter,
    onColumnFiltersChange: setColumnFilters,
    globalFilterFn: "includesString",
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
    getPaginationRowModel: getPaginationRowModel(),
    initialState: { pagination: { pageSize } },
  });
  const statusId = useId();
  const rows = table.getRowModel().rows;
  const shown = table.getFilteredRowModel().rows.length;
  const page = table.getState().pagination.pageIndex;
  return (
    <div className="flex flex-col gap-3">
      <div className="flex flex-wrap items-end gap-3">
        <Field label={searchLabel} className="w-72">
          <Input type="search" value={globalFilter} onChange={(e) => setGlobalFilter(e.target.value)} />
        </Field>
        {filters.map((f) => (
          <Field key={f.columnId} label={f.label} className="w-52">
            <Select value={(table.getColumn(f.columnId)?.getFilterValue() as string) ?? ""} onChange={(e) => table.getColumn(f.columnId)?.setFilterValue(e.target.value || undefined)}>
              <option value="">All</option>
              {f.options.map((o) => (
                <option key={o.value} value={o.value}>
                  {o.label}
                </option>
              ))}
            </Select>
          </Field>
        ))}
        <p id={statusId} className="ml-auto text-sm text-basin-700" aria-live="polite">
          {shown} of {data.length}
        </p>
      </div>
      <Table>
        <caption className="sr-only">{caption}</caption>
        <THead>
          {table.getHeaderGroups().map((group) => (
            <TR key={group.id}>
              {group.headers.map((header) => {
                const canSort = header.column.getCanSort();
                const dir = header.column.getIsSorted();
                const content = flexRender(header.column.columnDef.header, header.getContext());
                return (
                  <TH key={header.id} aria-sort={canSort ? sortState(dir) : undefined}>
                    {canSort ? (
                      <button type="button" onClick={header.column.getToggleSortingHandler()} className="inline-flex items-center gap-1 font-semibold hover:text-basin-950">
                        {content}
                        <span aria-hidden="true" className="text-basin-400">
                          {dir === "asc" ? "▲" : dir === "desc" ? "▼" : "↕"}
                        </span>
                      </button>
                    ) : (
                      content
                    )}
                  </TH>
                );
              })}
            </TR>
          ))}
        </THead>
        <TBody>
          {rows.length === 0 ? (
            <tr>
              <td colSpan={columns.length} className="px-3 py-8 text-center text-sm text-basin-600">
                {data.length ? "Nothing matches the search and filters." : emptyMessage}
              </td>
            </tr>
          ) : (
            rows.map((row) => (
              <TR key={row.id}>
                {row.getVisibleCells().map((cell) => (
                  <TD key={cell.id}>{flexRender(cell.column.columnDef.cell, cell.getContext())}</TD>
                ))}
              </TR>
            ))
          )}
        </TBody>
      </Table>
      {table.getPageCount() > 1 && (
        <nav aria-label="Pages" className="flex items-center gap-2 text-sm">
          <Button variant="secondary" size="sm" onClick={() => table.previousPage()} disabled={!table.getCanPreviousPage()}>
            Previous
          </Button>
          <span className="tabular-nums">
            Page {page + 1} of {table.getPageCount()}
          </span>
          <Button variant="secondary" size="sm" onClick={() => table.nextPage()} disabled={!table.getCanNextPage()}>
            Next
          </Button>
        </nav>
      )}
    </div>
  );
}
