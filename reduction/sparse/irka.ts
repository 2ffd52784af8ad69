/**
 * IRKA on large sparse models E ẋ = A x + B u, y = C x + D u: the iteration of `../irka.ts` (Gugercin,
 * Antoulas & Beattie, "H2 model reduction for large-scale linear dynamical systems", SIAM J. Matrix Anal.
 * Appl. 30(2), 2008, Algorithm 4.1, tangential for several inputs and outputs) with its shifted solves by
 * sparse LU:
 *
 *   v = (σE − A)⁻¹ B b,   w = (σE − A)⁻ᵀ Cᵀ c
 *
 * by UMFPACK (`reduction/linalg/sparse.ts`) on the union pattern of A and E (`shiftPattern`): one symbolic
 * analysis for the real shifts and one (complex) for the conjugate pairs, kept for the whole run; each shift
 * of each iteration costs one numeric factorization, used for both solves (the second through the plain
 * transpose). The bases V, W are n×r and the projections Wᵀ A V, Wᵀ E V are sparse products with them:
 * nothing forms E⁻¹A or an n×n dense matrix.
 *
 * Initial shifts, unless given: the dense path's rule (`slowestPoleShifts`: mirror images of the slowest
 * poles) on estimates of the slowest poles, 1/μ for the Ritz values μ of A⁻¹E after max(20, 2r + 5) Arnoldi
 * steps (the operator applied through sparse solves); the largest pole magnitude, which bounds the
 * log-spaced fill when too few estimates remain, is estimated from the Ritz values of E⁻¹A (20 steps).
 *
 * Stability: the sparse path reduces stable models only (IRKA's H2 setting needs them, and nothing here
 * separates unstable modes). A singular A (a pole at 0: rigid-body modes, integrators) or a slowest Ritz
 * value on or right of the imaginary axis (Re λ ≥ −10⁻⁷·max|λ|, the dense path's default marginal
 * tolerance) is refused with ModelError('unstable') pointing to the dense path, which keeps such poles
 * exactly. This check looks at the slowest poles only (where such modes sit in physical models); it is not
 * a proof of stability.
 */
import { ModelError } from '../errors';
import { throwIfStopped } from '../stop';
import { type Matrix, linalgThreads, zeros, matmul } from '../linalg/index';
import { SparseLu } from '../linalg/sparse';
import type { StateSpaceModel } from '../model';
import {
  type InterpolationPoint,
  type IrkaOptions,
  type IrkaReport,
  type ProjectedModel,
  type Shift,
  type TangentialProjector,
  initialPoints,
  irkaReport,
  irkaSettings,
  iterateIrka,
  slowestPoleShifts,
  orthonormalBasisOf,
  petrovGalerkin,
  setColumn,
  shiftCount,
  timesComplex,
  transposeTimesComplex,
} from '../irka';
import { arnoldiRitzValues } from './adi';
import { checkFactorBudget } from './budget';
import { cscTimesDense, cscTimesVector, shiftPattern, shiftedValues, type ShiftPattern, type SparseStateSpaceModel } from './model';

export interface SparseIrkaOptions extends IrkaOptions {
  /** States of the reduced model (1 ≤ order < states). */
  readonly order: number;
  /** Bytes each sparse factorization (plus those held) may take, checked after its symbolic analysis (budget.ts). */
  readonly memoryBudgetBytes?: number;
}

export interface SparseIrkaResult {
  /** The reduced model, E_r = I, D of the model. */
  readonly model: StateSpaceModel;
  readonly report: IrkaReport;
  /** Estimated smallest and largest pole magnitudes of the model (Arnoldi Ritz values). */
  readonly spectralRange: { readonly lo: number; readonly hi: number };
  /** Numeric sparse factorizations and symbolic analyses made by the iteration. */
  readonly factorizations: number;
  readonly analyses: number;
  readonly seconds: number;
  readonly notes: readonly string[];
}

/** Relative tolerance of the marginal-pole check (as the dense path's DEFAULT_STABILITY_TOLERANCE). */
const MARGINAL_TOLERANCE = 1e-7;
const ARNOLDI_STEPS = 20;

export interface SpectrumEstimate {
  /** Estimated smallest and largest pole magnitudes. */
  readonly lo: number;
  readonly hi: number;
  /** Estimates 1/μ of the slowest poles from the Ritz values μ of A⁻¹E. */
  readonly slowest: { readonly re: Float64Array; readonly im: Float64Array };
}

