'use client';
// A project's tokens for the pull API: engineer members make one (shown once, here, and never again),
// every member sees the list with its use counts and recent uses, engineer members revoke.
import { useState } from 'react';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { apiFetch, ApiClientError } from '@/components/api-client';
import type { ProjectToken, TokenUse } from '@/lib/project-tokens';
import { numberField } from './form-values';

const SCOPES: { value: 'pull' | 'lock-check'; label: string }[] = [
  { value: 'pull', label: 'pull: pins, downloads, lock file' },
  { value: 'lock-check', label: 'lock-check: pins and lock file only' },
];

const when = (iso: string | null) => (iso ? iso.replace('T', ' ').slice(0, 16) : '—');

export function TokensPanel({ projectSlug, initialTokens, canManage }: { projectSlug: string; initialTokens: ProjectToken[]; canManage: boolean }) {
  const queryClient = useQueryClient();
  const key = ['project-tokens', projectSlug];
  const { data: tokens = initialTokens } = useQuery({
    queryKey: key,
    queryFn: async () => (await apiFetch<{ tokens: ProjectToken[] }>(`/api/projects/${projectSlug}/tokens`)).tokens,
    initialData: initialTokens,
  });
  const [fresh, setFresh] = useState<{ token: string; name: string } | null>(null);
  const [error, setError] = useState<{ field?: string; message: string } | null>(null);
  const [confirming, setConfirming] = useState<string | null>(null);
  const [showUses, setShowUses] = useState<string | null>(null);

  const create = useMutation({
    mutationFn: (body: Record<string, unknown>) =>
      apiFetch<{ token: string; record: ProjectToken }>(`/api/projects/${projectSlug}/tokens`, { method: 'POST', body }),
    onSuccess: ({ token, record }) => {
      setError(null);
      setFresh({ token, name: record.name });
      return queryClient.invalidateQueries({ queryKey: key });
    },
    onError: (err: Error) => setError({ field: err instanceof ApiClientError ? err.field : undefined, message: err.message }),
  });
  const revoke = useMutation({
    mutationFn: (id: string) => apiFetch(`/api/projects/${projectSlug}/tokens/${id}/revoke`, { method: 'POST' }),
    onSuccess: () => {
      setConfirming(null);
      return queryClient.invalidateQueries({ queryKey: key });
    },
    onError: (err: Error) => setError({ message: err.message }),
  });

  return (
    <section aria-label="Project tokens" className="panel">
      <header className="border-b border-rule px-4 py-3">
        <h2 className="text-base font-semibold">Project tokens</h2>
        <p className="text-sm text-graphite-soft">
          For the controller's build or CI to pull from the API with <span className="num">Authorization: Bearer msp_…</span>. A token is shown once;
          Modeshelf keeps only its SHA-256.
        </p>
      </header>

      {fresh ? (
        <div className="m-4 border-l-4 border-okabe-green bg-sheet-raised px-4 py-3" role="status">
          <p className="text-sm font-medium">Token “{fresh.name}” — copy it now; it will not be shown again.</p>
          <code className="num mt-2 block break-all rounded-sheet border border-rule bg-sheet px-2 py-1 text-sm" data-testid="new-token">
            {fresh.token}
          </code>
          <div className="mt-2 flex gap-2">
            <button type="button" className="button-quiet" onClick={() => void navigator.clipboard?.writeText(fresh.token)}>
              Copy
            </button>
            <button type="button" className="button-quiet" onClick={() => setFresh(null)}>
              I have stored it
            </button>
          </div>
        </div>
      ) : null}

      {canManage ? (
        <form
          aria-label="New project token"
          className="grid gap-4 border-b border-rule px-4 py-4 md:grid-cols-[1fr_16rem_8rem_auto] md:items-start"
          onSubmit={(e) => {
            e.preventDefault();
            const formElement = e.currentTarget;
            const form = new FormData(formElement);
            const days = numberField(form.get('expiresInDays'));
            create.mutate(
              { name: String(form.get('name') ?? ''), scope: String(form.get('scope') ?? 'pull'), ...(days !== undefined ? { expiresInDays: days } : {}) },
              { onSuccess: () => formElement.reset() },
            );
          }}
        >
          <label>
            <span className="field-label">Token name</span>
            <input className="field-input" name="name" required autoComplete="off" placeholder="zone controller CI" />
            {error?.field === 'name' ? <span className="mt-1 block text-xs text-okabe-vermillion" role="alert">{error.message}</span> : null}
          </label>
          <label>
            <span className="field-label">Scope</span>
            <select className="field-input" name="scope" defaultValue="pull">
              {SCOPES.map((s) => (
                <option key={s.value} value={s.value}>
                  {s.label}
                </option>
              ))}
            </select>
          </label>
          <label>
            <span className="field-label">Expires in, days</span>
            <input className="field-input num" name="expiresInDays" inputMode="numeric" placeholder="never" />
            {error?.field === 'expiresInDays' ? <span className="mt-1 block text-xs text-okabe-vermillion" role="alert">{error.message}</span> : null}
          </label>
          <div className="md:pt-5">
            <button type="submit" className="button-primary w-full" disabled={create.isPending}>
              {create.isPending ? 'Making…' : 'Make token'}
            </button>
          </div>
        </form>
      ) : null}
      {error && error.field !== 'name' && error.field !== 'expiresInDays' ? (
        <p role="alert" className="px-4 py-2 text-sm text-okabe-vermillion">
          {error.message}
        </p>
      ) : null}

      {tokens.length === 0 ? (
        <p className="px-4 py-6 text-sm text-graphite-soft">No tokens yet.</p>
      ) : (
        <table className="w-full text-left text-sm">
          <thead>
            <tr className="border-b border-rule">
              {['Name', 'Token', 'Scope', 'State', 'Expires', 'Uses', 'Last used', ''].map((h, i) => (
                <th key={i} scope="col" className="px-4 py-2 font-medium">
                  <span className="field-label">{h}</span>
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {tokens.map((t) => (
              <TokenRow
                key={t.id}
                token={t}
                projectSlug={projectSlug}
                canManage={canManage}
                confirming={confirming === t.id}
                usesOpen={showUses === t.id}
                onToggleUses={() => setShowUses(showUses === t.id ? null : t.id)}
                onRevoke={() => (confirming === t.id ? revoke.mutate(t.id) : setConfirming(t.id))}
                onCancel={() => setConfirming(null)}
                busy={revoke.isPending}
              />
            ))}
          </tbody>
        </table>
      )}
    </section>
  );
}

function TokenRow(props: {
  token: ProjectToken;
  projectSlug: string;
  canManage: boolean;
  confirming: boolean;
  usesOpen: boolean;
  busy: boolean;
  onToggleUses: () => void;
  onRevoke: () => void;
  onCancel: () => void;
}) {
  const t = props.token;
  const uses = useQuery({
    queryKey: ['token-uses', props.projectSlug, t.id, t.useCount],
    queryFn: async () => (await apiFetch<{ uses: TokenUse[] }>(`/api/projects/${props.projectSlug}/tokens/${t.id}/uses`)).uses,
    enabled: props.usesOpen,
  });
  return (
    <>
      <tr className={`border-b border-rule ${t.state === 'active' ? '' : 'text-graphite-faint'}`} data-testid="token-row" data-name={t.name}>
        <td className="px-4 py-2">{t.name}</td>
        <td className="num px-4 py-2 text-xs">{t.prefix}…</td>
        <td className="px-4 py-2">{t.scope}</td>
        <td className="px-4 py-2" data-testid="token-state">
          {t.state}
        </td>
        <td className="num px-4 py-2 text-xs">{when(t.expiresAt)}</td>
        <td className="num px-4 py-2">
          <button type="button" className="underline-offset-2 hover:underline" onClick={props.onToggleUses} aria-expanded={props.usesOpen}>
            {t.useCount}
          </button>
        </td>
        <td className="num px-4 py-2 text-xs">
          {when(t.lastUsedAt)}
          {t.lastAddress ? <span className="block text-graphite-faint">{t.lastAddress}</span> : null}
        </td>
        <td className="px-4 py-2 text-right">
          {props.canManage && t.state !== 'revoked' ? (
            <span className="inline-flex gap-2">
              <button type="button" className="button-quiet" disabled={props.busy} onClick={props.onRevoke}>
                {props.confirming ? 'Confirm revoke' : 'Revoke'}
              </button>
              {props.confirming ? (
                <button type="button" className="button-quiet" onClick={props.onCancel}>
                  Keep
                </button>
              ) : null}
            </span>
          ) : null}
        </td>
      </tr>
      {props.usesOpen ? (
        <tr className="border-b border-rule bg-sheet">
          <td colSpan={8} className="px-4 py-2 text-xs">
            {uses.isLoading ? (
              'Loading uses…'
            ) : uses.data && uses.data.length > 0 ? (
              <ul className="num space-y-0.5">
                {uses.data.map((u, i) => (
                  <li key={i}>
                    {when(u.at)} {u.address} {u.method} {u.path}
                  </li>
                ))}
              </ul>
            ) : (
              'Not used yet.'
            )}
          </td>
        </tr>
      ) : null}
    </>
  );
}
