/**
 * The stiff solver: the numerical differentiation formulas (NDF) of orders 1–5 with quasi-constant step
 * size, in backward-difference form, with variable order.
 *
 * Method: L. F. Shampine & M. W. Reichelt, SIAM J. Sci. Comput. 18(1):1–22, 1997, §2: the NDFs and their
 * κ coefficients, the quasi-constant step-size implementation in backward differences with the rescaling
 * matrices R and U on a step change, and the order and step selection. The section numbers and the κ
 * values are as recalled here; the κ values are the same as those of Debian's scipy BDF integrator, the
 * reference the tests compare step counts and solutions with. The constant-step error estimate is that of
 * Hairer, Nørsett & Wanner, "Solving ODE I", 2nd ed., Springer 1993, §III.2.
 *
 * For the linear model ẋ = A x + b (b = Bu constant between input jumps) with the step h and order k, the
 * formula for the new value y = y⁽⁰⁾ + d, with the predictor y⁽⁰⁾ = Σ_{j≤k} ∇ʲ yₙ, is
 *
 *     d − c·f(y⁽⁰⁾ + d) = −ψ,     c = h/αₖ,   αₖ = (1 − κₖ)·γₖ,   γₖ = Σ_{j≤k} 1/j,
 *     ψ = (Σ_{j=1..k} γⱼ ∇ʲ yₙ) / αₖ,
 *
 * and since f is affine with Jacobian A, the one Newton step is exact: (I − cA)·d = c·f(y⁽⁰⁾) − ψ. So a
 * step costs one right-hand side and one solve with the factorisation of I − cA, which is made once per
 * change of h or k (c changes with both) and reused while they stay. The local error estimate is
 * (κₖγₖ + 1/(k+1))·d; after k+1 steps of the same size the estimates of orders k − 1 and k + 1 (from the
 * differences ∇ᵏ and ∇ᵏ⁺²) decide the next order, and the largest admissible step of the three sets h
 * (a raise under 20 % at the same order is skipped, to keep the factorisation).
 *
 * Dense output is the interpolating polynomial of the step, Σ_{j≤k} ∇ʲ yₙ₊₁ Π_{m<j} (t − tₙ₊₁ + m·h)/((m+1)·h),
 * of order k. At an input jump the derivative of x jumps, so the method restarts at order 1 there.
 *
 * Descriptor form E ẋ = A x + b (the sparse path, `reduction/sparse/simulate.ts`): the formulas are applied
 * to ẋ = E⁻¹(A x + b) and multiplied through by E, so that E⁻¹ is never formed — the treatment of M y' = f(y)
 * in Hairer & Wanner, "Solving Ordinary Differential Equations II", 2nd ed., Springer 1996, §VI.1 (as
 * recalled; Shampine & Reichelt 1997 describe the same for their NDF code, also as recalled):
 *
 *     (E − c·A)·d = c·f(y⁽⁰⁾) − E·ψ,     f(y) = A y + b,
 *
 * the same d in exact arithmetic as the explicit form's, hence the same error estimate, step and order
 * selection and dense output (all in terms of the state). Only the (re)start needs ẋ itself, one solve
 * with E there.
 *
 * The step and order logic (`integrateNdf`) is written once; the linear algebra sits behind `NdfSystem`
 * (right-hand side, product with E, and solves with E − c·A for a few recent c): here dense, with
 * `luFactor` / `luSolve` of the linear-algebra interface (`reduction/linalg`), whatever backend serves it;
 * on the sparse path UMFPACK factors of E − c·A through one kept symbolic analysis.
 */
import { ModelError } from '../errors';
import { type LuFactorization, luFactor, luSolve } from '../linalg/index';
import type { StateSpaceModel } from '../model';
import { throwIfStopped, type LoopHooks } from '../stop';
import { startingStep } from './dormand-prince';
import type { InputSignal } from './inputs';
import { LinearSystem, type TimeSystem } from './linear-system';
import { type CheckedOptions, OutputRecorder, constantInputIntervals } from './output-grid';
import type { SimulationResult, TimeStepReport } from './types';

