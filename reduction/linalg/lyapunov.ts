/**
 * Continuous Lyapunov equations A·X + X·Aᵀ + Q = 0 for stable A, by the matrix sign function.
 *
 * Method: Roberts' observation (J. D. Roberts, "Linear model reduction and solution of the algebraic
 * Riccati equation by use of the sign function", Int. J. Control 32(4), 1980; report of 1971) that
 * sign([[A, Q], [0, −Aᵀ]]) = [[−I, 2X], [0, I]], computed by the Newton iteration
 *   Z ← (c·Z + Z⁻¹/c)/2, i.e. A ← (c·A + A⁻¹/c)/2,  Q ← (c·Q + A⁻¹·Q·A⁻ᵀ/c)/2,
 * with Byers' determinant scaling c = |det A|^(−1/n) (R. Byers, "Solving the algebraic Riccati equation
 * with the matrix sign function", Linear Algebra Appl. 85, 1987). Every step is an inversion and matrix
 * products (level-3 work), which is why it is fast on blocked kernels.
 *
 * Factored form for Q = B·Bᵀ (P. Benner, J. M. Claver & E. S. Quintana-Ortí, 1999, the coupled factored
 * sign iteration — cited from memory, title not checked; P. Benner, E. S. Quintana-Ortí &
 * G. Quintana-Ortí, "Balanced truncation model reduction of large-scale dense systems on parallel
 * computers", Math. Comput. Model. Dyn. Syst. 6(4), 2000): B ← [√(c/2)·B, A⁻¹B/√(2c)], re-compressed every
 * step by a rank-revealing (column-pivoted) QR of Bᵀ, so X ≈ S·Sᵀ with S = B∞/√2 of numerical rank only.
 * The observability factor uses the same inverses: (A_kᵀ)⁻¹ = (A_k⁻¹)ᵀ, so both gramians cost one
 * iteration. Directions whose contribution to X lies below the rounding level of a dense solver are
 * dropped instead of being divided by, so non-minimal models (numerically singular gramians) are safe.
 * When a factor's rank passes 0.41·n, the compressions would cost more than dense updates of both
 * gramians, so the iteration carries P and Q densely from there on and factors them at the end by
 * pivoted Cholesky (`cholesky.ts`), which handles semidefinite gramians just as safely.
 */
import { type Matrix, zeros } from './matrix';
import { luLogDeterminant } from './lu';
import { sharedFloat64, sharedInt32 } from './parallel';
import { kernels, type DenseKernels } from './kernels';

/** The active backend's product (BLAS dgemm's contract, see kernels.ts). */
function gemm(...args: Parameters<DenseKernels['gemm']>): void {
  kernels().gemm(...args);
}

export interface SignIterationOptions {
  /** Stop when ‖A_k + I‖_F ≤ tolerance·√n (A_k → −I); default 1e-12. */
  readonly tolerance?: number;
  /** Default 100. */
  readonly maxIterations?: number;
  /**
   * Factored forms only: factor columns whose remaining norm is below this fraction of the largest
   * are dropped. The default √ε drops contributions to X of relative size ε, the rounding level of a
   * dense solver.
   */
  readonly compressionTolerance?: number;
}

export interface SignIterationReport {
  readonly iterations: number;
  /** ‖A_k + I‖_F/√n at the end: how close the iterate came to −I. */
  readonly finalDistance: number;
}

function checkSquareFinite(what: string, name: string, a: Matrix): void {
  if (a.rows !== a.cols) throw new Error(`${what}: ${name} must be square, got ${a.rows}×${a.cols}`);
  checkFinite(what, name, a);
}

function checkFinite(what: string, name: string, a: Matrix): void {
  for (let k = 0; k < a.data.length; k++) {
    if (!Number.isFinite(a.data[k])) throw new Error(`${what}: ${name}(${Math.floor(k / a.cols)}, ${k % a.cols}) is not finite`);
  }
}

