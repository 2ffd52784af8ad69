'use client';
// A project's members (they get the pin notices) and its sample time; engineer members add and remove
// people and change the sample time. The server refuses everything else (lib/projects.ts).
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { useMutation } from '@tanstack/react-query';
import { apiFetch, ApiClientError } from '@/components/api-client';
import { ROLE_LABELS } from '@/lib/roles';
import type { ProjectMember } from '@/lib/projects';
import { numberField } from './form-values';

export function MembersPanel({
  projectSlug,
  members,
  canManage,
}: {
  projectSlug: string;
  members: ProjectMember[];
  canManage: boolean;
}) {
  const router = useRouter();
  const [error, setError] = useState<{ field?: string; message: string } | null>(null);
  const onError = (err: Error) => setError({ field: err instanceof ApiClientError ? err.field : undefined, message: err.message });
  const add = useMutation({
    mutationFn: (email: string) => apiFetch(`/api/projects/${projectSlug}/members`, { method: 'POST', body: { email } }),
    onSuccess: () => {
      setError(null);
      router.refresh();
    },
    onError,
  });
  const remove = useMutation({
    mutationFn: (userId: string) => apiFetch(`/api/projects/${projectSlug}/members/${userId}`, { method: 'DELETE' }),
    onSuccess: () => {
      setError(null);
      router.refresh();
    },
    onError,
  });

  return (
    <section aria-label="Members" className="panel">
      <header className="border-b border-rule px-4 py-3">
        <h2 className="text-base font-semibold">Members</h2>
        <p className="text-sm text-graphite-soft">
          Members are mailed when a pinned model gets a newer approved version, or the version a pin resolves to is retired or its source changes.
          Engineer members change the project.
        </p>
      </header>
      <ul className="divide-y divide-rule">
        {members.map((m) => (
          <li key={m.userId} className="flex items-center justify-between gap-4 px-4 py-2 text-sm" data-testid="member-row">
            <span>
              {m.name} <span className="text-graphite-soft">· {m.email} · {ROLE_LABELS[m.role]}</span>
              {m.active ? null : <span className="text-graphite-faint"> · deactivated</span>}
            </span>
            {canManage ? (
              <button type="button" className="button-quiet" disabled={remove.isPending} onClick={() => remove.mutate(m.userId)}>
                Remove
              </button>
            ) : null}
          </li>
        ))}
      </ul>
      {canManage ? (
        <form
          aria-label="Add a member"
          className="flex flex-wrap items-end gap-3 border-t border-rule px-4 py-3"
          onSubmit={(e) => {
            e.preventDefault();
            const formElement = e.currentTarget;
            add.mutate(String(new FormData(formElement).get('email') ?? ''), { onSuccess: () => formElement.reset() });
          }}
        >
          <label className="min-w-64 flex-1">
            <span className="field-label">E-mail of someone on the shelf</span>
            <input className="field-input" name="email" type="email" required autoComplete="off" />
          </label>
          <button type="submit" className="button-quiet" disabled={add.isPending}>
            Add member
          </button>
        </form>
      ) : null}
      {error ? (
        <p role="alert" className="px-4 py-2 text-sm text-okabe-vermillion">
          {error.message}
        </p>
      ) : null}
    </section>
  );
}

export function SampleTimeForm({ projectSlug, sampleTime }: { projectSlug: string; sampleTime: number | null }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  const save = useMutation({
    mutationFn: (value: number | string | null) => apiFetch(`/api/projects/${projectSlug}`, { method: 'PATCH', body: { sampleTime: value } }),
    onSuccess: () => {
      setError(null);
      router.refresh();
    },
    onError: (err: Error) => setError(err.message),
  });
  return (
    <form
      aria-label="Sample time"
      className="flex flex-wrap items-end gap-3"
      onSubmit={(e) => {
        e.preventDefault();
        save.mutate(numberField(new FormData(e.currentTarget).get('sampleTime')) ?? null);
      }}
    >
      <label>
        <span className="field-label">Sample time, s (default for ?ts=project)</span>
        <input className="field-input num w-40" name="sampleTime" inputMode="decimal" defaultValue={sampleTime ?? ''} placeholder="none" />
      </label>
      <button type="submit" className="button-quiet" disabled={save.isPending}>
        Save
      </button>
      {error ? (
        <span role="alert" className="text-sm text-okabe-vermillion">
          {error}
        </span>
      ) : null}
    </form>
  );
}
