'use client';
/**
 * Sortable table of a model's modes: pole, stability, natural frequency, damping ratio, time constant and
 * dominance (and kept/truncated when a reduction is shown). Pages of 50 rows, so a thousand-state model
 * stays quick; sorting runs over all rows.
 */
import { useMemo, useState } from 'react';
import {
  flexRender,
  getCoreRowModel,
  getPaginationRowModel,
  getSortedRowModel,
  useReactTable,
  type SortingState,
} from '@tanstack/react-table';
import { modeColumns, toModeTableRows, type ModeInput } from './modes-columns';
import { SortableHead } from '@/components/table/SortableHead';

export interface ModesTableProps {
  readonly modes: readonly ModeInput[];
  readonly timeBase?: string;
  /** shown instead of the table when there are no modes */
  readonly emptyText?: string;
  readonly pageSize?: number;
  readonly initialSorting?: SortingState;
  readonly caption?: string;
}

export function ModesTable({
  modes,
  timeBase = 's',
  emptyText = 'No modes to show yet. They appear once the analysis has finished.',
  pageSize = 50,
  initialSorting = [{ id: 'dominance', desc: true }],
  caption = 'Modes',
}: ModesTableProps) {
  const built = useMemo(() => {
    try {
      return { rows: toModeTableRows(modes), problem: null };
    } catch (e) {
      return { rows: [], problem: e instanceof Error ? e.message : String(e) };
    }
  }, [modes]);
  const withKept = built.rows.some((r) => r.kept !== null);
  const columns = useMemo(() => modeColumns(timeBase, withKept), [timeBase, withKept]);
  const [sorting, setSorting] = useState<SortingState>(initialSorting);
  const table = useReactTable({
    data: built.rows,
    columns,
    state: { sorting },
    onSortingChange: setSorting,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getPaginationRowModel: getPaginationRowModel(),
    initialState: { pagination: { pageIndex: 0, pageSize } },
  });

  if (built.problem !== null) {
    return (
      <p role="alert" className="panel p-4 text-sm">
        The modes cannot be listed: {built.problem}
      </p>
    );
  }
  if (built.rows.length === 0) {
    return (
      <p className="panel p-4 text-sm text-graphite-soft" data-testid="modes-table-empty">
        {emptyText}
      </p>
    );
  }
  const { pageIndex } = table.getState().pagination;
  const total = built.rows.length;
  const first = pageIndex * pageSize + 1;
  const last = Math.min(total, first + pageSize - 1);

  return (
    <div className="panel overflow-x-auto" data-testid="modes-table">
      <table className="w-full border-collapse text-sm">
        <caption className="px-3 py-2 text-left text-sm font-medium">
          {caption} <span className="num text-graphite-soft">({total})</span>
        </caption>
        <SortableHead table={table} rowClassName="border-b border-rule-strong" cellClassName="px-3 py-2 whitespace-nowrap" />
        <tbody>
          {table.getRowModel().rows.map((row) => (
            <tr key={row.id} className="border-b border-rule last:border-b-0">
              {row.getVisibleCells().map((cell) => (
                <td key={cell.id} className={`px-3 py-1.5 whitespace-nowrap ${cell.column.id === 'stability' || cell.column.id === 'kept' ? '' : 'num text-right'}`}>
                  {flexRender(cell.column.columnDef.cell, cell.getContext())}
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
      {table.getPageCount() > 1 ? (
        <nav aria-label="Modes table pages" className="flex items-center justify-between gap-2 px-3 py-2 text-sm">
          <span className="num text-graphite-soft">
            rows {first}–{last} of {total}
          </span>
          <span className="flex gap-1">
            <button type="button" className="button-quiet" onClick={() => table.previousPage()} disabled={!table.getCanPreviousPage()}>
              Previous
            </button>
            <button type="button" className="button-quiet" onClick={() => table.nextPage()} disabled={!table.getCanNextPage()}>
              Next
            </button>
          </span>
        </nav>
      ) : null}
    </div>
  );
}