/**
 * Runs the scaled Newton sign iteration on A, calling `step(inv, c)` with A_k⁻¹ and the scaling of each
 * step before A is advanced. Throws when A is not stable (A_k does not approach −I).
 */
function signIteration(
  what: string,
  a: Matrix,
  options: SignIterationOptions,
  step: (inv: Float64Array, c: number) => void,
): SignIterationReport {
  const n = a.rows;
  const tol = options.tolerance ?? 1e-12;
  const maxIt = options.maxIterations ?? 100;
  let ak: Matrix = { rows: n, cols: n, data: sharedFloat64(n * n) };
  ak.data.set(a.data);
  let scaling = true;
  let distance = Infinity;
  for (let it = 1; it <= maxIt; it++) {
    const previous = distance;
    const f = kernels().luFactor(ak);
    if (f.zeroPivot >= 0) {
      throw new Error(`${what}: A has an eigenvalue at zero (or the iteration met a singular iterate); the equation needs A stable`);
    }
    let c = 1;
    if (scaling) {
      const { logAbs } = luLogDeterminant(f);
      c = Math.exp(-logAbs / n);
      if (!Number.isFinite(c) || c <= 0) c = 1;
    }
    const inv = kernels().luInverse(f).data;
    step(inv, c);
    const next = sharedFloat64(n * n);
    const half = 0.5 * c, halfInv = 0.5 / c;
    let change = 0, size = 0, dist = 0;
    for (let k = 0; k < n * n; k++) {
      const v = half * ak.data[k] + halfInv * inv[k];
      const d = v - ak.data[k];
      change += d * d;
      size += v * v;
      next[k] = v;
    }
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        const v = next[i * n + j] + (i === j ? 1 : 0);
        dist += v * v;
      }
    }
    ak = { rows: n, cols: n, data: next };
    distance = Math.sqrt(dist / n);
    // Determinant scaling speeds the early steps but spoils the final quadratic convergence.
    if (Math.sqrt(change) < 1e-2 * Math.sqrt(size)) scaling = false;
    // The solution iterate is as close as A_k is to −I. Stop there, or when the distance stalls at the
    // rounding level that the eigenvector conditioning of A allows.
    if (distance <= tol) return { iterations: it, finalDistance: distance };
    if (!scaling && distance < 1e-6 && distance > 0.5 * previous) return { iterations: it, finalDistance: distance };
    if (!Number.isFinite(distance)) break;
  }
  if (distance < 1e-6) return { iterations: maxIt, finalDistance: distance };
  throw new Error(
    `${what}: the sign iteration did not reach −I (distance ${distance.toExponential(2)}): A is not stable, or it has eigenvalues too close to the imaginary axis`,
  );
}

/**
 * X with A·X + X·Aᵀ + Q = 0, for stable A (all eigenvalues in the open left half-plane) and any Q of the
 * same size; symmetric when Q is. Cost per step: one inversion and two products (≈ 6n³ flops), typically
 * 8–15 steps. Accuracy: forward error of order ε·κ of the Lyapunov operator, like any backward-stable
 * solver; check with `lyapunovResidual`.
 */
export function lyapunov(a: Matrix, q: Matrix, options: SignIterationOptions = {}): Matrix {
  checkSquareFinite('lyapunov', 'A', a);
  if (q.rows !== a.rows || q.cols !== a.cols) throw new Error(`lyapunov: Q is ${q.rows}×${q.cols}, A is ${a.rows}×${a.cols}`);
  checkFinite('lyapunov', 'Q', q);
  const n = a.rows;
  if (n === 0) return zeros(0, 0);
  let qk = sharedFloat64(n * n);
  qk.set(q.data);
  const tmp = sharedFloat64(n * n);
  signIteration('lyapunov', a, options, (inv, c) => {
    // Q ← (c·Q + A⁻¹·Q·A⁻ᵀ/c)/2
    gemm(false, false, n, n, n, 1, inv, 0, n, qk, 0, n, 0, tmp, 0, n);
    const next = sharedFloat64(n * n);
    next.set(qk);
    gemm(false, true, n, n, n, 0.5 / c, tmp, 0, n, inv, 0, n, 0.5 * c, next, 0, n);
    qk = next;
  });
  const x = zeros(n, n);
  for (let k = 0; k < n * n; k++) x.data[k] = 0.5 * qk[k];
  return x;
}

