/**
 * A few eigenvalues of a large sparse pencil A x = λ E x (E nonsingular, absent = identity) without
 * forming E⁻¹A or a dense n×n matrix.
 *
 *   krylovSchur       the Krylov–Schur method (G. W. Stewart, "A Krylov–Schur algorithm for large
 *                     eigenproblems", SIAM J. Matrix Anal. Appl. 23(3), 2001) for the eigenvalues of
 *                     largest priority (default largest |θ|) of a real operator given as a function:
 *                     Arnoldi expansion with classical Gram–Schmidt reorthogonalised once (Daniel, Gragg,
 *                     Kaufman & Stewart, Math. Comp. 30, 1976), real Schur form of the Rayleigh quotient
 *                     (`schur` of reduction/linalg), reordering so the wanted Ritz values come first
 *                     (`sortSchur`, Bai & Demmel 1993), locking of converged leading Schur vectors
 *                     (their coupling to the residual vector set to zero, Stewart 2001 §4) and restart by
 *                     truncating the Krylov–Schur decomposition.
 *   sparseEigs        shift-invert: the k eigenvalues nearest a shift σ, through one sparse LU of A − σE
 *                     (UMFPACK, `reduction/linalg/sparse.ts`) and the operator (A − σE)⁻¹E, whose
 *                     eigenvalues θ = 1/(λ − σ) are largest for the λ nearest σ. A complex σ keeps the
 *                     iteration real with the operator Re[(A − σE)⁻¹E] of B. N. Parlett & Y. Saad, "Complex
 *                     shift and invert strategies for real matrices", Linear Algebra Appl. 88/89, 1987
 *                     (one complex LU; the eigenvectors are those of the pencil, and each λ is recovered
 *                     from its vector by the Rayleigh quotient). The left side (yᴴA = λ yᴴE) is the same
 *                     iteration on the transposed pencil, with transposed solves on the same LU.
 *   fastestPole       the eigenvalue of largest |λ| by Krylov–Schur on E⁻¹A applied through sparse
 *                     products and solves with E (CHOLMOD for a symmetric positive definite E, UMFPACK
 *                     otherwise).
 *
 * Every eigenvalue is reported with its residual ‖A x − λ E x‖₂ / (‖A‖₁ ‖x‖₂), computed with the sparse
 * matrices themselves.
 */
import { ModelError } from '../errors';
import { type Matrix, type ComplexVector, zeros, schur, eig, gemm, sortSchur, schurBlocks, blockEigenvalue } from '../linalg/index';
import { SparseCholesky, SparseLu, type CscMatrix } from '../linalg/sparse';
import { throwIfStopped, type StopSignal } from '../stop';
import { checkFactorBudget } from './budget';
import { cscTimesVector, shiftPattern, shiftedValues } from './model';

/** The two sparse matrices of the pencil. */
export interface SparsePencil {
  readonly A: CscMatrix;
  readonly E?: CscMatrix;
}

export interface KrylovSchurOptions {
  /** Eigenvalues wanted (one more is taken when the last would split a complex pair). */
  readonly wanted: number;
  /** Largest basis size m (default max(2·wanted + 10, wanted + 20), at most n). */
  readonly basisSize?: number;
  /** A Ritz pair is converged when its Schur-vector residual is at most tolerance·|θ| (default 1e-10). */
  readonly tolerance?: number;
  /** Most restarts (default 300). */
  readonly maxRestarts?: number;
  /** Start vector (default a fixed pseudo-random one). */
  readonly start?: Float64Array;
  /** Which Ritz values are wanted first: larger is wanted more (default |θ|). */
  readonly priority?: (re: number, im: number) => number;
  /** Looked at before each operator application (StoppedError when set). */
  readonly signal?: StopSignal;
}

export interface KrylovSchurResult {
  /** Ritz values θ in the order of T's diagonal (highest priority first; pairs consecutive, Im > 0 first). */
  readonly values: ComplexVector;
  /** Orthonormal Schur basis: column j of the n×k matrix; its leading columns span the invariant subspace of the leading values. */
  readonly basis: Matrix;
  /** k×k quasi-upper-triangular T with op·basis = basis·T (+ the residual of the converged part). */
  readonly T: Matrix;
  /** True when `wanted` values reached the tolerance. */
  readonly converged: boolean;
  readonly restarts: number;
  readonly operatorApplications: number;
}