/** A deterministic start vector: the inputs' sum plus a fixed pseudo-random sequence. */
function startVector(model: SparseStateSpaceModel): Float64Array {
  const n = model.A.n, m = model.B.cols;
  const v = new Float64Array(n);
  let bnorm = 0;
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let c = 0; c < m; c++) s += model.B.data[i * m + c];
    v[i] = s;
    bnorm += s * s;
  }
  bnorm = Math.sqrt(bnorm);
  let state = 0x2545f491;
  for (let i = 0; i < n; i++) {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
    const noise = state / 4294967296 - 0.5;
    v[i] = (bnorm > 0 ? v[i] / bnorm : 0) + noise / Math.sqrt(n);
  }
  return v;
}

function refuseUnstable(detail: string): never {
  throw new ModelError(
    'unstable',
    'A',
    `${detail}: the sparse path reduces stable models only and cannot keep such poles; reduce this model on the dense path (--path dense), which keeps marginal and unstable poles exactly`,
  );
}

/**
 * Estimates of the slowest poles of E⁻¹A and of its smallest and largest pole magnitudes, from Arnoldi Ritz
 * values of A⁻¹E (`slowSteps` steps) and E⁻¹A (20 steps) through sparse solves; refuses a model whose A is
 * singular or whose slowest Ritz value is marginal or unstable.
 */
export function sparseSpectrumEstimate(model: SparseStateSpaceModel, memoryBudgetBytes = Infinity, slowSteps = ARNOLDI_STEPS): SpectrumEstimate {
  const { A, E } = model;
  const aLu = SparseLu.analyze(A, 'A');
  checkFactorBudget(aLu, memoryBudgetBytes, 'A');
  let eLu: SparseLu | null = null;
  try {
    try {
      aLu.factor();
    } catch (e) {
      if ((e as { code?: string }).code === 'singular') refuseUnstable('A is singular, so the model has a pole at 0 (a rigid-body mode or an integrator)');
      throw e;
    }
    if (E) {
      eLu = SparseLu.analyze(E, 'E');
      checkFactorBudget(eLu, memoryBudgetBytes, 'E', aLu.factorInfo?.memoryBytes ?? 0);
      try {
        eLu.factor();
      } catch (e) {
        if ((e as { code?: string }).code === 'singular') throw new ModelError('singular_mass', 'E', 'E is singular: the descriptor matrix must be nonsingular (a mass matrix)');
        throw e;
      }
    }
    const start = startVector(model);
    const slow = arnoldiRitzValues((x) => aLu.solve(E ? cscTimesVector(E, x) : x), start, slowSteps);
    const fast = arnoldiRitzValues((x) => {
      const ax = cscTimesVector(A, x);
      return eLu ? eLu.solve(ax) : ax;
    }, start, ARNOLDI_STEPS);
    let hi = 0;
    for (let i = 0; i < fast.re.length; i++) hi = Math.max(hi, Math.hypot(fast.re[i], fast.im[i]));
    // The largest |μ| of A⁻¹E is the best-converged Ritz value: 1/μ estimates the slowest pole.
    let k = -1, top = 0;
    for (let i = 0; i < slow.re.length; i++) {
      const mag = Math.hypot(slow.re[i], slow.im[i]);
      if (mag > top) {
        top = mag;
        k = i;
      }
    }
    if (!(top > 0) || !(hi > 0)) refuseUnstable('no nonzero Ritz values were found');
    const d = top * top;
    const slowRe = slow.re[k] / d; // Re(1/μ) = Re μ / |μ|²
    hi = Math.max(hi, 1 / top);
    if (slowRe >= -MARGINAL_TOLERANCE * hi) {
      refuseUnstable(`the slowest pole is estimated at ${slowRe.toPrecision(4)} ${slow.im[k] === 0 ? '' : `± ${Math.abs(slow.im[k] / d).toPrecision(4)}i `}(an Arnoldi Ritz value), on or right of the imaginary axis`);
    }
    const re = new Float64Array(slow.re.length), im = new Float64Array(slow.re.length);
    for (let i = 0; i < slow.re.length; i++) {
      const m2 = slow.re[i] * slow.re[i] + slow.im[i] * slow.im[i];
      re[i] = m2 > 0 ? slow.re[i] / m2 : NaN; // 1/μ = μ̄/|μ|²
      im[i] = m2 > 0 ? -slow.im[i] / m2 : NaN;
    }
    return { lo: 1 / top, hi, slowest: { re, im } };
  } finally {
    aLu.dispose();
    eLu?.dispose();
  }
}

