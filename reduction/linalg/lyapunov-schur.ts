/**
 * Continuous Lyapunov equations on one real Schur form, the method of Bartels & Stewart ("Algorithm
 * 432: Solution of the matrix equation AX + XB = C", Comm. ACM 15(9), 1972): with A = Z·T·Zᵀ,
 *
 *   A·P + P·Aᵀ + B·Bᵀ = 0   ⇔   T·Y + Y·Tᵀ = −Zᵀ·B·Bᵀ·Z,   P = Z·Y·Zᵀ
 *   Aᵀ·Q + Q·A + Cᵀ·C = 0   ⇔   Tᵀ·Y + Y·T = −Zᵀ·Cᵀ·C·Z,   Q = Z·Y·Zᵀ
 *
 * so both gramians share the one O(n³) Schur decomposition, and the quasi-triangular solves run in the
 * backend's Sylvester kernel (LAPACK 3.11's level-3 dtrsyl3 on the native backend). The square-root
 * factors come from Cholesky with diagonal pivoting, truncated at the numerical rank (Higham 1990;
 * LAPACK dpstrf), so semidefinite gramians of non-minimal models are safe.
 *
 * Measured here (README, "Engine benchmark"): on the native backend this is 3–4× faster than the
 * factored sign iteration of `lyapunov.ts` for n = 1000–2000, whose compressions dominate once the
 * factors' rank passes ~100; on the portable backend the sign iteration stays faster (its Schur form
 * is the slow kernel), so `gramians.ts` chooses by backend.
 */
import { type Matrix, type ComplexVector, zeros } from './matrix';
import { kernels } from './kernels';
import { nativeHammarlingFactor } from './native';

export interface SchurForm {
  readonly T: Matrix;
  readonly Z: Matrix;
  readonly values: ComplexVector;
}

function product(a: Matrix, b: Matrix, ta: boolean, tb: boolean): Matrix {
  const m = ta ? a.cols : a.rows, k = ta ? a.rows : a.cols, n = tb ? b.rows : b.cols;
  const c = zeros(m, n);
  if (m > 0 && n > 0) kernels().gemm(ta, tb, m, n, k, 1, a.data, 0, a.cols, b.data, 0, b.cols, 0, c.data, 0, n);
  return c;
}

/** Throws unless every eigenvalue has a negative real part (the equations need a stable A). */
function requireStable(what: string, values: ComplexVector): void {
  for (let i = 0; i < values.re.length; i++) {
    if (!(values.re[i] < 0)) {
      throw new Error(
        `${what}: A is not stable (eigenvalue ${values.re[i].toExponential(3)}${values.im[i] >= 0 ? '+' : '−'}${Math.abs(values.im[i]).toExponential(3)}i); the equation needs A stable`,
      );
    }
  }
}

/** Y = Zᵀ·X·Z solving the equation in Schur coordinates (see `schurLyapunov`); symmetric. */
function schurCoordinatesSolution(form: SchurForm, f: Matrix, transposeA: boolean): Matrix {
  const n = form.T.rows;
  if (f.rows !== n) throw new Error(`schurLyapunov: the right-hand factor has ${f.rows} rows, A is ${n}×${n}`);
  requireStable('schurLyapunov', form.values);
  // W = Zᵀ·F, right-hand side −W·Wᵀ.
  const W = product(form.Z, f, true, false);
  const Y = product(W, W, false, true);
  for (let k = 0; k < Y.data.length; k++) Y.data[k] = -Y.data[k];
  // T·Y + Y·Tᵀ (controllability) or Tᵀ·Y + Y·T (observability).
  if (kernels().quasiTriangularSylvester(form.T, form.T, Y, transposeA, !transposeA)) {
    throw new Error('schurLyapunov: A and −Aᵀ share an eigenvalue to working precision (A is not stable enough)');
  }
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < i; j++) {
      const v = 0.5 * (Y.data[i * n + j] + Y.data[j * n + i]);
      Y.data[i * n + j] = v;
      Y.data[j * n + i] = v;
    }
  }
  return Y;
}

/**
 * X with A·X + X·Aᵀ + F·Fᵀ = 0 (`transposeA` false) or Aᵀ·X + X·A + F·Fᵀ = 0 (true), for stable A
 * given by its Schur form; F is n×k. X is symmetric positive semidefinite.
 */
