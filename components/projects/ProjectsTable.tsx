'use client';
// Controller projects: the sortable, filterable list (TanStack Table) and, for engineers, the form that
// starts a new project. Changes go through /api/projects, which checks the role on the server.
import Link from 'next/link';
import { useRouter } from 'next/navigation';
import { useMemo, useState } from 'react';
import { useMutation } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { apiFetch, ApiClientError } from '@/components/api-client';
import { formatTime } from '@/lib/format';
import { numberField } from './form-values';
import type { Project, ProjectSummary } from '@/lib/projects';
import { DataTable, useFilteredTable } from '@/components/table/DataTable';

/** A project row: its summary and how many of its pins are retired, upstream changed or unresolved. */
export type ProjectRowData = ProjectSummary & { pinsNeedingAttention: number };

const column = createColumnHelper<ProjectRowData>();

export function ProjectsTable({ projects, canCreate }: { projects: ProjectRowData[]; canCreate: boolean }) {
  const [mineOnly, setMineOnly] = useState(false);
  const rows = useMemo(() => (mineOnly ? projects.filter((p) => p.isMember) : projects), [projects, mineOnly]);

  const columns = useMemo(
    () => [
      column.accessor('name', {
        header: 'Project',
        cell: (info) => <Link href={`/projects/${info.row.original.slug}`}>{info.getValue()}</Link>,
      }),
      column.accessor('slug', { header: 'Slug', cell: (info) => <span className="num text-xs">{info.getValue()}</span> }),
      column.accessor('pinCount', { header: 'Pins', cell: (info) => <span className="num">{info.getValue()}</span> }),
      column.accessor('pinsNeedingAttention', {
        header: 'Needs a look',
        cell: (info) =>
          info.getValue() > 0 ? (
            <span className="rounded-sheet border border-okabe-orange px-1.5 py-0.5 text-xs" title="Pins whose version is retired, upstream changed, or that resolve to nothing">
              <span className="num">{info.getValue()}</span> pin{info.getValue() === 1 ? '' : 's'}
            </span>
          ) : (
            <span className="text-graphite-faint">—</span>
          ),
      }),
      column.accessor('memberCount', { header: 'Members', cell: (info) => <span className="num">{info.getValue()}</span> }),
      column.accessor('sampleTime', {
        header: 'Sample time',
        sortUndefined: 'last',
        cell: (info) => {
          const ts = info.getValue();
          return <span className="num">{ts === null ? '—' : formatTime(ts, 's')}</span>;
        },
      }),
      column.accessor((p) => (p.isMember ? 'member' : ''), { id: 'membership', header: 'You' }),
      column.accessor('createdAt', { header: 'Created', cell: (info) => <span className="num text-xs">{info.getValue().slice(0, 10)}</span> }),
    ],
    [],
  );

  const { table, filter, setFilter } = useFilteredTable({ data: rows, columns, initialSorting: [{ id: 'name', desc: false }] });

  return (
    <div className="space-y-6">
      {canCreate ? <NewProjectForm /> : null}
      <DataTable
        table={table}
        label="Controller projects"
        filter={{ value: filter, onChange: setFilter, placeholder: 'Name or slug' }}
        controls={
          <label className="flex items-center gap-2 pb-2 text-sm">
            <input type="checkbox" checked={mineOnly} onChange={(e) => setMineOnly(e.target.checked)} />
            Only projects I am a member of
          </label>
        }
        count={`${table.getRowModel().rows.length} of ${projects.length}`}
        empty={projects.length === 0 ? 'No controller projects yet.' : 'No project matches this filter.'}
        rowProps={(row) => ({ 'data-testid': 'project-row', 'data-slug': row.original.slug })}
      />
    </div>
  );
}

function NewProjectForm() {
  const router = useRouter();
  const [error, setError] = useState<{ field?: string; message: string } | null>(null);
  const create = useMutation({
    mutationFn: (body: { name: string; slug?: string; sampleTime?: number | string }) =>
      apiFetch<{ project: Project }>('/api/projects', { method: 'POST', body }),
    onSuccess: ({ project }) => router.push(`/projects/${project.slug}`),
    onError: (err: Error) => setError({ field: err instanceof ApiClientError ? err.field : undefined, message: err.message }),
  });
  const errorFor = (field: string) =>
    error?.field === field ? (
      <span className="mt-1 block text-xs text-okabe-vermillion" role="alert">
        {error.message}
      </span>
    ) : null;

  return (
    <section aria-label="New controller project" className="panel px-4 py-4">
      <h2 className="text-base font-semibold">New controller project</h2>
      <p className="mt-1 text-sm text-graphite-soft">You become its first member and can then pin reduced models and make project tokens.</p>
      <form
        className="mt-3 grid gap-4 md:grid-cols-[1fr_14rem_10rem_auto] md:items-start"
        onSubmit={(e) => {
          e.preventDefault();
          setError(null);
          const form = new FormData(e.currentTarget);
          const slug = String(form.get('slug') ?? '').trim();
          const sampleTime = numberField(form.get('sampleTime'));
          create.mutate({
            name: String(form.get('name') ?? ''),
            ...(slug ? { slug } : {}),
            ...(sampleTime !== undefined ? { sampleTime } : {}),
          });
        }}
      >
        <label>
          <span className="field-label">Name</span>
          <input className="field-input" name="name" required autoComplete="off" placeholder="Kiln 3 zone controller" />
          {errorFor('name')}
        </label>
        <label>
          <span className="field-label">Slug (optional)</span>
          <input className="field-input num" name="slug" autoComplete="off" placeholder="from the name" />
          {errorFor('slug')}
        </label>
        <label>
          <span className="field-label">Sample time, s</span>
          <input className="field-input num" name="sampleTime" inputMode="decimal" autoComplete="off" placeholder="0.001" />
          {errorFor('sampleTime')}
        </label>
        <div className="md:pt-5">
          <button type="submit" className="button-primary w-full" disabled={create.isPending}>
            {create.isPending ? 'Creating…' : 'Create project'}
          </button>
        </div>
      </form>
      {error && !['name', 'slug', 'sampleTime'].includes(error.field ?? '') ? (
        <p className="mt-2 text-sm text-okabe-vermillion" role="alert">
          {error.message}
        </p>
      ) : null}
    </section>
  );
}
