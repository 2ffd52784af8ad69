'use client';
// The review panel of a reduced-model version: the actions the state machine allows this person now
// (submit with a note; approve or send back with a comment; retire with a reason), why an action their role
// would allow is withheld (the four-eyes rule), the next draft after a revise decision, and the review
// history with its comment thread. Every action goes through /api/reduced-versions/{id}/…, where the
// server decides again under a row lock; a refusal's message is shown as it comes.
import Link from 'next/link';
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { apiFetch, ApiClientError } from '@/components/api-client';
import { describeText, TRANSITIONS, type ReviewAction } from '@/lib/review/state-machine';
import type { ReviewEntry, ReviewSheet } from '@/lib/review';
import { StatusBadge } from './StatusBadge';
import { formatWhen } from './when';

const EVENT_WORDS: Record<ReviewEntry['event'], string> = {
  submitted: 'submitted for review',
  approved: 'approved',
  revise: 'sent back for revision',
  retired: 'retired',
  comment: 'commented',
};

interface Notice {
  tone: 'ok' | 'error';
  text: string;
}

function NoticeLine({ notice }: { notice: Notice | null }) {
  if (!notice) return null;
  return (
    <p
      role={notice.tone === 'error' ? 'alert' : 'status'}
      className={`border-l-2 bg-sheet px-3 py-2 text-sm ${notice.tone === 'ok' ? 'border-okabe-green' : 'border-okabe-vermillion'}`}
    >
      {notice.text}
    </p>
  );
}

/** One text and the buttons that send it: approve and revise share the reviewer's comment. */
function ActionForm({
  actions,
  pending,
  onSubmit,
}: {
  actions: ReviewAction[];
  pending: boolean;
  onSubmit: (action: ReviewAction, text: string, reset: () => void) => void;
}) {
  const [text, setText] = useState('');
  const rule = TRANSITIONS[actions[0]];
  const id = `review-${rule.textField}`;
  return (
    <form
      className="space-y-2"
      onSubmit={(e) => {
        e.preventDefault();
        const submitter = (e.nativeEvent as SubmitEvent).submitter as HTMLButtonElement | null;
        const action = (submitter?.value as ReviewAction | undefined) ?? actions[0];
        onSubmit(action, text, () => setText(''));
      }}
    >
      <label htmlFor={id} className="field-label">
        {describeText(rule)}
      </label>
      <textarea id={id} className="field-input min-h-24" value={text} onChange={(e) => setText(e.target.value)} maxLength={4000} />
      <div className="flex flex-wrap gap-2">
        {actions.map((action) => (
          <button
            key={action}
            type="submit"
            value={action}
            disabled={pending}
            className={action === 'approve' || action === 'submit' ? 'button-primary' : 'button-quiet'}
          >
            {TRANSITIONS[action].label}
          </button>
        ))}
      </div>
    </form>
  );
}

