/**
 * Sparse direct solvers from SuiteSparse through the native addon (`reduction/native/src/sparse.cc`):
 *
 *   SparseLu        UMFPACK (T. A. Davis, "Algorithm 832: UMFPACK V4.3, an unsymmetric-pattern
 *                   multifrontal method", ACM TOMS 30(2), 2004), real or complex; the symbolic analysis
 *                   (ordering, fill and memory estimates) is kept, so new values on the same pattern —
 *                   a shifted matrix A − σE for every ADI shift or frequency — cost only a numeric
 *                   factorization.
 *   SparseCholesky  CHOLMOD (Y. Chen, T. A. Davis, W. W. Hager & S. Rajamanickam, "Algorithm 887:
 *                   CHOLMOD, supernodal sparse Cholesky factorization and update/downdate", ACM TOMS
 *                   35(3), 2008) for symmetric positive definite matrices (mass and stiffness matrices).
 *   amdOrdering     AMD (P. R. Amestoy, T. A. Davis & I. S. Duff, "An approximate minimum degree ordering
 *                   algorithm", SIAM J. Matrix Anal. Appl. 17(4), 1996).
 *
 * Matrices are in compressed sparse column form with 0-based Int32 indices. There is no portable
 * implementation: these need the native backend, and say so when it is not built.
 */
import { nativeAddon, type NativeAddon, type UmfpackSymbolicInfo, type UmfpackNumericInfo, type CholmodInfo } from './native';

export interface CscMatrix {
  readonly n: number;
  readonly colPtr: Int32Array;
  readonly rowIndex: Int32Array;
  readonly values: Float64Array;
  /** Imaginary parts, for a complex matrix. */
  readonly imag?: Float64Array;
}

function addon(what: string): NativeAddon {
  const a = nativeAddon();
  if (!a.addon) throw new Error(`${what} needs the native backend (npm run build:native): ${a.error}`);
  return a.addon;
}

/** Rethrows a native error with its code, prefixed by the operation. */
function native<T>(what: string, f: () => T): T {
  try {
    return f();
  } catch (e) {
    const err = e as Error & { code?: string };
    const out = new Error(`${what}: ${err.message}`) as Error & { code?: string };
    out.code = err.code;
    throw out;
  }
}

/** UMFPACK LU of one sparsity pattern; `factor` may be called again with new values on the same pattern. */
export class SparseLu {
  private readonly lib: NativeAddon;
  private symbolic: unknown;
  private numeric: unknown = null;
  private current: { values: Float64Array; imag: Float64Array | null } | null = null;
  readonly analysis: UmfpackSymbolicInfo;
  factorInfo: UmfpackNumericInfo | null = null;

  private constructor(
    readonly pattern: CscMatrix,
    readonly name: string,
  ) {
    this.lib = addon('sparse LU');
    const [sym, info] = native(`sparse LU of ${name}`, () =>
      this.lib.umfpackSymbolic(pattern.n, pattern.colPtr, pattern.rowIndex, pattern.values, pattern.imag ?? null, name),
    );
    this.symbolic = sym;
    this.analysis = info;
  }

  /** Symbolic analysis of the pattern (and its values, which UMFPACK uses for its pivoting strategy). */
  static analyze(a: CscMatrix, name = 'matrix'): SparseLu {
    return new SparseLu(a, name);
  }

  /** Numeric factorization of new values on the analysed pattern (complex when `imag` is given and the analysis was complex). */
  factor(values: Float64Array = this.pattern.values, imag: Float64Array | null = this.pattern.imag ?? null): UmfpackNumericInfo {
    if (this.numeric) this.lib.umfpackFree(this.numeric);
    this.numeric = null;
    const [num, info] = native(`sparse LU of ${this.name}`, () =>
      this.lib.umfpackNumeric(this.symbolic, this.pattern.n, this.pattern.colPtr, this.pattern.rowIndex, values, imag, this.name),
    );
    this.numeric = num;
    this.current = { values, imag };
    this.factorInfo = info;
    return info;
  }

