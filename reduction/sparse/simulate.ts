/**
 * Time responses of a large sparse model E ẋ = A x + B u, y = C x + D u (E absent = identity), with the dense
 * path's solvers written once and the linear algebra here:
 *
 *   stiff     the variable-order NDF/BDF solver of orders 1–5 (L. F. Shampine & M. W. Reichelt, SIAM J.
 *             Sci. Comput. 18(1), 1997; `reduction/simulate/bdf.ts`, `integrateNdf`) in its mass-matrix
 *             form (E − c·A)·d = c·f(y⁽⁰⁾) − E·ψ (Hairer & Wanner, "Solving Ordinary Differential Equations
 *             II", 2nd ed., Springer 1996, §VI.1, as recalled; see bdf.ts). E − c·A is written on the union
 *             pattern of A and E (`shiftPattern`), analysed once by UMFPACK (T. A. Davis, ACM TOMS 30(2),
 *             2004; `reduction/linalg/sparse.ts`), and factored numerically once per value of c = h/αₖ, i.e.
 *             per change of step size or order; the last few factors are kept (first in, first out, as the
 *             dense solver keeps its LU factors), so returning to a recent c costs nothing. ẋ itself, needed
 *             only at a (re)start and for an impulse, is one solve with E (c = 0) on the same analysis.
 *   explicit  the Dormand–Prince 5(4) pair (`reduction/simulate/dormand-prince.ts`, `integrateExplicit`) on
 *             f = E⁻¹(A x + B u): sparse products with A, and solves with one factor of E kept for the run —
 *             CHOLMOD's Cholesky (Chen, Davis, Hager & Rajamanickam, ACM TOMS 35(3), 2008) when E is
 *             symmetric positive definite (a mass matrix), UMFPACK's LU otherwise; without E just the product.
 *
 * The memory budget (`budget.ts`) is checked before any numeric factorization: for the stiff solver from
 * UMFPACK's symbolic estimate of one factorization's peak plus the factors kept beside it (fewer factors are
 * kept when the budget is tight, never fewer than one), for E's Cholesky factor from AMD's count of the
 * factor's nonzeros (P. R. Amestoy, T. A. Davis & I. S. Duff, SIAM J. Matrix Anal. Appl. 17(4), 1996).
 *
 * `auto` picks between the two by the dense path's rule (`reduction/simulate/auto.ts`: stiffness ratio ≥
 * STIFF_RATIO, or more than EXPLICIT_STEP_LIMIT explicit steps for stability alone), with the fastest pole
 * from Krylov–Schur on E⁻¹A and the slowest from shift-invert near 0 (`eigs.ts`), both by modulus. The
 * exact (zero-order-hold) solver needs dense matrix exponentials and is not offered here.
 *
 * Nothing here forms E⁻¹A or an n×n array: the state, the backward differences (8 vectors of n) and the
 * Dormand–Prince stages (about 16 vectors of n) are the only per-state storage besides the factors.
 */
import { ModelError } from '../errors';
import { SparseCholesky, SparseLu, amdOrdering, type SparseLuFactor } from '../linalg/sparse';
import type { StateSpaceModel } from '../model';
import { STIFF_RATIO, EXPLICIT_STEP_LIMIT } from '../simulate/auto';
import { integrateNdf, type BdfOptions, type NdfSystem } from '../simulate/bdf';
import { costReport, type SimulationCostReport } from '../simulate/cost-report';
import { integrateExplicit } from '../simulate/dormand-prince';
import type { InputSignal } from '../simulate/inputs';
import { InputOutputMaps, type TimeSystem } from '../simulate/linear-system';
import { checkOptions } from '../simulate/output-grid';
import type { SimulationOptions, SimulationResult, SolverName, TimeStepReport } from '../simulate/types';
import { explicitStabilitySteps } from '../step-limits';
import type { LoopHooks } from '../stop';
import { checkFactorBudget, checkMemoryEstimate } from './budget';
import { cscNorm1, fastestPole, isSymmetric, ShiftInvert, sparseEigs } from './eigs';
import { cscTranspose, shiftPattern, type CscMatrix, type ShiftPattern, type SparseStateSpaceModel } from './model';

/** The sparse path's solvers: no exact (dense exponential) solver here. */
export type SparseSolverChoice = 'explicit' | 'stiff' | 'auto';

export interface SparseSimulationOptions extends Omit<SimulationOptions, 'sharedExponentials'> {
  solver?: SparseSolverChoice;
  /** Bytes the sparse factorizations may take (default unlimited); checked before each is made. */
  memoryBudgetBytes?: number;
  /** The stiff solver's highest order (1…5, default 5). */
  maxOrder?: number;
}

