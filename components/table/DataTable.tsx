'use client';
// The data tables of Modeshelf (people, controller projects, the review queue, source models) on one frame:
// a panel with a toolbar (the filter field, the table's own controls, a count), the sortable header, one row
// per record, a sentence when there are none, and an optional footer (pages). Each table describes only its
// columns, its data and its controls; `useFilteredTable` is the set-up of a table sorted and filtered in the
// browser.
import { useState, type HTMLAttributes, type ReactNode } from 'react';
import {
  flexRender,
  getCoreRowModel,
  getFilteredRowModel,
  getSortedRowModel,
  useReactTable,
  type ColumnDef,
  type Row,
  type SortingState,
  type Table,
} from '@tanstack/react-table';
import { SortableHead } from '@/components/table/SortableHead';

/** A table sorted and filtered in the browser: TanStack's sorting, a global "includes" filter, and its text. */
export function useFilteredTable<Data>({
  data,
  columns,
  initialSorting,
}: {
  data: Data[];
  /** A column helper's columns carry a value type each, hence TanStack's `any` here. */
  columns: ColumnDef<Data, any>[];
  initialSorting: SortingState;
}): { table: Table<Data>; filter: string; setFilter: (text: string) => void } {
  const [sorting, setSorting] = useState<SortingState>(initialSorting);
  const [filter, setFilter] = useState('');
  const table = useReactTable({
    data,
    columns,
    state: { sorting, globalFilter: filter },
    onSortingChange: setSorting,
    onGlobalFilterChange: setFilter,
    globalFilterFn: 'includesString',
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
  });
  return { table, filter, setFilter };
}

type RowAttributes = HTMLAttributes<HTMLTableRowElement> & { [data: `data-${string}`]: string | undefined };

interface DataTableProps<Data> {
  table: Table<Data>;
  /** The panel's accessible name. */
  label: string;
  /** The filter field: its text, its change, and what it searches (the placeholder). */
  filter: { value: string; onChange: (text: string) => void; placeholder: string };
  /** The table's own controls beside the filter (a select, a checkbox). */
  controls?: ReactNode;
  /** How many rows are shown, in words. */
  count: ReactNode;
  /** The sentence in place of rows when there are none. */
  empty: ReactNode;
  /** Attributes of a row (test ids, data attributes, a class added to the rule under it). */
  rowProps?: (row: Row<Data>) => RowAttributes;
  /** Classes of each cell; middle-aligned by default. */
  cellClassName?: string;
  /** Classes of the header row (the thin rule by default). */
  headRowClassName?: string;
  /** Below the table, e.g. the page navigation. */
  footer?: ReactNode;
  'data-testid'?: string;
}

export function DataTable<Data>({
  table,
  label,
  filter,
  controls,
  count,
  empty,
  rowProps,
  cellClassName = 'px-4 py-2 align-middle',
  headRowClassName,
  footer,
  'data-testid': testId,
}: DataTableProps<Data>) {
  const rows = table.getRowModel().rows;
  return (
    <section aria-label={label} className="panel" data-testid={testId}>
      <div className="flex flex-wrap items-end gap-4 border-b border-rule px-4 py-3">
        <label className="min-w-64 flex-1">
          <span className="field-label">Filter</span>
          <input
            className="field-input"
            type="search"
            placeholder={filter.placeholder}
            value={filter.value}
            onChange={(e) => filter.onChange(e.target.value)}
          />
        </label>
        {controls}
        <p className="num pb-2 text-xs text-graphite-soft" aria-live="polite">
          {count}
        </p>
      </div>
      <div className="overflow-x-auto">
        <table className="w-full text-left text-sm">
          <SortableHead table={table} rowClassName={headRowClassName} />
          <tbody>
            {rows.map((row) => {
              const { className, ...attributes } = rowProps?.(row) ?? {};
              return (
                <tr key={row.id} className={`border-b border-rule last:border-0 ${className ?? ''}`.trim()} {...attributes}>
                  {row.getVisibleCells().map((cell) => (
                    <td key={cell.id} className={cellClassName}>
                      {flexRender(cell.column.columnDef.cell, cell.getContext())}
                    </td>
                  ))}
                </tr>
              );
            })}
            {rows.length === 0 ? (
              <tr>
                <td colSpan={table.getVisibleLeafColumns().length} className="px-4 py-6 text-center text-graphite-soft">
                  {empty}
                </td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </div>
      {footer}
    </section>
  );
}
