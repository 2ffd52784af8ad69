/**
 * What a job's progress bar says, for sighted users and assistive technology alike (WAI-ARIA 1.2,
 * role "progressbar": aria-valuenow within aria-valuemin..max, aria-valuetext for the words; an
 * indeterminate bar leaves aria-valuenow out).
 */
import { withUnit } from '../charts/format';

export type JobStatus = 'queued' | 'running' | 'succeeded' | 'failed';

export interface ProgressView {
  /** 0..100, or null while the fraction is unknown */
  readonly percent: number | null;
  readonly valueText: string;
}

/**
 * Clamps a reported fraction into the bar. A queued job, or one whose fraction is unknown or NaN, gets an
 * indeterminate bar; a running job shows at most 99 % (it may still be writing its results), and only a
 * succeeded job shows 100 %.
 */
export function progressView(status: JobStatus, stage: string, fraction: number | null | undefined): ProgressView {
  const words = stage.trim() || (status === 'queued' ? 'Waiting for a worker' : status === 'succeeded' ? 'Done' : 'Working');
  if (status === 'succeeded') return { percent: 100, valueText: `${words}, ${percentText(100)}` };
  if (status !== 'running' || fraction === null || fraction === undefined || Number.isNaN(fraction)) {
    return { percent: null, valueText: words };
  }
  const percent = Math.min(99, Math.max(0, fraction * 100));
  return { percent, valueText: `${words}, ${percentText(percent)}` };
}

/** Whole percent, rounded down. */
export function percentText(percent: number): string {
  return withUnit(String(Math.floor(percent)), '%');
}
