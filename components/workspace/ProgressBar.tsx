'use client';
/**
 * A background job's progress: the stage in words and the fraction done, with the stage's counts and the
 * time left when known, and a cancel button; when it failed, its error and a retry button; when it was
 * cancelled, who cancelled it and a button to queue it again. Polling is the page's business (TanStack
 * Query); this only shows what it is given.
 */
import { useId } from 'react';
import { INK, VERDICT_COLORS } from '../charts/theme';
import { countsText, percentText, progressView, timeLeftText, type JobStatus, type StageCounts, type TimeLeftEstimate } from './progress';

export interface ProgressBarProps {
  readonly status: JobStatus;
  /** current stage in words, e.g. "Computing Hankel singular values" */
  readonly stage: string;
  /** 0..1; null while unknown */
  readonly fraction?: number | null;
  /** what the job is, e.g. "Analysis of v3" */
  readonly label?: string;
  /** the job's error message, shown when it failed */
  readonly error?: string;
  /** called by the retry button (failed or cancelled); without it no button is shown */
  readonly onRetry?: () => void;
  readonly retrying?: boolean;
  /** counts within the current stage ("ADI step 14 of at most 200, residual 3·10⁻⁷") */
  readonly counts?: StageCounts | null;
  readonly timeLeft?: TimeLeftEstimate | null;
  /** called by the cancel button (queued or running); without it no button is shown */
  readonly onCancel?: () => void;
  readonly cancelling?: boolean;
  /** someone asked to stop it: it is stopping (running) or was stopped by this person (cancelled) */
  readonly cancelledBy?: string | null;
  readonly cancelRequested?: boolean;
}

export function ProgressBar({
  status,
  stage,
  fraction,
  label = 'Job progress',
  error,
  onRetry,
  retrying,
  counts,
  timeLeft,
  onCancel,
  cancelling,
  cancelledBy,
  cancelRequested,
}: ProgressBarProps) {
  const labelId = useId();
  if (status === 'cancelled') {
    return (
      <div className="panel p-4 text-sm" data-testid="job-cancelled" data-status="cancelled">
        <p className="font-medium">
          {label}: cancelled{cancelledBy ? ` by ${cancelledBy}` : ''}
        </p>
        <p className="mt-1 text-graphite-soft">{stage.trim() || 'Cancelled'}. Nothing of it was kept.</p>
        {onRetry ? (
          <button type="button" className="button-quiet mt-3" onClick={onRetry} disabled={retrying}>
            {retrying ? 'Queuing…' : 'Queue again'}
          </button>
        ) : null}
      </div>
    );
  }
  if (status === 'failed') {
    return (
      <div role="alert" className="panel p-4 text-sm" data-testid="job-failed">
        <p className="font-medium" style={{ color: VERDICT_COLORS.fail }}>
          {label}: failed{stage.trim() ? ` during “${stage.trim()}”` : ''}
        </p>
        <p className="num mt-1 break-words">{error?.trim() || 'The job stopped without an error message.'}</p>
        {onRetry ? (
          <button type="button" className="button-quiet mt-3" onClick={onRetry} disabled={retrying}>
            {retrying ? 'Retrying…' : 'Retry'}
          </button>
        ) : null}
      </div>
    );
  }
  const view = progressView(status, stage, fraction);
  const stopping = cancelRequested && status === 'running';
  const extra = [status === 'running' && counts ? countsText(counts) : null, status === 'running' && timeLeft && !stopping ? timeLeftText(timeLeft) : null]
    .filter(Boolean)
    .join(' · ');
  const active = status === 'queued' || status === 'running';
  return (
    <div className="panel p-4 text-sm" data-testid="job-progress" data-status={status}>
      <div className="flex items-baseline justify-between gap-2">
        <span id={labelId} className="font-medium">
          {label}
        </span>
        <span className="num text-graphite-soft">{view.percent === null ? '' : percentText(view.percent)}</span>
      </div>
      <div
        role="progressbar"
        aria-labelledby={labelId}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={view.percent === null ? undefined : Math.round(view.percent)}
        aria-valuetext={view.valueText}
        className="mt-2 h-2 w-full overflow-hidden rounded-sheet bg-sheet-sunk"
      >
        <div
          className={`h-full ${view.percent === null ? 'w-1/3 animate-pulse' : ''}`}
          style={{ width: view.percent === null ? undefined : `${view.percent}%`, background: INK.teal }}
        />
      </div>
      <p className="mt-1 text-graphite-soft" aria-live="polite">
        {view.valueText}
      </p>
      {extra ? (
        <p className="num mt-1 text-xs text-graphite-soft" data-testid="job-counts">
          {extra}
        </p>
      ) : null}
      {stopping ? (
        <p className="mt-1 text-xs" data-testid="job-stopping">
          Stopping{cancelledBy ? ` (cancelled by ${cancelledBy})` : ''}: the worker ends it within a few seconds, keeping nothing of it.
        </p>
      ) : null}
      {active && onCancel && !stopping ? (
        <button type="button" className="button-quiet mt-3" onClick={onCancel} disabled={cancelling}>
          {cancelling ? 'Cancelling…' : 'Cancel job'}
        </button>
      ) : null}
    </div>
  );
}