/** A deterministic start vector (a fixed pseudo-random sequence). */
export function pseudoRandomVector(n: number, seed = 0x2545f491): Float64Array {
  const v = new Float64Array(n);
  let s = seed >>> 0;
  for (let i = 0; i < n; i++) {
    s = (Math.imul(s ^ (s >>> 15), 0x2c1b3c6d) + 0x6d2b79f5) >>> 0;
    s = (s ^ (s >>> 13)) >>> 0;
    v[i] = s / 4294967296 - 0.5;
  }
  return v;
}

function norm2(x: Float64Array): number {
  let s = 0;
  for (let i = 0; i < x.length; i++) s += x[i] * x[i];
  return Math.sqrt(s);
}

/**
 * Orthogonalises w against rows 0..j of Vt (row-major, rows of length n) by classical Gram–Schmidt, repeated
 * once when the norm drops below 1/√2 of what it was (the criterion of Daniel, Gragg, Kaufman & Stewart
 * 1976), returning the coefficients (added to `h`) and ‖w‖ after.
 */
function orthogonalise(Vt: Float64Array, j: number, n: number, w: Float64Array, h: Float64Array): number {
  const c = new Float64Array(j + 1);
  let before = norm2(w);
  for (let pass = 0; pass < 3; pass++) {
    gemm(false, false, j + 1, 1, n, 1, Vt, 0, n, w, 0, 1, 0, c, 0, 1);
    gemm(true, false, n, 1, j + 1, -1, Vt, 0, n, c, 0, 1, 1, w, 0, 1);
    for (let i = 0; i <= j; i++) h[i] += c[i];
    const after = norm2(w);
    if (after > Math.SQRT1_2 * before) return after;
    before = after;
  }
  return norm2(w);
}

