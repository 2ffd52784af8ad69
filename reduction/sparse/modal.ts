/**
 * Modal truncation of a large sparse model E ẋ = A x + B u, y = C x + D u.
 *
 * The modes are computed, not all of the model's: the slowest (nearest s = 0) by shift-invert Krylov–Schur
 * (`eigs.ts`), those in a band of natural frequency |λ| ∈ [lo, hi] by the same iteration near 0 carried on
 * until the computed |λ| pass hi, and the dominance-ranked ones by the subspace-accelerated dominant pole
 * algorithm (`dominant.ts`) together with a few of the slowest. For the computed set, right and left
 * invariant subspaces X and Y (Krylov–Schur bases of the pencil and of its transpose, or the right and left
 * eigenvectors of the dominant poles) give the Petrov–Galerkin projection with the E-biorthogonal pair
 * W = Y (Xᵀ Eᵀ Y)⁻¹, Wᵀ E X = I:
 *
 *     Â = Wᵀ A X,  B̂ = Wᵀ B,  Ĉ = C X,  D̂ = D,
 *
 * which is exactly the part of G made of the computed modes (their poles and residues are those of the
 * model: A X = E X Λ and Yᵀ A = Λ Yᵀ E give Â = Λ in the eigenvector basis). Modal truncation of that small
 * realization is then the dense path's own (`reduceModel` of `reduction/reduce.ts` with method 'modal'):
 * the real modal form with conjugate pairs as 2×2 blocks, the selection rule's ranking, pairs never split,
 * and marginal and unstable modes (among those computed) kept exactly, as on the dense path. A defective
 * marginal mode (a rigid-body double pole at 0) is kept through its invariant subspace, as the dense path
 * keeps it through its spectral projector.
 *
 * What is estimated: the modal bound Σ‖Rᵢ‖/|Re λᵢ| needs every discarded mode, and only the computed ones
 * are known, so it is not reported as a bound of the full model; the sum over the computed modes left out
 * is reported as a lower estimate of it. Unstable modes far from the origin are not searched for (the
 * sparse path, like its balanced truncation, is for models that are stable apart from a few slow modes).
 * "Slowest" means nearest s = 0 (smallest |λ|), which for well-damped and real spectra (thermal models) is
 * the smallest decay rate; the dense rule's ranking by |Re λ| is then applied among the computed modes.
 */
import { ModelError } from '../errors';
import { type Matrix, type ComplexVector, zeros, solve, multiplyTransposeA, matmul, luFactor, luReciprocalCondition, norm1 } from '../linalg/index';
import type { StateSpaceModel } from '../model';
import { reduceModel, type ReductionOptions, type ReductionResult } from '../reduce';
import type { StopSignal } from '../stop';
import { cscNorm1, fastestPole, ShiftInvert, sparseEigs, type SparseEigsResult } from './eigs';
import { dominantPoles, sweepPeakShifts, type DominantPoleResult } from './dominant';
import { sweepGridFromPoles } from './norms';
import { cscTimesDense, type SparseStateSpaceModel } from './model';

type ModalSelection = NonNullable<ReductionOptions['modalSelection']>;

export interface SparseModalOptions {
  /** States of the reduced model, including those kept for marginal and unstable poles (may be omitted for the band rule). */
  readonly order?: number;
  /** Which modes come first (default by dominance, as on the dense path). */
  readonly selection?: ModalSelection;
  readonly stabilityTolerance?: number;
  /** Eigen-residual tolerances (Krylov–Schur's Ritz tolerance 1e-10; SAMDP's residual 1e-10). */
  readonly tolerance?: number;
  /** Initial shifts for the dominant pole algorithm (default i·1; the command line uses a sweep's peaks). */
  readonly initialShifts?: readonly { readonly re: number; readonly im: number }[];
  /** Most modes computed for the band rule (default 400). */
  readonly maxModes?: number;
  readonly memoryBudgetBytes?: number;
  readonly signal?: StopSignal;
}

