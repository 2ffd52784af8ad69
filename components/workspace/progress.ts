/**
 * What a job's progress bar says, for sighted users and assistive technology alike (WAI-ARIA 1.2,
 * role "progressbar": aria-valuenow within aria-valuemin..max, aria-valuetext for the words; an
 * indeterminate bar leaves aria-valuenow out).
 */
import { withUnit } from '@/lib/format';

export type JobStatus = 'queued' | 'running' | 'succeeded' | 'failed' | 'cancelled';

/** Counts within a stage, as the job route gives them (lib/engine-tasks/progress.ts, ProgressDetail). */
export interface StageCounts {
  readonly done: number;
  readonly total?: number | null;
  readonly atMost?: boolean;
  readonly unit: string;
  readonly note?: string | null;
}

/** An estimate of the time left, as the job route gives it (lib/jobs/progress-estimate.ts, TimeLeft). */
export interface TimeLeftEstimate {
  readonly seconds: number;
  readonly lowerBound: boolean;
}

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

/** "ADI step 14 of at most 200, residual 3·10⁻⁷", "frequency 31 of 60", "simulation 3" (no total known). */
export function countsText(d: StageCounts): string {
  const total = d.total === null || d.total === undefined ? '' : ` of ${d.atMost ? 'at most ' : ''}${d.total}`;
  return `${d.unit} ${d.done}${total}${d.note ? `, ${d.note}` : ''}`;
}

/**
 * "about 40 s left", "about 3 min left", "at least 2 h 10 min left" (a lower bound); under 5 s is "a few
 * seconds left". Seconds are rounded to 5 s below a minute, minutes below an hour.
 */
export function timeLeftText(t: TimeLeftEstimate): string {
  const s = Math.max(0, t.seconds);
  const lead = t.lowerBound ? 'at least' : 'about';
  if (s < 5) return t.lowerBound ? 'at least a few seconds left' : 'a few seconds left';
  let words: string;
  if (s < 60) words = `${Math.round(s / 5) * 5} s`;
  else if (s < 3600) words = `${Math.round(s / 60)} min`;
  else {
    const h = Math.floor(s / 3600);
    const m = Math.round((s - 3600 * h) / 60);
    words = m === 60 ? `${h + 1} h` : m > 0 ? `${h} h ${m} min` : `${h} h`;
  }
  return `${lead} ${words} left`;
}

/** Whole percent, rounded down. */
export function percentText(percent: number): string {
  return withUnit(String(Math.floor(percent)), '%');
}