/** The sparse projector: A − σE factorized by UMFPACK on one kept analysis per kind of shift. */
class SparseProjector implements TangentialProjector {
  readonly states: number;
  readonly inputs: number;
  readonly outputs: number;
  factorizations = 0;
  analyses = 0;
  private readonly sp: ShiftPattern;
  private real: SparseLu | null = null;
  private complex: SparseLu | null = null;

  constructor(
    private readonly model: SparseStateSpaceModel,
    private readonly budget: number,
  ) {
    this.sp = shiftPattern(model.A, model.E);
    this.states = model.A.n;
    this.inputs = model.B.cols;
    this.outputs = model.C.rows;
  }

  /** The kept analysis for this kind of shift (real or complex), made from the shift's values the first time. */
  private analysisFor(pt: Shift, copies = 1): SparseLu {
    const isComplex = pt.im !== 0;
    let lu = isComplex ? this.complex : this.real;
    if (!lu) {
      const { values, imag } = shiftedValues(this.sp, pt.re, pt.im); // A − σE
      const label = isComplex ? 'A − σE (complex shifts)' : 'A − σE (real shifts)';
      lu = SparseLu.analyze({ ...this.sp.pattern, values, imag: imag ?? undefined }, label);
      this.analyses++;
      const other = isComplex ? this.real : this.complex;
      checkFactorBudget(lu, this.budget, label, other?.factorInfo?.memoryBytes ?? 0);
      if (isComplex) this.complex = lu;
      else this.real = lu;
    }
    return lu;
  }

  private factorAt(pt: Shift): SparseLu {
    const { values, imag } = shiftedValues(this.sp, pt.re, pt.im); // A − σE
    const lu = this.analysisFor(pt);
    try {
      lu.factor(values, imag);
    } catch (e) {
      if ((e as { code?: string }).code === 'singular') {
        refuseUnstable(`σE − A is singular at the shift σ = ${pt.re}${pt.im > 0 ? ` + ${pt.im}i` : ''}, so the model has a pole there`);
      }
      throw e;
    }
    this.factorizations++;
    return lu;
  }

  /**
   * The solves of every point of one kind (real or complex shifts) at once, the shifts spread over `threads`
   * native threads (as many as the memory budget allows for that many factorizations side by side).
   */
  private solveTogether(points: readonly InterpolationPoint[], threads: number): { x: { re: Float64Array; im: Float64Array | null }; y: { re: Float64Array; im: Float64Array | null } } {
    const n = this.states;
    const lu = this.analysisFor(points[0]);
    const fit = Math.floor(this.budget / Math.max(1, lu.analysis.peakMemoryBytes));
    const t = Math.max(1, Math.min(threads, points.length, Number.isFinite(fit) ? fit : threads));
    const complex = points[0].im !== 0;
    const f = { re: new Float64Array(points.length * n), im: complex ? new Float64Array(points.length * n) : null };
    const g = { re: new Float64Array(points.length * n), im: complex ? new Float64Array(points.length * n) : null };
    points.forEach((pt, j) => {
      const fj = timesComplex(this.model.B, pt.b);
      const gj = transposeTimesComplex(this.model.C, pt.c);
      f.re.set(fj.re, j * n);
      g.re.set(gj.re, j * n);
      if (complex) {
        if (fj.im) f.im!.set(fj.im, j * n);
        if (gj.im) g.im!.set(gj.im, j * n);
      }
    });
    try {
      const out = lu.shiftedSolves(this.sp.pattern.values, this.eValues(), points, f, g, t);
      this.factorizations += points.length;
      return out;
    } catch (e) {
      if ((e as { code?: string }).code === 'singular') refuseUnstable(`σE − A is singular at one of the shifts (${(e as Error).message}), so the model has a pole there`);
      throw e;
    }
  }

  private eOnPattern: Float64Array | null = null;
  /** E on the union pattern (A − σE = values − σ·this). */
  private eValues(): Float64Array {
    if (!this.eOnPattern) {
      this.eOnPattern = new Float64Array(this.sp.pattern.values.length);
      for (let q = 0; q < this.sp.eAt.length; q++) this.eOnPattern[this.sp.eAt[q]] += this.sp.eValues[q];
    }
    return this.eOnPattern;
  }

