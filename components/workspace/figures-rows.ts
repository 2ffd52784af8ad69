/**
 * The accuracy report of a reduced-model version as table rows: accuracy against the full model, orders
 * and stiffness, and the simulation cost of full versus reduced under the same input and tolerances
 * (the engine's solver statistics: steps, rejected steps, right-hand-side evaluations, factorisations,
 * points stored, wall time). Every value leaves here formatted with its unit.
 */
import { formatCount, formatFactor, formatFrequency, formatNumber, formatPercent, formatWallTime } from '@/lib/format';
import type { SolverCostRecord } from '@/lib/engine-tasks/records';

type OptionalCount = 'rejectedSteps' | 'rhsEvaluations' | 'factorizations';

/**
 * One solver's cost as stored (lib/engine-tasks/records.ts SolverCostRecord; the solver as the engine names
 * it, e.g. "exact", "explicit", "stiff"); the counts a solver does not keep may be absent.
 */
export type SimulationCost = Readonly<Omit<SolverCostRecord, OptionalCount> & Partial<Pick<SolverCostRecord, OptionalCount>>>;

export interface AccuracyFigures {
  readonly fullOrder: number;
  readonly reducedOrder: number;
  /** ‖G - Gr‖∞, absolute */
  readonly hInfinityError: number | null;
  /** ‖G - Gr‖∞ / ‖G‖∞ as a fraction */
  readonly hInfinityErrorRelative: number | null;
  /** the method's a-priori bound on ‖G - Gr‖∞; null when the method has none */
  readonly errorBound: number | null;
  readonly h2Error: number | null;
  /** largest entry of |G(0) - Gr(0)|; null when the DC gain is not defined (pole at 0) */
  readonly zeroFrequencyGainError: number | null;
  /** largest absolute step-response error over all channels */
  readonly peakStepError: number | null;
  readonly stiffnessRatioFull: number | null;
  readonly stiffnessRatioReduced: number | null;
  readonly simulation?: { readonly full: SimulationCost; readonly reduced: SimulationCost };
  /** why there is no bound, for a method that has none (frequency-limited balanced truncation) */
  readonly errorBoundNote?: string | null;
  /** whether the reduced model's stable part is stable; absent where the method guarantees it */
  readonly reducedStable?: boolean;
  /** frequency-limited balanced truncation: the band (rad per time unit) and the errors measured in and out of it */
  readonly bandErrors?: {
    readonly minFrequency: number;
    readonly maxFrequency: number;
    readonly inBand: number;
    readonly inBandAt: number | null;
    readonly outOfBand: number;
    readonly outOfBandAt: number | null;
    readonly timeBase: string;
  } | null;
}

export interface FigureRow {
  readonly label: string;
  readonly value: string;
  /** short explanation for a value that needs one (a dash, a bound not met) */
  readonly note?: string;
}

export interface CostRow {
  readonly label: string;
  readonly full: string;
  readonly reduced: string;
  /** full over reduced, e.g. "250×"; dash when either is zero or missing */
  readonly ratio: string;
}

/** Measured error above the a-priori bound means a numerical problem; a relative slack of 1e-9 absorbs rounding (common practice). */
export const BOUND_SLACK = 1e-9;

function optional(x: number | null, format: (v: number) => string): string {
  return x === null || x === undefined ? '—' : format(x);
}

