/**
 * Low-rank square-root balanced truncation and balanced residualization of a large sparse model
 * E ẋ = A x + B u, y = C x + D u, from the low-rank ADI factors P ≈ Zc Zcᵀ, Q ≈ Zo Zoᵀ (`adi.ts`):
 *
 *   Zoᵀ E Zc = U Σ Vᵀ,   T = Zc V₁ Σ₁^(−½),   W = Zo U₁ Σ₁^(−½)   (Wᵀ E T = I),
 *   balanced (k states):  (Wᵀ A T, Wᵀ B, C T, D)
 *
 * (the square-root method of Laub, Heath, Paige & Ward, IEEE Trans. AC 32(2), 1987 and Tombs &
 * Postlethwaite, Int. J. Control 46(4), 1987, on low-rank factors as in Penzl, "Algorithms for model
 * reduction of large dynamical systems", Linear Algebra Appl. 415, 2006; Li & White 2002). Σ is cut at
 * its numerical rank k before Σ^(−½) is formed. Truncation keeps the leading r states of that balanced
 * realization; residualization (Liu & Anderson, Int. J. Control 50(4), 1989) is applied to the k-state
 * balanced realization (so it keeps the DC gain of that realization, which approximates the model's).
 *
 * Both ADI iterations must have reached their tolerance (an unstable model never does); otherwise the
 * reduction is refused with ModelError('unstable') unless `allowUnconverged`.
 *
 * What is exact and what is estimated: the Hankel singular values are those of the low-rank gramians,
 * accurate to about the ADI residual for the leading ones; there are only min(rank Zc, rank Zo) of them,
 * and the tail of the model's true Hankel singular values beyond the factor rank is not computed. The
 * bound 2 Σ_{i>r} σᵢ (Enns 1984; Glover 1984) is therefore summed over the computed values only, and is
 * labelled an estimate; the measured error (a sweep of the full model, `frequency.ts`) is the check.
 */
import { ModelError } from '../errors';
import { type Matrix, zeros, svd, multiplyTransposeA, matmul, block } from '../linalg/index';
import { balancedResidualization, balancedTruncation, balancedErrorBound, DEFAULT_RANK_TOLERANCE, type BalancedRealization } from '../balanced';
import type { StateSpaceModel } from '../model';
import { lowRankGramians, type AdiOptions, type AdiResult } from './adi';
import { cscTimesDense, type SparseStateSpaceModel } from './model';

export interface SparseBalancedOptions {
  readonly method: 'balanced' | 'residualization';
  readonly order: number;
  readonly adi?: AdiOptions;
  /** Relative cut on Σ (default as the dense path, 1e-12). */
  readonly rankTolerance?: number;
  /** Gramian factors already computed (both equations). */
  readonly gramians?: AdiResult;
  /** Reduce even when an ADI stopped above its tolerance (default false: refused, see below). */
  readonly allowUnconverged?: boolean;
}

export interface SparseBalancedResult {
  readonly method: 'balanced' | 'residualization';
  readonly order: number;
  /** The reduced model, E_r = I. */
  readonly model: StateSpaceModel;
  /** Computed Hankel singular values (descending, length = the factor rank k). */
  readonly hankelSingularValues: Float64Array;
  /** k: how many Hankel singular values were computed above the rank tolerance. */
  readonly factorRank: number;
  /** 2 Σ_{i=r+1..k} σᵢ over the computed values: an estimate of the a-priori bound (the tail past k is not included). */
  readonly errorBound: number;
  readonly gramians: AdiResult;
  readonly notes: readonly string[];
}

function scaleColumns(m: Matrix, f: Float64Array): Matrix {
  const out = zeros(m.rows, m.cols);
  for (let i = 0; i < m.rows; i++) for (let j = 0; j < m.cols; j++) out.data[i * m.cols + j] = m.data[i * m.cols + j] * f[j];
  return out;
}

