'use client';
// A project's pins: what each resolves to now and why, its flags (retired, upstream changed, unresolved),
// downloads (JSON, CSV bundle, C header; continuous or discretised at a sample time), and, for engineer
// members, pinning another reduced model, changing a pin and removing one.
import Link from 'next/link';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { useMutation } from '@tanstack/react-query';
import { apiFetch, ApiClientError } from '@/components/api-client';
import { formatNumber, formatPercent } from '@/lib/format';
import type { PinCandidate, PinLimits, ResolvedPin } from '@/lib/pins';
import { numberField } from './form-values';

function Flag({ tone, children }: { tone: 'warn' | 'bad' | 'info'; children: string }) {
  const border = tone === 'bad' ? 'border-okabe-vermillion' : tone === 'warn' ? 'border-okabe-orange' : 'border-okabe-blue';
  return <span className={`inline-block rounded-sheet border ${border} bg-sheet-raised px-1.5 py-0.5 text-xs`}>{children}</span>;
}

function limitsText(limits: PinLimits): string {
  const parts: string[] = [];
  if (limits.maxOrder !== null) parts.push(`order ≤ ${limits.maxOrder}`);
  if (limits.maxRelativeHInfinityError !== null) parts.push(`rel. H∞ error ≤ ${formatPercent(limits.maxRelativeHInfinityError)}`);
  if (limits.requireAcceptancePassed) parts.push('acceptance band passed');
  return parts.length > 0 ? parts.join(', ') : 'no limits';
}

