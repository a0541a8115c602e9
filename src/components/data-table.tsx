import {
  type ColumnDef,
  flexRender,
  getCoreRowModel,
  getFilteredRowModel,
  getPaginationRowModel,
  getSortedRowModel,
  type SortingState,
  useReactTable,
} from '@tanstack/react-table';
import { useId, useMemo, useState } from 'react';
import { downloadCsv } from '../lib/download';

export interface DataTableColumn<T> {
  /** Key of the row used for sorting, filtering and the CSV file. */
  key: keyof T & string;
  header: string;
  /** How the cell shows (defaults to the value as text). */
  cell?: (row: T) => React.ReactNode;
  /** The value written to the CSV (defaults to the row's value). */
  csv?: (row: T) => unknown;
  align?: 'left' | 'right';
  sortable?: boolean;
}

export interface DataTableProps<T> {
  /** Accessible name of the table, also shown as its caption. */
  caption: string;
  rows: T[];
  columns: DataTableColumn<T>[];
  /** File name of the CSV download; no download button when omitted. */
  csvFileName?: string;
  /** Show a text filter over all columns. */
  filterable?: boolean;
  pageSize?: number;
  emptyText?: string;
  initialSort?: SortingState;
  rowKey?: (row: T) => string;
  /**
   * On a narrow screen (below 640 px): 'scroll' (default) scrolls the table inside its own box
   * with the first column kept in view; 'stack' shows each row as a block of labelled values,
   * for tables whose later columns hold controls (Members).
   */
  layout?: 'scroll' | 'stack';
}

/**
 * An accessible table with sorting, an optional filter, pagination and a CSV download of all
 * (filtered) rows, built on TanStack Table.
 */
export function DataTable<T>({
  caption,
  rows,
  columns,
  csvFileName,
  filterable = false,
  pageSize = 25,
  emptyText = 'Nothing to show.',
  initialSort = [],
  rowKey,
  layout = 'scroll',
}: DataTableProps<T>) {
  const [sorting, setSorting] = useState<SortingState>(initialSort);
  const [filter, setFilter] = useState('');
  const filterId = useId();
  const columnDefs = useMemo<ColumnDef<T>[]>(
    () =>
      columns.map((c) => ({
        id: c.key,
        accessorFn: (row: T) => row[c.key],
        header: c.header,
        enableSorting: c.sortable !== false,
        sortUndefined: 'last',
        sortDescFirst: false,
        cell: (info) => (c.cell ? c.cell(info.row.original) : String(info.getValue() ?? '—')),
      })),
    [columns],
  );
  const table = useReactTable({
    data: rows,
    columns: columnDefs,
    state: { sorting, globalFilter: filter },
    onSortingChange: setSorting,
    onGlobalFilterChange: setFilter,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
    getPaginationRowModel: getPaginationRowModel(),
    initialState: { pagination: { pageSize } },
    getRowId: rowKey ? (row) => rowKey(row) : undefined,
  });
  const filtered = table.getPrePaginationRowModel().rows;
  const pageCount = table.getPageCount();

  return (
    <div className="space-y-3">
      {filterable || csvFileName ? (
        <div className="flex flex-wrap items-end gap-3">
          {filterable ? (
            <div className="field">
              <label htmlFor={filterId}>Filter</label>
              <input id={filterId} className="input" type="search" value={filter} onChange={(e) => setFilter(e.target.value)} />
            </div>
          ) : null}
          {csvFileName ? (
            <button
              type="button"
              className="btn btn-quiet ml-auto"
              onClick={() =>
                downloadCsv(
                  filtered.map((r) => Object.fromEntries(columns.map((c) => [c.key, c.csv ? c.csv(r.original) : r.original[c.key]]))),
                  columns.map((c) => ({ key: c.key, header: c.header })),
                  csvFileName,
                )
              }
            >
              Download CSV
            </button>
          ) : null}
        </div>
      ) : null}
      <div className="data-table-box overflow-x-auto rounded-lg border border-line bg-card" data-layout={layout}>
        <table
          role="table"
          className={`data-table w-full border-collapse text-sm ${layout === 'stack' ? 'data-table-stack' : 'data-table-scroll'}`}
        >
          <caption className="sr-only">{caption}</caption>
          <thead role="rowgroup" className="bg-paper">
            {table.getHeaderGroups().map((group) => (
              <tr key={group.id} role="row">
                {group.headers.map((header) => {
                  const column = columns.find((c) => c.key === header.column.id);
                  const sorted = header.column.getIsSorted();
                  return (
                    <th
                      key={header.id}
                      scope="col"
                      role="columnheader"
                      aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : undefined}
                      className={`border-b border-line px-3 py-2 font-semibold ${column?.align === 'right' ? 'text-right' : 'text-left'}`}
                    >
                      {header.column.getCanSort() ? (
                        <button
                          type="button"
                          className="inline-flex items-center gap-1 hover:text-harbour"
                          onClick={header.column.getToggleSortingHandler()}
                        >
                          {flexRender(header.column.columnDef.header, header.getContext())}
                          <span aria-hidden="true" className="text-muted">
                            {sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : '↕'}
                          </span>
                        </button>
                      ) : (
                        flexRender(header.column.columnDef.header, header.getContext())
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody role="rowgroup">
            {table.getRowModel().rows.length === 0 ? (
              <tr role="row">
                <td role="cell" colSpan={columns.length} className="px-3 py-6 text-center text-muted">
                  {emptyText}
                </td>
              </tr>
            ) : (
              table.getRowModel().rows.map((row) => (
                <tr key={row.id} role="row" className="border-b border-line last:border-b-0 hover:bg-harbour-soft/40">
                  {row.getVisibleCells().map((cell) => {
                    const column = columns.find((c) => c.key === cell.column.id);
                    return (
                      <td
                        key={cell.id}
                        role="cell"
                        data-label={column?.header}
                        className={`px-3 py-2 ${column?.align === 'right' ? 'text-right tabular-nums' : ''}`}
                      >
                        {/* Called, not mounted as a component: the cell's controls keep their state and focus across renders. */}
                        {column?.cell ? column.cell(row.original) : String(cell.getValue() ?? '—')}
                      </td>
                    );
                  })}
                </tr>
              ))
            )}
          </tbody>
        </table>
      </div>
      {pageCount > 1 ? (
        <nav aria-label={`${caption} pages`} className="flex items-center gap-3 text-sm">
          <button type="button" className="btn btn-quiet" onClick={() => table.previousPage()} disabled={!table.getCanPreviousPage()}>
            Previous
          </button>
          <span>
            Page {table.getState().pagination.pageIndex + 1} of {pageCount} ({filtered.length} rows)
          </span>
          <button type="button" className="btn btn-quiet" onClick={() => table.nextPage()} disabled={!table.getCanNextPage()}>
            Next
          </button>
        </nav>
      ) : null}
    </div>
  );
}