/** Most numeric factors of E − c·A kept at once (the dense NDF solver keeps as many of I − cA). */
const KEEP_FACTORS = 4;

/** Rows of a CSC matrix, for y = A x by rows (each y[i] one gather, no zeroing pass). */
interface Rows {
  readonly ptr: Int32Array;
  readonly col: Int32Array;
  readonly val: Float64Array;
}

function rowsOf(a: CscMatrix): Rows {
  const t = cscTranspose(a); // Aᵀ in compressed columns = A in compressed rows
  return { ptr: t.colPtr, col: t.rowIndex, val: t.values };
}

/** out = M x (+ b when given). */
function rowProduct(m: Rows, x: Float64Array, out: Float64Array, b?: Float64Array): void {
  const { ptr, col, val } = m;
  const n = ptr.length - 1;
  for (let i = 0; i < n; i++) {
    let s = b ? b[i] : 0;
    for (let p = ptr[i]; p < ptr[i + 1]; p++) s += val[p] * x[col[p]];
    out[i] = s;
  }
}

/** The sparse right-hand side A x + b with its count, and the model's input and output maps. */
abstract class SparseSystem extends InputOutputMaps implements TimeSystem {
  rhsEvaluations = 0;
  protected readonly aRows: Rows;

  constructor(protected readonly model: SparseStateSpaceModel) {
    super(model.B, model.C, model.D);
    this.aRows = rowsOf(model.A);
  }

  abstract get factorizations(): number;
  abstract derivative(x: Float64Array, b: Float64Array, out: Float64Array): void;
  abstract impulseJump(w: Float64Array): Float64Array;
  abstract dispose(): void;

  /** out = A x + b. */
  rhs(x: Float64Array, b: Float64Array, out: Float64Array): void {
    rowProduct(this.aRows, x, out, b);
    this.rhsEvaluations++;
  }
}

/** Values of E − c·A on the union pattern (E the identity when absent). */
function shiftedByStep(sp: ShiftPattern, c: number): Float64Array {
  const a = sp.pattern.values; // A's values in the union, zeros where only E has an entry
  const v = new Float64Array(a.length);
  for (let k = 0; k < a.length; k++) v[k] = -c * a[k];
  for (let q = 0; q < sp.eAt.length; q++) v[sp.eAt[q]] += sp.eValues[q];
  return v;
}

const isSingular = (e: unknown) => (e as { code?: string }).code === 'singular';

/** The stiff solver's system: UMFPACK factors of E − c·A on one kept analysis (see the file header). */
class SparseNdfSystem extends SparseSystem implements NdfSystem {
  private readonly sp: ShiftPattern;
  private readonly lu: SparseLu;
  private readonly keep: number;
  private readonly cache: { c: number; factor: SparseLuFactor }[] = [];
  /** The factor of E itself (c = 0), for ẋ at restarts; null until needed or without E. */
  private mass: SparseLuFactor | null = null;
  /** out = E v (absent without E: the NDF step then skips the product). */
  readonly massTimes?: (v: Float64Array, out: Float64Array) => void;
  private made = 0;

  constructor(model: SparseStateSpaceModel, budgetBytes: number) {
    super(model);
    const { A, E } = model;
    this.sp = shiftPattern(A, E);
    if (E) {
      const eRows = rowsOf(E);
      this.massTimes = (v, out) => rowProduct(eRows, v, out);
    }
    // Analysed with c = ‖E‖₁/‖A‖₁, where both terms count: UMFPACK chooses its strategy from the values too.
    const cRef = (E ? cscNorm1(E) : 1) / Math.max(cscNorm1(A), Number.MIN_VALUE);
    this.lu = SparseLu.analyze({ ...this.sp.pattern, values: shiftedByStep(this.sp, cRef) }, 'E − c·A');
    // Keep as many factors as the budget allows beside the one being made (at most KEEP_FACTORS), plus E's.
    const one = this.lu.analysis.numericSizeBytes;
    const extra = E ? 1 : 0;
    let keep = KEEP_FACTORS;
    if (Number.isFinite(budgetBytes) && one > 0) {
      keep = Math.max(1, Math.min(KEEP_FACTORS, Math.floor((budgetBytes - this.lu.analysis.peakMemoryBytes) / one) + 1 - extra));
    }
    this.keep = keep;
    checkFactorBudget(this.lu, budgetBytes, 'E − c·A', (keep - 1 + extra) * one);
  }

  get factorizations(): number {
    return this.made;
  }

  private factor(c: number): SparseLuFactor {
    try {
      const f = this.lu.factorApart(shiftedByStep(this.sp, c));
      this.made++;
      return f;
    } catch (e) {
      if (!isSingular(e)) throw e;
      if (c === 0) throw new ModelError('singular_mass', 'E', 'E is singular: the descriptor matrix must be nonsingular');
      throw new ModelError('unstable', 'A', `E − c·A is singular at c = ${c}: the model has a pole at 1/c in the right half-plane`);
    }
  }

