/**
 * Hankel singular values, balanced truncation and balanced residualization of a stable model.
 *
 * Balancing (Moore 1981, IEEE Trans. AC 26(1)) in the square-root form of Laub, Heath, Paige & Ward
 * ("Computation of system balancing transformations and other applications of simultaneous
 * diagonalization algorithms", IEEE Trans. AC 32(2), 1987) and Tombs & Postlethwaite ("Truncated balanced
 * realization of a stable non-minimal state-space system", Int. J. Control 46(4), 1987): with gramian
 * factors P = Lc Lcᵀ, Q = Lo Loᵀ and the SVD Loᵀ Lc = U Σ Vᵀ, the Hankel singular values are diag(Σ) and
 *
 *   T = Lc V Σ^(−½),   W = Lo U Σ^(−½)   (Wᵀ T = I),   (Ab, Bb, Cb) = (Wᵀ A T, Wᵀ B, C T)
 *
 * is balanced: both gramians equal Σ. Tombs & Postlethwaite's point is the one that matters for
 * finite-element exports: Σ is cut at its numerical rank before Σ^(−½) is formed, so a non-minimal model
 * (Hankel singular values at rounding level) never divides by a negligible singular value; the states
 * dropped that way carry no input-output behaviour beyond the rounding level.
 *
 * Truncation keeps the leading r balanced states; residualization (singular perturbation approximation,
 * Liu & Anderson, "Singular perturbation approximation of balanced systems", Int. J. Control 50(4), 1989)
 * sets the derivative of the discarded states to zero:
 *
 *   Ar = A11 − A12 A22⁻¹ A21,  Br = B1 − A12 A22⁻¹ B2,  Cr = C1 − C2 A22⁻¹ A21,  Dr = D − C2 A22⁻¹ B2,
 *
 * which keeps G(0) exactly. Both satisfy ‖G − Gr‖∞ ≤ 2 Σ_{i>r} σ_i (Enns, "Model reduction with balanced
 * realizations: an error bound and a frequency weighted generalization", 23rd IEEE CDC, 1984; Glover,
 * "All optimal Hankel-norm approximations of linear multivariable systems and their L∞-error bounds",
 * Int. J. Control 39(6), 1984; for residualization Liu & Anderson 1989), and ‖G − Gr‖∞ ≥ σ_{r+1}
 * (Glover 1984). A22 is stable, hence invertible, when σ_r > σ_{r+1} (Pernebo & Silverman, "Model
 * reduction via balanced state space representations", IEEE Trans. AC 27(2), 1982).
 */
import { type Matrix, zeros, matmul, transpose, svd, solve, block, sub } from './linalg/index';
import type { StateSpaceModel } from './model';
import { gramianFactors } from './gramians';
import { leadingStates, stackColumns } from './realization';
import { balancedErrorBound, DEFAULT_RANK_TOLERANCE, numericalOrder } from './hankel-figures';

/** The rank tolerance, the numerical order and the bound are pure rules shared with the pages (hankel-figures.ts). */
export { DEFAULT_RANK_TOLERANCE, balancedErrorBound };

export interface BalancedRealization {
  /** All Hankel singular values of the stable model, descending (length n); those past its numerical rank are at rounding level or 0. */
  readonly hankelSingularValues: Float64Array;
  /** Numerical minimal order: how many σ exceed the rank tolerance; the balanced realization has this many states. */
  readonly minimalOrder: number;
  /** The balanced realization (minimalOrder states); D of the model. */
  readonly balanced: StateSpaceModel;
  /** The gramian factors it was made from (P = Lc Lcᵀ, Q = Lo Loᵀ of the stable model); ‖C Lc‖_F is its H2 norm. */
  readonly factors?: { readonly controllability: Matrix; readonly observability: Matrix };
}

function scaleColumns(m: Matrix, factors: Float64Array): Matrix {
  const out = zeros(m.rows, m.cols);
  for (let i = 0; i < m.rows; i++) {
    for (let j = 0; j < m.cols; j++) out.data[i * m.cols + j] = m.data[i * m.cols + j] * factors[j];
  }
  return out;
}

