'use client';
// The review queue: versions waiting for a decision, the longest-waiting first, sortable and filterable.
// Each row opens the version's review sheet (comparison figures, review panel and history).
import Link from 'next/link';
import { useMemo, useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { apiFetch } from '@/components/api-client';
import { formatCount, formatNumber, formatOptional, formatPercent } from '@/lib/format';
import type { DecisionEntry, QueueEntry } from '@/lib/review';
import { UpstreamChangedBadge } from './StatusBadge';
import { formatWhen } from './when';
import { DataTable, useFilteredTable } from '@/components/table/DataTable';
import { ACCEPTANCE_WORD } from '@/lib/acceptance';
import { methodName } from '@/lib/recipe-words';

const column = createColumnHelper<QueueEntry>();

export function ReviewQueueTable({ initialQueue, canDecide }: { initialQueue: QueueEntry[]; canDecide: boolean }) {
  const { data: queue = initialQueue } = useQuery({
    queryKey: ['reviews', 'queue'],
    queryFn: async () => (await apiFetch<{ queue: QueueEntry[]; decisions: DecisionEntry[] }>('/api/reviews')).queue,
    initialData: initialQueue,
    refetchInterval: 30_000,
  });
  const [mineOnly, setMineOnly] = useState(canDecide);
  const rows = useMemo(() => (mineOnly ? queue.filter((q) => q.yoursToDecide) : queue), [queue, mineOnly]);

  const columns = useMemo(
    () => [
      column.accessor((q) => `${q.reducedModelName} v${q.number}`, {
        id: 'version',
        header: 'Version',
        cell: (info) => (
          <span className="flex flex-wrap items-baseline gap-x-2">
            <Link href={info.row.original.comparisonUrl} className="font-medium">
              {info.getValue()}
            </Link>
            <Link href={`/reviews/${info.row.original.versionId}`} className="text-xs">
              review sheet
            </Link>
          </span>
        ),
      }),
      column.accessor('authorName', { header: 'Author' }),
      column.accessor('submittedAt', {
        header: 'Submitted',
        cell: (info) => <span className="num text-xs">{formatWhen(info.getValue())}</span>,
      }),
      column.accessor((q) => `${q.sourceModelName} v${q.sourceNumber}`, {
        id: 'source',
        header: 'Source',
        cell: (info) => (
          <span className="flex flex-wrap items-center gap-1">
            {info.getValue()}
            {info.row.original.upstreamChanged ? <UpstreamChangedBadge sourceNumber={info.row.original.sourceNumber} newestSourceNumber={info.row.original.newestSourceNumber} /> : null}
          </span>
        ),
      }),
      column.accessor((q) => `${methodName(q.method)}, ${q.fullOrder === null ? '?' : formatCount(q.fullOrder)} → ${formatCount(q.order)}`, {
        id: 'reduction',
        header: 'Method, order',
        cell: (info) => <span className="num text-xs">{info.getValue()}</span>,
      }),
      column.accessor('hInfinityErrorRelative', {
        header: '‖G − Gr‖∞ / ‖G‖∞',
        cell: (info) => <span className="num">{formatOptional(info.getValue(), (v) => formatPercent(v))}</span>,
        sortUndefined: 'last',
      }),
      column.accessor('errorBound', {
        header: 'Bound',
        cell: (info) => <span className="num">{formatOptional(info.getValue(), (v) => formatNumber(v))}</span>,
        sortUndefined: 'last',
      }),
      column.accessor((q) => (q.acceptance === null ? '—' : ACCEPTANCE_WORD[q.acceptance]), {
        id: 'acceptance',
        header: 'Acceptance',
      }),
      column.accessor((q) => (q.yoursToDecide ? 'yours to decide' : ''), {
        id: 'decider',
        header: () => <span className="sr-only">Yours to decide</span>,
        cell: (info) => (info.getValue() ? <span className="text-xs font-medium text-teal-deep">◆ yours to decide</span> : null),
      }),
    ],
    [],
  );

  const { table, filter, setFilter } = useFilteredTable({ data: rows, columns, initialSorting: [{ id: 'submittedAt', desc: false }] });

  return (
    <DataTable
      table={table}
      label="Review queue"
      filter={{ value: filter, onChange: setFilter, placeholder: 'Reduced model, author or source' }}
      controls={
        canDecide ? (
          <label className="flex items-center gap-2 pb-2 text-sm">
            <input type="checkbox" checked={mineOnly} onChange={(e) => setMineOnly(e.target.checked)} />
            Only versions I may decide (not my own)
          </label>
        ) : null
      }
      count={`${table.getRowModel().rows.length} of ${queue.length} in review`}
      empty={
        queue.length === 0
          ? 'Nothing is waiting for review.'
          : mineOnly
            ? 'Nothing here is yours to decide: the versions in review are your own or match no filter.'
            : 'Nothing matches this filter.'
      }
      rowProps={(row) => ({ 'data-testid': 'queue-row', 'data-version': row.original.versionId })}
    />
  );
}
