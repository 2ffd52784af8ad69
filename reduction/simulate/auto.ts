/**
 * `auto`: choose a solver from the input, the model's size and its stiffness, and say why.
 *
 * - Piecewise-constant input on few distinct interval lengths: the exact solver is exact at any stiffness
 *   and costs one n×n-ish matrix exponential per distinct length (about 16n³ flops with Padé 13, Higham
 *   2005) plus n² per output point. Up to `EXACT_ALWAYS` states that is cheap enough to take always; up to
 *   `EXACT_MAX` states it is taken for stiff models, where the alternatives pay for stiffness too.
 * - Otherwise a stiff model (stiffness ratio ≥ 10³, or a stability-bound explicit step count above 10⁵)
 *   goes to the stiff solver and the rest to the explicit one. The threshold 10³ is common practice for
 *   calling a linear model stiff; the explicit bound uses RK stability along the real axis
 *   (step-limits.ts, explicitStabilitySteps: |hλ| ≲ 3.3 for Dormand–Prince 5(4), Hairer & Wanner 1996, §IV.2).
 *   The stable poles are those of the analysis' rule (poles.ts, classifyPoles).
 *
 * The stiffness ratio (fastest over slowest decay rate of the stable poles) comes from the eigenvalues for
 * small models; above `EIGEN_MAX` states it is estimated by power iteration on A and on A⁻¹ (largest over
 * smallest eigenvalue modulus; Golub & Van Loan 2013, §7.3), which costs one LU and a few dozen
 * matrix–vector products instead of an O(n³) eigenvalue decomposition with a large constant.
 */
import { eigenvalues, luFactor, type Matrix } from '../linalg/index';
import type { InputSignal } from './inputs';
import { luSolveVector } from './iteration-matrix';
import { matVec } from './linear-system';
import type { CheckedOptions } from './output-grid';
import { IntervalLengths } from './exact';
import type { SolverName } from './types';
import { classifyPoles, stiffnessFromRates } from '../poles';
import { explicitStabilitySteps } from '../step-limits';

export const EXACT_ALWAYS = 500;
export const EXACT_MAX = 2000;
const EIGEN_MAX = 200;
/** Stiffness ratio from which a linear model counts as stiff (common practice); the reduction report uses it too. */
export const STIFF_RATIO = 1e3;
/** Explicit steps for stability alone above which a model counts as stiff whatever its ratio (also the sparse path's rule). */
export const EXPLICIT_STEP_LIMIT = 1e5;
const MAX_EXPONENTIALS = 4;

export interface StiffnessEstimate {
  /** Largest decay rate (or eigenvalue modulus when estimated). */
  fastest: number;
  /** Smallest decay rate among stable poles (or eigenvalue modulus when estimated); 0 when none. */
  slowest: number;
  ratio: number;
  method: 'eigenvalues' | 'power iteration';
}

function powerIteration(apply: (x: Float64Array, out: Float64Array) => void, n: number, iterations = 60): number {
  let x = new Float64Array(n);
  // Deterministic, non-special start vector.
  for (let i = 0; i < n; i++) x[i] = 1 + ((i * 7919) % 13) / 13;
  let out = new Float64Array(n);
  const norm = (v: Float64Array) => Math.sqrt(v.reduce((s, e) => s + e * e, 0));
  const s0 = norm(x);
  for (let i = 0; i < n; i++) x[i] /= s0;
  let logSum = 0;
  let counted = 0;
  for (let k = 0; k < iterations; k++) {
    apply(x, out);
    const g = norm(out);
    if (!(g > 0) || !Number.isFinite(g)) return g;
    // Geometric mean of the growth over the second half: robust to a complex dominant pair.
    if (k >= iterations / 2) {
      logSum += Math.log(g);
      counted++;
    }
    for (let i = 0; i < n; i++) out[i] /= g;
    [x, out] = [out, x];
  }
  return Math.exp(logSum / counted);
}