export function schurLyapunov(form: SchurForm, f: Matrix, transposeA: boolean): Matrix {
  if (form.T.rows === 0) return zeros(0, 0);
  const Y = schurCoordinatesSolution(form, f, transposeA);
  return product(product(form.Z, Y, false, false), form.Z, false, true);
}

/**
 * L (n × numerical rank) with X ≈ L·Lᵀ for the same equation: the pivoted Cholesky factor G of the
 * Schur-coordinate solution Y = Zᵀ·X·Z, then L = Z·G (X = Z·Y·Zᵀ is never formed: one n²·r product
 * instead of two n³ ones).
 */
export function schurLyapunovFactor(form: SchurForm, f: Matrix, transposeA: boolean, tolerance: number): Matrix {
  const n = form.T.rows;
  if (n === 0) return zeros(0, 0);
  const G = kernels().pivotedCholesky(schurCoordinatesSolution(form, f, transposeA), tolerance);
  return product(form.Z, G, false, false);
}

/**
 * Square-root factors of both gramians from one Schur form: P ≈ Lc·Lcᵀ (A·P + P·Aᵀ + B·Bᵀ = 0) and
 * Q ≈ Lo·Loᵀ (Aᵀ·Q + Q·A + Cᵀ·C = 0), each n × (numerical rank), rank cut where the pivoted Cholesky's
 * remaining diagonal falls to tolerance²·max diag (default √ε: contributions at the rounding level of a
 * dense solver, as the sign iteration's compressions drop).
 */
export function schurGramianFactors(
  a: Matrix,
  b: Matrix,
  c: Matrix,
  options: { form?: SchurForm; tolerance?: number; method?: SchurLyapunovMethod } = {},
): { controllability: Matrix; observability: Matrix; form: SchurForm } {
  const n = a.rows;
  if (a.cols !== n) throw new Error(`schurGramianFactors: A must be square, got ${a.rows}×${a.cols}`);
  if (b.rows !== n) throw new Error(`schurGramianFactors: B has ${b.rows} rows, A is ${n}×${n}`);
  if (c.cols !== n) throw new Error(`schurGramianFactors: C has ${c.cols} columns, A is ${n}×${n}`);
  const form = options.form ?? kernels().schur(a);
  const tol = options.tolerance ?? Math.sqrt(Number.EPSILON);
  const ct: Matrix = { rows: n, cols: c.rows, data: new Float64Array(n * c.rows) };
  for (let i = 0; i < c.rows; i++) for (let j = 0; j < n; j++) ct.data[j * c.rows + i] = c.data[i * n + j];
  const factor = options.method === 'hammarling' ? hammarlingLyapunovFactor : schurLyapunovFactor;
  return {
    controllability: factor(form, b, false, tol),
    observability: factor(form, ct, true, tol),
    form,
  };
}

/**
 * How the factors are found on the Schur form: `bartels-stewart` solves for the full Schur-coordinate
 * solution (level 3, dtrsyl3) and factors it; `hammarling` finds the Cholesky factor directly,
 * column by column (Hammarling 1982; level 2, native backend only). Both are measured by `npm run bench`
 * (case "gramians"); the engine uses Bartels–Stewart, the faster of the two here.
 */
export type SchurLyapunovMethod = 'bartels-stewart' | 'hammarling';

/**
 * L (n×n) with X = L·Lᵀ by Hammarling's method (S. J. Hammarling, "Numerical solution of the stable,
 * non-negative definite Lyapunov equation", IMA J. Numer. Anal. 2, 1982): the factor of the
 * Schur-coordinate solution comes straight from the native kernel, never forming X; L = Z·F.
 */
export function hammarlingLyapunovFactor(form: SchurForm, f: Matrix, transposeA: boolean): Matrix {
  const n = form.T.rows;
  if (n === 0) return zeros(0, 0);
  if (f.rows !== n) throw new Error(`hammarlingLyapunovFactor: the right-hand factor has ${f.rows} rows, A is ${n}×${n}`);
  requireStable('hammarlingLyapunovFactor', form.values);
  const W = product(form.Z, f, true, false);
  const F = nativeHammarlingFactor(form.T, W, transposeA);
  if (!F) throw new Error('hammarlingLyapunovFactor: needs the native backend (npm run build:native)');
  return product(form.Z, F, false, false);
}

