// The stored acceptance verdict, as every reader shows it: the comparison chart, the review sheet, the lists,
// the exports and the pull API. The verdict itself is decided once, by the worker, with
// reduction/acceptance.ts (acceptanceVerdict) on the error curve it computed; nothing here or in a page
// decides it again. Pure and browser-safe (no database, no engine kernels): client components import it.
//
// Stored form: accuracy_reports.figures.acceptance (AcceptanceRecord, lib/engine-tasks/records.ts) and the
// column accuracy_reports.acceptance_passed (true: pass, false: fail, null: not checked or no band), which
// pins filter on. Reports written before the three-state verdict carry `passed` only; they read as the
// column says, else as pass, or as fail when some sample was checked, or as not checked when none was.
import type { AcceptanceStatus } from '@/reduction/acceptance';
import { formatFrequency, formatNumber, frequencyUnit } from '@/lib/format';

export type { AcceptanceStatus };

export interface StoredAcceptance {
  status: AcceptanceStatus;
  /** the band, rad per model time unit, and the largest error allowed in it (null when the report kept no record) */
  minFrequency: number | null;
  maxFrequency: number | null;
  maxError: number | null;
  worstError: number | null;
  worstFrequency: number | null;
  pointsChecked: number | null;
  computedRange: [number, number] | null;
}

const finite = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);
const STATUSES: readonly AcceptanceStatus[] = ['pass', 'fail', 'not-checked'];

/** The column's value for a verdict: what pins ("acceptance band passed") filter on. */
export function acceptancePassedColumn(status: AcceptanceStatus | null): boolean | null {
  return status === 'pass' ? true : status === 'fail' ? false : null;
}

/**
 * The stored verdict of a report: its figures' acceptance record, else (older reports, test fixtures) the
 * column alone. Null when the recipe set no acceptance band.
 */
export function storedAcceptance(figures: unknown, acceptancePassed?: boolean | null): StoredAcceptance | null {
  const record =
    figures && typeof figures === 'object' && (figures as Record<string, unknown>).acceptance && typeof (figures as Record<string, unknown>).acceptance === 'object'
      ? ((figures as Record<string, unknown>).acceptance as Record<string, unknown>)
      : null;
  if (!record) {
    if (typeof acceptancePassed !== 'boolean') return null;
    return {
      status: acceptancePassed ? 'pass' : 'fail',
      minFrequency: null,
      maxFrequency: null,
      maxError: null,
      worstError: null,
      worstFrequency: null,
      pointsChecked: null,
      computedRange: null,
    };
  }
  const points = finite(record.pointsChecked) ?? finite(record.samplesChecked);
  let status: AcceptanceStatus;
  if (typeof record.status === 'string' && (STATUSES as readonly string[]).includes(record.status)) status = record.status as AcceptanceStatus;
  else if (typeof acceptancePassed === 'boolean') status = acceptancePassed ? 'pass' : 'fail';
  else if (record.passed === true) status = 'pass';
  else status = points === 0 ? 'not-checked' : 'fail';
  const range = Array.isArray(record.computedRange) && record.computedRange.length === 2 ? record.computedRange.map(finite) : null;
  return {
    status,
    minFrequency: finite(record.minFrequency),
    maxFrequency: finite(record.maxFrequency),
    maxError: finite(record.maxError),
    worstError: points === 0 ? null : finite(record.worstError),
    worstFrequency: points === 0 ? null : finite(record.worstFrequency),
    pointsChecked: points,
    computedRange: range && range[0] !== null && range[1] !== null ? [range[0], range[1]] : null,
  };
}

export const ACCEPTANCE_WORD: Record<AcceptanceStatus, string> = { pass: 'PASS', fail: 'FAIL', 'not-checked': 'NOT CHECKED' };

/** One word for tables: PASS, FAIL, NOT CHECKED, or a dash when no band was set. */
export function acceptanceWord(v: StoredAcceptance | null): string {
  return v ? ACCEPTANCE_WORD[v.status] : '—';
}

/**
 * The verdict in one sentence, as the chart writes it and the review sheet and exports repeat it, in the
 * model's time unit. `plain` (the exports' text files) writes every digit and ASCII only.
 */
export function acceptanceSentence(v: StoredAcceptance, timeBase = 's', plain = false): string {
  const word = ACCEPTANCE_WORD[v.status];
  const num = plain ? (x: number) => String(x) : (x: number) => formatNumber(x);
  const frequencyText = plain ? (w: number) => `${w} ${frequencyUnit(timeBase)}` : (w: number) => formatFrequency(w, timeBase);
  const dash = plain ? ' to ' : '–';
  const range = v.minFrequency !== null && v.maxFrequency !== null ? `${num(v.minFrequency)}${dash}${frequencyText(v.maxFrequency)}` : null;
  const at = v.worstError !== null && v.worstFrequency !== null ? `${num(v.worstError)} at ${frequencyText(v.worstFrequency)}` : null;
  const limit = v.maxError !== null ? num(v.maxError) : null;
  if (v.status === 'fail') {
    return at && limit && range ? `${word}: error ${at} exceeds ${limit} in the band ${range}` : `${word}: the error exceeds the acceptance band's limit`;
  }
  if (v.status === 'pass') {
    return at && limit && range ? `${word}: largest error ${at} is within ${limit} over ${range}` : `${word}: the error is within the acceptance band's limit`;
  }
  if (v.computedRange && range && v.pointsChecked) {
    return `${word}: the error was computed over ${num(v.computedRange[0])}${dash}${frequencyText(v.computedRange[1])}, the band is ${range}`;
  }
  return range ? `${word}: no error sample lies in the band ${range}` : `${word}: no error sample lies in the band`;
}