/** Krylov–Schur for the wanted eigenvalues of a real operator (see the file header). */
export function krylovSchur(op: (x: Float64Array) => Float64Array, n: number, options: KrylovSchurOptions): KrylovSchurResult {
  const wantedIn = options.wanted;
  if (!Number.isInteger(wantedIn) || wantedIn < 1) throw new ModelError('invalid_option', 'count', `the number of eigenvalues wanted must be a whole number ≥ 1, got ${wantedIn}`);
  const wanted = Math.min(wantedIn, n);
  const m = Math.min(n, Math.max(options.basisSize ?? Math.max(2 * wanted + 10, wanted + 20), wanted + 2));
  const tol = options.tolerance ?? 1e-10;
  const maxRestarts = options.maxRestarts ?? 300;
  const priority = options.priority ?? ((re: number, im: number) => Math.hypot(re, im));
  // Vt: rows v_0 … v_m; H: (m+1)×m, OP·V_m = V_{m+1}·H.
  const Vt = new Float64Array((m + 1) * n);
  let H = new Float64Array((m + 1) * m);
  const start = options.start ? Float64Array.from(options.start) : pseudoRandomVector(n);
  let s0 = norm2(start);
  if (!(s0 > 0)) {
    start.set(pseudoRandomVector(n));
    s0 = norm2(start);
  }
  for (let i = 0; i < n; i++) Vt[i] = start[i] / s0;
  let applications = 0;
  let locked = 0; // leading Schur vectors locked (converged)
  let p = 0; // current decomposition size (columns of H filled)
  let restarts = 0;
  let seed = 1;
  let converged = false;
  for (;;) {
    // Expand to m.
    for (let j = p; j < m; j++) {
      throwIfStopped(options.signal, 'the Krylov–Schur iteration');
      const w = Float64Array.from(op(Vt.slice(j * n, (j + 1) * n)));
      applications++;
      const h = new Float64Array(j + 1);
      const wn0 = norm2(w);
      let beta = orthogonalise(Vt, j, n, w, h);
      for (let i = 0; i <= j; i++) H[i * m + j] = h[i];
      if (!(beta > 1e-12 * Math.max(wn0, Number.MIN_VALUE))) {
        // An invariant subspace: continue with a new direction orthogonal to the basis (H's entry stays 0).
        const r = pseudoRandomVector(n, 0x9e3779b9 + seed++);
        const dummy = new Float64Array(j + 1);
        const rn = orthogonalise(Vt, j, n, r, dummy);
        for (let i = 0; i < n; i++) Vt[(j + 1) * n + i] = r[i] / rn;
        beta = 0;
      } else {
        for (let i = 0; i < n; i++) Vt[(j + 1) * n + i] = w[i] / beta;
      }
      H[(j + 1) * m + j] = beta;
    }
    // Schur form of the active part S[l..m, l..m], wanted Ritz values first.
    const l = locked, a = m - l;
    const S22 = zeros(a, a);
    for (let i = 0; i < a; i++) for (let j = 0; j < a; j++) S22.data[i * a + j] = H[(l + i) * m + l + j];
    const { T, Z } = schur(S22);
    sortSchur(T, Z, priority);
    // H[0..l, l..m] ← H[0..l, l..m]·Z;  H[l..m, l..m] ← T;  b[l..m] ← b[l..m]·Z.
    const tmp = new Float64Array(a);
    for (const row of [...Array.from({ length: l }, (_, i) => i), m]) {
      for (let j = 0; j < a; j++) {
        let s = 0;
        for (let k = 0; k < a; k++) s += H[row * m + l + k] * Z.data[k * a + j];
        tmp[j] = s;
      }
      for (let j = 0; j < a; j++) H[row * m + l + j] = tmp[j];
    }
    for (let i = 0; i < a; i++) for (let j = 0; j < a; j++) H[(l + i) * m + l + j] = T.data[i * a + j];
    // Convergence of the leading active Schur vectors, in order.
    const blocks = schurBlocks(T);
    let newlyLocked = 0;
    let stillLeading = true;
    for (const b of blocks) {
      const i = l + b.start;
      const theta = b.size === 1 ? Math.abs(T.data[b.start * a + b.start]) : Math.sqrt(Math.abs(T.data[b.start * a + b.start] ** 2 - T.data[b.start * a + b.start + 1] * T.data[(b.start + 1) * a + b.start]));
      const r = b.size === 1 ? Math.abs(H[m * m + i]) : Math.hypot(H[m * m + i], H[m * m + i + 1]);
      const rel = r / Math.max(theta, Number.MIN_VALUE);
      if (stillLeading && rel <= tol) newlyLocked += b.size;
      else stillLeading = false;
    }
    for (let i = l; i < l + newlyLocked; i++) H[m * m + i] = 0;
    locked = l + newlyLocked;
    // Enough converged: the wanted count without splitting a pair at the end.
    let enough = locked >= wanted;
    if (enough && locked < m) {
      // `wanted` must not cut a 2×2 block of the locked part.
      const lockedBlocks = schurBlocksOf(H, m, locked);
      let count = 0;
      for (const b of lockedBlocks) {
        count += b.size;
        if (count >= wanted) break;
      }
      enough = count <= locked;
    }
    if (enough || restarts >= maxRestarts || locked >= m - 1) {
      // The basis rows l..m follow H's transformation: Vt[l..m] ← Zᵀ·Vt[l..m].
      const rows = new Float64Array(a * n);
      gemm(true, false, a, n, a, 1, Z.data, 0, a, Vt, l * n, n, 0, rows, 0, n);
      Vt.set(rows, l * n);
      converged = enough;
      break;
    }
    // Restart: keep p columns (the locked ones and about half the active ones), not splitting a pair.
    let keep = Math.max(locked + 1, Math.min(m - 1, Math.max(wanted + 1, locked + Math.floor((m - locked) / 2))));
    {
      // The active blocks (in T, offset l) must not be cut: a 2×2 block starting at keep − 1 is kept whole.
      for (const b of blocks) {
        const s = l + b.start;
        if (b.size === 2 && s === keep - 1) {
          keep = keep + 1 <= m - 1 ? keep + 1 : keep - 1;
          break;
        }
      }
    }
    // New basis rows l..keep: Zᵀ[0..keep−l, :]·Vt[l..m];  v_keep ← v_m.
    const kk = keep - l;
    const newRows = new Float64Array(kk * n);
    gemm(true, false, kk, n, a, 1, Z.data, 0, a, Vt, l * n, n, 0, newRows, 0, n);
    Vt.set(newRows, l * n);
    Vt.copyWithin(keep * n, m * n, (m + 1) * n);
    const H2 = new Float64Array((m + 1) * m);
    for (let i = 0; i < keep; i++) for (let j = 0; j < keep; j++) H2[i * m + j] = H[i * m + j];
    for (let j = 0; j < keep; j++) H2[keep * m + j] = H[m * m + j];
    H = H2;
    p = keep;
    restarts++;
  }
  // The locked part when converged (else the whole sorted decomposition), sorted by priority once more,
  // then cut after `wanted` values without splitting a pair.
  const K = converged ? locked : m;
  const TK = zeros(K, K);
  for (let i = 0; i < K; i++) for (let j = 0; j < K; j++) TK.data[i * K + j] = H[i * m + j];
  const ZK = zeros(K, K);
  for (let i = 0; i < K; i++) ZK.data[i * K + i] = 1;
  sortSchur(TK, ZK, priority);
  let k = 0;
  for (const b of schurBlocks(TK)) {
    if (k >= wanted) break;
    k += b.size;
  }
  const Tk = zeros(k, k);
  for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) Tk.data[i * k + j] = TK.data[i * K + j];
  const values = eigenvaluesOfQuasiTriangular(Tk);
  const basisT = new Float64Array(k * n);
  gemm(true, false, k, n, K, 1, ZK.data, 0, K, Vt, 0, n, 0, basisT, 0, n);
  const basis = zeros(n, k);
  for (let j = 0; j < k; j++) for (let i = 0; i < n; i++) basis.data[i * k + j] = basisT[j * n + i];
  return { values, basis, T: Tk, converged, restarts, operatorApplications: applications };
}