export function estimateStiffness(A: Matrix): StiffnessEstimate {
  const n = A.rows;
  if (n <= EIGEN_MAX) {
    const ev = eigenvalues(A);
    const { stability } = classifyPoles(ev);
    const s = stiffnessFromRates(stability.flatMap((c, k) => (c === 'stable' ? [-ev.re[k]] : [])));
    return { fastest: s.fastestDecayRate ?? 0, slowest: s.slowestDecayRate ?? 0, ratio: s.stiffnessRatio ?? 1, method: 'eigenvalues' };
  }
  const fastest = powerIteration((x, out) => matVec(A, x, out), n);
  const lu = luFactor(A);
  let slowest = 0;
  if (lu.zeroPivot < 0) {
    const work = new Float64Array(n);
    const inv = powerIteration((x, out) => {
      out.set(x);
      luSolveVector(lu, out, work);
    }, n);
    slowest = inv > 0 && Number.isFinite(inv) ? 1 / inv : 0;
  }
  return { fastest, slowest, ratio: slowest > 0 ? fastest / slowest : Infinity, method: 'power iteration' };
}

/** How many distinct interval lengths the exact solver would need exponentials for. */
export function distinctIntervalLengths(input: InputSignal, opts: CheckedOptions, limit = MAX_EXPONENTIALS + 1): number {
  const events = [...Array.from(opts.times), ...Array.from(input.breakpoints).filter((b) => b > 0 && b < opts.tEnd)]
    .filter((t) => t > 0)
    .sort((a, b) => a - b);
  const seen = new IntervalLengths<true>();
  let t = 0;
  for (const e of events) {
    if (e - t <= 1e-12 * opts.tEnd) continue;
    if (!seen.get(e - t)) seen.set(e - t, true);
    if (seen.size >= limit) break;
    t = e;
  }
  return seen.size;
}

const fmt = (v: number) => (Number.isFinite(v) ? Number(v.toPrecision(3)).toString() : '∞');

export function chooseSolver(A: Matrix, input: InputSignal, opts: CheckedOptions): { solver: SolverName; reason: string } {
  const n = A.rows;
  const exponentials = distinctIntervalLengths(input, opts);
  const fewLengths = exponentials <= MAX_EXPONENTIALS;
  const inputText = `${input.description}, ${fewLengths ? `${exponentials} distinct interval length${exponentials === 1 ? '' : 's'}` : 'many distinct interval lengths'}`;
  if (fewLengths && n <= EXACT_ALWAYS) {
    return {
      solver: 'exact',
      reason: `exact: the input is piecewise constant (${inputText}), so zero-order-hold discretisation is exact at any stiffness; with n = ${n} states the matrix exponential is cheap`,
    };
  }
  const s = estimateStiffness(A);
  const stabilitySteps = explicitStabilitySteps(s.fastest, opts.tEnd);
  const stiff = s.ratio >= STIFF_RATIO || stabilitySteps > EXPLICIT_STEP_LIMIT;
  const stiffText =
    `stiffness ratio ≈ ${fmt(s.ratio)} (${s.method}; fastest rate ${fmt(s.fastest)}, slowest ${fmt(s.slowest)}), ` +
    `an explicit method needs ≳ ${fmt(stabilitySteps)} steps for stability alone`;
  if (fewLengths && stiff && n <= EXACT_MAX) {
    return {
      solver: 'exact',
      reason: `exact: the model is stiff (${stiffText}) and the input is piecewise constant (${inputText}); one matrix exponential of size ${n} beats both adaptive solvers`,
    };
  }
  if (stiff) {
    return { solver: 'stiff', reason: `stiff: ${stiffText}; n = ${n}, input: ${inputText}` };
  }
  return {
    solver: 'explicit',
    reason: `explicit: not stiff (${stiffText}); with n = ${n} states an explicit method avoids O(n³) factorisations and exponentials; input: ${inputText}`,
  };
}
