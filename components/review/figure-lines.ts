/**
 * An accuracy report's figures as table lines, for one report or several side by side (at approval
 * against now; an old version against its re-run). Reads accuracy_reports.figures as the reduction job
 * writes it (lib/engine-tasks/records.ts, AccuracyFiguresRecord), tolerating older or partial reports: a
 * figure that is missing or not a finite number shows as a dash, never as zero. Values leave formatted
 * with their units (lib/format.ts).
 */
import { formatCount, formatFrequency, formatNumber, formatPercent } from '@/lib/format';
import { acceptanceWord, storedAcceptance } from '@/lib/acceptance';

export interface FigureLine {
  key: string;
  label: string;
  /** one formatted value per figure set, in the order given */
  values: string[];
  /** the raw numbers, for telling which set is better; null where missing */
  numbers: (number | null)[];
  /** smaller is better (errors); false for counts and ratios that are neither */
  lowerIsBetter: boolean;
}

type Figures = Record<string, unknown> | null | undefined;

const finite = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

interface LineSpec {
  key: string;
  /** other names the same figure has had */
  aliases?: string[];
  label: string;
  format: (v: number, figures: Record<string, unknown>) => string;
  lowerIsBetter: boolean;
  /** where the figure sits when it is not a top-level key */
  read?: (figures: Record<string, unknown>) => unknown;
}

const bandFigure = (key: string) => (f: Record<string, unknown>) =>
  f.frequencyLimited && typeof f.frequencyLimited === 'object' ? (f.frequencyLimited as Record<string, unknown>)[key] : undefined;

const LINES: readonly LineSpec[] = [
  { key: 'fullOrder', label: 'Full order', format: (v) => formatCount(v), lowerIsBetter: false },
  { key: 'reducedOrder', aliases: ['order'], label: 'Reduced order', format: (v) => formatCount(v), lowerIsBetter: false },
  { key: 'hInfinityError', label: '‖G − Gr‖∞', format: (v) => formatNumber(v), lowerIsBetter: true },
  { key: 'hInfinityErrorRelative', label: '‖G − Gr‖∞ / ‖G‖∞', format: (v) => formatPercent(v), lowerIsBetter: true },
  {
    key: 'hInfinityErrorFrequency',
    label: 'Frequency of the largest error',
    format: (v, f) => formatFrequency(v, typeof f.timeBase === 'string' ? f.timeBase : 's'),
    lowerIsBetter: false,
  },
  { key: 'errorBound', label: 'A-priori error bound', format: (v) => formatNumber(v), lowerIsBetter: true },
  // Frequency-limited balanced truncation: measured inside and outside its band (no bound applies).
  { key: 'inBandError', label: 'Error inside the band (measured)', format: (v) => formatNumber(v), lowerIsBetter: true, read: bandFigure('inBandError') },
  { key: 'outOfBandError', label: 'Error outside the band (measured)', format: (v) => formatNumber(v), lowerIsBetter: true, read: bandFigure('outOfBandError') },
  { key: 'h2Error', label: '‖G − Gr‖₂', format: (v) => formatNumber(v), lowerIsBetter: true },
  { key: 'zeroFrequencyGainError', label: 'DC gain error (largest entry)', format: (v) => formatNumber(v), lowerIsBetter: true },
  { key: 'peakStepError', label: 'Peak step-response error', format: (v) => formatNumber(v), lowerIsBetter: true },
  { key: 'stiffnessRatioFull', aliases: ['fullStiffnessRatio'], label: 'Stiffness ratio, full', format: (v) => formatNumber(v), lowerIsBetter: false },
  { key: 'stiffnessRatioReduced', aliases: ['reducedStiffnessRatio'], label: 'Stiffness ratio, reduced', format: (v) => formatNumber(v), lowerIsBetter: false },
];

function valueOf(figures: Figures, spec: LineSpec): number | null {
  if (!figures) return null;
  if (spec.read) return finite(spec.read(figures));
  for (const key of [spec.key, ...(spec.aliases ?? [])]) {
    const v = finite(figures[key]);
    if (v !== null) return v;
  }
  return null;
}