/** Eigenvalues of a quasi-upper-triangular matrix in diagonal order (pairs: Im > 0 first). */
function eigenvaluesOfQuasiTriangular(T: Matrix): ComplexVector {
  const n = T.rows;
  const re = new Float64Array(n), im = new Float64Array(n);
  for (const b of schurBlocks(T)) {
    const e = blockEigenvalue(T, b.start, b.size);
    re[b.start] = e.re;
    im[b.start] = e.im;
    if (b.size === 2) {
      re[b.start + 1] = e.re;
      im[b.start + 1] = -e.im;
    }
  }
  return { re, im };
}

/** Diagonal blocks of the leading `size`×`size` part of H (row stride m). */
function schurBlocksOf(H: Float64Array, m: number, size: number): { start: number; size: 1 | 2 }[] {
  const out: { start: number; size: 1 | 2 }[] = [];
  for (let j = 0; j < size; ) {
    if (j + 1 < size && H[(j + 1) * m + j] !== 0) {
      out.push({ start: j, size: 2 });
      j += 2;
    } else {
      out.push({ start: j, size: 1 });
      j += 1;
    }
  }
  return out;
}

/** ‖A‖₁ of a sparse matrix (largest column sum of absolute values). */
export function cscNorm1(a: CscMatrix): number {
  let best = 0;
  for (let j = 0; j < a.n; j++) {
    let s = 0;
    for (let p = a.colPtr[j]; p < a.colPtr[j + 1]; p++) s += Math.abs(a.values[p]);
    best = Math.max(best, s);
  }
  return best;
}

/**
 * ‖A x − λ E x‖₂ / (‖A‖₁‖x‖₂) for x = xr + i·xi (xi null for a real pair); with `transpose`, for the
 * transposed pencil (left eigenvectors: Aᵀ y = λ Eᵀ y).
 */
export function eigenResidual(p: SparsePencil, re: number, im: number, xr: Float64Array, xi: Float64Array | null, transpose = false, normA = cscNorm1(p.A)): number {
  const E = p.E;
  const ar = cscTimesVector(p.A, xr, transpose);
  const er = E ? cscTimesVector(E, xr, transpose) : xr;
  let num = 0, den = 0;
  if (!xi) {
    for (let i = 0; i < xr.length; i++) {
      num += (ar[i] - re * er[i]) ** 2 + (im * er[i]) ** 2;
      den += xr[i] * xr[i];
    }
  } else {
    const ai = cscTimesVector(p.A, xi, transpose);
    const ei = E ? cscTimesVector(E, xi, transpose) : xi;
    for (let i = 0; i < xr.length; i++) {
      // (λ E x) = (re·er − im·ei) + i(re·ei + im·er)
      const rr = ar[i] - (re * er[i] - im * ei[i]);
      const ri = ai[i] - (re * ei[i] + im * er[i]);
      num += rr * rr + ri * ri;
      den += xr[i] * xr[i] + xi[i] * xi[i];
    }
  }
  return Math.sqrt(num) / (Math.max(normA, Number.MIN_VALUE) * Math.sqrt(den));
}

/**
 * The factorization of A − σE on the union pattern of A and E, real for a real σ and complex otherwise, and
 * the shift-invert operators it gives. `dispose()` frees it.
 */
