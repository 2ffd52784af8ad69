'use client';
/**
 * A background job's progress: the stage in words and the fraction done, or, when it failed, its error
 * and a retry button. Polling is the page's business (TanStack Query); this only shows what it is given.
 */
import { useId } from 'react';
import { INK, VERDICT_COLORS } from '../charts/theme';
import { percentText, progressView, type JobStatus } from './progress';

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
  /** called by the retry button; without it no button is shown */
  readonly onRetry?: () => void;
  readonly retrying?: boolean;
}

export function ProgressBar({ status, stage, fraction, label = 'Job progress', error, onRetry, retrying }: ProgressBarProps) {
  const labelId = useId();
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
    </div>
  );
}
