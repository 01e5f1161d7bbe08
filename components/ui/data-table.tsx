"use client";

import {
  flexRender,
  getCoreRowModel,
  getSortedRowModel,
  useReactTable,
  type ColumnDef,
  type SortingState,
} from "@tanstack/react-table";
import { useState, type ReactNode } from "react";
import { cn } from "./cn";
import { Table, TableCaption, TBody, TD, TH, THead, TR } from "./table";

/** Read from `columnDef.meta`; kept local rather than augmenting the library's global ColumnMeta. */
export interface DataTableColumnMeta {
  numeric?: boolean;
  headerClassName?: string;
  cellClassName?: string;
}

export interface DataTableProps<T> {
  data: T[];
  // `any` for the value type is what the library's own helpers produce for mixed columns.
  columns: ColumnDef<T, any>[];
  caption?: ReactNode;
  emptyMessage?: ReactNode;
  initialSorting?: SortingState;
  getRowId?: (row: T, index: number) => string;
  className?: string;
}

function metaOf(meta: unknown): DataTableColumnMeta {
  return (meta ?? {}) as DataTableColumnMeta;
}

export function DataTable<T>({
  data,
  columns,
  caption,
  emptyMessage = "Nothing to show yet.",
  initialSorting = [],
  getRowId,
  className,
}: DataTableProps<T>) {
  const [sorting, setSorting] = useState<SortingState>(initialSorting);
  const table = useReactTable({
    data,
    columns,
    state: { sorting },
    onSortingChange: setSorting,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getRowId,
  });

  const rows = table.getRowModel().rows;
  const columnCount = table.getVisibleLeafColumns().length;

  return (
    <Table containerClassName={className}>
      {caption && <TableCaption>{caption}</TableCaption>}
      <THead>
        {table.getHeaderGroups().map((group) => (
          <TR key={group.id}>
            {group.headers.map((header) => {
              const meta = metaOf(header.column.columnDef.meta);
              const canSort = header.column.getCanSort();
              const dir = header.column.getIsSorted();
              const content = header.isPlaceholder
                ? null
                : flexRender(header.column.columnDef.header, header.getContext());
              return (
                <TH
                  key={header.id}
                  colSpan={header.colSpan > 1 ? header.colSpan : undefined}
                  numeric={meta.numeric}
                  className={meta.headerClassName}
                  aria-sort={
                    canSort ? (dir === "asc" ? "ascending" : dir === "desc" ? "descending" : "none") : undefined
                  }
                >
                  {canSort && !header.isPlaceholder ? (
                    <button
                      type="button"
                      onClick={header.column.getToggleSortingHandler()}
                      className={cn(
                        "-mx-1 inline-flex items-center gap-1 rounded px-1 font-semibold hover:text-basin-950",
                        meta.numeric && "flex-row-reverse",
                      )}
                    >
                      {content}
                      <SortIcon dir={dir} />
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
            <td colSpan={columnCount} className="px-3 py-10 text-center text-sm text-basin-600">
              {emptyMessage}
            </td>
          </tr>
        ) : (
          rows.map((row) => (
            <TR key={row.id}>
              {row.getVisibleCells().map((cell) => {
                const meta = metaOf(cell.column.columnDef.meta);
                return (
                  <TD key={cell.id} numeric={meta.numeric} className={meta.cellClassName}>
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </TD>
                );
              })}
            </TR>
          ))
        )}
      </TBody>
    </Table>
  );
}

function SortIcon({ dir }: { dir: false | "asc" | "desc" }) {
  // Direction is already conveyed by aria-sort on the header cell; the glyph is for sighted users.
  return (
    <svg
      className={cn("size-3.5 shrink-0", dir ? "text-basin-700" : "text-basin-300")}
      viewBox="0 0 16 16"
      fill="none"
      aria-hidden="true"
    >
      <path
        d="M5 6.5 8 3.5l3 3"
        stroke="currentColor"
        strokeWidth="1.5"
        strokeLinecap="round"
        strokeLinejoin="round"
        opacity={dir === "desc" ? 0.25 : 1}
      />
      <path
        d="M5 9.5 8 12.5l3-3"
        stroke="currentColor"
        strokeWidth="1.5"
        strokeLinecap="round"
        strokeLinejoin="round"
        opacity={dir === "asc" ? 0.25 : 1}
      />
    </svg>
  );
}
