import { useState, type ReactNode } from "react";
import {
  flexRender,
  getCoreRowModel,
  getPaginationRowModel,
  getSortedRowModel,
  useReactTable,
  type ColumnDef,
  type RowData,
  type SortingState,
} from "@tanstack/react-table";

declare module "@tanstack/react-table" {
  // Column options every Calmcrest table understands.
  interface ColumnMeta<TData extends RowData, TValue> {
    /** Unit written under the header, e.g. "arcsec" or "m". */
    unit?: string;
    /** Numbers are right-aligned with tabular figures. */
    numeric?: boolean;
  }
}

export interface DataTableProps<Row> {
  /** Short description for screen readers and the table caption. */
  caption: string;
  columns: ColumnDef<Row, never>[];
  data: Row[];
  initialSorting?: SortingState;
  pageSize?: number;
  /** What to show when there are no rows. */
  empty?: ReactNode;
  getRowId?: (row: Row) => string;
  /** Highlights a row (e.g. the one under the mouse on the map). */
  highlightedRowId?: string | null;
  onRowHover?: (rowId: string | null) => void;
}

/** Calmcrest's one table: sortable by any column header, paginated, units in the header, numbers right-aligned. */
export function DataTable<Row>({ caption, columns, data, initialSorting = [], pageSize = 25, empty, getRowId, highlightedRowId, onRowHover }: DataTableProps<Row>) {
  const [sorting, setSorting] = useState<SortingState>(initialSorting);
  const [pagination, setPagination] = useState({ pageIndex: 0, pageSize });
  const table = useReactTable({
    data,
    columns,
    state: { sorting, pagination },
    onSortingChange: setSorting,
    onPaginationChange: setPagination,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getPaginationRowModel: getPaginationRowModel(),
    getRowId,
    // Numbers sort small-first on the first click too (the library's default is large-first).
    sortDescFirst: false,
    // Missing values (accessors return undefined for them) go last whichever way a column is sorted.
    defaultColumn: { sortUndefined: "last" },
  });

  if (data.length === 0 && empty) return <>{empty}</>;
  const pageCount = table.getPageCount();

  return (
    <div className="overflow-hidden rounded-lg border border-line bg-panel">
      <div className="overflow-x-auto">
        <table className="w-full border-collapse text-sm">
          <caption className="sr-only">{caption}</caption>
          <thead className="bg-paper">
            {table.getHeaderGroups().map((headerGroup) => (
              <tr key={headerGroup.id}>
                {headerGroup.headers.map((header) => {
                  const meta = header.column.columnDef.meta;
                  const sorted = header.column.getIsSorted();
                  const canSort = header.column.getCanSort();
                  const label = header.isPlaceholder ? null : flexRender(header.column.columnDef.header, header.getContext());
                  const content = (
                    <span className={`inline-flex flex-col ${meta?.numeric ? "items-end" : "items-start"}`}>
                      <span className="inline-flex items-center gap-1">
                        {label}
                        {canSort ? (
                          <span aria-hidden="true" className="text-ink-soft">
                            {sorted === "asc" ? "▲" : sorted === "desc" ? "▼" : "↕"}
                          </span>
                        ) : null}
                      </span>
                      {meta?.unit ? <span className="text-xs font-normal text-ink-soft">{meta.unit}</span> : null}
                    </span>
                  );
                  return (
                    <th
                      key={header.id}
                      scope="col"
                      aria-sort={sorted === "asc" ? "ascending" : sorted === "desc" ? "descending" : canSort ? "none" : undefined}
                      className={`border-b border-line px-3 py-2 align-bottom font-semibold ${meta?.numeric ? "text-right" : "text-left"}`}
                    >
                      {canSort ? (
                        <button type="button" onClick={header.column.getToggleSortingHandler()} className="rounded font-semibold hover:text-accent">
                          {content}
                        </button>
                      ) : (
                        content
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((row) => (
              <tr
                key={row.id}
                onMouseEnter={onRowHover ? () => onRowHover(row.id) : undefined}
                onMouseLeave={onRowHover ? () => onRowHover(null) : undefined}
                className={`border-b border-line last:border-b-0 ${highlightedRowId === row.id ? "bg-accent-pale" : ""}`}
              >
                {row.getVisibleCells().map((cell) => {
                  const meta = cell.column.columnDef.meta;
                  return (
                    <td key={cell.id} className={`px-3 py-2 ${meta?.numeric ? "num whitespace-nowrap" : ""}`}>
                      {flexRender(cell.column.columnDef.cell, cell.getContext())}
                    </td>
                  );
                })}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {pageCount > 1 ? (
        <nav aria-label={`Pages of ${caption}`} className="flex flex-wrap items-center justify-between gap-2 border-t border-line px-3 py-2 text-sm">
          <span className="text-ink-soft">
            Rows {pagination.pageIndex * pagination.pageSize + 1}–{Math.min(data.length, (pagination.pageIndex + 1) * pagination.pageSize)} of {data.length}
          </span>
          <span className="flex gap-2">
            <button type="button" className="rounded-md border border-line px-3 py-1 font-semibold disabled:opacity-50" onClick={() => table.previousPage()} disabled={!table.getCanPreviousPage()}>
              Previous
            </button>
            <span className="self-center">
              Page {pagination.pageIndex + 1} of {pageCount}
            </span>
            <button type="button" className="rounded-md border border-line px-3 py-1 font-semibold disabled:opacity-50" onClick={() => table.nextPage()} disabled={!table.getCanNextPage()}>
              Next
            </button>
          </span>
        </nav>
      ) : null}
    </div>
  );
}
