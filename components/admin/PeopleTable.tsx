'use client';
// Admin › People: the table of accounts (sort, filter, role change, deactivate, send link) and the invite
// form. Every change goes through /api/admin/people, which checks the admin role on the server.
import { useMemo, useState } from 'react';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { apiFetch, ApiClientError } from '@/components/api-client';
import { ROLES, ROLE_LABELS, type Role } from '@/lib/roles';
import type { Person } from '@/lib/people';
import { DataTable, useFilteredTable } from '@/components/table/DataTable';

interface LinkSent {
  person: Person;
  mailSent: boolean;
  message: string;
}

const PEOPLE_KEY = ['admin', 'people'];
const column = createColumnHelper<Person>();

function formatDate(iso: string | null): string {
  return iso ? iso.replace('T', ' ').slice(0, 16) : '—';
}

function status(p: Person): string {
  if (!p.active) return 'deactivated';
  if (!p.hasPassword) return 'invited';
  return 'active';
}

export function PeopleTable({ initialPeople, currentUserId }: { initialPeople: Person[]; currentUserId: string }) {
  const queryClient = useQueryClient();
  const { data: people = initialPeople } = useQuery({
    queryKey: PEOPLE_KEY,
    queryFn: async () => (await apiFetch<{ people: Person[] }>('/api/admin/people')).people,
    initialData: initialPeople,
  });
  const [notice, setNotice] = useState<{ tone: 'ok' | 'error'; text: string } | null>(null);

  const update = useMutation({
    mutationFn: (input: { id: string; role?: Role; active?: boolean }) =>
      apiFetch<{ person: Person }>(`/api/admin/people/${input.id}`, {
        method: 'PATCH',
        body: { role: input.role, active: input.active },
      }),
    onSuccess: ({ person }) => {
      setNotice({ tone: 'ok', text: `${person.name}: ${ROLE_LABELS[person.role]}, ${status(person)}.` });
      return queryClient.invalidateQueries({ queryKey: PEOPLE_KEY });
    },
    onError: (err: Error) => setNotice({ tone: 'error', text: err.message }),
  });

  const sendLink = useMutation({
    mutationFn: (id: string) => apiFetch<LinkSent>(`/api/admin/people/${id}/link`, { method: 'POST' }),
    onSuccess: (result) => setNotice({ tone: result.mailSent ? 'ok' : 'error', text: result.message }),
    onError: (err: Error) => setNotice({ tone: 'error', text: err.message }),
  });

  const [roleFilter, setRoleFilter] = useState<Role | ''>('');

  const rows = useMemo(() => (roleFilter ? people.filter((p) => p.role === roleFilter) : people), [people, roleFilter]);

  const columns = useMemo(
    () => [
      column.accessor('name', { header: 'Name', cell: (info) => <span className="whitespace-nowrap">{info.getValue()}</span> }),
      column.accessor('email', { header: 'E-mail' }),
      column.accessor('role', {
        header: 'Role',
        cell: (info) => {
          const p = info.row.original;
          return (
            <select
              aria-label={`Role of ${p.name}`}
              className="rounded-sheet border border-rule-strong bg-sheet-raised px-2 py-1 text-sm"
              value={p.role}
              disabled={update.isPending}
              onChange={(e) => update.mutate({ id: p.id, role: e.target.value as Role })}
            >
              {ROLES.map((r) => (
                <option key={r} value={r}>
                  {ROLE_LABELS[r]}
                </option>
              ))}
            </select>
          );
        },
      }),
      column.accessor((p) => status(p), { id: 'status', header: 'Status' }),
      column.accessor('lastSignedInAt', {
        header: 'Last sign-in',
        cell: (info) => <span className="num text-xs">{formatDate(info.getValue())}</span>,
        sortUndefined: 'last',
      }),
      column.display({
        id: 'actions',
        header: () => <span className="sr-only">Actions</span>,
        cell: (info) => {
          const p = info.row.original;
          return (
            <div className="flex justify-end gap-2">
              <button
                type="button"
                className="button-quiet"
                disabled={sendLink.isPending || !p.active}
                onClick={() => sendLink.mutate(p.id)}
              >
                {p.hasPassword ? 'Send reset link' : 'Send invitation again'}
              </button>
              <button
                type="button"
                className="button-quiet"
                disabled={update.isPending || p.id === currentUserId}
                title={p.id === currentUserId ? 'You cannot deactivate yourself' : undefined}
                onClick={() => update.mutate({ id: p.id, active: !p.active })}
              >
                {p.active ? 'Deactivate' : 'Reactivate'}
              </button>
            </div>
          );
        },
      }),
    ],
    [update, sendLink, currentUserId],
  );

  const { table, filter, setFilter } = useFilteredTable({ data: rows, columns, initialSorting: [{ id: 'name', desc: false }] });

  return (
    <div className="space-y-6">
      <InviteForm
        onInvited={(result) => {
          setNotice({ tone: result.mailSent ? 'ok' : 'error', text: result.message });
          return queryClient.invalidateQueries({ queryKey: PEOPLE_KEY });
        }}
      />

      {notice ? (
        <p
          role="status"
          className={`border-l-2 px-3 py-2 text-sm ${
            notice.tone === 'ok' ? 'border-okabe-green bg-sheet-raised' : 'border-okabe-vermillion bg-sheet-raised'
          }`}
        >
          {notice.text}
        </p>
      ) : null}

      <DataTable
        table={table}
        label="People"
        filter={{ value: filter, onChange: setFilter, placeholder: 'Name, e-mail, role or status' }}
        controls={
          <label>
            <span className="field-label">Role</span>
            <select className="field-input" value={roleFilter} onChange={(e) => setRoleFilter(e.target.value as Role | '')}>
              <option value="">All roles</option>
              {ROLES.map((r) => (
                <option key={r} value={r}>
                  {ROLE_LABELS[r]}
                </option>
              ))}
            </select>
          </label>
        }
        count={`${table.getRowModel().rows.length} of ${people.length}`}
        empty="Nobody matches this filter."
        rowProps={(row) => ({
          className: row.original.active ? '' : 'text-graphite-faint',
          'data-testid': 'person-row',
          'data-email': row.original.email,
        })}
      />
    </div>
  );
}