  /**
   * A numeric factorization of new (real) values on the analysed pattern, kept apart from the one `factor`
   * makes: several may live at once on one analysis (one per shift or step size, say), each freed by its
   * own `dispose`. `values` is kept by the factor (UMFPACK's iterative refinement reads the matrix).
   */
  factorApart(values: Float64Array): SparseLuFactor {
    if (!this.symbolic) throw new Error(`sparse LU of ${this.name}: the analysis was freed`);
    const [num, info] = native(`sparse LU of ${this.name}`, () =>
      this.lib.umfpackNumeric(this.symbolic, this.pattern.n, this.pattern.colPtr, this.pattern.rowIndex, values, null, this.name),
    );
    return new SparseLuFactor(this.lib, this.pattern, this.name, values, num, info);
  }

  /** x with A·x = b (or Aᵀ·x = b), real factorization. */
  solve(b: Float64Array, options: { transpose?: boolean } = {}): Float64Array {
    const { values } = this.requireFactor();
    const x = new Float64Array(this.pattern.n);
    native(`sparse solve with ${this.name}`, () =>
      this.lib.umfpackSolve(this.numeric, this.pattern.n, this.pattern.colPtr, this.pattern.rowIndex, values, null, b, null, x, null, options.transpose ?? false),
    );
    return x;
  }

  /** x with A·x = b for a complex factorization (b may be real: pass null for its imaginary part). */
  solveComplex(bRe: Float64Array, bIm: Float64Array | null, options: { transpose?: boolean } = {}): { re: Float64Array; im: Float64Array } {
    const { values, imag } = this.requireFactor();
    const re = new Float64Array(this.pattern.n), im = new Float64Array(this.pattern.n);
    native(`sparse solve with ${this.name}`, () =>
      this.lib.umfpackSolve(this.numeric, this.pattern.n, this.pattern.colPtr, this.pattern.rowIndex, values, imag, bRe, bIm, re, im, options.transpose ?? false),
    );
    return { re, im };
  }

  /**
   * The frequency sweep on this (complex) analysis of A − iωE's pattern: for each ω, −C (A − iωE)⁻¹ B into
   * `re`/`im` as [frequency][p][m], each frequency factored anew by one of `threads` native threads sharing
   * the analysis (reduction/native/src/sparse.cc umfpackSweep). `aValues` and `eValues` are A and E on the
   * analysed pattern; B is n×m and C p×n, row-major. Leaves this object's own factorization alone.
   */
  sweep(
    aValues: Float64Array, eValues: Float64Array, frequencies: Float64Array,
    b: { data: Float64Array; cols: number }, c: { data: Float64Array; rows: number },
    out: { re: Float64Array; im: Float64Array }, threads: number,
  ): void {
    if (!this.symbolic) throw new Error(`frequency sweep of ${this.name}: the analysis was freed`);
    const { n, colPtr, rowIndex } = this.pattern;
    native(`frequency sweep of ${this.name}`, () =>
      this.lib.umfpackSweep(this.symbolic, n, colPtr, rowIndex, aValues, eValues, frequencies, b.data, b.cols, c.data, c.rows, out.re, out.im, threads, this.name),
    );
  }

  /**
   * For each shift σⱼ (real for a real analysis, complex for a complex one), x = (A − σⱼE)⁻¹ fⱼ and
   * y = (A − σⱼE)⁻ᵀ gⱼ (the plain transpose), with `aValues` and `eValues` A and E on the analysed pattern;
   * each shift factored anew by one of `threads` native threads sharing the analysis (reduction/native/src/
   * sparse.cc umfpackShiftedSolves). Blocks of n entries, shift after shift; the imaginary parts are used
   * for a complex analysis only. Leaves this object's own factorization alone.
   */
  shiftedSolves(
    aValues: Float64Array, eValues: Float64Array, shifts: readonly { re: number; im: number }[],
    f: { re: Float64Array; im: Float64Array | null }, g: { re: Float64Array; im: Float64Array | null }, threads: number,
  ): { x: { re: Float64Array; im: Float64Array | null }; y: { re: Float64Array; im: Float64Array | null } } {
    if (!this.symbolic) throw new Error(`shifted solves with ${this.name}: the analysis was freed`);
    const { n, colPtr, rowIndex } = this.pattern;
    const size = shifts.length * n;
    const complex = this.pattern.imag !== undefined;
    const x = { re: new Float64Array(size), im: complex ? new Float64Array(size) : null };
    const y = { re: new Float64Array(size), im: complex ? new Float64Array(size) : null };
    native(`shifted solves with ${this.name}`, () =>
      this.lib.umfpackShiftedSolves(
        this.symbolic, n, colPtr, rowIndex, aValues, eValues,
        Float64Array.from(shifts, (p) => p.re), Float64Array.from(shifts, (p) => p.im),
        f.re, f.im, g.re, g.im, x.re, x.im, y.re, y.im, threads, this.name,
      ),
    );
    return { x, y };
  }