export interface SparseModalResult {
  /** The dense path's result on the projected realization of the computed modes (`model` is the reduced model). */
  readonly reduction: ReductionResult;
  /** States of the projected realization (the computed modes). */
  readonly computedStates: number;
  /** The computed poles (pairs as both members) and their residuals ‖A x − λ E x‖/(‖A‖₁‖x‖), right and left. */
  readonly computedPoles: ComplexVector;
  readonly maxResidual: number;
  /** Σ of the dominance terms of the computed stable modes left out: a lower estimate of the modal bound. */
  readonly discardedComputedBound: number;
  /** Shift used near 0, factorizations and solves. */
  readonly shift: { readonly re: number; readonly im: number };
  readonly notes: readonly string[];
}

/** Whether j (0..k) is a cut that does not split a conjugate pair of the list. */
function cutOk(v: ComplexVector, j: number): boolean {
  return j === 0 || j >= v.re.length || !(v.im[j - 1] > 0 && v.im[j] < 0);
}

/**
 * The longest prefix j on which the right and left runs found the same eigenvalues (as multisets, within
 * `tol`), cut where neither splits a pair and where the distance to σ grows past the cut in both (so a
 * multiple eigenvalue is never cut through: both invariant subspaces are then complete). Eigenvalues within
 * `zeroTol` of 0 count as one cluster: a defective pole at 0 (a rigid-body mode) comes out of each run as a
 * pair ±δ with δ of the order of √ε, different for the two runs.
 */
function commonPrefix(right: SparseEigsResult, left: SparseEigsResult, tol: number, zeroTol: number): number {
  const R = right.values, L = left.values, s = right.shift;
  const atZero = (v: ComplexVector, i: number) => Math.hypot(v.re[i], v.im[i]) <= zeroTol;
  const dist = (v: ComplexVector, i: number) => Math.hypot(v.re[i] - s.re, v.im[i] - s.im);
  const gap = (v: ComplexVector, j: number) => j < v.re.length && !(atZero(v, j) && atZero(v, j - 1)) && dist(v, j) > dist(v, j - 1) + tol;
  for (let j = Math.min(R.re.length, L.re.length) - 1; j >= 1; j--) {
    if (!cutOk(R, j) || !cutOk(L, j) || !gap(R, j) || !gap(L, j)) continue;
    const used = new Uint8Array(j);
    let ok = true;
    for (let a = 0; a < j && ok; a++) {
      let hit = -1;
      for (let b = 0; b < j; b++) {
        if (used[b]) continue;
        const same = (Math.abs(R.re[a] - L.re[b]) <= tol && Math.abs(R.im[a] - L.im[b]) <= tol) || (atZero(R, a) && atZero(L, b));
        if (same) {
          hit = b;
          break;
        }
      }
      if (hit < 0) ok = false;
      else used[hit] = 1;
    }
    if (ok) return j;
  }
  return 0;
}

function leadingColumns(m: Matrix, k: number): Matrix {
  const out = zeros(m.rows, k);
  for (let i = 0; i < m.rows; i++) for (let j = 0; j < k; j++) out.data[i * k + j] = m.data[i * m.cols + j];
  return out;
}

function concatColumns(a: Matrix, b: Matrix): Matrix {
  const k = a.cols + b.cols;
  const out = zeros(a.rows, k);
  for (let i = 0; i < a.rows; i++) {
    for (let j = 0; j < a.cols; j++) out.data[i * k + j] = a.data[i * a.cols + j];
    for (let j = 0; j < b.cols; j++) out.data[i * k + a.cols + j] = b.data[i * b.cols + j];
  }
  return out;
}

/** A factorization of A − σE near 0: σ = 0, or a small negative σ when A is singular (a pole at 0). */
export function shiftNearZero(model: SparseStateSpaceModel, memoryBudgetBytes: number | undefined): ShiftInvert {
  try {
    return new ShiftInvert(model, { re: 0, im: 0 }, memoryBudgetBytes);
  } catch (e) {
    if (!(e instanceof ModelError && e.field === 'shift')) throw e;
  }
  const scale = cscNorm1(model.A) / (model.E ? cscNorm1(model.E) : 1);
  return new ShiftInvert(model, { re: -1e-6 * scale, im: 0 }, memoryBudgetBytes);
}