export const NDF_MAX_ORDER = 5;
/** κₖ of the NDFs, Shampine & Reichelt (1997) (k = 1…4; as recalled, see above); κ₅ = 0: order 5 is plain BDF5. */
export const NDF_KAPPA = [0, -0.185, -1 / 9, -0.0823, -0.0415, 0] as const;
/** γₖ = Σ_{j≤k} 1/j, k = 0…5. */
export const NDF_GAMMA: readonly number[] = Array.from({ length: NDF_MAX_ORDER + 1 }, (_, k) => {
  let s = 0;
  for (let j = 1; j <= k; j++) s += 1 / j;
  return s;
});
/** αₖ = (1 − κₖ)γₖ. */
export const NDF_ALPHA: readonly number[] = NDF_GAMMA.map((g, k) => (1 - NDF_KAPPA[k]) * g);
/** Error constants κₖγₖ + 1/(k+1), k = 0…5 (index 0 unused but defined as 1). */
export const NDF_ERROR_CONSTANT: readonly number[] = NDF_GAMMA.map((g, k) => NDF_KAPPA[k] * g + 1 / (k + 1));

const MIN_FACTOR = 0.2;
/**
 * At a selection point, a raise of h by less than this factor at the same order is skipped: each change
 * of h costs a factorisation of I − cA (n³/3 multiplications, a few hundred steps' worth at n = 1000).
 * Our choice, measured on the benchmark model (n = 300, relTol 1e-6): 31 factorisations instead of 39 for
 * 217 steps instead of 210; on the 3-state test model at most 4 % more steps over relTol 1e-3…1e-8.
 */
const SMALLEST_WORTHWHILE_RAISE = 1.2;
const MAX_FACTOR = 10;
/**
 * Safety factor on the predicted step. Codes with a Newton iteration lower 0.9 as the iteration count
 * grows; here the one linear solve is exact, so the factor stays 0.9. Measured on the 3-state test model
 * (rates 0.8, 25, 2000 s⁻¹) over relTol 1e-3…1e-8: 0.9 took 4–8 % fewer steps than 0.81, rejections included.
 */
const SAFETY = 0.9;

/**
 * The rescaling matrix of the backward differences for a step ratio ρ (Shampine & Reichelt 1997, §2):
 * R[i][j] = Π_{r=1..i} (r − 1 − ρ·j)/r for i, j = 0…k (R[i][0] = 0 for i ≥ 1, R[0][j] = 1).
 */
export function differenceRescaling(order: number, ratio: number): Float64Array {
  const s = order + 1;
  const R = new Float64Array(s * s);
  for (let j = 0; j < s; j++) {
    let p = 1;
    R[j] = 1;
    for (let i = 1; i < s; i++) {
      p *= (i - 1 - ratio * j) / i;
      R[i * s + j] = p;
    }
  }
  return R;
}

/** ∇ʲ ← Σᵢ (R·U)[i][j] ∇ⁱ for j ≤ k: the differences of the same polynomial on the grid of step ρ·h. */
function rescaleDifferences(D: Float64Array, n: number, order: number, ratio: number, scratch: Float64Array): void {
  if (ratio === 1) return; // U·U = I
  const s = order + 1;
  const R = differenceRescaling(order, ratio);
  const U = differenceRescaling(order, 1);
  const RU = new Float64Array(s * s);
  for (let i = 0; i < s; i++) {
    for (let j = 0; j < s; j++) {
      let v = 0;
      for (let q = 0; q < s; q++) v += R[i * s + q] * U[q * s + j];
      RU[i * s + j] = v;
    }
  }
  scratch.fill(0, 0, s * n);
  for (let j = 0; j < s; j++) {
    const out = j * n;
    for (let i = 0; i < s; i++) {
      const w = RU[i * s + j];
      if (w === 0) continue;
      const src = i * n;
      for (let e = 0; e < n; e++) scratch[out + e] += w * D[src + e];
    }
  }
  D.set(scratch.subarray(0, s * n));
}

/** Weighted RMS norm of v with scale absTol + relTol·|y| (HNW93 eq. II.4.11 with the new value as scale). */
function scaledNorm(v: Float64Array, vOff: number, y: Float64Array, n: number, relTol: number, absTol: number): number {
  let s = 0;
  for (let i = 0; i < n; i++) {
    const r = v[vOff + i] / (absTol + relTol * Math.abs(y[i]));
    s += r * r;
  }
  return Math.sqrt(s / n);
}