interface Factor {
  data: Float64Array;
  cols: number;
}

/** Copies the first `rank` columns of the pivoted rows back into original row order. */
function unpermute(work: Float64Array, n: number, w: number, rank: number, perm: Int32Array): Factor {
  const out = sharedFloat64(n * rank);
  for (let j = 0; j < n; j++) {
    const src = j * w, dst = perm[j] * rank;
    for (let c = 0; c < rank; c++) out[dst + c] = work[src + c];
  }
  return { data: out, cols: rank };
}

/**
 * Replaces the n×w factor `g` (row-major, X ≈ g·gᵀ) by an n×r factor of numerical rank r ≤ min(n, w),
 * with g·gᵀ unchanged up to the dropped part: a Householder QR with column pivoting of gᵀ
 * (Businger & Golub, Numer. Math. 7, 1965; `pivotedQrOfRows`), truncated where the largest remaining
 * column norm falls below `tol` times the first pivot's. Then gᵀ·Π ≈ U·[R₁₁ R₁₂] and
 * g·gᵀ ≈ (Π·[R₁₁ R₁₂]ᵀ)·(…)ᵀ.
 */
export function compressFactor(g: Float64Array, n: number, w: number, tol: number): Factor {
  const work = sharedFloat64(n * w);
  work.set(g.subarray(0, n * w));
  const perm = new Int32Array(n);
  const rank = kernels().pivotedQrOfRows(work, n, w, tol, perm);
  return unpermute(work, n, w, rank, perm);
}

/**
 * Two independent compressions, the second on the worker thread when one is available. The inputs are
 * the fresh arrays of `expandFactor` (on SharedArrayBuffers) and are overwritten.
 */
function compressPair(a: { g: Float64Array; w: number }, b: { g: Float64Array; w: number }, n: number, tol: number): [Factor, Factor] {
  const pa = new Int32Array(n);
  const pb = sharedInt32(n);
  const ranks = kernels().pivotedQrOfRowsPair({ work: a.g, n, w: a.w, perm: pa }, { work: b.g, n, w: b.w, perm: pb }, tol);
  return [unpermute(a.g, n, a.w, ranks[0], pa), unpermute(b.g, n, b.w, ranks[1], pb)];
}

/** [√(c/2)·G, (A⁻¹ or A⁻ᵀ)·G/√(2c)] as one n×2w array (before compression). */
function expandFactor(n: number, fac: Factor, inv: Float64Array, transposeInverse: boolean, c: number): { g: Float64Array; w: number } {
  const w = fac.cols;
  const w2 = 2 * w;
  const both = sharedFloat64(n * w2);
  const sc = Math.sqrt(c / 2);
  for (let i = 0; i < n; i++) for (let j = 0; j < w; j++) both[i * w2 + j] = sc * fac.data[i * w + j];
  gemm(transposeInverse, false, n, w, n, 1 / Math.sqrt(2 * c), inv, 0, n, fac.data, 0, w, 0, both, w, w2);
  return { g: both, w: w2 };
}

function asFactor(what: string, a: Matrix, b: Matrix, name: string): Factor {
  if (b.rows !== a.rows) throw new Error(`${what}: ${name} has ${b.rows} rows, A is ${a.rows}×${a.cols}`);
  checkFinite(what, name, b);
  const data = sharedFloat64(b.rows * b.cols);
  data.set(b.data);
  return { data, cols: b.cols };
}

function finishFactor(n: number, f: Factor): Matrix {
  const s = zeros(n, f.cols);
  const r = Math.SQRT1_2;
  for (let k = 0; k < s.data.length; k++) s.data[k] = r * f.data[k];
  return s;
}