export function accuracyRows(f: AccuracyFigures): FigureRow[] {
  const rows: FigureRow[] = [
    { label: 'H∞ error ‖G − Gr‖∞', value: optional(f.hInfinityError, (v) => formatNumber(v)) },
    { label: 'H∞ error, relative to ‖G‖∞', value: optional(f.hInfinityErrorRelative, (v) => formatPercent(v)) },
    f.errorBoundNote
      ? { label: 'A-priori bound', value: 'none', note: f.errorBoundNote }
      : {
          label: 'A-priori bound',
          value: optional(f.errorBound, (v) => formatNumber(v)),
          ...(f.errorBound === null ? { note: 'the method gives no bound here' } : {}),
        },
  ];
  const b = f.bandErrors;
  if (b) {
    const band = `${formatNumber(b.minFrequency)}–${formatFrequency(b.maxFrequency, b.timeBase)}`;
    const at = (w: number | null) => (w === null ? undefined : `measured; largest at ${formatFrequency(w, b.timeBase)}`);
    rows.push(
      { label: `Error inside the band ${band}`, value: formatNumber(b.inBand), ...(at(b.inBandAt) ? { note: at(b.inBandAt) } : {}) },
      { label: 'Error outside the band', value: formatNumber(b.outOfBand), ...(at(b.outOfBandAt) ? { note: at(b.outOfBandAt) } : {}) },
    );
  }
  if (f.reducedStable !== undefined) {
    rows.push({
      label: 'Reduced model stable',
      value: f.reducedStable ? 'yes' : 'no',
      ...(f.reducedStable ? {} : { note: 'poles in the closed right half-plane: do not use it as it is' }),
    });
  }
  if (f.hInfinityError !== null && f.errorBound !== null) {
    const holds = f.hInfinityError <= f.errorBound * (1 + BOUND_SLACK);
    rows.push({
      label: 'Error within bound',
      value: holds ? 'yes' : 'no',
      ...(holds ? {} : { note: 'measured error exceeds the a-priori bound: check the computation' }),
    });
  }
  rows.push(
    { label: 'H2 error ‖G − Gr‖2', value: optional(f.h2Error, (v) => formatNumber(v)) },
    {
      label: 'DC-gain error',
      value: optional(f.zeroFrequencyGainError, (v) => formatNumber(v)),
      ...(f.zeroFrequencyGainError === null ? { note: 'not defined (pole at 0) or not computed' } : {}),
    },
    { label: 'Peak step-response error', value: optional(f.peakStepError, (v) => formatNumber(v)) },
    { label: 'Order, full → reduced', value: `${formatCount(f.fullOrder)} → ${formatCount(f.reducedOrder)}` },
    {
      label: 'Stiffness ratio, full → reduced',
      value: `${optional(f.stiffnessRatioFull, (v) => formatNumber(v))} → ${optional(f.stiffnessRatioReduced, (v) => formatNumber(v))}`,
    },
  );
  return rows;
}

function ratio(full: number | undefined, reduced: number | undefined): string {
  if (full === undefined || reduced === undefined || !(full > 0) || !(reduced > 0)) return '—';
  return formatFactor(full / reduced);
}

export function simulationCostRows(full: SimulationCost, reduced: SimulationCost): CostRow[] {
  const count = (x: number | undefined) => (x === undefined ? '—' : formatCount(x));
  const rows: CostRow[] = [
    { label: 'Solver', full: full.solver, reduced: reduced.solver, ratio: '' },
    { label: 'Steps', full: count(full.steps), reduced: count(reduced.steps), ratio: ratio(full.steps, reduced.steps) },
  ];
  const optionalCounts: [string, keyof SimulationCost][] = [
    ['Rejected steps', 'rejectedSteps'],
    ['Right-hand-side evaluations', 'rhsEvaluations'],
    ['Factorisations', 'factorizations'],
  ];
  for (const [label, key] of optionalCounts) {
    const a = full[key] as number | undefined;
    const b = reduced[key] as number | undefined;
    if (a === undefined && b === undefined) continue;
    rows.push({ label, full: count(a), reduced: count(b), ratio: ratio(a, b) });
  }
  rows.push(
    { label: 'Points stored', full: count(full.pointsStored), reduced: count(reduced.pointsStored), ratio: ratio(full.pointsStored, reduced.pointsStored) },
    { label: 'Wall time', full: formatWallTime(full.wallMs), reduced: formatWallTime(reduced.wallMs), ratio: ratio(full.wallMs, reduced.wallMs) },
  );
  return rows;
}