  project(points: readonly InterpolationPoint[]): ProjectedModel {
    const n = this.states;
    const r = shiftCount(points);
    const V = zeros(n, r), W = zeros(n, r);
    const threads = linalgThreads();
    if (threads >= 2 && points.length >= 2) {
      // Each kind's shifts solved together over the cores, then the columns in the points' order.
      const solved = new Map<boolean, ReturnType<SparseProjector['solveTogether']>>();
      for (const complex of [false, true]) {
        const group = points.filter((pt) => (pt.im !== 0) === complex);
        if (group.length > 0) solved.set(complex, this.solveTogether(group, threads));
      }
      const next = new Map<boolean, number>([
        [false, 0],
        [true, 0],
      ]);
      let col = 0;
      for (const pt of points) {
        const complex = pt.im !== 0;
        const j = next.get(complex)!;
        next.set(complex, j + 1);
        const { x, y } = solved.get(complex)!;
        const block = (v: Float64Array) => v.subarray(j * n, (j + 1) * n);
        setColumn(V, col, block(x.re));
        setColumn(W, col, block(y.re));
        if (complex) {
          setColumn(V, col + 1, block(x.im!));
          setColumn(W, col + 1, block(y.im!));
        }
        col += complex ? 2 : 1;
      }
    } else {
      let col = 0;
      for (const pt of points) {
        const lu = this.factorAt(pt);
        const f = timesComplex(this.model.B, pt.b);
        const g = transposeTimesComplex(this.model.C, pt.c);
        if (pt.im === 0) {
          setColumn(V, col, lu.solve(f.re));
          setColumn(W, col, lu.solve(g.re, { transpose: true }));
          col += 1;
        } else {
          const x = lu.solveComplex(f.re, f.im);
          const y = lu.solveComplex(g.re, g.im, { transpose: true });
          setColumn(V, col, x.re);
          setColumn(V, col + 1, x.im);
          setColumn(W, col, y.re);
          setColumn(W, col + 1, y.im);
          col += 2;
        }
      }
    }
    const Vq = orthonormalBasisOf(V, 'right (input)');
    const Wq = orthonormalBasisOf(W, 'left (output)');
    const { A, E, B, C } = this.model;
    const EV: Matrix = E ? cscTimesDense(E, Vq) : Vq;
    return petrovGalerkin(Wq, cscTimesDense(A, Vq), EV, B, matmul(C, Vq));
  }

  dispose(): void {
    this.real?.dispose();
    this.complex?.dispose();
    this.real = null;
    this.complex = null;
  }
}

/** IRKA on a sparse model to `order` states (see the header). */
export function sparseIrka(model: SparseStateSpaceModel, options: SparseIrkaOptions): SparseIrkaResult {
  const started = performance.now();
  const n = model.A.n;
  const r = options.order;
  if (!Number.isInteger(r) || r < 1) throw new ModelError('invalid_option', 'order', `--order must be a whole number ≥ 1, got ${r}`);
  if (r >= n) throw new ModelError('order_too_large', 'order', `--order ${r} is not below the model's ${n} states`);
  const settings = irkaSettings(options, r);
  const budget = options.memoryBudgetBytes ?? Infinity;
  throwIfStopped(options.signal, 'IRKA');
  const spectrum = sparseSpectrumEstimate(model, budget, Math.max(ARNOLDI_STEPS, 2 * r + 5));
  const shifts: Shift[] = options.initialShifts ? [...options.initialShifts] : slowestPoleShifts(spectrum.slowest, r, spectrum.hi);
  const projector = new SparseProjector(model, budget);
  let run: ReturnType<typeof iterateIrka>;
  try {
    run = iterateIrka(projector, initialPoints(shifts, projector.inputs, projector.outputs), { ...settings, signal: options.signal, onStep: options.onStep });
  } finally {
    projector.dispose();
  }
  const report = irkaReport(run, settings, shifts, options.initialShifts ? 'given' : 'slowest-pole-estimates');
  const notes = [...run.notes];
  if (!report.reducedStable) {
    notes.push('the reduced model has poles in the closed right half-plane (IRKA does not guarantee stability); try another order or initial shifts');
  }
  notes.push('the full model was checked for marginal and unstable poles at its slowest Ritz value only; the sparse path assumes a stable model');
  return {
    model: { A: run.reduced.A, B: run.reduced.B, C: run.reduced.C, D: model.D },
    report,
    spectralRange: { lo: spectrum.lo, hi: spectrum.hi },
    factorizations: projector.factorizations,
    analyses: projector.analyses,
    seconds: (performance.now() - started) / 1000,
    notes,
  };
}