/**
 * S (n×r, r the numerical rank) with X = S·Sᵀ solving A·X + X·Aᵀ + B·Bᵀ = 0 for stable A.
 * Never forms X; cost per step one inversion plus O(n²·r) for the factor.
 */
export function lyapunovFactor(a: Matrix, b: Matrix, options: SignIterationOptions = {}): Matrix {
  checkSquareFinite('lyapunovFactor', 'A', a);
  const n = a.rows;
  let fac = asFactor('lyapunovFactor', a, b, 'B');
  if (n === 0) return zeros(0, 0);
  const tol = options.compressionTolerance ?? Math.sqrt(Number.EPSILON);
  fac = compressFactor(fac.data, n, fac.cols, tol);
  signIteration('lyapunovFactor', a, options, (inv, c) => {
    const e = expandFactor(n, fac, inv, false, c);
    fac = compressFactor(e.g, n, e.w, tol);
  });
  return finishFactor(n, fac);
}

/**
 * Square-root factors of both gramians of a stable model from ONE sign iteration:
 * P = S·Sᵀ with A·P + P·Aᵀ + B·Bᵀ = 0 and Q = R·Rᵀ with Aᵀ·Q + Q·A + Cᵀ·C = 0 (S n×r_c, R n×r_o).
 * The Hankel singular values are the singular values of Rᵀ·S (Laub, Heath, Paige & Ward 1987).
 */
export function lowRankGramianFactors(
  a: Matrix,
  b: Matrix,
  c: Matrix,
  options: SignIterationOptions = {},
): {
  controllability: Matrix;
  observability: Matrix;
  report: SignIterationReport;
  /** Step after which the gramians were carried densely (a factor passed 0.41·n columns), or null. */
  denseFrom: number | null;
} {
  const what = 'lowRankGramianFactors';
  checkSquareFinite(what, 'A', a);
  const n = a.rows;
  if (c.cols !== n) throw new Error(`${what}: C has ${c.cols} columns, A is ${n}×${n}`);
  checkFinite(what, 'C', c);
  let fb = asFactor(what, a, b, 'B');
  const ct = zeros(n, c.rows);
  for (let i = 0; i < c.rows; i++) for (let j = 0; j < n; j++) ct.data[j * c.rows + i] = c.data[i * n + j];
  let fc = asFactor(what, a, ct, 'Cᵀ');
  if (n === 0) return { controllability: zeros(0, 0), observability: zeros(0, 0), report: { iterations: 0, finalDistance: 0 }, denseFrom: null };
  const tol = options.compressionTolerance ?? Math.sqrt(Number.EPSILON);
  fb = compressFactor(fb.data, n, fb.cols, tol);
  fc = compressFactor(fc.data, n, fc.cols, tol);
  // Dense gramians once a factor's rank passes DENSE_RANK_FRACTION·n (see there); null until then.
  let dense: { p: Float64Array; q: Float64Array } | null = null;
  let steps = 0;
  let denseFrom: number | null = null;
  const report = signIteration(what, a, options, (inv, cs) => {
    steps++;
    if (!dense) {
      [fb, fc] = compressPair(expandFactor(n, fb, inv, false, cs), expandFactor(n, fc, inv, true, cs), n, tol);
      if (Math.max(fb.cols, fc.cols) > DENSE_RANK_FRACTION * n) {
        dense = { p: outerProduct(n, fb), q: outerProduct(n, fc) };
        denseFrom = steps;
      }
      return;
    }
    // P ← (c·P + A⁻¹·P·A⁻ᵀ/c)/2 and Q ← (c·Q + A⁻ᵀ·Q·A⁻¹/c)/2, the observability side with (A_kᵀ)⁻¹ = (A_k⁻¹)ᵀ.
    const tmp = sharedFloat64(n * n);
    gemm(false, false, n, n, n, 1, inv, 0, n, dense.p, 0, n, 0, tmp, 0, n);
    symmetricUpdate(n, tmp, inv, true, 0.5 / cs, 0.5 * cs, dense.p);
    gemm(true, false, n, n, n, 1, inv, 0, n, dense.q, 0, n, 0, tmp, 0, n);
    symmetricUpdate(n, tmp, inv, false, 0.5 / cs, 0.5 * cs, dense.q);
  });
  if (dense) {
    // X = lim P_k/2; factors of numerical rank by pivoted Cholesky, truncated like the compressions.
    const d: { p: Float64Array; q: Float64Array } = dense;
    const half = (x: Float64Array): Matrix => {
      const m = zeros(n, n);
      for (let i = 0; i < n; i++)
        for (let j = 0; j < n; j++) m.data[i * n + j] = 0.25 * (x[i * n + j] + x[j * n + i]);
      return m;
    };
    return { controllability: kernels().pivotedCholesky(half(d.p), tol), observability: kernels().pivotedCholesky(half(d.q), tol), report, denseFrom };
  }
  return { controllability: finishFactor(n, fb), observability: finishFactor(n, fc), report, denseFrom };
}