export class ShiftInvert {
  private readonly lu: SparseLu;
  readonly complex: boolean;
  constructor(
    readonly pencil: SparsePencil,
    readonly shift: { re: number; im: number },
    memoryBudgetBytes = Infinity,
  ) {
    const sp = shiftPattern(pencil.A, pencil.E);
    const { values, imag } = shiftedValues(sp, shift.re, shift.im);
    this.complex = imag !== null;
    const label = `A − (${shift.re}${this.complex ? ` + ${shift.im}i` : ''})·E`;
    this.lu = SparseLu.analyze({ ...sp.pattern, values, imag: imag ?? undefined }, label);
    checkFactorBudget(this.lu, memoryBudgetBytes, label);
    try {
      this.lu.factor(values, imag);
    } catch (e) {
      this.lu.dispose();
      if ((e as { code?: string }).code === 'singular') {
        throw new ModelError('invalid_option', 'shift', `${label} is singular: the shift is an eigenvalue of the model; move it`);
      }
      throw e;
    }
  }

  /** (A − σE)⁻¹·x (complex result for a complex σ; im null for a real one). */
  solve(x: Float64Array, transpose = false, xi: Float64Array | null = null): { re: Float64Array; im: Float64Array | null } {
    if (!this.complex && !xi) return { re: this.lu.solve(x, { transpose }), im: null };
    if (!this.complex) {
      return { re: this.lu.solve(x, { transpose }), im: this.lu.solve(xi!, { transpose }) };
    }
    return this.lu.solveComplex(x, xi, { transpose });
  }

  /** The real shift-invert operator: (A − σE)⁻¹E x, or Re[(A − σE)⁻¹E x] for a complex σ; transposed: (A − σE)⁻ᵀEᵀ x. */
  operator(transpose: boolean): (x: Float64Array) => Float64Array {
    const E = this.pencil.E;
    return (x) => this.solve(E ? cscTimesVector(E, x, transpose) : x, transpose).re;
  }

  dispose(): void {
    this.lu.dispose();
  }
}

export interface SparseEigsOptions {
  /** How many eigenvalues nearest the shift (one more when the last would split a complex pair). */
  readonly count: number;
  /** σ (default 0). */
  readonly shift?: { readonly re: number; readonly im: number };
  /** 'right' (A x = λ E x, default) or 'left' (yᴴ A = λ yᴴ E, computed as Aᵀ ȳ = λ Eᵀ ȳ). */
  readonly side?: 'right' | 'left';
  readonly tolerance?: number;
  readonly basisSize?: number;
  readonly maxRestarts?: number;
  readonly memoryBudgetBytes?: number;
  /** A factorization of A − σE to reuse (it is not disposed); its shift replaces `shift`. */
  readonly factorization?: ShiftInvert;
  readonly signal?: StopSignal;
}

export interface SparseEigsResult {
  /** λ, nearest the shift first; a complex pair consecutive with Im > 0 first. */
  readonly values: ComplexVector;
  /**
   * Eigenvectors (n×k, real packed as `eig` of reduction/linalg: a pair's columns hold the real and
   * imaginary parts of the vector of the member with Im > 0), unit 2-norm. For side 'left' these are the
   * vectors ȳ of the transposed pencil, Aᵀ ȳ = λ Eᵀ ȳ.
   */
  readonly vectors: Matrix;
  /** Orthonormal n×k basis whose leading j columns span the invariant subspace of the first j eigenvalues (no pair split). */
  readonly schurBasis: Matrix;
  /** ‖A x − λ E x‖₂ / (‖A‖₁‖x‖₂) per eigenvalue (transposed pencil for 'left'). */
  readonly residuals: Float64Array;
  readonly converged: boolean;
  readonly restarts: number;
  readonly solves: number;
  readonly shift: { readonly re: number; readonly im: number };
  readonly side: 'right' | 'left';
}

/** Eigenvectors of a quasi-triangular T (k×k) in packed form, and the basis times them, normalised. */
function ritzVectors(basis: Matrix, T: Matrix): { values: ComplexVector; vectors: Matrix } {
  const k = T.rows, n = basis.rows;
  const { values, vectors } = eig(T);
  const X = zeros(n, k);
  gemm(false, false, n, k, k, 1, basis.data, 0, k, vectors.data, 0, k, 0, X.data, 0, k);
  // Unit 2-norm (a pair's two columns together).
  for (let j = 0; j < k; j++) {
    const pair = values.im[j] !== 0 && j + 1 < k;
    let s = 0;
    for (let i = 0; i < n; i++) s += X.data[i * k + j] ** 2 + (pair ? X.data[i * k + j + 1] ** 2 : 0);
    const f = 1 / Math.sqrt(s);
    for (let i = 0; i < n; i++) {
      X.data[i * k + j] *= f;
      if (pair) X.data[i * k + j + 1] *= f;
    }
    if (pair) j++;
  }
  return { values, vectors: X };
}