function InviteForm({ onInvited }: { onInvited: (result: LinkSent) => unknown }) {
  const [fieldError, setFieldError] = useState<{ field?: string; message: string } | null>(null);
  const invite = useMutation({
    mutationFn: (body: { email: string; name: string; role: Role }) =>
      apiFetch<LinkSent>('/api/admin/people', { method: 'POST', body }),
    onSuccess: (result) => {
      setFieldError(null);
      return onInvited(result);
    },
    onError: (err: Error) =>
      setFieldError({ field: err instanceof ApiClientError ? err.field : undefined, message: err.message }),
  });

  const errorFor = (field: string) =>
    fieldError?.field === field ? (
      <span className="mt-1 block text-xs text-okabe-vermillion" role="alert">
        {fieldError.message}
      </span>
    ) : null;

  return (
    <section aria-label="Invite someone" className="panel px-4 py-4">
      <h2 className="text-base font-semibold">Invite someone</h2>
      <form
        className="mt-3 grid gap-4 md:grid-cols-[1fr_1fr_10rem_auto] md:items-start"
        onSubmit={(e) => {
          e.preventDefault();
          const formElement = e.currentTarget;
          const form = new FormData(formElement);
          invite.mutate(
            {
              email: String(form.get('email') ?? ''),
              name: String(form.get('name') ?? ''),
              role: String(form.get('role') ?? 'viewer') as Role,
            },
            { onSuccess: () => formElement.reset() },
          );
        }}
      >
        <label>
          <span className="field-label">Name</span>
          <input className="field-input" name="name" required autoComplete="off" />
          {errorFor('name')}
        </label>
        <label>
          <span className="field-label">E-mail</span>
          <input className="field-input" name="email" type="email" required autoComplete="off" />
          {errorFor('email')}
        </label>
        <label>
          <span className="field-label">Role</span>
          <select className="field-input" name="role" defaultValue="viewer">
            {ROLES.map((r) => (
              <option key={r} value={r}>
                {ROLE_LABELS[r]}
              </option>
            ))}
          </select>
          {errorFor('role')}
        </label>
        <div className="md:pt-5">
          <button type="submit" className="button-primary w-full" disabled={invite.isPending}>
            {invite.isPending ? 'Sending…' : 'Send invitation'}
          </button>
        </div>
      </form>
      {fieldError && !['name', 'email', 'role'].includes(fieldError.field ?? '') ? (
        <p className="mt-2 text-sm text-okabe-vermillion" role="alert">
          {fieldError.message}
        </p>
      ) : null}
    </section>
  );
}