  /** Frees the factorization and the analysis now (the garbage collector would, later). */
  dispose(): void {
    if (this.numeric) this.lib.umfpackFree(this.numeric);
    if (this.symbolic) this.lib.umfpackFree(this.symbolic);
    this.numeric = null;
    this.symbolic = null;
  }

  private requireFactor(): { values: Float64Array; imag: Float64Array | null } {
    if (!this.numeric || !this.current) throw new Error(`sparse solve with ${this.name}: call factor() first`);
    return this.current;
  }
}

/** One real numeric factorization made by `SparseLu.factorApart`; independent of the analysis once made. */
export class SparseLuFactor {
  private numeric: unknown;

  constructor(
    private readonly lib: NativeAddon,
    private readonly pattern: CscMatrix,
    private readonly name: string,
    private readonly values: Float64Array,
    numeric: unknown,
    readonly info: UmfpackNumericInfo,
  ) {
    this.numeric = numeric;
  }

  /** x with A·x = b, written into `out` (a new array when not given; it must not be `b`). */
  solve(b: Float64Array, out: Float64Array = new Float64Array(this.pattern.n)): Float64Array {
    if (!this.numeric) throw new Error(`sparse solve with ${this.name}: the factorization was freed`);
    const { n, colPtr, rowIndex } = this.pattern;
    native(`sparse solve with ${this.name}`, () => this.lib.umfpackSolve(this.numeric, n, colPtr, rowIndex, this.values, null, b, null, out, null, false));
    return out;
  }

  dispose(): void {
    if (this.numeric) this.lib.umfpackFree(this.numeric);
    this.numeric = null;
  }
}

/** CHOLMOD Cholesky factorization A = L·Lᵀ of a symmetric positive definite matrix (its lower triangle is read). */
export class SparseCholesky {
  private readonly lib: NativeAddon;
  private handle: unknown;
  readonly info: CholmodInfo;

  constructor(
    readonly matrix: CscMatrix,
    readonly name = 'matrix',
  ) {
    this.lib = addon('sparse Cholesky');
    const [h, info] = native(`sparse Cholesky of ${name}`, () => this.lib.cholmodFactor(matrix.n, matrix.colPtr, matrix.rowIndex, matrix.values, null, name));
    this.handle = h;
    this.info = info;
  }

  /** X with A·X = B for B n×k stored column by column (k = b.length / n). */
  solve(b: Float64Array): Float64Array {
    const n = this.matrix.n;
    if (b.length % n !== 0) throw new Error(`sparse Cholesky solve with ${this.name}: right-hand side length ${b.length} is not a multiple of ${n}`);
    const x = new Float64Array(b.length);
    native(`sparse Cholesky solve with ${this.name}`, () => this.lib.cholmodSolve(this.handle, b, x, b.length / n));
    return x;
  }

  dispose(): void {
    if (this.handle) this.lib.cholmodFree(this.handle);
    this.handle = null;
  }
}

/** A fill-reducing symmetric ordering of A + Aᵀ (AMD), with the predicted nonzeros of L and flop count. */
export function amdOrdering(a: Pick<CscMatrix, 'n' | 'colPtr' | 'rowIndex'>): { perm: Int32Array; lnz: number; flops: number } {
  const perm = new Int32Array(a.n);
  const r = native('AMD ordering', () => addon('AMD ordering').amdOrder(a.n, a.colPtr, a.rowIndex, perm));
  return { perm, lnz: r.lnz, flops: r.flops };
}

