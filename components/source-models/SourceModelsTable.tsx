'use client';
// The source-model list: a TanStack Table whose sorting, filtering and pagination happen on the server
// (GET /api/source-models), so a shelf with thousands of models sends one page at a time. The first page
// comes rendered with the page; later ones through TanStack Query, keeping the previous page on screen
// while the next loads.
import Link from 'next/link';
import { useEffect, useMemo, useState } from 'react';
import { keepPreviousData, useQuery } from '@tanstack/react-query';
import { createColumnHelper, getCoreRowModel, useReactTable, type SortingState } from '@tanstack/react-table';
import { apiFetch } from '@/components/api-client';
import { formatNumber } from '@/lib/format';
import type { SourceModelListRow, SourceModelSort } from '@/lib/source-models';
import { DataTable } from '@/components/table/DataTable';

export interface SourceModelPage {
  rows: SourceModelListRow[];
  total: number;
}

const column = createColumnHelper<SourceModelListRow>();
const PAGE_SIZE = 20;

function when(iso: string): string {
  return iso.replace('T', ' ').slice(0, 16);
}

export function SourceModelsTable({ initial }: { initial: SourceModelPage }) {
  const [sorting, setSorting] = useState<SortingState>([{ id: 'uploadedAt', desc: true }]);
  const [filterText, setFilterText] = useState('');
  const [filter, setFilter] = useState('');
  const [stable, setStable] = useState<'' | 'yes' | 'no'>('');
  const [page, setPage] = useState(0);

  // Typing waits a moment before asking the server.
  useEffect(() => {
    const t = setTimeout(() => {
      setFilter(filterText.trim());
      setPage(0);
    }, 250);
    return () => clearTimeout(t);
  }, [filterText]);

  const sort = (sorting[0]?.id ?? 'uploadedAt') as SourceModelSort;
  const dir = sorting[0]?.desc === false ? 'asc' : 'desc';
  const isFirstView = filter === '' && stable === '' && page === 0 && sort === 'uploadedAt' && dir === 'desc';
  const query = useQuery({
    queryKey: ['source-models', { filter, stable, sort, dir, page }],
    queryFn: () => {
      const params = new URLSearchParams({ q: filter, stable, sort, dir, page: String(page), pageSize: String(PAGE_SIZE) });
      return apiFetch<SourceModelPage>(`/api/source-models?${params}`);
    },
    placeholderData: keepPreviousData,
    initialData: isFirstView ? initial : undefined,
  });
  const data = query.data ?? initial;
  const pages = Math.max(1, Math.ceil(data.total / PAGE_SIZE));

  const columns = useMemo(
    () => [
      column.accessor('name', {
        header: 'Name',
        cell: (info) => (
          <span>
            <Link href={`/source-models/${info.row.original.slug}`}>{info.getValue()}</Link>
            {info.row.original.tags.length ? <span className="ml-2 text-xs text-graphite-soft">{info.row.original.tags.join(', ')}</span> : null}
          </span>
        ),
      }),
      column.accessor('latestVersion', {
        header: 'Latest',
        cell: (info) => (
          <Link className="num" href={`/source-models/${info.row.original.slug}/versions/${info.getValue()}`}>
            v{info.getValue()}
          </Link>
        ),
      }),
      column.accessor('states', { header: 'States', cell: (info) => <span className="num">{info.getValue()}</span> }),
      column.accessor('inputs', { header: 'Inputs', cell: (info) => <span className="num">{info.getValue()}</span> }),
      column.accessor('outputs', { header: 'Outputs', cell: (info) => <span className="num">{info.getValue()}</span> }),
      column.accessor('stiffnessRatio', {
        header: 'Stiffness ratio',
        cell: (info) => <span className="num">{info.getValue() === null ? '—' : formatNumber(info.getValue()!)}</span>,
      }),
      column.accessor('stable', {
        header: 'Stable?',
        cell: (info) => (info.getValue() === null ? <span className="text-graphite-soft">not analysed</span> : info.getValue() ? 'yes' : 'no'),
      }),
      column.accessor('uploadedBy', { header: 'Uploaded by' }),
      column.accessor('uploadedAt', { header: 'When', cell: (info) => <span className="num text-xs">{when(info.getValue())}</span> }),
    ],
    [],
  );

  const table = useReactTable({
    data: data.rows,
    columns,
    state: { sorting },
    manualSorting: true,
    manualPagination: true,
    manualFiltering: true,
    enableSortingRemoval: false,
    pageCount: pages,
    onSortingChange: (updater) => {
      setSorting(updater);
      setPage(0);
    },
    getCoreRowModel: getCoreRowModel(),
  });

  return (
    <DataTable
      table={table}
      label="Source models"
      data-testid="source-models-table"
      filter={{ value: filterText, onChange: setFilterText, placeholder: 'Name, description, tag or uploader' }}
      controls={
        <label>
          <span className="field-label">Stable?</span>
          <select
            className="field-input"
            value={stable}
            onChange={(e) => {
              setStable(e.target.value as '' | 'yes' | 'no');
              setPage(0);
            }}
          >
            <option value="">Any</option>
            <option value="yes">Stable</option>
            <option value="no">Marginal or unstable poles</option>
          </select>
        </label>
      }
      count={`${query.isFetching ? 'Loading… ' : ''}${data.total} model${data.total === 1 ? '' : 's'}`}
      empty={filter || stable ? 'No source model matches the filter.' : 'No source models yet.'}
      headRowClassName="border-b border-rule-strong"
      cellClassName="px-4 py-2 align-top"
      footer={
        <nav aria-label="Pages" className="flex items-center justify-between border-t border-rule px-4 py-2 text-sm">
          <button type="button" className="button-quiet" disabled={page === 0} onClick={() => setPage((p) => Math.max(0, p - 1))}>
            Previous
          </button>
          <span className="num text-graphite-soft">
            page {page + 1} of {pages}
          </span>
          <button type="button" className="button-quiet" disabled={page + 1 >= pages} onClick={() => setPage((p) => p + 1)}>
            Next
          </button>
        </nav>
      }
    />
  );
}
