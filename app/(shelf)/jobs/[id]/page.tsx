// One background job: what it works on, its worker class, who queued it, when it ran, and its progress
// with the stage's counts and the time left (polled), with Cancel for its owner or an admin and "Queue
// again" / Retry for engineers once it failed or was cancelled.
import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { requirePageRole } from '@/lib/auth';
import { getJob, jobIdSchema, jobSubject, mayCancel, type JobView } from '@/lib/jobs/jobs';
import { largeJobThresholds } from '@/lib/jobs/worker-class';
import { PageHeader } from '@/components/shell/PageHeader';
import { JobProgress } from '@/components/source-models/JobProgress';

export const metadata: Metadata = { title: 'Job' };
export const dynamic = 'force-dynamic';

const KIND_WORDS: Record<JobView['kind'], string> = {
  analysis: 'Analysis',
  reduction: 'Reduction',
  response: 'Input-signal response',
};

const when = (iso: string | null) => (iso ? `${iso.slice(0, 10)} ${iso.slice(11, 19)} UTC` : '—');

export default async function JobPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageRole();
  const parsed = jobIdSchema.safeParse(await params);
  if (!parsed.success) notFound();
  const job = await getJob(parsed.data.id).catch(() => null);
  if (!job) notFound();
  const subject = await jobSubject(job);
  const thresholds = largeJobThresholds();
  const label = `${KIND_WORDS[job.kind]} of ${subject.words}`;
  return (
    <>
      <PageHeader
        title={`${KIND_WORDS[job.kind]} job`}
        lead={
          <>
            {subject.href ? <Link href={subject.href}>{subject.words}</Link> : subject.words} · {job.workerClass} job · queued by{' '}
            {job.createdByName ?? 'the system'}
          </>
        }
      />
      <div className="space-y-6">
        <JobProgress
          initial={job}
          label={label}
          canRetry={user.role === 'engineer'}
          canCancel={mayCancel(user, job)}
          showDetailsLink={false}
        />
        <dl className="panel grid grid-cols-[max-content_1fr] gap-x-6 gap-y-1 p-4 text-sm" data-testid="job-facts">
          <dt className="text-graphite-soft">Worker class</dt>
          <dd>
            <span className="num">{job.workerClass}</span>{' '}
            <span className="text-graphite-soft">
              (large above {thresholds.states} states or {thresholds.nonzeros.toLocaleString('en-US')} nonzeros in A; decided when it was queued)
            </span>
          </dd>
          <dt className="text-graphite-soft">Attempts</dt>
          <dd className="num">{job.attempts}</dd>
          <dt className="text-graphite-soft">Queued</dt>
          <dd className="num">{when(job.createdAt)}</dd>
          <dt className="text-graphite-soft">Started</dt>
          <dd className="num">{when(job.startedAt)}</dd>
          <dt className="text-graphite-soft">Finished</dt>
          <dd className="num">{when(job.finishedAt)}</dd>
          {job.cancelledBy ? (
            <>
              <dt className="text-graphite-soft">Cancelled by</dt>
              <dd>
                {job.cancelledBy.name ?? 'someone'} <span className="num">{when(job.cancelRequestedAt)}</span>
              </dd>
            </>
          ) : null}
        </dl>
      </div>
    </>
  );
}
