/**
 * Figures of a list of Hankel singular values σ₁ ≥ σ₂ ≥ … ≥ σₙ ≥ 0 of the stable part, as pure functions
 * with no linear algebra and no imports, so the engine (balanced.ts, the analysis) and the Hankel chart use
 * the same rules.
 *
 *   - a-priori bound of balanced truncation and residualization at order r: ‖G − Gr‖∞ ≤ 2 Σ_{i>r} σᵢ
 *     (Enns, 23rd IEEE CDC, 1984; Glover, Int. J. Control 39(6), 1984; Liu & Anderson, Int. J. Control
 *     50(4), 1989); summed from the smallest value up for accuracy;
 *   - numerical order: how many σ exceed the rank tolerance tol·σ₁ (balanced.ts cuts Σ there before forming
 *     Σ^(−½), after Tombs & Postlethwaite 1987); the chart opens on these values;
 *   - rounding floor σ₁·n·ε: values below it are indistinguishable from the rounding of the computation that
 *     produced them (common practice: the default rank tolerance of a computed SVD, max(m, n)·ε·σ₁, as in
 *     numpy.linalg.matrix_rank's documentation).
 */

/**
 * Relative rank tolerance on Σ: singular values ≤ tol·σ₁ are treated as zero (numerically uncontrollable
 * or unobservable directions). Common practice: a small multiple of the accuracy a square-root method
 * delivers for σ₁, well above ε so that Σ^(−½) stays below about 10⁶·σ₁^(−½).
 */
export const DEFAULT_RANK_TOLERANCE = 1e-12;

/** 2 Σ_{i>r} σᵢ: the bound at order r (0 ≤ r ≤ n). */
export function balancedErrorBound(hankel: ArrayLike<number>, r: number): number {
  let tail = 0;
  for (let i = hankel.length - 1; i >= r; i--) tail += hankel[i];
  return 2 * tail;
}

/** The bound at every order r = 0..n (n + 1 values, the last 0), in one pass from the smallest value up. */
export function balancedErrorBounds(hankel: ArrayLike<number>): number[] {
  const n = hankel.length;
  const bound = new Array<number>(n + 1);
  let tail = 0;
  bound[n] = 0;
  for (let r = n - 1; r >= 0; r--) {
    tail += hankel[r];
    bound[r] = 2 * tail;
  }
  return bound;
}

/** How many leading σ exceed tol·σ₁: the numerical minimal order of the stable part. */
export function numericalOrder(hankel: ArrayLike<number>, rankTolerance = DEFAULT_RANK_TOLERANCE): number {
  if (hankel.length === 0) return 0;
  const tol = rankTolerance * hankel[0];
  let k = 0;
  while (k < hankel.length && hankel[k] > tol) k++;
  return k;
}

/** σ₁·n·ε (see the file header); 0 for an empty list. */
export function roundingFloor(hankel: ArrayLike<number>): number {
  return hankel.length === 0 ? 0 : hankel[0] * hankel.length * Number.EPSILON;
}
