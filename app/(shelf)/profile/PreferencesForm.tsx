'use client';
// Which review mails the signed-in person receives. Each box saves on change (PATCH
// /api/profile/notifications) and says so; a refusal is shown as it comes.
import { useState } from 'react';
import { useMutation } from '@tanstack/react-query';
import { apiFetch } from '@/components/api-client';
import type { NotificationKind, NotificationPreferences } from '@/lib/notifications';

const CHOICES: Record<NotificationKind, { field: keyof NotificationPreferences; label: string; detail: string }> = {
  review_requested: {
    field: 'reviewRequested',
    label: 'A version is submitted for review',
    detail: 'Sent to reviewers, never for a version you authored.',
  },
  review_decided: {
    field: 'reviewDecided',
    label: 'My version is approved or sent back for revision',
    detail: 'With the reviewer’s comment.',
  },
  upstream_changed: {
    field: 'upstreamChanged',
    label: 'The source model of my reduced models has a new version',
    detail: 'Once per new source version, listing your versions reduced from an older one.',
  },
};

export function PreferencesForm({ initial, offered }: { initial: NotificationPreferences; offered: NotificationKind[] }) {
  const [preferences, setPreferences] = useState(initial);
  const [notice, setNotice] = useState<{ tone: 'ok' | 'error'; text: string } | null>(null);
  const save = useMutation({
    mutationFn: (change: Partial<NotificationPreferences>) =>
      apiFetch<{ preferences: NotificationPreferences }>('/api/profile/notifications', { method: 'PATCH', body: change }),
    // The box changes at once; a refusal puts it back and says why.
    onMutate: (change) => {
      const before = preferences;
      setPreferences({ ...preferences, ...change });
      setNotice(null);
      return { before };
    },
    onSuccess: ({ preferences: saved }) => {
      setPreferences(saved);
      setNotice({ tone: 'ok', text: 'Saved.' });
    },
    onError: (err: Error, _change, context) => {
      if (context) setPreferences(context.before);
      setNotice({ tone: 'error', text: err.message });
    },
  });

  return (
    <section aria-label="Notifications" className="panel max-w-3xl px-4 py-4">
      <h2 className="text-base font-semibold">E-mail notifications</h2>
      {offered.length === 0 ? (
        <p className="mt-2 text-sm text-graphite-soft">Your role receives no review mail.</p>
      ) : (
        <fieldset className="mt-3 space-y-3" disabled={save.isPending}>
          <legend className="sr-only">Mail me when</legend>
          {offered.map((kind) => {
            const choice = CHOICES[kind];
            return (
              <label key={kind} className="flex items-start gap-3 text-sm">
                <input
                  type="checkbox"
                  className="mt-1"
                  name={choice.field}
                  checked={preferences[choice.field]}
                  onChange={(e) => save.mutate({ [choice.field]: e.target.checked })}
                />
                <span>
                  {choice.label}
                  <span className="block text-xs text-graphite-soft">{choice.detail}</span>
                </span>
              </label>
            );
          })}
        </fieldset>
      )}
      {notice ? (
        <p role={notice.tone === 'error' ? 'alert' : 'status'} className="mt-3 text-sm">
          {notice.text}
        </p>
      ) : null}
    </section>
  );
}
