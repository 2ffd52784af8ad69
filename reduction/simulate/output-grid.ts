/**
 * Output times and the recorder that keeps only the outputs asked for. Solvers hand it the state at each
 * output time (from their dense output); it evaluates y = Cx + Du with the input in effect at that time
 * (right-continuous: at a jump the new value), so nothing per internal step is stored.
 */
import { ModelError } from '../errors';
import { type Matrix, zeros } from '../linalg/matrix';
import type { InputSignal } from './inputs';
import { pieceAfter, pieceAt } from './inputs';
import type { OutputMap } from './linear-system';
import { DEFAULT_ABS_TOL, DEFAULT_POINTS, DEFAULT_REL_TOL, type SharedExponentialStore, type SimulationOptions } from './types';

export interface CheckedOptions {
  tEnd: number;
  relTol: number;
  absTol: number;
  times: Float64Array;
  /** True when `times` is the uniform grid k·tEnd/(N−1). */
  uniform: boolean;
  initialState: Float64Array;
  fixedStep?: number;
  maxSteps: number;
  /** Exponentials shared with other exact runs of the same model (see exact.ts, SharedExponentials). */
  sharedExponentials?: SharedExponentialStore;
}

function positive(v: unknown, field: string, what: string): number {
  if (typeof v !== 'number' || !Number.isFinite(v) || v <= 0) {
    throw new ModelError('invalid_option', field, `${field} must be a positive number (${what}), got ${String(v)}`);
  }
  return v;
}

/** Validate simulation options against a model with n states. Throws invalid_option naming the option. */
export function checkOptions(opts: SimulationOptions, n: number): CheckedOptions {
  const tEnd = positive(opts.tEnd, 'tEnd', 'the end time of the simulation');
  const relTol = opts.relTol ?? DEFAULT_REL_TOL;
  const absTol = opts.absTol ?? DEFAULT_ABS_TOL;
  if (typeof relTol !== 'number' || !(relTol >= 1e-13 && relTol < 1)) {
    throw new ModelError('invalid_option', 'relTol', `relTol must be between 1e-13 and 1, got ${String(relTol)}`);
  }
  // A step from rest starts at x = 0, where a purely relative tolerance means nothing: absTol must be > 0.
  if (typeof absTol !== 'number' || !(absTol > 0) || !Number.isFinite(absTol)) {
    throw new ModelError('invalid_option', 'absTol', `absTol must be a positive finite number, got ${String(absTol)}`);
  }
  let times: Float64Array;
  let uniform = false;
  if (opts.times !== undefined) {
    if (opts.points !== undefined) {
      throw new ModelError('invalid_option', 'times', 'give either points (a uniform grid) or times, not both');
    }
    if (opts.times.length === 0) throw new ModelError('invalid_option', 'times', 'times must list at least one output time');
    times = Float64Array.from(opts.times);
    for (let k = 0; k < times.length; k++) {
      const t = times[k];
      if (!Number.isFinite(t) || t < 0 || t > tEnd) {
        throw new ModelError('invalid_option', 'times', `output time ${k + 1} (${t}) is outside [0, tEnd = ${tEnd}]`);
      }
      if (k > 0 && !(t > times[k - 1])) {
        throw new ModelError('invalid_option', 'times', `output times must increase strictly: time ${k + 1} (${t}) follows ${times[k - 1]}`);
      }
    }
  } else {
    const points = opts.points ?? DEFAULT_POINTS;
    if (!Number.isInteger(points) || points < 2) {
      throw new ModelError('invalid_option', 'points', `points must be a whole number ≥ 2, got ${String(points)}`);
    }
    times = new Float64Array(points);
    for (let k = 0; k < points; k++) times[k] = (tEnd * k) / (points - 1);
    times[points - 1] = tEnd;
    uniform = true;
  }
  const initialState = new Float64Array(n);
  if (opts.initialState !== undefined) {
    if (opts.initialState.length !== n) {
      throw new ModelError('dimension_mismatch', 'initialState', `initialState has ${opts.initialState.length} entries but the model has ${n} states`);
    }
    for (let i = 0; i < n; i++) {
      if (!Number.isFinite(opts.initialState[i])) throw new ModelError('non_finite', 'initialState', `initialState entry ${i + 1} is not finite`);
      initialState[i] = opts.initialState[i];
    }
  }
  if (opts.fixedStep !== undefined) positive(opts.fixedStep, 'fixedStep', 'the fixed step size');
  const maxSteps = opts.maxSteps ?? 1_000_000;
  positive(maxSteps, 'maxSteps', 'the safety limit on steps');
  return { tEnd, relTol, absTol, times, uniform, initialState, fixedStep: opts.fixedStep, maxSteps, sharedExponentials: opts.sharedExponentials };
}

export class OutputRecorder {
  readonly y: Matrix;
  /** Index of the next output time to fill. */
  next = 0;

  /** Jumps this close after an output time count as at it (see `pieceAfter`). */
  private readonly tol: number;

  constructor(
    readonly times: Float64Array,
    private readonly system: OutputMap,
    private readonly input: InputSignal,
  ) {
    this.y = zeros(times.length, system.p);
    this.tol = 1e-12 * Math.max(times.length > 0 ? times[times.length - 1] : 0, 1e-300);
  }

  get done(): boolean {
    return this.next >= this.times.length;
  }

  /** The next output time (Infinity when all are filled). */
  get nextTime(): number {
    return this.next < this.times.length ? this.times[this.next] : Infinity;
  }

  /** Record y at the next output time from the state x there. */
  record(x: Float64Array): void {
    const t = this.times[this.next];
    const u = this.input.values[pieceAfter(this.input, t, this.tol)];
    this.system.output(x, u, this.y.data, this.next * this.system.p);
    this.next++;
  }

  /** Record y at the next output time from C·x there (p values of `cx` from `offset`); adds D·u. */
  recordFromCx(cx: Float64Array, offset: number): void {
    const t = this.times[this.next];
    const u = this.input.values[pieceAfter(this.input, t, this.tol)];
    this.system.outputFromCx(cx, offset, u, this.y.data, this.next * this.system.p);
    this.next++;
  }
}

/** The intervals on which u is constant inside [0, tEnd]: [start, end) with the piece index in effect. */
export function constantInputIntervals(input: InputSignal, tEnd: number): { start: number; end: number; piece: number }[] {
  const out: { start: number; end: number; piece: number }[] = [];
  let start = 0;
  let piece = pieceAt(input, 0);
  for (let k = piece; k < input.breakpoints.length; k++) {
    const b = input.breakpoints[k];
    if (b >= tEnd) break;
    if (b > start) out.push({ start, end: b, piece });
    start = Math.max(start, b);
    piece = k + 1;
  }
  out.push({ start, end: tEnd, piece });
  return out;
}

/** Weighted RMS norm of e with scale absTol + relTol·max(|a|, |b|) (Hairer, Nørsett & Wanner 1993, eq. II.4.11). */
export function errorNorm(e: Float64Array, a: Float64Array, b: Float64Array, relTol: number, absTol: number): number {
  let s = 0;
  const n = e.length;
  for (let i = 0; i < n; i++) {
    const sc = absTol + relTol * Math.max(Math.abs(a[i]), Math.abs(b[i]));
    const r = e[i] / sc;
    s += r * r;
  }
  return Math.sqrt(s / n);
}
