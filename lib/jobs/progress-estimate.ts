// The time left of a running job, estimated from what its engine task reports (no database, no clock of its
// own: the caller passes "now", so the job route uses the database's clock and tests a fixed one).
//
// Two rates, each the plain linear extrapolation "what is left takes as long per unit as what is done":
//   - the whole attempt: elapsed · (1 − f) / f from the task's overall fraction f (its stages are weighted
//     by their usual share of the work, e.g. lib/engine-tasks/analysis-task.ts STAGES);
//   - the current stage, when it reports counts of a known total: stage elapsed · (total − done) / done.
// The job cannot end before its stage does, so with both the larger is taken; with only the stage's, it is
// a lower bound ("at least"). A stage whose total is only a cap ("ADI step 14 of at most 200": the loop
// stops early at its tolerance) gives no stage estimate. Too little to go on (under MIN_FRACTION done, or
// under MIN_ELAPSED_S seconds, or no count done yet) gives none: a wild first guess helps nobody.
import type { ProgressDetail } from '@/lib/engine-tasks/progress';

export const MIN_FRACTION = 0.02;
export const MIN_ELAPSED_S = 2;

export interface TimeLeft {
  /** seconds, rounded up to whole seconds */
  readonly seconds: number;
  /** true when only the current stage could be estimated: the job takes at least this long */
  readonly lowerBound: boolean;
  /** what the figure rests on */
  readonly basis: 'fraction' | 'counts' | 'fraction and counts';
}

export interface EstimateInput {
  readonly status: string;
  readonly fraction: number;
  readonly detail: ProgressDetail | null;
  /** when the current attempt began */
  readonly attemptStartedAt: Date | null;
  /** when the current stage began */
  readonly stageStartedAt: Date | null;
  readonly now: Date;
}

const seconds = (from: Date | null, to: Date): number | null => (from ? (to.getTime() - new Date(from).getTime()) / 1000 : null);

export function estimateTimeLeft(input: EstimateInput): TimeLeft | null {
  if (input.status !== 'running') return null;
  const f = Number.isFinite(input.fraction) ? Math.min(1, Math.max(0, input.fraction)) : 0;

  let whole: number | null = null;
  const elapsed = seconds(input.attemptStartedAt, input.now);
  if (elapsed !== null && elapsed >= MIN_ELAPSED_S && f >= MIN_FRACTION) whole = (elapsed * (1 - f)) / f;

  let stage: number | null = null;
  const d = input.detail;
  const stageElapsed = seconds(input.stageStartedAt, input.now);
  if (d && !d.atMost && d.total !== null && d.total !== undefined && d.done >= 1 && d.total >= d.done && stageElapsed !== null && stageElapsed >= 0) {
    stage = (stageElapsed * (d.total - d.done)) / d.done;
  }

  if (whole === null && stage === null) return null;
  if (whole !== null && stage !== null) return { seconds: Math.ceil(Math.max(whole, stage)), lowerBound: false, basis: 'fraction and counts' };
  if (whole !== null) return { seconds: Math.ceil(whole), lowerBound: false, basis: 'fraction' };
  return { seconds: Math.ceil(stage!), lowerBound: true, basis: 'counts' };
}