/** The stored acceptance verdict in words (lib/acceptance.ts): PASS / FAIL / NOT CHECKED with the worst error, or a dash. */
export function acceptanceText(figures: Figures, acceptancePassed: boolean | null | undefined): string {
  const v = storedAcceptance(figures, acceptancePassed);
  if (!v) return '—';
  const detail = v.worstError !== null && v.maxError !== null ? ` (worst ${formatNumber(v.worstError)} against ${formatNumber(v.maxError)})` : '';
  return `${acceptanceWord(v)}${detail}`;
}

/**
 * One line per known figure that at least one set states. `acceptance` gives each set's
 * accuracy_reports.acceptance_passed, read with the figures' verdict record by lib/acceptance.ts.
 */
export function figureLines(sets: readonly Figures[], acceptance?: readonly (boolean | null | undefined)[]): FigureLine[] {
  const lines: FigureLine[] = [];
  for (const spec of LINES) {
    const numbers = sets.map((f) => valueOf(f, spec));
    if (numbers.every((n) => n === null)) continue;
    lines.push({
      key: spec.key,
      label: spec.label,
      numbers,
      values: numbers.map((n, i) => (n === null ? '—' : spec.format(n, sets[i] ?? {}))),
      lowerIsBetter: spec.lowerIsBetter,
    });
  }
  // A method without an a-priori bound says so where the bound would be.
  const noBound = sets.map((f) => (f && typeof f.errorBoundNote === 'string' ? f.errorBoundNote : null));
  if (noBound.some((n) => n !== null)) {
    const at = lines.findIndex((l) => l.key === 'errorBound');
    const line: FigureLine = {
      key: 'errorBoundNote',
      label: 'A-priori error bound',
      values: sets.map((f, i) => noBound[i] ?? (finite(f?.errorBound) !== null ? formatNumber(finite(f?.errorBound)!) : '—')),
      numbers: sets.map(() => null),
      lowerIsBetter: false,
    };
    if (at >= 0) lines.splice(at, 1, line);
    else lines.splice(Math.min(lines.length, 4), 0, line);
  }
  const band = sets.map((f) => (f && f.frequencyLimited && typeof f.frequencyLimited === 'object' ? (f.frequencyLimited as Record<string, unknown>) : null));
  if (band.some((b) => b !== null)) {
    lines.push({
      key: 'band',
      label: 'Band balanced on (rad per time unit)',
      values: band.map((b) => {
        const lo = finite((b?.band as Record<string, unknown> | undefined)?.minFrequency);
        const hi = finite((b?.band as Record<string, unknown> | undefined)?.maxFrequency);
        return lo !== null && hi !== null ? `${formatNumber(lo)}–${formatNumber(hi)}` : '—';
      }),
      numbers: sets.map(() => null),
      lowerIsBetter: false,
    });
  }
  const stable = sets.map((f) => (f && typeof f.reducedStable === 'boolean' ? f.reducedStable : null));
  if (band.some((b) => b !== null) || stable.some((v) => v === false)) {
    lines.push({
      key: 'reducedStable',
      label: 'Reduced model stable',
      values: stable.map((v) => (v === null ? '—' : v ? 'yes' : 'NO')),
      numbers: sets.map(() => null),
      lowerIsBetter: false,
    });
  }
  const verdicts = sets.map((f, i) => acceptanceText(f, acceptance?.[i]));
  if (verdicts.some((v) => v !== '—')) {
    lines.push({ key: 'acceptance', label: 'Acceptance band', values: verdicts, numbers: sets.map(() => null), lowerIsBetter: false });
  }
  return lines;
}

/** For two sets: which one is better on a line, in words ('' when equal, unknown, or not comparable). */
export function comparisonNote(line: FigureLine): string {
  if (!line.lowerIsBetter || line.numbers.length !== 2) return '';
  const [a, b] = line.numbers;
  if (a === null || b === null || a === b) return '';
  if (a === 0 || b === 0) return b < a ? 'smaller' : 'larger';
  const ratio = b / a;
  return ratio < 1 ? `${formatNumber(1 / ratio, { significant: 2 })}× smaller` : `${formatNumber(ratio, { significant: 2 })}× larger`;
}