function column(M: Matrix, j: number): Float64Array {
  const v = new Float64Array(M.rows);
  for (let i = 0; i < M.rows; i++) v[i] = M.data[i * M.cols + j];
  return v;
}

/** Rayleigh quotient λ = (Ex)ᴴ(Ax)/‖Ex‖² of the pencil for x = xr + i·xi (least-squares eigenvalue of the vector). */
function rayleighQuotient(p: SparsePencil, xr: Float64Array, xi: Float64Array | null, transpose: boolean): { re: number; im: number } {
  const ar = cscTimesVector(p.A, xr, transpose), er = p.E ? cscTimesVector(p.E, xr, transpose) : xr;
  const ai = xi ? cscTimesVector(p.A, xi, transpose) : null, ei = xi ? (p.E ? cscTimesVector(p.E, xi, transpose) : xi) : null;
  let nr = 0, ni = 0, d = 0;
  for (let i = 0; i < xr.length; i++) {
    const a_r = ar[i], a_i = ai ? ai[i] : 0, e_r = er[i], e_i = ei ? ei[i] : 0;
    // conj(e)·a
    nr += e_r * a_r + e_i * a_i;
    ni += e_r * a_i - e_i * a_r;
    d += e_r * e_r + e_i * e_i;
  }
  return { re: nr / d, im: ni / d };
}

/** The `count` eigenvalues of A x = λ E x nearest the shift, by shift-invert Krylov–Schur (see the file header). */
export function sparseEigs(pencil: SparsePencil, options: SparseEigsOptions): SparseEigsResult {
  const n = pencil.A.n;
  const side = options.side ?? 'right';
  const transpose = side === 'left';
  const own = options.factorization ? null : new ShiftInvert(pencil, options.shift ?? { re: 0, im: 0 }, options.memoryBudgetBytes);
  const si = options.factorization ?? own!;
  const sigma = si.shift;
  try {
    const ks = krylovSchur(si.operator(transpose), n, {
      wanted: options.count,
      tolerance: options.tolerance,
      basisSize: options.basisSize,
      maxRestarts: options.maxRestarts,
      signal: options.signal,
    });
    const { values: theta, vectors } = ritzVectors(ks.basis, ks.T);
    const k = theta.re.length;
    const re = new Float64Array(k), im = new Float64Array(k);
    const normA = cscNorm1(pencil.A);
    const residuals = new Float64Array(k);
    for (let j = 0; j < k; j++) {
      const pair = theta.im[j] !== 0 && j + 1 < k;
      const xr = column(vectors, j), xi = pair ? column(vectors, j + 1) : null;
      let lam: { re: number; im: number };
      if (si.complex) lam = rayleighQuotient(pencil, xr, xi, transpose);
      else {
        // λ = σ + 1/θ for the vector of θ (θ = a + ib gives λ with Im λ = −b/|θ|²).
        const d = theta.re[j] ** 2 + theta.im[j] ** 2;
        lam = { re: sigma.re + theta.re[j] / d, im: -theta.im[j] / d };
      }
      if (pair && lam.im < 0) {
        // The packed columns hold the vector of λ̄ with Im > 0 once the imaginary part is negated.
        for (let i = 0; i < n; i++) vectors.data[i * k + j + 1] = -vectors.data[i * k + j + 1];
        lam = { re: lam.re, im: -lam.im };
        xi!.forEach((v, i) => (xi![i] = -v));
      }
      if (!pair) lam = { re: lam.re, im: 0 };
      re[j] = lam.re;
      im[j] = lam.im;
      residuals[j] = eigenResidual(pencil, lam.re, lam.im, xr, xi, transpose, normA);
      if (pair) {
        re[j + 1] = lam.re;
        im[j + 1] = -lam.im;
        residuals[j + 1] = residuals[j];
        j++;
      }
    }
    return {
      values: { re, im },
      vectors,
      schurBasis: ks.basis,
      residuals,
      converged: ks.converged,
      restarts: ks.restarts,
      solves: ks.operatorApplications,
      shift: sigma,
      side,
    };
  } finally {
    own?.dispose();
  }
}