  solveShifted(c: number, r: Float64Array, d: Float64Array): void {
    let hit = this.cache.find((e) => e.c === c);
    if (!hit) {
      hit = { c, factor: this.factor(c) };
      this.cache.unshift(hit);
      if (this.cache.length > this.keep) this.cache.pop()!.factor.dispose();
    }
    hit.factor.solve(r, d);
  }

  /** E⁻¹ v (v itself without E). */
  private massSolve(v: Float64Array): Float64Array {
    if (!this.model.E) return v;
    this.mass ??= this.factor(0);
    return this.mass.solve(v);
  }

  derivative(x: Float64Array, b: Float64Array, out: Float64Array): void {
    if (!this.model.E) {
      this.rhs(x, b, out);
      return;
    }
    const f = new Float64Array(this.n);
    this.rhs(x, b, f);
    out.set(this.massSolve(f));
  }

  impulseJump(w: Float64Array): Float64Array {
    return this.massSolve(this.inputTerm(w));
  }

  dispose(): void {
    for (const e of this.cache) e.factor.dispose();
    this.cache.length = 0;
    this.mass?.dispose();
    this.mass = null;
    this.lu.dispose();
  }
}

/** Bytes of a Cholesky factor with `lnz` nonzeros: values and row indices, plus column pointers. */
const choleskyBytes = (lnz: number, n: number) => lnz * 12 + n * 16;

/** Solves with E kept for a run: CHOLMOD's Cholesky when E is symmetric positive definite, else UMFPACK's LU. */
class MassSolver {
  readonly kind: 'cholesky' | 'lu';
  private chol: SparseCholesky | null = null;
  private lu: SparseLu | null = null;

  constructor(E: CscMatrix, budgetBytes: number) {
    if (isSymmetric(E)) {
      checkMemoryEstimate(choleskyBytes(amdOrdering(E).lnz, E.n), budgetBytes, 'E', "AMD's count of the Cholesky factor's nonzeros");
      try {
        this.chol = new SparseCholesky(E, 'E');
      } catch {
        this.chol = null; // not positive definite: LU below
      }
    }
    if (this.chol) {
      this.kind = 'cholesky';
      return;
    }
    this.kind = 'lu';
    const lu = SparseLu.analyze(E, 'E');
    checkFactorBudget(lu, budgetBytes, 'E');
    try {
      lu.factor();
    } catch (e) {
      lu.dispose();
      if (isSingular(e)) throw new ModelError('singular_mass', 'E', 'E is singular: the descriptor matrix must be nonsingular');
      throw e;
    }
    this.lu = lu;
  }

  solve(b: Float64Array): Float64Array {
    return this.chol ? this.chol.solve(b) : this.lu!.solve(b);
  }

  dispose(): void {
    this.chol?.dispose();
    this.lu?.dispose();
  }
}

/** The explicit solver's system: f = E⁻¹(A x + b) by a sparse product and, with E, one solve. */
class SparseExplicitSystem extends SparseSystem {
  private readonly mass: MassSolver | null;
  private readonly f: Float64Array;

  constructor(model: SparseStateSpaceModel, budgetBytes: number) {
    super(model);
    this.mass = model.E ? new MassSolver(model.E, budgetBytes) : null;
    this.f = new Float64Array(this.n);
  }

  get factorizations(): number {
    return this.mass ? 1 : 0;
  }

  derivative(x: Float64Array, b: Float64Array, out: Float64Array): void {
    if (!this.mass) {
      this.rhs(x, b, out);
      return;
    }
    this.rhs(x, b, this.f);
    out.set(this.mass.solve(this.f));
  }

  impulseJump(w: Float64Array): Float64Array {
    const b = this.inputTerm(w);
    return this.mass ? this.mass.solve(b) : b;
  }

  dispose(): void {
    this.mass?.dispose();
  }
}

/**
 * `auto` on the sparse path: the dense path's stiffness rule with the fastest and slowest poles by modulus
 * (see the file header). Returns the solver and why.
 */