/** The square-root balanced realization of a stable model (see the file header). */
export function balancedRealization(
  stable: StateSpaceModel,
  options: { rankTolerance?: number } = {},
): BalancedRealization {
  const n = stable.A.rows;
  const p = stable.C.rows;
  const m = stable.B.cols;
  const empty = {
    hankelSingularValues: new Float64Array(n),
    minimalOrder: 0,
    balanced: { A: zeros(0, 0), B: zeros(0, m), C: zeros(p, 0), D: stable.D },
  };
  if (n === 0) return empty;
  const { controllability: Lc, observability: Lo } = gramianFactors(stable);
  if (Lc.cols === 0 || Lo.cols === 0) return empty;
  const { U, s, V } = svd(matmul(transpose(Lo), Lc));
  const hsv = new Float64Array(n);
  hsv.set(s.subarray(0, Math.min(n, s.length)));
  const k = numericalOrder(s, options.rankTolerance ?? DEFAULT_RANK_TOLERANCE);
  const invSqrt = new Float64Array(k);
  for (let i = 0; i < k; i++) invSqrt[i] = 1 / Math.sqrt(s[i]);
  const T = matmul(Lc, scaleColumns(block(V, 0, V.rows, 0, k), invSqrt));
  const W = matmul(Lo, scaleColumns(block(U, 0, U.rows, 0, k), invSqrt));
  const Wt = transpose(W);
  return {
    hankelSingularValues: hsv,
    minimalOrder: k,
    balanced: { A: matmul(matmul(Wt, stable.A), T), B: matmul(Wt, stable.B), C: matmul(stable.C, T), D: stable.D },
    factors: { controllability: Lc, observability: Lo },
  };
}

/** Hankel singular values of a stable model, descending (length n): the singular values of Loᵀ Lc. */
export function hankelSingularValues(stable: StateSpaceModel): Float64Array {
  const n = stable.A.rows;
  const hsv = new Float64Array(n);
  if (n === 0) return hsv;
  const { controllability: Lc, observability: Lo } = gramianFactors(stable);
  if (Lc.cols === 0 || Lo.cols === 0) return hsv;
  const s = svd(matmul(transpose(Lo), Lc)).s;
  hsv.set(s.subarray(0, Math.min(n, s.length)));
  return hsv;
}

/**
 * Relative gap below which two Hankel singular values count as equal (common practice: well above the
 * ~1e-12 relative accuracy of the leading values, well below any gap that matters for the bound).
 */
export const EQUAL_HANKEL_TOLERANCE = 1e-8;

/**
 * Orders at which the balanced realization may be cut: never between equal Hankel singular values,
 * where the truncated model is not unique and need not be asymptotically stable, and A22 of
 * residualization can be singular (Pernebo & Silverman 1982 require σ_r > σ_{r+1}). Past the numerical
 * rank every order is allowed (the values there are rounding noise).
 */
export function balancedCutPoints(real: BalancedRealization): number[] {
  const s = real.hankelSingularValues;
  const n = s.length;
  const cuts = [0];
  for (let r = 1; r <= n; r++) {
    if (r >= real.minimalOrder || r === n || s[r - 1] - s[r] > EQUAL_HANKEL_TOLERANCE * s[r - 1]) cuts.push(r);
  }
  return cuts;
}

/**
 * The smallest balanced truncation G_q (q ≥ minOrder) whose a-priori error 2Σ_{i>q} σ_i (Enns 1984;
 * Glover 1984) is at most `slack`: a stand-in for G in the O(q³) certification steps of the H∞ norm
 * (`hInfinityNorm`'s `certifyOn`). Null when no order below the numerical minimal order meets the slack.
 */
export function balancedCertificate(
  real: BalancedRealization,
  slack: number,
  minOrder = 0,
): { model: StateSpaceModel; slack: number } | null {
  const s = real.hankelSingularValues;
  let tail = 0;
  let q = s.length;
  // Walk down from the end while the tail stays within the slack.
  while (q > minOrder && tail + 2 * s[q - 1] <= slack) {
    tail += 2 * s[q - 1];
    q--;
  }
  if (q >= real.minimalOrder) return null;
  return { model: leadingStates(real.balanced, q), slack: tail };
}

/** Balanced truncation to r states (r ≤ minimalOrder). */
export function balancedTruncation(real: BalancedRealization, r: number): StateSpaceModel {
  return leadingStates(real.balanced, Math.min(r, real.minimalOrder));
}

/** Balanced residualization to r states (r ≤ minimalOrder): keeps the DC gain (Liu & Anderson 1989). */
export function balancedResidualization(real: BalancedRealization, r: number): StateSpaceModel {
  const k = real.minimalOrder;
  if (r >= k) return real.balanced;
  const { A, B, C, D } = real.balanced;
  const m = B.cols;
  const p = C.rows;
  const A11 = block(A, 0, r, 0, r);
  const A12 = block(A, 0, r, r, k);
  const A21 = block(A, r, k, 0, r);
  const A22 = block(A, r, k, r, k);
  const B1 = block(B, 0, r, 0, m);
  const B2 = block(B, r, k, 0, m);
  const C1 = block(C, 0, p, 0, r);
  const C2 = block(C, 0, p, r, k);
  // One factorisation of A22 for both right-hand sides: A22⁻¹ [A21  B2].
  const X = solve(A22, stackColumns(A21, B2));
  const XA = block(X, 0, k - r, 0, r);
  const XB = block(X, 0, k - r, r, r + m);
  return {
    A: sub(A11, matmul(A12, XA)),
    B: sub(B1, matmul(A12, XB)),
    C: sub(C1, matmul(C2, XA)),
    D: sub(D, matmul(C2, XB)),
  };
}
