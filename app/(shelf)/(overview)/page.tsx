import type { Metadata } from 'next';
import Link from 'next/link';
import type { ReactNode } from 'react';
import { requirePageRole } from '@/lib/auth';
import { ROLE_DUTIES, ROLE_LABELS } from '@/lib/roles';
import { dashboardActivity } from '@/lib/activity';
import { RERUN_ROLES } from '@/lib/upstream';
import { PageHeader } from '@/components/shell/PageHeader';
import { ActivityFeed } from '@/components/review/ActivityFeed';
import { StatusBadge, UpstreamChangedBadge } from '@/components/review/StatusBadge';
import { RerunButton } from '@/components/lineage/RerunButton';
import { formatWhen } from '@/components/review/when';

export const metadata: Metadata = { title: 'Dashboard' };

function Section({ title, testId, children }: { title: string; testId: string; children: ReactNode }) {
  return (
    <section aria-label={title} className="panel px-4 py-3" data-testid={testId}>
      <h2 className="text-base font-semibold">{title}</h2>
      <div className="mt-2">{children}</div>
    </section>
  );
}

export default async function DashboardPage() {
  const user = await requirePageRole();
  const activity = await dashboardActivity(user);
  const nothingForYou =
    activity.awaitingYourReview.length + activity.yoursInReview.length + activity.sentBackToYou.length + activity.yourUpstreamChanged.length === 0;
  return (
    <>
      <PageHeader
        title="Dashboard"
        lead={
          <>
            Signed in as {user.name}, {ROLE_LABELS[user.role].toLowerCase()}: {ROLE_DUTIES[user.role]}.
          </>
        }
      />
      <div className="grid gap-6 lg:grid-cols-[minmax(0,1fr)_minmax(0,26rem)]">
        <div className="space-y-4">
          {user.role === 'reviewer' ? (
            <Section title="Awaiting your review" testId="awaiting-your-review">
              {activity.awaitingYourReview.length === 0 ? (
                <p className="text-sm text-graphite-soft">Nothing is waiting for your decision.</p>
              ) : (
                <ul className="space-y-1 text-sm">
                  {activity.awaitingYourReview.map((q) => (
                    <li key={q.versionId}>
                      <Link href={`/reviews/${q.versionId}`}>
                        {q.reducedModelName} v{q.number}
                      </Link>{' '}
                      by {q.authorName}, submitted <span className="num text-xs">{formatWhen(q.submittedAt)}</span>
                    </li>
                  ))}
                </ul>
              )}
            </Section>
          ) : null}
          {activity.sentBackToYou.length > 0 ? (
            <Section title="Sent back to you for revision" testId="sent-back">
              <ul className="space-y-2 text-sm">
                {activity.sentBackToYou.map((s) => (
                  <li key={s.versionId}>
                    <Link href={`/reviews/${s.versionId}`}>
                      {s.reducedModelName} v{s.number}
                    </Link>{' '}
                    by {s.reviewerName}: <span className="text-graphite-soft">“{s.comment}”</span>
                  </li>
                ))}
              </ul>
            </Section>
          ) : null}
          {activity.yoursInReview.length > 0 ? (
            <Section title="Your versions in review" testId="yours-in-review">
              <ul className="space-y-1 text-sm">
                {activity.yoursInReview.map((q) => (
                  <li key={q.versionId}>
                    <Link href={`/reviews/${q.versionId}`}>
                      {q.reducedModelName} v{q.number}
                    </Link>{' '}
                    <StatusBadge status="in_review" /> since <span className="num text-xs">{formatWhen(q.submittedAt)}</span>
                  </li>
                ))}
              </ul>
            </Section>
          ) : null}
          {activity.yourUpstreamChanged.length > 0 ? (
            <Section title="Your reduced models: upstream changed" testId="your-upstream-changed">
              <ul className="space-y-2 text-sm">
                {activity.yourUpstreamChanged.map((u) => (
                  <li key={u.reducedVersionId} className="flex flex-wrap items-center gap-2">
                    <Link href={`/reviews/${u.reducedVersionId}`}>
                      {u.reducedModelName} v{u.number}
                    </Link>
                    <StatusBadge status={u.status} />
                    <UpstreamChangedBadge sourceNumber={u.sourceNumber} newestSourceNumber={u.newestSourceNumber} />
                    {u.rerun ? (
                      <span>
                        re-run as <Link href={`/reviews/${u.rerun.id}`}>v{u.rerun.number}</Link>
                      </span>
                    ) : RERUN_ROLES.includes(user.role) ? (
                      <RerunButton versionId={u.reducedVersionId} newestSourceNumber={u.newestSourceNumber} />
                    ) : null}
                  </li>
                ))}
              </ul>
            </Section>
          ) : null}
          {nothingForYou && user.role !== 'reviewer' ? (
            <Section title="Nothing needs you" testId="nothing-needs-you">
              <p className="text-sm text-graphite-soft">
                {user.role === 'engineer'
                  ? 'No version of yours is in review, sent back or upstream changed. Upload a source model on Source models, or reduce one.'
                  : user.role === 'admin'
                    ? 'Invite your team on Admin › People; their invitations and the review mail appear on Admin › Mail.'
                    : 'Read approved reduced models on Reduced models; controller projects pull them by version.'}
              </p>
            </Section>
          ) : null}
        </div>
        <Section title="Recent activity" testId="recent-activity">
          <ActivityFeed items={activity.recent} />
        </Section>
      </div>
    </>
  );
}
