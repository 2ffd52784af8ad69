import type { Metadata } from 'next';
import Link from 'next/link';
import { requirePageRole } from '@/lib/auth';
import { recentDecisions, reviewQueue } from '@/lib/review';
import { upstreamChangedVersions } from '@/lib/upstream';
import { PageHeader } from '@/components/shell/PageHeader';
import { ReviewQueueTable } from '@/components/review/ReviewQueueTable';
import { UpstreamChangedBadge } from '@/components/review/StatusBadge';
import { STATUS_STYLE } from '@/components/review/status-style';
import { formatWhen } from '@/components/review/when';

export const metadata: Metadata = { title: 'Reviews' };

const DECISION_WORDS = { approved: 'approved', revise: 'sent back for revision', retired: 'retired' } as const;

export default async function ReviewsPage() {
  const user = await requirePageRole();
  const [queue, decisions, upstream] = await Promise.all([reviewQueue(user), recentDecisions(15), upstreamChangedVersions({ limit: 15 })]);
  const canDecide = user.role === 'reviewer';
  return (
    <>
      <PageHeader
        title="Reviews"
        lead={
          canDecide
            ? 'Versions waiting for your decision: open one to compare it with its source model, then approve it or send it back for revision with a comment. You never decide on a version you authored.'
            : 'Reduced model versions submitted for review, and the decisions taken on them. A reviewer other than the author approves each version or sends it back for revision.'
        }
      />
      <div className="space-y-8">
        <ReviewQueueTable initialQueue={queue} canDecide={canDecide} />

        <section aria-label="Recent decisions">
          <h2 className="text-base font-semibold">Recent decisions</h2>
          {decisions.length === 0 ? (
            <p className="mt-2 text-sm text-graphite-soft">No version has been approved, sent back or retired yet.</p>
          ) : (
            <ol className="mt-2 space-y-2 text-sm">
              {decisions.map((d) => (
                <li key={`${d.versionId}-${d.event}-${d.at}`} className="border-l-2 border-rule-strong pl-3">
                  <span aria-hidden="true" style={{ color: STATUS_STYLE[d.event === 'retired' ? 'retired' : d.event].color }}>
                    {STATUS_STYLE[d.event === 'retired' ? 'retired' : d.event].glyph}{' '}
                  </span>
                  <Link href={`/reviews/${d.versionId}`}>
                    {d.reducedModelName} v{d.number}
                  </Link>{' '}
                  {DECISION_WORDS[d.event]} by {d.actorName} <span className="num text-xs text-graphite-soft">{formatWhen(d.at)}</span>
                  <span className="block text-graphite-soft">“{d.body}”</span>
                </li>
              ))}
            </ol>
          )}
        </section>

        {upstream.length > 0 ? (
          <section aria-label="Upstream changed">
            <h2 className="text-base font-semibold">Upstream changed</h2>
            <p className="mt-1 text-sm text-graphite-soft">Versions in use whose source model has a newer version than the one they were reduced from.</p>
            <ul className="mt-2 space-y-1 text-sm">
              {upstream.map((u) => (
                <li key={u.reducedVersionId}>
                  <Link href={`/reviews/${u.reducedVersionId}`}>
                    {u.reducedModelName} v{u.number}
                  </Link>{' '}
                  <UpstreamChangedBadge sourceNumber={u.sourceNumber} newestSourceNumber={u.newestSourceNumber} />
                  {u.rerun ? (
                    <>
                      {' '}
                      re-run as <Link href={`/reviews/${u.rerun.id}`}>v{u.rerun.number}</Link> ({u.rerun.status.replace('_', ' ')})
                    </>
                  ) : null}
                </li>
              ))}
            </ul>
          </section>
        ) : null}
      </div>
    </>
  );
}