/** The projected realization (Â, B̂, Ĉ, D) on right and left bases X, Y (see the file header). */
export function projectOnModes(model: SparseStateSpaceModel, X: Matrix, Y: Matrix): StateSpaceModel {
  const EX = model.E ? cscTimesDense(model.E, X) : X;
  const M = multiplyTransposeA(Y, EX);
  const f = luFactor(M);
  const rcond = luReciprocalCondition(f, norm1(M));
  if (!(rcond > 1e-13)) {
    throw new Error(
      `sparse modal truncation: the left and right bases of the computed modes are not E-biorthogonalisable (reciprocal condition ${rcond.toExponential(1)}); the eigenvalue runs disagree`,
    );
  }
  const AX = cscTimesDense(model.A, X);
  return {
    A: solve(M, multiplyTransposeA(Y, AX)),
    B: solve(M, multiplyTransposeA(Y, model.B)),
    C: matmul(model.C, X),
    D: model.D,
  };
}

/** Modal truncation of a sparse model (see the file header). */
export function sparseModalReduction(model: SparseStateSpaceModel, options: SparseModalOptions): SparseModalResult {
  const n = model.A.n;
  const selection: ModalSelection = options.selection ?? { rule: 'dominance' };
  const order = options.order;
  if (order !== undefined && (!Number.isInteger(order) || order < 1)) {
    throw new ModelError('invalid_option', 'order', `--order must be a whole number ≥ 1, got ${order}`);
  }
  if (order !== undefined && order >= n) throw new ModelError('order_too_large', 'order', `--order ${order} is not below the model's ${n} states`);
  if (order === undefined && selection.rule !== 'band') {
    throw new ModelError('invalid_option', 'order', 'sparse modal truncation needs --order R (the band rule may leave it out)');
  }
  if (selection.rule === 'band') {
    const [lo, hi] = selection.band;
    if (!(Number.isFinite(lo) && Number.isFinite(hi) && lo >= 0 && hi > lo)) {
      throw new ModelError('invalid_option', 'band', `band must be [low, high] with 0 ≤ low < high, got [${lo}, ${hi}]`);
    }
  }
  const notes: string[] = [];
  const eigsOptions = { tolerance: options.tolerance, signal: options.signal };
  const si = shiftNearZero(model, options.memoryBudgetBytes);
  let right: SparseEigsResult, left: SparseEigsResult;
  let dominant: DominantPoleResult | null = null;
  try {
    const margin = (c: number) => c + Math.max(4, Math.ceil(c / 4));
    let count: number;
    if (selection.rule === 'slowest') count = margin(order!);
    else if (selection.rule === 'dominance') count = margin(Math.max(2, Math.ceil(order! / 2)));
    else count = margin(Math.max(order ?? 0, 8));
    const maxModes = Math.min(n - 2, options.maxModes ?? 400);
    count = Math.min(count, maxModes);
    for (;;) {
      right = sparseEigs(model, { count, factorization: si, ...eigsOptions });
      if (selection.rule !== 'band' || count >= maxModes) break;
      // The band rule needs every mode up to |λ| = hi: nearest 0 first, so go on until one lies past hi.
      const hi = selection.band[1];
      const reached = Array.from(right.values.re).some((re, i) => Math.hypot(re, right.values.im[i]) > hi);
      if (reached) break;
      count = Math.min(maxModes, 2 * count);
    }
    if (selection.rule === 'band' && count >= maxModes) {
      notes.push(`the band rule computed the ${right!.values.re.length} modes nearest s = 0 (the most it computes, maxModes); modes of the band beyond them are not included`);
    }
    left = sparseEigs(model, { count: right!.values.re.length, factorization: si, side: 'left', ...eigsOptions });
  } finally {
    si.dispose();
  }
  const scale = Math.max(...Array.from(right!.values.re, (re, i) => Math.hypot(re, right!.values.im[i])), Number.MIN_VALUE);
  const j = commonPrefix(right!, left!, 1e-8 * scale, 1e-6 * scale);
  if (j === 0) throw new Error('sparse modal truncation: the right and left eigenvalue runs found no common set of modes');
  if (j < right!.values.re.length - Math.max(4, Math.ceil(right!.values.re.length / 4)) - 1) {
    notes.push(`the right and left runs agreed on ${j} of the ${right!.values.re.length} eigenvalues nearest the shift; the others are not used`);
  }
  let X = leadingColumns(right!.schurBasis, j), Y = leadingColumns(left!.schurBasis, j);
  const re: number[] = Array.from(right!.values.re.subarray(0, j)), im: number[] = Array.from(right!.values.im.subarray(0, j));
  let maxResidual = 0;
  for (let i = 0; i < j; i++) maxResidual = Math.max(maxResidual, right!.residuals[i], left!.residuals[i]);
  if (selection.rule === 'dominance') {
    let initialShifts = options.initialShifts;
    if (!initialShifts) {
      // A sweep's peaks between the slowest computed mode and the fastest pole (Krylov–Schur on E⁻¹A).
      const slow = Math.min(...Array.from(right!.values.re, (r, i) => Math.hypot(r, right!.values.im[i])).filter((x) => x > 0));
      const fast = fastestPole(model, { memoryBudgetBytes: options.memoryBudgetBytes, signal: options.signal });
      initialShifts = sweepPeakShifts(model, sweepGridFromPoles(slow, Math.hypot(fast.re, fast.im), 16), 6, options.memoryBudgetBytes);
    }
    // The candidates are the slowest computed above and these; the dense ranking then keeps the most dominant.
    dominant = dominantPoles(model, {
      count: Math.max(2, Math.ceil(order! / 2) + 2),
      initialShifts,
      tolerance: options.tolerance,
      memoryBudgetBytes: options.memoryBudgetBytes,
      signal: options.signal,
    });
    notes.push(...dominant.notes);
    // Dominant poles already among the slowest are not added again.
    const keepCols: number[] = [];
    let col = 0;
    for (const p of dominant.poles) {
      const dup = re.some((r, i) => Math.abs(r - p.re) <= 1e-8 * scale + 1e-8 * Math.hypot(p.re, p.im) && Math.abs(Math.abs(im[i]) - p.im) <= 1e-8 * scale + 1e-8 * Math.hypot(p.re, p.im));
      if (!dup) {
        for (let s = 0; s < p.states; s++) keepCols.push(col + s);
        re.push(p.re);
        im.push(p.im);
        if (p.states === 2) {
          re.push(p.re);
          im.push(-p.im);
        }
        maxResidual = Math.max(maxResidual, p.residual, p.leftResidual);
      }
      col += p.states;
    }
    const pick = (m: Matrix) => {
      const out = zeros(n, keepCols.length);
      for (let i = 0; i < n; i++) for (let c = 0; c < keepCols.length; c++) out.data[i * keepCols.length + c] = m.data[i * m.cols + keepCols[c]];
      return out;
    };
    X = concatColumns(X, pick(dominant.right));
    Y = concatColumns(Y, pick(dominant.left));
  }
  const k = X.cols;
  if (order !== undefined && order > k) {
    throw new ModelError('order_too_large', 'order', `--order ${order} is more than the ${k} states of the modes computed; ask for at most ${k}`);
  }
  const small = projectOnModes(model, X, Y);
  const reduction = reduceModel(small, {
    method: 'modal',
    order: order ?? undefined,
    modalSelection: selection,
    stabilityTolerance: options.stabilityTolerance,
  });
  notes.push(
    `modal truncation of the ${k} computed modes (E-biorthogonal projection); the modal bound needs every discarded mode, so it is not a bound of the full model here`,
  );
  return {
    reduction,
    computedStates: k,
    computedPoles: { re: Float64Array.from(re), im: Float64Array.from(im) },
    maxResidual,
    discardedComputedBound: reduction.errorBound,
    shift: right!.shift,
    notes: [...notes, ...reduction.notes],
  };
}
