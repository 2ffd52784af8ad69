'use client';
// A controller project's acceptance band: the frequencies (rad/s) its controller needs the reduced model
// accurate over, and optionally the largest error it accepts there. Engineer members set or clear it
// (PATCH /api/projects/{project}; lib/projects.ts checks membership and the band again). The reduce page
// starts frequency-limited balanced truncation's band from it when reached with ?project=slug.
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { useMutation } from '@tanstack/react-query';
import { apiFetch, ApiClientError } from '@/components/api-client';
import type { AcceptanceBand } from '@/lib/projects';
import { numberField } from './form-values';

type Field = 'acceptanceBand.minFrequency' | 'acceptanceBand.maxFrequency' | 'acceptanceBand.maxError' | 'form';

/** The band as typed, checked as the server checks it; the message names the field it belongs beside. */
export function checkAcceptanceBand(
  lo: number | string | undefined,
  hi: number | string | undefined,
  maxError: number | string | undefined,
): { ok: true; band: AcceptanceBand } | { ok: false; field: Field; message: string } {
  if (typeof lo !== 'number') return { ok: false, field: 'acceptanceBand.minFrequency', message: 'Give the lower edge as a finite number of rad/s (0 for a band from DC).' };
  if (lo < 0) return { ok: false, field: 'acceptanceBand.minFrequency', message: 'The lower edge must be 0 or above.' };
  if (typeof hi !== 'number') return { ok: false, field: 'acceptanceBand.maxFrequency', message: 'Give the upper edge as a finite number of rad/s.' };
  if (!(hi > lo)) return { ok: false, field: 'acceptanceBand.maxFrequency', message: 'The upper edge must be above the lower edge.' };
  if (maxError !== undefined && !(typeof maxError === 'number' && maxError > 0)) {
    return { ok: false, field: 'acceptanceBand.maxError', message: 'The largest error must be a positive number, or left empty.' };
  }
  return { ok: true, band: { minFrequency: lo, maxFrequency: hi, maxError: maxError === undefined ? null : maxError } };
}

export function AcceptanceBandForm({ projectSlug, band }: { projectSlug: string; band: AcceptanceBand | null }) {
  const router = useRouter();
  const [error, setError] = useState<{ field: Field; message: string } | null>(null);
  const save = useMutation({
    mutationFn: (value: AcceptanceBand | null) => apiFetch(`/api/projects/${projectSlug}`, { method: 'PATCH', body: { acceptanceBand: value } }),
    onSuccess: () => {
      setError(null);
      router.refresh();
    },
    onError: (err: Error) => {
      const field = err instanceof ApiClientError && err.field ? (err.field as Field) : 'form';
      setError({ field: ['acceptanceBand.minFrequency', 'acceptanceBand.maxFrequency', 'acceptanceBand.maxError'].includes(field) ? field : 'form', message: err.message });
    },
  });
  const errorFor = (field: Field) =>
    error?.field === field ? (
      <span role="alert" className="mt-1 block text-sm text-okabe-vermillion" data-testid={`error-${field}`}>
        {error.message}
      </span>
    ) : null;
  return (
    <form
      aria-label="Acceptance band"
      className="mt-4 flex flex-wrap items-start gap-3"
      onSubmit={(e) => {
        e.preventDefault();
        const form = new FormData(e.currentTarget);
        const checked = checkAcceptanceBand(numberField(form.get('minFrequency')), numberField(form.get('maxFrequency')), numberField(form.get('maxError')));
        if (!checked.ok) return setError({ field: checked.field, message: checked.message });
        save.mutate(checked.band);
      }}
    >
      <label>
        <span className="field-label">Acceptance band from, rad/s</span>
        <input className="field-input num w-32" name="minFrequency" inputMode="decimal" defaultValue={band?.minFrequency ?? ''} placeholder="0" />
        {errorFor('acceptanceBand.minFrequency')}
      </label>
      <label>
        <span className="field-label">to, rad/s</span>
        <input className="field-input num w-32" name="maxFrequency" inputMode="decimal" defaultValue={band?.maxFrequency ?? ''} placeholder="e.g. 60" />
        {errorFor('acceptanceBand.maxFrequency')}
      </label>
      <label>
        <span className="field-label">Largest error |G − Gr| (optional)</span>
        <input className="field-input num w-32" name="maxError" inputMode="decimal" defaultValue={band?.maxError ?? ''} placeholder="none" />
        {errorFor('acceptanceBand.maxError')}
      </label>
      <div className="flex gap-2 pt-5">
        <button type="submit" className="button-quiet" disabled={save.isPending}>
          Save band
        </button>
        {band ? (
          <button type="button" className="button-quiet" disabled={save.isPending} onClick={() => save.mutate(null)}>
            Clear
          </button>
        ) : null}
      </div>
      {errorFor('form')}
      <p className="basis-full text-xs text-graphite-soft">
        The frequencies this controller needs the reduced model accurate over. A source version opened from this project starts frequency-limited balanced
        truncation on this band, and its acceptance check with the largest error.
      </p>
    </form>
  );
}