/** The k-state approximately balanced realization from the ADI factors, with the projections W and T. */
export function lowRankBalancedRealization(
  model: SparseStateSpaceModel,
  gramians: AdiResult,
  rankTolerance = DEFAULT_RANK_TOLERANCE,
): { realization: BalancedRealization; W: Matrix; T: Matrix } {
  const Zc = gramians.controllability?.Z, Zo = gramians.observability?.Z;
  if (!Zc || !Zo) throw new Error('low-rank balancing needs both gramian factors');
  const p = model.C.rows, m = model.B.cols;
  const EZc = model.E ? cscTimesDense(model.E, Zc) : Zc;
  const { U, s, V } = svd(multiplyTransposeA(Zo, EZc));
  const tol = rankTolerance * (s[0] ?? 0);
  let k = 0;
  while (k < s.length && s[k] > tol) k++;
  const hsv = s.slice(0, k);
  const inv = new Float64Array(k);
  for (let i = 0; i < k; i++) inv[i] = 1 / Math.sqrt(s[i]);
  const T = matmul(Zc, scaleColumns(block(V, 0, V.rows, 0, k), inv));
  const W = matmul(Zo, scaleColumns(block(U, 0, U.rows, 0, k), inv));
  const balanced: StateSpaceModel =
    k === 0
      ? { A: zeros(0, 0), B: zeros(0, m), C: zeros(p, 0), D: model.D }
      : {
          A: multiplyTransposeA(W, cscTimesDense(model.A, T)),
          B: multiplyTransposeA(W, model.B),
          C: matmul(model.C, T),
          D: model.D,
        };
  return { realization: { hankelSingularValues: hsv, minimalOrder: k, balanced }, W, T };
}

/** Balanced truncation or residualization of a sparse model to `order` states (see the header). */
export function sparseBalancedReduction(model: SparseStateSpaceModel, options: SparseBalancedOptions): SparseBalancedResult {
  const r = options.order;
  if (!Number.isInteger(r) || r < 1) throw new ModelError('invalid_option', 'order', `--order must be a whole number ≥ 1, got ${r}`);
  if (r >= model.A.n) throw new ModelError('order_too_large', 'order', `--order ${r} is not below the model's ${model.A.n} states`);
  const gramians = options.gramians ?? lowRankGramians(model, options.adi);
  if (!options.allowUnconverged) {
    for (const side of ['controllability', 'observability'] as const) {
      const f = gramians[side];
      if (f && !f.converged) {
        // An unstable model never converges with stable shifts; a stable one may just need more steps.
        throw new ModelError(
          'unstable',
          'A',
          `the ${side} gramian's low-rank ADI stopped after ${f.iterations} steps with normalised residual ${f.residual.toExponential(2)}, ` +
            `above its tolerance: the model may be unstable (the sparse path needs a stable model), or the iteration needs more steps (--adi-max-iterations) or a looser --adi-tolerance`,
        );
      }
    }
  }
  const { realization } = lowRankBalancedRealization(model, gramians, options.rankTolerance);
  const k = realization.minimalOrder;
  const notes = [...gramians.notes];
  if (r > k) {
    throw new ModelError(
      'order_too_large',
      'order',
      `--order ${r} is past the ${k} Hankel singular values the low-rank gramians resolve; ask for at most ${k} or tighten the ADI tolerance`,
    );
  }
  const reduced = options.method === 'balanced' ? balancedTruncation(realization, r) : balancedResidualization(realization, r);
  notes.push(
    `Hankel singular values computed from low-rank gramian factors (rank ${k}); the model's values past the ${k}th are not computed, so the bound 2Σσ(r+1..) is an estimate`,
  );
  return {
    method: options.method,
    order: r,
    model: reduced,
    hankelSingularValues: realization.hankelSingularValues,
    factorRank: k,
    errorBound: balancedErrorBound(realization.hankelSingularValues, r),
    gramians,
    notes,
  };
}