export function PinsPanel({
  projectSlug,
  pins,
  candidates,
  canManage,
  sampleTime,
}: {
  projectSlug: string;
  pins: ResolvedPin[];
  candidates: PinCandidate[];
  canManage: boolean;
  sampleTime: number | null;
}) {
  const router = useRouter();
  const [notice, setNotice] = useState<string | null>(null);
  const remove = useMutation({
    mutationFn: (pinId: string) => apiFetch(`/api/projects/${projectSlug}/pins/${pinId}`, { method: 'DELETE' }),
    onSuccess: () => router.refresh(),
    onError: (err: Error) => setNotice(err.message),
  });
  const pinned = new Set(pins.map((p) => p.reducedModel.slug));

  return (
    <section aria-label="Pins" className="panel">
      <header className="border-b border-rule px-4 py-3">
        <h2 className="text-base font-semibold">Pins</h2>
        <p className="text-sm text-graphite-soft">The reduced models this controller depends on, and the version each pin resolves to now.</p>
      </header>
      {pins.length === 0 ? (
        <p className="px-4 py-6 text-sm text-graphite-soft">Nothing pinned yet.{canManage ? ' Pin an approved reduced model below.' : ''}</p>
      ) : (
        <table className="w-full text-left text-sm">
          <thead>
            <tr className="border-b border-rule">
              {['Reduced model', 'Pin', 'Resolves to', 'Flags', 'Download', ''].map((h, i) => (
                <th key={i} scope="col" className="px-4 py-2 font-medium">
                  <span className="field-label">{h}</span>
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {pins.map((pin) => {
              const v = pin.resolution.version;
              const base = `/api/projects/${projectSlug}/pins/${pin.id}/export`;
              return (
                <tr key={pin.id} className="border-b border-rule align-top last:border-0" data-testid="pin-row" data-model={pin.reducedModel.slug}>
                  <td className="px-4 py-2">
                    <Link className="font-medium" href={`/lineage/reduced-models/${pin.reducedModel.slug}`} title="Lineage: source model, versions and the projects that pin them">
                      {pin.reducedModel.name}
                    </Link>
                    <div className="num text-xs text-graphite-soft">{pin.reducedModel.slug}</div>
                  </td>
                  <td className="px-4 py-2">
                    {pin.mode === 'exact' ? (
                      <span>
                        exact <span className="num">v{pin.exactVersionNumber}</span>
                      </span>
                    ) : (
                      <span>
                        newest approved
                        <span className="block text-xs text-graphite-soft">{limitsText(pin.limits)}</span>
                      </span>
                    )}
                  </td>
                  <td className="px-4 py-2" data-testid="resolved-version">
                    {v ? (
                      <>
                        <span className="num font-medium">v{v.number}</span>{' '}
                        <span className="text-xs text-graphite-soft">
                          order <span className="num">{v.order}</span>
                          {v.hInfinityErrorRelative !== null ? (
                            <>
                              , rel. H∞ error <span className="num">{formatPercent(v.hInfinityErrorRelative)}</span>
                            </>
                          ) : null}
                        </span>
                        <span className="num block max-w-[14rem] truncate text-xs text-graphite-faint" title={`SHA-256 ${v.matricesSha256}`}>
                          {v.matricesSha256.slice(0, 16)}…
                        </span>
                      </>
                    ) : (
                      <span className="text-graphite-soft">none</span>
                    )}
                    <span className="mt-1 block max-w-xs text-xs text-graphite-soft">{pin.resolution.explanation}</span>
                  </td>
                  <td className="space-x-1 space-y-1 px-4 py-2">
                    {pin.resolution.retired ? <Flag tone="bad">retired</Flag> : null}
                    {pin.resolution.upstreamChanged ? <Flag tone="warn">upstream changed</Flag> : null}
                    {v === null ? <Flag tone="bad">unresolved</Flag> : null}
                    {pin.resolution.newerSatisfying.length > 0 ? <Flag tone="info">{`newer: v${pin.resolution.newerSatisfying[0].number}`}</Flag> : null}
                  </td>
                  <td className="px-4 py-2">
                    {v ? <Downloads base={base} sampleTime={sampleTime} /> : <span className="text-graphite-faint">—</span>}
                  </td>
                  <td className="px-4 py-2 text-right">
                    {canManage ? (
                      <button type="button" className="button-quiet" disabled={remove.isPending} onClick={() => remove.mutate(pin.id)}>
                        Remove pin
                      </button>
                    ) : null}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      )}
      {notice ? (
        <p role="alert" className="px-4 py-2 text-sm text-okabe-vermillion">
          {notice}
        </p>
      ) : null}
      {canManage ? <NewPinForm projectSlug={projectSlug} candidates={candidates.filter((c) => !pinned.has(c.slug))} /> : null}
    </section>
  );
}

function Downloads({ base, sampleTime }: { base: string; sampleTime: number | null }) {
  const [ts, setTs] = useState(sampleTime === null ? '' : String(sampleTime));
  const [format, setFormat] = useState<'json' | 'csv' | 'c'>('json');
  const discrete = `${base}?format=${format}&ts=${encodeURIComponent(ts.trim())}`;
  return (
    <div className="space-y-1 text-xs">
      <div className="flex gap-2">
        <a href={`${base}?format=json`}>JSON</a>
        <a href={`${base}?format=csv`}>CSV zip</a>
        <a href={`${base}?format=c`}>C header</a>
      </div>
      <div className="flex items-center gap-1">
        <label className="sr-only" htmlFor={`${base}-ts`}>
          Sample time in seconds
        </label>
        <input
          id={`${base}-ts`}
          className="num w-20 rounded-sheet border border-rule-strong bg-sheet-raised px-1 py-0.5"
          value={ts}
          placeholder="ts, s"
          inputMode="decimal"
          onChange={(e) => setTs(e.target.value)}
        />
        <select
          aria-label="Format of the discretised download"
          className="rounded-sheet border border-rule-strong bg-sheet-raised px-1 py-0.5"
          value={format}
          onChange={(e) => setFormat(e.target.value as 'json' | 'csv' | 'c')}
        >
          <option value="json">JSON</option>
          <option value="csv">CSV zip</option>
          <option value="c">C header</option>
        </select>
        {ts.trim() ? <a href={discrete}>ZOH</a> : <span className="text-graphite-faint">ZOH</span>}
      </div>
    </div>
  );
}

function NewPinForm({ projectSlug, candidates }: { projectSlug: string; candidates: PinCandidate[] }) {
  const router = useRouter();
  const [mode, setMode] = useState<'newest_approved' | 'exact'>('newest_approved');
  const [chosen, setModel] = useState(candidates[0]?.slug ?? '');
  // After a pin is made the chosen model leaves the list; fall back to the first one left.
  const model = candidates.some((c) => c.slug === chosen) ? chosen : (candidates[0]?.slug ?? '');
  const [error, setError] = useState<{ field?: string; message: string } | null>(null);
  const create = useMutation({
    mutationFn: (body: Record<string, unknown>) => apiFetch(`/api/projects/${projectSlug}/pins`, { method: 'POST', body }),
    onSuccess: () => {
      setError(null);
      router.refresh();
    },
    onError: (err: Error) => setError({ field: err instanceof ApiClientError ? err.field : undefined, message: err.message }),
  });
  const versions = candidates.find((c) => c.slug === model)?.approvedVersions ?? [];
  const errorFor = (field: string) =>
    error?.field === field ? (
      <span className="mt-1 block text-xs text-okabe-vermillion" role="alert">
        {error.message}
      </span>
    ) : null;

  if (candidates.length === 0) {
    return (
      <p className="border-t border-rule px-4 py-3 text-sm text-graphite-soft">
        No other reduced model has an approved version to pin yet; pins point only at approved versions.
      </p>
    );
  }
  return (
    <form
      aria-label="Pin a reduced model"
      className="grid gap-4 border-t border-rule px-4 py-4 md:grid-cols-4"
      onSubmit={(e) => {
        e.preventDefault();
        const form = new FormData(e.currentTarget);
        const body: Record<string, unknown> = { reducedModel: model, mode };
        if (mode === 'exact') body.version = numberField(form.get('version'));
        else {
          const maxOrder = numberField(form.get('maxOrder'));
          const maxError = numberField(form.get('maxRelativeHInfinityErrorPercent'));
          if (maxOrder !== undefined) body.maxOrder = maxOrder;
          if (maxError !== undefined) body.maxRelativeHInfinityError = typeof maxError === 'number' ? maxError / 100 : maxError;
          body.requireAcceptancePassed = form.get('requireAcceptancePassed') === 'on';
        }
        create.mutate(body);
      }}
    >
      <h3 className="text-sm font-semibold md:col-span-4">Pin a reduced model</h3>
      <label>
        <span className="field-label">Reduced model</span>
        <select className="field-input" name="reducedModel" value={model} onChange={(e) => setModel(e.target.value)}>
          {candidates.map((c) => (
            <option key={c.slug} value={c.slug}>
              {c.name} ({c.slug})
            </option>
          ))}
        </select>
        {errorFor('reducedModel')}
      </label>
      <fieldset>
        <legend className="field-label">Resolve to</legend>
        <label className="mt-2 flex items-center gap-2 text-sm">
          <input type="radio" name="mode" checked={mode === 'newest_approved'} onChange={() => setMode('newest_approved')} />
          newest approved within limits
        </label>
        <label className="flex items-center gap-2 text-sm">
          <input type="radio" name="mode" checked={mode === 'exact'} onChange={() => setMode('exact')} />
          an exact version
        </label>
      </fieldset>
      {mode === 'exact' ? (
        <label>
          <span className="field-label">Version</span>
          <select key={model} className="field-input num" name="version" defaultValue={versions[0]?.number}>
            {versions.map((v) => (
              <option key={v.number} value={v.number}>
                v{v.number} · order {v.order}
                {v.hInfinityErrorRelative !== null ? ` · ${formatPercent(v.hInfinityErrorRelative)}` : ''}
              </option>
            ))}
          </select>
          {errorFor('version')}
        </label>
      ) : (
        <div className="grid grid-cols-2 gap-2">
          <label>
            <span className="field-label">Max order</span>
            <input className="field-input num" name="maxOrder" inputMode="numeric" placeholder="any" />
            {errorFor('maxOrder')}
          </label>
          <label>
            <span className="field-label">Max rel. H∞ error, %</span>
            <input className="field-input num" name="maxRelativeHInfinityErrorPercent" inputMode="decimal" placeholder="any" />
            {errorFor('maxRelativeHInfinityError')}
          </label>
          <label className="col-span-2 flex items-center gap-2 text-sm">
            <input type="checkbox" name="requireAcceptancePassed" />
            acceptance band passed
          </label>
        </div>
      )}
      <div className="md:pt-5">
        <button type="submit" className="button-primary w-full" disabled={create.isPending}>
          {create.isPending ? 'Pinning…' : 'Pin'}
        </button>
        {error && !['reducedModel', 'version', 'maxOrder', 'maxRelativeHInfinityError'].includes(error.field ?? '') ? (
          <p className="mt-2 text-sm text-okabe-vermillion" role="alert">
            {error.message}
          </p>
        ) : null}
      </div>
      <p className="text-xs text-graphite-soft md:col-span-4">
        Versions of the model, newest first: {versions.map((v) => `v${v.number} (order ${v.order}${v.hInfinityErrorRelative !== null ? `, ${formatNumber(v.hInfinityErrorRelative * 100)} %` : ''})`).join(', ')}.
      </p>
    </form>
  );
}
