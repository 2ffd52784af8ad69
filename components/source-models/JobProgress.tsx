'use client';
// A background job's progress bar, polled with TanStack Query (GET /api/jobs/{id}) about once a second
// while the job is queued or running. When it succeeds the page is refreshed (its server components then
// read the result) or the caller's onSucceeded takes over; when it fails, its error and, for those who
// may, a Retry button (POST /api/jobs/{id}/retry).
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
  onSucceeded,
}: {
  initial: JobView;
  label: string;
  canRetry: boolean;
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
      return status === 'succeeded' || status === 'failed' ? false : POLL_MS;
    },
    refetchIntervalInBackground: true,
  });
  const retry = useMutation({
    mutationFn: async () => (await apiFetch<{ job: JobView }>(`/api/jobs/${initial.id}/retry`, { method: 'POST' })).job,
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
      />
      {retry.error ? (
        <p role="alert" className="mt-2 text-sm text-okabe-vermillion">
          {retry.error.message}
        </p>
      ) : null}
    </div>
  );
}
