// How an engine task says how far it is: the stage in words (shown under the progress bar), the fraction of
// the whole task done, 0..1, and, where the stage is a loop, its counts (`ProgressDetail`: "ADI step 14 of
// at most 200, residual 3·10⁻⁷", "order 31 of 60"). Tasks call it between engine calls; the thread host
// forwards it, and the runner writes it to the job's row. In the engine thread the reporter is also where a
// cancelled task stops (thread.ts): a call made after the job was cancelled throws.
export interface ProgressDetail {
  /** iterations (steps, frequencies, orders…) done in this stage */
  readonly done: number;
  /** how many there will be, or at most (atMost) when the loop may stop early; absent when unknown */
  readonly total?: number | null;
  readonly atMost?: boolean;
  /** what one iteration is, singular: "ADI step", "frequency", "order" */
  readonly unit: string;
  /** a short figure beside the count, e.g. "residual 3·10⁻⁷" */
  readonly note?: string | null;
}

export type ProgressReporter = (stage: string, fraction: number, detail?: ProgressDetail | null) => void;

const SUPERSCRIPT: Record<string, string> = { '-': '⁻', '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹' };

/** A figure in the form the progress line shows: 3·10⁻⁷, 1.5·10⁴; plain between 0.001 and 10⁴. */
export function scientific(x: number, digits = 2): string {
  if (!Number.isFinite(x)) return String(x);
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (a >= 1e-3 && a < 1e4) return String(Number(x.toPrecision(digits)));
  const [mantissa, exponent] = x.toExponential(digits - 1).split('e');
  const m = String(Number(mantissa));
  const e = String(Number(exponent)).replace(/[-0-9]/g, (c) => SUPERSCRIPT[c]);
  return `${m}·10${e}`;
}

/** Keeps a detail the runner may store: finite whole counts, short words; null when it is not one. */
export function cleanDetail(detail: unknown): ProgressDetail | null {
  if (!detail || typeof detail !== 'object') return null;
  const d = detail as Record<string, unknown>;
  const done = Number(d.done);
  if (!Number.isFinite(done) || done < 0 || typeof d.unit !== 'string' || d.unit.trim() === '') return null;
  const total = d.total === undefined || d.total === null ? null : Number(d.total);
  const out: ProgressDetail = {
    done: Math.floor(done),
    total: total !== null && Number.isFinite(total) && total >= 0 ? Math.floor(total) : null,
    atMost: d.atMost === true,
    unit: d.unit.trim().slice(0, 60),
    note: typeof d.note === 'string' && d.note.trim() ? d.note.trim().slice(0, 120) : null,
  };
  return out;
}