export function ReviewPanel({ initialSheet }: { initialSheet: ReviewSheet }) {
  const versionId = initialSheet.version.id;
  const key = ['review', versionId];
  const router = useRouter();
  const queryClient = useQueryClient();
  const { data: sheet = initialSheet } = useQuery({
    queryKey: key,
    queryFn: () => apiFetch<ReviewSheet>(`/api/reduced-versions/${versionId}/review`),
    initialData: initialSheet,
  });
  const [notice, setNotice] = useState<Notice | null>(null);
  const [comment, setComment] = useState('');

  const refresh = async () => {
    await queryClient.invalidateQueries({ queryKey: key });
    router.refresh();
  };
  const fail = (err: Error) => setNotice({ tone: 'error', text: err instanceof ApiClientError ? err.message : String(err.message) });

  const transition = useMutation({
    mutationFn: (input: { action: ReviewAction; text: string }) =>
      apiFetch(`/api/reduced-versions/${versionId}/${input.action}`, {
        method: 'POST',
        body: { [TRANSITIONS[input.action].textField]: input.text },
      }),
    onSuccess: (_result, input) => {
      const words: Record<ReviewAction, string> = {
        submit: 'Submitted for review. Reviewers have been notified.',
        approve: 'Approved. The author has been notified; controller projects can now pin this version.',
        revise: 'Sent back for revision. The author has been notified.',
        retire: 'Retired. It stays downloadable by exact version, and no "newest approved" pin chooses it.',
      };
      setNotice({ tone: 'ok', text: words[input.action] });
      return refresh();
    },
    onError: fail,
  });

  const addComment = useMutation({
    mutationFn: (body: string) => apiFetch(`/api/reduced-versions/${versionId}/comments`, { method: 'POST', body: { body } }),
    onSuccess: () => {
      setComment('');
      setNotice(null);
      return refresh();
    },
    onError: fail,
  });

  const nextDraft = useMutation({
    mutationFn: () => apiFetch<{ version: { id: string; number: number } }>(`/api/reduced-versions/${versionId}/next-draft`, { method: 'POST' }),
    onSuccess: ({ version }) => {
      router.push(`/reviews/${version.id}`);
    },
    onError: fail,
  });

  const { version } = sheet;
  const decisions = sheet.actions.filter((a) => a === 'approve' || a === 'revise');
  const pending = transition.isPending || addComment.isPending || nextDraft.isPending;

  return (
    <section aria-label="Review" className="panel" data-testid="review-panel">
      <header className="flex flex-wrap items-center gap-3 border-b border-rule px-4 py-3">
        <h2 className="text-base font-semibold">Review</h2>
        <StatusBadge status={version.status} />
        <span className="text-sm text-graphite-soft">author {version.author.name}</span>
      </header>
      <div className="space-y-4 px-4 py-4">
        <NoticeLine notice={notice} />

        {sheet.actions.includes('submit') ? (
          <ActionForm actions={['submit']} pending={pending} onSubmit={(action, text, reset) => transition.mutate({ action, text }, { onSuccess: reset })} />
        ) : null}
        {decisions.length > 0 ? (
          <ActionForm actions={decisions} pending={pending} onSubmit={(action, text, reset) => transition.mutate({ action, text }, { onSuccess: reset })} />
        ) : null}
        {sheet.actions.includes('retire') ? (
          <ActionForm actions={['retire']} pending={pending} onSubmit={(action, text, reset) => transition.mutate({ action, text }, { onSuccess: reset })} />
        ) : null}

        {sheet.withheld.map((w) => (
          <p key={w.action} role="note" className="border-l-2 border-okabe-orange bg-sheet px-3 py-2 text-sm" data-testid="withheld">
            {w.reason}
          </p>
        ))}
        {version.status === 'in_review' && sheet.actions.length === 0 && sheet.withheld.length === 0 ? (
          <p className="text-sm text-graphite-soft">Waiting for a reviewer other than the author to approve it or send it back.</p>
        ) : null}

        {sheet.canStartNextDraft ? (
          <div className="space-y-1">
            <p className="text-sm">
              Sent back for revision. Start the next draft version from this one, change what the review asks for, and submit it.
            </p>
            <button type="button" className="button-primary" disabled={pending} onClick={() => nextDraft.mutate()}>
              Start the next draft version
            </button>
          </div>
        ) : null}
        {sheet.successors.length > 0 ? (
          <p className="text-sm">
            Made from this version:{' '}
            {sheet.successors.map((s, i) => (
              <span key={s.id}>
                {i > 0 ? ', ' : ''}
                <Link href={`/reviews/${s.id}`}>v{s.number}</Link> ({s.status.replace('_', ' ')}, source v{s.sourceNumber})
              </span>
            ))}
          </p>
        ) : null}

        <div>
          <h3 className="field-label">History and comments</h3>
          {sheet.history.length === 0 ? (
            <p className="mt-2 text-sm text-graphite-soft">Nothing yet: not submitted, no comments.</p>
          ) : (
            <ol className="mt-2 space-y-3" aria-label="Review history">
              {sheet.history.map((entry) => (
                <li key={entry.id} className="border-l-2 border-rule-strong pl-3 text-sm" data-testid="review-entry" data-event={entry.event}>
                  <p>
                    <span className="font-medium">{entry.actor.name}</span> {EVENT_WORDS[entry.event]}{' '}
                    <time className="num text-xs text-graphite-soft" dateTime={entry.at}>
                      {formatWhen(entry.at)}
                    </time>
                  </p>
                  <p className="mt-0.5 whitespace-pre-wrap">{entry.body}</p>
                </li>
              ))}
            </ol>
          )}
        </div>

        {sheet.canComment ? (
          <form
            className="space-y-2"
            onSubmit={(e) => {
              e.preventDefault();
              addComment.mutate(comment);
            }}
          >
            <label htmlFor="review-comment-thread" className="field-label">
              Add a comment
            </label>
            <textarea
              id="review-comment-thread"
              className="field-input min-h-16"
              value={comment}
              onChange={(e) => setComment(e.target.value)}
              maxLength={4000}
            />
            <button type="submit" className="button-quiet" disabled={pending}>
              Add comment
            </button>
          </form>
        ) : null}
      </div>
    </section>
  );
}