/** Factorisations of I − cA, made on demand and kept for the last few values of c. */
class IterationFactors {
  factorizations = 0;
  private readonly cache: { c: number; lu: LuFactorization }[] = [];

  constructor(
    private readonly A: { rows: number; data: Float64Array },
    private readonly keep = 4,
  ) {}

  for(c: number): LuFactorization {
    const hit = this.cache.findIndex((e) => e.c === c);
    if (hit >= 0) return this.cache[hit].lu;
    const n = this.A.rows;
    const W = { rows: n, cols: n, data: new Float64Array(n * n) };
    const a = this.A.data;
    for (let k = 0; k < n * n; k++) W.data[k] = -c * a[k];
    for (let i = 0; i < n; i++) W.data[i * n + i] += 1;
    const lu = luFactor(W);
    this.factorizations++;
    if (lu.zeroPivot >= 0) {
      throw new ModelError('unstable', 'A', `I − c·A is singular at c = ${c}: A has an eigenvalue at 1/c in the right half-plane`);
    }
    this.cache.unshift({ c, lu });
    if (this.cache.length > this.keep) this.cache.pop();
    return lu;
  }
}

/**
 * The linear algebra the NDFs need of E ẋ = A x + b (E = I when `massTimes` is absent). `derivative` (from
 * `TimeSystem`) is ẋ = E⁻¹(A x + b), used at (re)starts only.
 */
export interface NdfSystem extends TimeSystem {
  /** out = A x + b, the right side of E ẋ = A x + b (counted as a right-hand-side evaluation). */
  rhs(x: Float64Array, b: Float64Array, out: Float64Array): void;
  /** out = E v; absent when E = I. */
  massTimes?(v: Float64Array, out: Float64Array): void;
  /** d with (E − c·A)·d = r (d must not alias r); E − c·A factored once per c, a few recent c kept. */
  solveShifted(c: number, r: Float64Array, d: Float64Array): void;
}

/** The dense system: `LinearSystem` with the factorisations of I − cA (`IterationFactors`). */
class DenseNdfSystem extends LinearSystem implements NdfSystem {
  private readonly factors: IterationFactors;
  private readonly column: { rows: number; cols: number; data: Float64Array };

  constructor(model: StateSpaceModel) {
    super(model);
    this.factors = new IterationFactors(model.A);
    this.column = { rows: this.n, cols: 1, data: new Float64Array(this.n) };
  }

  override get factorizations(): number {
    return this.factors.factorizations;
  }

  solveShifted(c: number, r: Float64Array, d: Float64Array): void {
    this.column.data.set(r);
    d.set(luSolve(this.factors.for(c), this.column).data);
  }
}

export interface BdfOptions {
  /** Highest order used (1…5, default 5). */
  maxOrder?: number;
}

/** Checks the NDF options against the run's; returns the highest order. */
function checkNdfOptions(opts: CheckedOptions, ndf: BdfOptions): number {
  const maxOrder = ndf.maxOrder ?? NDF_MAX_ORDER;
  if (!Number.isInteger(maxOrder) || maxOrder < 1 || maxOrder > NDF_MAX_ORDER) {
    throw new ModelError('invalid_option', 'maxOrder', `the stiff solver's highest order must be 1…5, got ${maxOrder}`);
  }
  if (opts.fixedStep !== undefined) {
    throw new ModelError('invalid_option', 'fixedStep', 'the variable-order stiff solver chooses its own steps; fixed steps use the one-step stiff method');
  }
  return maxOrder;
}

export function simulateBdf(
  model: StateSpaceModel,
  input: InputSignal,
  opts: CheckedOptions,
  ndf: BdfOptions = {},
  hooks: LoopHooks<TimeStepReport> = {},
): SimulationResult {
  checkNdfOptions(opts, ndf);
  const system = new DenseNdfSystem(model);
  try {
    return integrateNdf(system, input, opts, ndf, hooks);
  } finally {
    system.dispose();
  }
}