export function chooseSparseSolver(model: SparseStateSpaceModel, tEnd: number, budgetBytes = Infinity): { solver: 'explicit' | 'stiff'; reason: string } {
  // A few digits are enough to choose: loose tolerances, and the estimate taken even when not converged.
  const fast = fastestPole(model, { tolerance: 1e-3, maxRestarts: 20, memoryBudgetBytes: budgetBytes });
  const fastest = Math.hypot(fast.re, fast.im);
  let slowest = 0;
  let si: ShiftInvert | null = null;
  try {
    si = new ShiftInvert(model, { re: 0, im: 0 }, budgetBytes);
    const slow = sparseEigs(model, { count: 1, tolerance: 1e-6, maxRestarts: 50, factorization: si });
    slowest = Math.hypot(slow.values.re[0], slow.values.im[0]);
  } catch (e) {
    if (!(e instanceof ModelError && e.field === 'shift')) throw e; // A singular: a pole at 0, slowest 0
  } finally {
    si?.dispose();
  }
  const ratio = slowest > 0 ? fastest / slowest : Infinity;
  const stabilitySteps = explicitStabilitySteps(fastest, tEnd);
  const fmt = (v: number) => (Number.isFinite(v) ? Number(v.toPrecision(3)).toString() : '∞');
  const text =
    `stiffness ratio ≈ ${fmt(ratio)} (moduli of the fastest pole ${fmt(fastest)}, by Krylov–Schur on E⁻¹A, and of the slowest ${fmt(slowest)}, ` +
    `by shift-invert near 0), an explicit method needs ≳ ${fmt(stabilitySteps)} steps for stability alone; n = ${model.A.n}, sparse path`;
  if (ratio >= STIFF_RATIO || stabilitySteps > EXPLICIT_STEP_LIMIT) return { solver: 'stiff', reason: `stiff: ${text}` };
  return { solver: 'explicit', reason: `explicit: not stiff (${text})` };
}

/**
 * The time response of a sparse model under `input` with the stiff or the explicit solver (or `auto`).
 * `hooks`: the stop flag, looked at before every step, and a report after every accepted step (time
 * reached of tEnd). Throws ModelError on bad options, and too_large when a factorization would pass the
 * memory budget.
 */
export function simulateSparse(
  model: SparseStateSpaceModel,
  input: InputSignal,
  options: SparseSimulationOptions,
  hooks: LoopHooks<TimeStepReport> = {},
): SimulationResult {
  if (input.inputs !== model.B.cols) {
    throw new ModelError('dimension_mismatch', 'input', `the input has ${input.inputs} channels but the model has ${model.B.cols} inputs`);
  }
  const opts = checkOptions(options, model.A.n);
  const choice = options.solver ?? 'auto';
  if ((choice as string) === 'exact') {
    throw new ModelError('invalid_option', 'solver', 'the exact solver needs dense matrix exponentials; on the sparse path use stiff, explicit or auto');
  }
  if (choice !== 'auto' && choice !== 'stiff' && choice !== 'explicit') {
    throw new ModelError('invalid_option', 'solver', `solver must be stiff, explicit or auto on the sparse path, got "${String(choice)}"`);
  }
  const budget = options.memoryBudgetBytes ?? Infinity;
  let solver: 'explicit' | 'stiff' = choice === 'auto' ? 'stiff' : choice;
  let reason: string | undefined;
  if (choice === 'auto') ({ solver, reason } = chooseSparseSolver(model, opts.tEnd, budget));
  let result: SimulationResult;
  if (solver === 'stiff') {
    if (opts.fixedStep !== undefined) {
      throw new ModelError('invalid_option', 'fixedStep', 'on the sparse path the stiff solver chooses its own steps; a fixed step takes the explicit solver');
    }
    const ndf: BdfOptions = { maxOrder: options.maxOrder };
    const system = new SparseNdfSystem(model, budget);
    try {
      result = integrateNdf(system, input, opts, ndf, hooks);
    } finally {
      system.dispose();
    }
  } else {
    const system = new SparseExplicitSystem(model, budget);
    try {
      result = integrateExplicit(system, input, opts, hooks);
    } finally {
      system.dispose();
    }
  }
  return reason === undefined ? result : { ...result, reason };
}

/**
 * The simulation-cost report (`reduction/simulate/cost-report.ts`) with a sparse full model and a dense
 * reduced one: each solver named (stiff and explicit; the exact one is not offered on the sparse path) runs
 * on both, the full model by `simulateSparse`. The first solver's responses give the relative output
 * difference.
 */
export function sparseSimulationCostReport(
  full: SparseStateSpaceModel,
  reduced: StateSpaceModel,
  input: InputSignal,
  options: Omit<SparseSimulationOptions, 'solver'>,
  solvers: readonly Exclude<SolverName, 'exact'>[] = ['stiff', 'explicit'],
): SimulationCostReport {
  const { memoryBudgetBytes, maxOrder, ...common } = options;
  return costReport(
    {
      states: full.A.n,
      inputs: full.B.cols,
      outputs: full.C.rows,
      run: (solver) => simulateSparse(full, input, { ...common, memoryBudgetBytes, maxOrder, solver: solver as 'stiff' | 'explicit' }),
    },
    reduced,
    input,
    common,
    solvers,
  );
}
