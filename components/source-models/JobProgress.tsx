'use client';
// A background job's progress bar, polled with TanStack Query (GET /api/jobs/{id}) about once a second
// while the job is queued or running. When it succeeds the page is refreshed (its server components then
// read the result) or the caller's onSucceeded takes over; when it fails, its error and, for those who
// may, a Retry button (POST /api/jobs/{id}/retry). While queued or running, its owner or an admin may
// cancel it (POST /api/jobs/{id}/cancel); a cancelled job may be queued again like a failed one. The
// stage's counts and the time left come from the job route (lib/jobs/jobs.ts, JobView).
import Link from 'next/link';
import { useRouter } from 'next/navigation';
import { useEffect, useRef } from 'react';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { apiFetch } from '@/components/api-client';
import { ProgressBar } from '@/components/workspace/ProgressBar';
import type { JobView } from '@/lib/jobs/jobs';

const POLL_MS = 1000;

export function JobProgress({
  initial,
  label,
  canRetry,
  canCancel = false,
  showDetailsLink = true,
  onSucceeded,
}: {
  initial: JobView;
  label: string;
  canRetry: boolean;
  /** the job's owner or an admin: show the cancel button (the server decides again) */
  canCancel?: boolean;
  /** a link to the job's own page (/jobs/{id}) */
  showDetailsLink?: boolean;
  /** what to do once the job has succeeded; default: refresh the page's server data */
  onSucceeded?: (job: JobView) => void;
}) {
  const router = useRouter();
  const queryClient = useQueryClient();
  const key = ['job', initial.id];
  const { data: job = initial } = useQuery({
    queryKey: key,
    queryFn: async () => (await apiFetch<{ job: JobView }>(`/api/jobs/${initial.id}`)).job,
    initialData: initial,
    staleTime: 0,
    refetchInterval: (q) => {
      const status = q.state.data?.status;
      return status === 'succeeded' || status === 'failed' || status === 'cancelled' ? false : POLL_MS;
    },
    refetchIntervalInBackground: true,
  });
  const retry = useMutation({
    mutationFn: async () => (await apiFetch<{ job: JobView }>(`/api/jobs/${initial.id}/retry`, { method: 'POST' })).job,
    onSuccess: (next) => queryClient.setQueryData(key, next),
  });
  const cancel = useMutation({
    mutationFn: async () => (await apiFetch<{ job: JobView }>(`/api/jobs/${initial.id}/cancel`, { method: 'POST' })).job,
    onSuccess: (next) => queryClient.setQueryData(key, next),
  });

  const reported = useRef(initial.status === 'succeeded');
  useEffect(() => {
    if (job.status !== 'succeeded' || reported.current) return;
    reported.current = true;
    if (onSucceeded) onSucceeded(job);
    else router.refresh();
  }, [job, onSucceeded, router]);

  const attempts = job.attempts > 1 ? ` (attempt ${job.attempts})` : '';
  return (
    <div data-testid="job" data-job-status={job.status}>
      <ProgressBar
        status={job.status}
        stage={`${job.stage}${job.status === 'running' ? attempts : ''}`}
        fraction={job.fraction}
        label={label}
        error={job.error ?? undefined}
        onRetry={canRetry ? () => retry.mutate() : undefined}
        retrying={retry.isPending}
        counts={job.detail}
        timeLeft={job.timeLeft}
        onCancel={canCancel ? () => cancel.mutate() : undefined}
        cancelling={cancel.isPending}
        cancelRequested={job.cancelRequestedAt !== null}
        cancelledBy={job.cancelledBy?.name ?? null}
      />
      {retry.error || cancel.error ? (
        <p role="alert" className="mt-2 text-sm text-okabe-vermillion">
          {(retry.error ?? cancel.error)!.message}
        </p>
      ) : null}
      {showDetailsLink ? (
        <p className="mt-1 text-xs">
          <Link href={`/jobs/${job.id}`}>Job details</Link> <span className="text-graphite-soft">({job.workerClass} job)</span>
        </p>
      ) : null}
    </div>
  );
}