/**
 * Past this rank fraction a step of the factored iteration (two rank-revealing QRs, ≈ 6r²n level-2
 * flops each) costs more than the dense update of both gramians (four products, 8n³ level-3 flops);
 * the crossover r ≈ 0.41n follows from their measured speeds, ≈ 1 and ≈ 8 GFLOP/s here.
 */
const DENSE_RANK_FRACTION = 0.41;

/**
 * X ← β·X + α·T·op(M) for symmetric X and a symmetric product T·op(M) (op(M) = Mᵀ when `transposeM`):
 * only the block upper triangle is multiplied (about n³ instead of 2n³ flops), then mirrored.
 */
function symmetricUpdate(n: number, t: Float64Array, m: Float64Array, transposeM: boolean, alpha: number, beta: number, x: Float64Array): void {
  const nb = 128;
  for (let i0 = 0; i0 < n; i0 += nb) {
    const rows = Math.min(nb, n - i0);
    const cols = n - i0;
    // X[i0:i0+rows, i0:n] ← β·X + α·T[i0:i0+rows, :]·op(M)[:, i0:n]
    if (transposeM) gemm(false, true, rows, cols, n, alpha, t, i0 * n, n, m, i0 * n, n, beta, x, i0 * n + i0, n);
    else gemm(false, false, rows, cols, n, alpha, t, i0 * n, n, m, i0, n, beta, x, i0 * n + i0, n);
  }
  for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) x[i * n + j] = x[j * n + i];
}

function outerProduct(n: number, f: Factor): Float64Array {
  const x = sharedFloat64(n * n);
  gemm(false, true, n, n, f.cols, 1, f.data, 0, f.cols, f.data, 0, f.cols, 0, x, 0, n);
  return x;
}

/**
 * ‖A·X + X·Aᵀ + Q‖_F / ‖Q‖_F: the relative residual of a computed solution (0 when Q = 0 and the
 * residual is exactly 0; ‖A·X + X·Aᵀ‖_F itself when Q = 0 otherwise).
 */
export function lyapunovResidual(a: Matrix, x: Matrix, q: Matrix): number {
  const n = a.rows;
  if (a.cols !== n || x.rows !== n || x.cols !== n || q.rows !== n || q.cols !== n) {
    throw new Error(`lyapunovResidual: A, X and Q must all be ${n}×${n}`);
  }
  const r = new Float64Array(q.data);
  gemm(false, false, n, n, n, 1, a.data, 0, n, x.data, 0, n, 1, r, 0, n);
  gemm(false, true, n, n, n, 1, x.data, 0, n, a.data, 0, n, 1, r, 0, n);
  let rn = 0, qn = 0;
  for (let k = 0; k < n * n; k++) {
    rn += r[k] * r[k];
    qn += q.data[k] * q.data[k];
  }
  return qn > 0 ? Math.sqrt(rn / qn) : Math.sqrt(rn);
}
