'use client';
// "Re-run recipe on the new version": queues a reduction with the same recipe on the newest source
// version (POST /api/reduced-versions/{id}/rerun, engineers only, decided again on the server). The new
// draft appears as the next version of the reduced model when the job finishes.
import { useState } from 'react';
import { useMutation } from '@tanstack/react-query';
import { apiFetch } from '@/components/api-client';

interface RerunAnswer {
  jobId: string;
  alreadyQueued: boolean;
  sourceNumber: number;
}

export function RerunButton({ versionId, newestSourceNumber }: { versionId: string; newestSourceNumber: number }) {
  const [message, setMessage] = useState<{ tone: 'ok' | 'error'; text: string } | null>(null);
  const rerun = useMutation({
    mutationFn: () => apiFetch<RerunAnswer>(`/api/reduced-versions/${versionId}/rerun`, { method: 'POST' }),
    onSuccess: (answer) =>
      setMessage({
        tone: 'ok',
        text: answer.alreadyQueued
          ? `A re-run on source v${answer.sourceNumber} is already queued (job ${answer.jobId.slice(0, 8)}). Its draft appears as the next version when it finishes.`
          : `Re-run queued on source v${answer.sourceNumber} (job ${answer.jobId.slice(0, 8)}). The new draft appears as the next version when the reduction finishes.`,
      }),
    onError: (err: Error) => setMessage({ tone: 'error', text: err.message }),
  });
  return (
    <span className="inline-flex flex-wrap items-center gap-2">
      <button type="button" className="button-quiet" disabled={rerun.isPending || rerun.isSuccess} onClick={() => rerun.mutate()} data-testid="rerun-recipe">
        {rerun.isPending ? 'Queuing…' : `Re-run recipe on source v${newestSourceNumber}`}
      </button>
      {message ? (
        <span role={message.tone === 'error' ? 'alert' : 'status'} className={`text-sm ${message.tone === 'error' ? 'text-okabe-vermillion' : ''}`}>
          {message.text}
        </span>
      ) : null}
    </span>
  );
}