export interface FastestPoleResult {
  /** The eigenvalue of largest |λ| (a pair: the member with Im ≥ 0). */
  readonly re: number;
  readonly im: number;
  /** ‖A x − λ E x‖₂ / (‖A‖₁‖x‖₂). */
  readonly residual: number;
  readonly converged: boolean;
  readonly restarts: number;
  readonly operatorApplications: number;
  /** How E⁻¹ was applied: 'identity', 'cholesky' (CHOLMOD) or 'lu' (UMFPACK). */
  readonly solver: 'identity' | 'cholesky' | 'lu';
}

/** Whether A = Aᵀ exactly (pattern and values). */
export function isSymmetric(a: CscMatrix): boolean {
  const { n, colPtr, rowIndex, values } = a;
  // Entry (i, j) against (j, i) by binary search in column i (rows sorted).
  for (let j = 0; j < n; j++) {
    for (let p = colPtr[j]; p < colPtr[j + 1]; p++) {
      const i = rowIndex[p];
      let lo = colPtr[i], hi = colPtr[i + 1] - 1, found = false;
      while (lo <= hi) {
        const mid = (lo + hi) >> 1;
        if (rowIndex[mid] === j) {
          found = values[mid] === values[p];
          break;
        }
        if (rowIndex[mid] < j) lo = mid + 1;
        else hi = mid - 1;
      }
      if (!found) return false;
    }
  }
  return true;
}

/**
 * The fastest pole, largest |λ| of A x = λ E x, by Krylov–Schur on E⁻¹A through products with A and solves
 * with E. Its Ritz value converges slowly when the top of the spectrum is clustered (a fine mesh), so the
 * default tolerance is looser (1e-6 relative Ritz residual: the step limits and the stiffness ratio need a
 * few digits; for a symmetric pencil the eigenvalue's error is of the order of its square) and the residual
 * is reported.
 */
export function fastestPole(
  pencil: SparsePencil,
  options: { tolerance?: number; basisSize?: number; maxRestarts?: number; memoryBudgetBytes?: number; signal?: StopSignal } = {},
): FastestPoleResult {
  const { A, E } = pencil;
  const n = A.n;
  let solve: (x: Float64Array) => Float64Array = (x) => x;
  let solver: FastestPoleResult['solver'] = 'identity';
  let chol: SparseCholesky | null = null;
  let lu: SparseLu | null = null;
  try {
    if (E) {
      if (isSymmetric(E)) {
        try {
          chol = new SparseCholesky(E, 'E');
          solver = 'cholesky';
          solve = (x) => chol!.solve(x);
        } catch {
          chol = null; // not positive definite: LU below
        }
      }
      if (!chol) {
        lu = SparseLu.analyze(E, 'E');
        checkFactorBudget(lu, options.memoryBudgetBytes ?? Infinity, 'E');
        try {
          lu.factor();
        } catch (e) {
          lu.dispose();
          lu = null;
          if ((e as { code?: string }).code === 'singular') throw new ModelError('singular_mass', 'E', 'E is singular: the descriptor matrix must be nonsingular');
          throw e;
        }
        solver = 'lu';
        solve = (x) => lu!.solve(x);
      }
    }
    const op = (x: Float64Array) => solve(cscTimesVector(A, x));
    const ks = krylovSchur(op, n, {
      wanted: 1,
      tolerance: options.tolerance ?? 1e-6,
      basisSize: options.basisSize ?? 40,
      maxRestarts: options.maxRestarts ?? 40,
      signal: options.signal,
    });
    const { values, vectors } = ritzVectors(ks.basis, ks.T);
    const pair = values.im[0] !== 0 && vectors.cols > 1;
    const xr = column(vectors, 0), xi = pair ? column(vectors, 1) : null;
    const re = values.re[0], im = Math.abs(values.im[0]);
    if (xi && values.im[0] < 0) xi.forEach((v, i) => (xi[i] = -v));
    return {
      re,
      im,
      residual: eigenResidual(pencil, re, im, xr, xi),
      converged: ks.converged,
      restarts: ks.restarts,
      operatorApplications: ks.operatorApplications,
      solver,
    };
  } finally {
    chol?.dispose();
    lu?.dispose();
  }
}