/**
 * The NDF integration (see the file header) on any `NdfSystem`: dense here, sparse in
 * `reduction/sparse/simulate.ts`. `hooks`: a stop flag looked at before each step, and a report after each
 * accepted one (time reached, step, order). The caller owns (and disposes) the system.
 */
export function integrateNdf(
  system: NdfSystem,
  input: InputSignal,
  opts: CheckedOptions,
  ndf: BdfOptions = {},
  hooks: LoopHooks<TimeStepReport> = {},
): SimulationResult {
  const wallStart = performance.now();
  const maxOrder = checkNdfOptions(opts, ndf);
  const n = system.n;
  const recorder = new OutputRecorder(opts.times, system, input);
  const { relTol, absTol } = opts;

  const x = Float64Array.from(opts.initialState);
  if (input.impulseWeights) {
    const jump = system.impulseJump(input.impulseWeights);
    for (let i = 0; i < n; i++) x[i] += jump[i];
  }
  while (!recorder.done && recorder.nextTime <= 0) recorder.record(x);

  // Backward differences ∇⁰…∇^{K+2}, one row of n each.
  const D = new Float64Array((NDF_MAX_ORDER + 3) * n);
  const scratch = new Float64Array((NDF_MAX_ORDER + 1) * n);
  const f = new Float64Array(n);
  const yPred = new Float64Array(n);
  const yNew = new Float64Array(n);
  const r = new Float64Array(n);
  const psi = new Float64Array(n);
  const massPsi = system.massTimes ? new Float64Array(n) : psi;
  const d = new Float64Array(n);
  const dense = new Float64Array(n);

  let steps = 0;
  let rejected = 0;
  let hPrevious = NaN;
  const intervals = constantInputIntervals(input, opts.tEnd);

  intervals.forEach((interval, index) => {
    if (recorder.done) return;
    const b = system.inputTerm(input.values[interval.piece]);
    // After the final input jump the input is held, so the solution is defined past tEnd and the last
    // step may overshoot (outputs come from dense output); an interior jump must be landed on.
    const mayOvershoot = index === intervals.length - 1;
    let t = interval.start;
    const tStop = interval.end;

    // (Re)start at order 1: ∇⁰ = x, ∇¹ = h·ẋ.
    system.derivative(x, b, f);
    let h = startingStep(system, x, b, f, tStop - t, relTol, absTol, 1);
    if (hPrevious > 0) h = Math.min(h, hPrevious);
    D.fill(0);
    D.set(x, 0);
    for (let i = 0; i < n; i++) D[n + i] = h * f[i];
    let order = 1;
    let equalSteps = 0;

    while (t < tStop && !recorder.done) {
      throwIfStopped(hooks.signal, 'the stiff solver');
      if (steps + rejected >= opts.maxSteps) {
        throw new ModelError('invalid_option', 'maxSteps', `the stiff solver reached ${opts.maxSteps} steps at t = ${t}`);
      }
      const minStep = 10 * Math.abs(t) * Number.EPSILON + Number.MIN_VALUE;
      if (!(h > minStep)) {
        throw new ModelError('invalid_option', 'relTol', `the stiff solver's step fell below ${minStep} at t = ${t}; loosen relTol or absTol`);
      }
      let landing = false;
      if (!mayOvershoot && t + h >= tStop - 1e-12 * Math.max(1, Math.abs(tStop))) {
        const hLand = tStop - t;
        rescaleDifferences(D, n, order, hLand / h, scratch);
        h = hLand;
        equalSteps = 0;
        landing = true;
      }

      // Predictor and ψ; then (E − cA)·d = c·f(y⁽⁰⁾) − E·ψ.
      yPred.fill(0);
      for (let j = 0; j <= order; j++) for (let i = 0; i < n; i++) yPred[i] += D[j * n + i];
      const alpha = NDF_ALPHA[order];
      const c = h / alpha;
      system.rhs(yPred, b, f);
      for (let i = 0; i < n; i++) {
        let s = 0;
        for (let j = 1; j <= order; j++) s += NDF_GAMMA[j] * D[j * n + i];
        psi[i] = s / alpha;
      }
      system.massTimes?.(psi, massPsi);
      for (let i = 0; i < n; i++) r[i] = c * f[i] - massPsi[i];
      system.solveShifted(c, r, d);
      for (let i = 0; i < n; i++) yNew[i] = yPred[i] + d[i];
      let errNorm = 0;
      {
        let s = 0;
        const ec = NDF_ERROR_CONSTANT[order];
        for (let i = 0; i < n; i++) {
          const v = (ec * d[i]) / (absTol + relTol * Math.abs(yNew[i]));
          s += v * v;
        }
        errNorm = Math.sqrt(s / n);
      }
      if (!(errNorm <= 1)) {
        rejected++;
        const factor = Number.isFinite(errNorm) ? Math.max(MIN_FACTOR, SAFETY * Math.pow(errNorm, -1 / (order + 1))) : MIN_FACTOR;
        rescaleDifferences(D, n, order, factor, scratch);
        h *= factor;
        equalSteps = 0;
        continue;
      }

      // Accepted: ∇^{k+2} ← d − ∇^{k+1}, ∇^{k+1} ← d, then ∇ʲ += ∇ʲ⁺¹ downwards.
      steps++;
      equalSteps++;
      const tNew = landing ? tStop : t + h;
      for (let i = 0; i < n; i++) {
        D[(order + 2) * n + i] = d[i] - D[(order + 1) * n + i];
        D[(order + 1) * n + i] = d[i];
      }
      for (let j = order; j >= 0; j--) for (let i = 0; i < n; i++) D[j * n + i] += D[(j + 1) * n + i];

      while (!recorder.done && recorder.nextTime <= tNew) {
        const s = recorder.nextTime;
        dense.set(D.subarray(0, n));
        let p = 1;
        for (let j = 1; j <= order; j++) {
          p *= (s - (tNew - (j - 1) * h)) / (j * h);
          for (let i = 0; i < n; i++) dense[i] += p * D[j * n + i];
        }
        recorder.record(dense);
      }
      x.set(D.subarray(0, n));
      t = tNew;
      hPrevious = h;
      hooks.onStep?.({ t, tEnd: opts.tEnd, steps, rejectedSteps: rejected, h, order });
      if (equalSteps < order + 1) continue;

      // Order and step selection from the estimates of orders k − 1, k, k + 1.
      const errLower = order > 1 ? scaledNorm(scaleInto(scratch, D, order * n, n, NDF_ERROR_CONSTANT[order - 1]), 0, yNew, n, relTol, absTol) : Infinity;
      const errHigher = order < maxOrder ? scaledNorm(scaleInto(scratch, D, (order + 2) * n, n, NDF_ERROR_CONSTANT[order + 1]), 0, yNew, n, relTol, absTol) : Infinity;
      const fLower = Math.pow(errLower, -1 / order);
      const fSame = Math.pow(errNorm, -1 / (order + 1));
      const fHigher = Math.pow(errHigher, -1 / (order + 2));
      let best = fSame;
      let newOrder = order;
      if (fLower > best) {
        best = fLower;
        newOrder = order - 1;
      }
      if (fHigher > best) {
        best = fHigher;
        newOrder = order + 1;
      }
      const factor = Math.min(MAX_FACTOR, SAFETY * best);
      if (newOrder === order && factor >= 1 && factor < SMALLEST_WORTHWHILE_RAISE) {
        equalSteps = 0; // keep h and its factorisation; look again after k + 1 more steps
        continue;
      }
      order = newOrder;
      rescaleDifferences(D, n, order, factor, scratch);
      h *= factor;
      equalSteps = 0;
    }
  });
  while (!recorder.done) recorder.record(x);
  return {
    t: opts.times,
    y: recorder.y,
    solver: 'stiff',
    stats: {
      steps,
      rejectedSteps: rejected,
      rhsEvaluations: system.rhsEvaluations,
      factorizations: system.factorizations,
      pointsStored: recorder.next,
      wallMs: performance.now() - wallStart,
    },
  };
}

/** out[0..n) = w · src[off..off+n); returns out. */
function scaleInto(out: Float64Array, src: Float64Array, off: number, n: number, w: number): Float64Array {
  for (let i = 0; i < n; i++) out[i] = w * src[off + i];
  return out;
}
