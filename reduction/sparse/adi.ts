/**
 * Low-rank ADI for the gramians of a large sparse model E ẋ = A x + B u, y = C x:
 *
 *   controllability   A P Eᵀ + E P Aᵀ + B Bᵀ = 0,    P ≈ Zc Zcᵀ
 *   observability     Aᵀ Q E + Eᵀ Q A + Cᵀ C = 0,    Q ≈ Zo Zoᵀ
 *
 * The low-rank ADI iteration (T. Penzl, "A cyclic low-rank Smith method for large sparse Lyapunov
 * equations", SIAM J. Sci. Comput. 21(4), 2000; J.-R. Li & J. White, "Low rank solution of Lyapunov
 * equations", SIAM J. Matrix Anal. Appl. 24(1), 2002) in its residual-factor form with real arithmetic
 * for complex-conjugate shift pairs (P. Benner, P. Kürschner & J. Saak, "Efficient handling of complex
 * shift parameters in the low-rank ADI method", Numer. Algorithms 62, 2013):
 *
 *   W₀ = B;  real shift p:   V = (A + pE)⁻¹ W,  W ← W − 2p·E V,  Z ← [Z, √(−2p)·V]
 *            pair p, p̄:       V = (A + pE)⁻¹ W (complex), γ = 2√(−Re p), δ = Re p / Im p,
 *                             W ← W + γ²·E (Re V + δ Im V),  Z ← [Z, γ(Re V + δ Im V), γ√(δ²+1)·Im V]
 *
 * so the residual of the current Z is exactly W Wᵀ and the iteration stops when the normalised residual
 * ‖W‖₂² / ‖B‖₂² is at most the tolerance (default 1e-10). The observability equation is the same
 * iteration on (Aᵀ, Eᵀ, Cᵀ): transposed solves with the same factorizations.
 *
 * Shifts by Penzl's heuristic (Penzl 2000, Algorithm 5.1): Ritz values of E⁻¹A (Arnoldi, k₊ steps) and
 * reciprocals of the Ritz values of A⁻¹E (k₋ steps), each operator applied through sparse solves (E⁻¹A is
 * never formed), then l₀ shifts chosen greedily from them to make max |∏ (t − pⱼ)/(t + pⱼ)| small over
 * the candidates t. A is assumed stable (Re λ(E⁻¹A) < 0); Ritz values in the closed right half-plane are
 * dropped, and the model refused when none remain.
 *
 * When a whole pass over Penzl's shifts lowers the residual by less than a factor 100 (lightly damped,
 * oscillating models such as structures, whose poles lie along the imaginary axis far from Penzl's few
 * shifts), the iteration goes on with self-generating projection shifts (P. Benner, P. Kürschner & J. Saak,
 * "Self-generating and efficient shift parameters in ADI methods for large Lyapunov and Sylvester
 * equations", ETNA 43, 2014, §4.1): the eigenvalues of the pencil (UᵀAU, UᵀEU), U an orthonormal basis of
 * the most recent factor columns (up to 32 of each equation), those in the right half-plane mirrored
 * into the left one; each pass makes the next pass's shifts. These shifts are used once each, so their
 * factorizations are not kept.
 *
 * Factorizations: A + pE is written on the union pattern of A and E (`shiftPattern`), one numeric UMFPACK
 * factorization per distinct shift, used by both equations (the two iterations run in lockstep) and kept
 * for the next cycle when the estimated memory allows (`cacheBudgetBytes`); otherwise each use refactors
 * numerically on one kept symbolic analysis.
 */
import { ModelError } from '../errors';
import { throwIfStopped, type StopSignal } from '../stop';
import { type Matrix, zeros, eigenvalues, solve, symmetricEigenvalues } from '../linalg/index';
import { SparseLu, type CscMatrix } from '../linalg/sparse';
import { checkFactorBudget } from './budget';
import { cscTimesVector, shiftPattern, shiftedValues, type ShiftPattern, type SparseStateSpaceModel } from './model';

export interface Shift {
  readonly re: number;
  /** ≥ 0; a shift with im > 0 stands for the pair p, p̄. */
  readonly im: number;
}

export interface AdiOptions {
  /** Normalised residual ‖W‖²/‖B‖² to reach (default 1e-10). */
  readonly tolerance?: number;
  /** Most ADI steps per equation (a complex pair counts as two; default 300). */
  readonly maxIterations?: number;
  /** Shifts to use instead of Penzl's heuristic (used cyclically, never replaced by projection shifts). */
  readonly shifts?: readonly Shift[];
  /** Go on with projection shifts when a pass over Penzl's shifts gains less than a factor 100 (default true). */
  readonly projectionShifts?: boolean;
  /** Arnoldi steps on E⁻¹A, on A⁻¹E and the number of shifts (Penzl's k₊, k₋, l₀; default 30, 20, 16). */
  readonly arnoldiSteps?: number;
  readonly inverseArnoldiSteps?: number;
  readonly shiftCount?: number;
  /** Memory for keeping one factorization per distinct shift (default 1 GiB); past it, each use refactors. */
  readonly cacheBudgetBytes?: number;
  /** Memory budget in bytes for each sparse factorization plus those held (default unlimited; see budget.ts). */
  readonly memoryBudgetBytes?: number;
  /** Which equations to solve (default both). */
  readonly equations?: readonly ('controllability' | 'observability')[];
  /** Looked at before each ADI step; when set, the iteration throws StoppedError (../stop.ts). */
  readonly signal?: StopSignal;
  /** Called after each step of each equation with its step count (a pair counts two) and normalised residual. */
  readonly onStep?: (step: AdiStep) => void;
}

/** One ADI step as `onStep` reports it. */
export interface AdiStep {
  readonly equation: 'controllability' | 'observability';
  /** steps made so far on this equation (a complex pair counts as two) */
  readonly step: number;
  /** the most it will make (maxIterations); it stops earlier at the tolerance */
  readonly maxSteps: number;
  /** ‖W‖₂²/‖B‖₂² after this step */
  readonly residual: number;
  readonly tolerance: number;
}

export interface AdiFactor {
  /** n×k factor: P ≈ Z Zᵀ (controllability) or Q ≈ Z Zᵀ (observability). */
  readonly Z: Matrix;
  readonly iterations: number;
  /** ‖W‖₂²/‖B‖₂² after each step (the normalised residual of the Lyapunov equation, exactly). */
  readonly residualHistory: readonly number[];
  readonly residual: number;
  readonly converged: boolean;
}

export interface AdiResult {
  readonly controllability?: AdiFactor;
  readonly observability?: AdiFactor;
  /** Every shift used: Penzl's (or the given ones), then any projection shifts in the order made. */
  readonly shifts: readonly Shift[];
  /** Numeric factorizations made, and symbolic analyses made. */
  readonly factorizations: number;
  readonly analyses: number;
  readonly seconds: number;
  /**
   * Decay rates −Re λ of the slowest and fastest stable Ritz values behind the shifts (absent when the shifts
   * were given): estimates of the model's slowest and fastest poles (the slowest converges fast through the
   * solves with A; the fastest is a Ritz value of E⁻¹A, for a normal E⁻¹A inside the spectrum).
   */
  readonly ritzDecayRates?: { readonly slowest: number; readonly fastest: number };
  readonly notes: readonly string[];
}

/** Runs a numeric factorization, turning UMFPACK's "singular" into a ModelError naming the model's matrix. */
function factorOrRefuse(lu: SparseLu, values: Float64Array | undefined, imag: Float64Array | null | undefined, field: 'A' | 'E', message: string): void {
  try {
    if (values === undefined) lu.factor();
    else lu.factor(values, imag ?? null);
  } catch (e) {
    if ((e as { code?: string }).code === 'singular') {
      lu.dispose();
      throw new ModelError(field === 'E' ? 'singular_mass' : 'unstable', field, message);
    }
    throw e;
  }
}

/** A + pE factorizations for the shifts, on the union pattern. */
class ShiftedSolvers {
  private readonly cache = new Map<string, SparseLu>();
  private shared: { real: SparseLu | null; complex: SparseLu | null; key: { real: string; complex: string } } = {
    real: null,
    complex: null,
    key: { real: '', complex: '' },
  };
  factorizations = 0;
  analyses = 0;
  private caching = true;
  private cachedBytes = 0;

  constructor(
    private readonly sp: ShiftPattern,
    private readonly budget: number,
    private readonly memoryBudget: number,
  ) {}

  private analyze(values: Float64Array, imag: Float64Array | null, label: string): SparseLu {
    const lu = SparseLu.analyze({ ...this.sp.pattern, values, imag: imag ?? undefined }, label);
    this.analyses++;
    checkFactorBudget(lu, this.memoryBudget, label, this.cachedBytes);
    return lu;
  }

  /** The factorization of A + pE; `keep` false for a shift used once (not cached, refactored on a shared analysis). */
  get(p: Shift, keep = true): SparseLu {
    const key = `${p.re}:${p.im}`;
    const hit = this.cache.get(key);
    if (hit) return hit;
    const { values, imag } = shiftedValues(this.sp, -p.re, -p.im);
    const complex = imag !== null;
    if (this.caching && keep) {
      const label = `A + (${p.re}${complex ? ` + ${p.im}i` : ''})·E`;
      const lu = this.analyze(values, imag, label);
      factorOrRefuse(lu, values, imag, 'A', `${label} is singular: −(shift) is a pole of the model, which a stable model's shifts never are`);
      this.factorizations++;
      const bytes = lu.factorInfo?.memoryBytes ?? lu.analysis.numericSizeBytes;
      if (this.cachedBytes + bytes <= Math.min(this.budget, this.memoryBudget / 2)) {
        this.cachedBytes += bytes;
        this.cache.set(key, lu);
        return lu;
      }
      this.caching = false; // past the budget: keep what is cached, refactor the rest on one analysis each
      if (complex) {
        this.shared.complex = lu;
        this.shared.key.complex = key;
      } else {
        this.shared.real = lu;
        this.shared.key.real = key;
      }
      return lu;
    }
    const slot = complex ? 'complex' : 'real';
    let lu = this.shared[slot];
    if (lu && this.shared.key[slot] === key) return lu;
    if (!lu) {
      lu = this.analyze(values, imag, `A + p·E (${slot} shifts)`);
      this.shared[slot] = lu;
    }
    try {
      factorOrRefuse(lu, values, imag, 'A', `A + (${p.re}${complex ? ` + ${p.im}i` : ''})·E is singular: −(shift) is a pole of the model, which a stable model's shifts never are`);
    } catch (e) {
      this.shared[slot] = null; // disposed by factorOrRefuse on a singular matrix
      throw e;
    }
    this.factorizations++;
    this.shared.key[slot] = key;
    return lu;
  }

  dispose(): void {
    for (const lu of this.cache.values()) lu.dispose();
    this.shared.real?.dispose();
    this.shared.complex?.dispose();
    this.cache.clear();
  }
}

/** ‖W‖₂² for W given as columns. */
function spectralNormSquared(cols: readonly Float64Array[]): number {
  const m = cols.length;
  const g = zeros(m, m);
  for (let a = 0; a < m; a++) {
    for (let b = 0; b <= a; b++) {
      let s = 0;
      const x = cols[a], y = cols[b];
      for (let i = 0; i < x.length; i++) s += x[i] * y[i];
      g.data[a * m + b] = s;
      g.data[b * m + a] = s;
    }
  }
  if (m === 1) return g.data[0];
  const ev = symmetricEigenvalues(g);
  return Math.max(0, ev[ev.length - 1]);
}

function columnsOf(m: Matrix, transpose: boolean): Float64Array[] {
  // Columns of M (n×k), or of Mᵀ when transpose (M k×n).
  const out: Float64Array[] = [];
  if (!transpose) {
    for (let c = 0; c < m.cols; c++) {
      const v = new Float64Array(m.rows);
      for (let i = 0; i < m.rows; i++) v[i] = m.data[i * m.cols + c];
      out.push(v);
    }
  } else {
    for (let r = 0; r < m.rows; r++) out.push(m.data.slice(r * m.cols, (r + 1) * m.cols));
  }
  return out;
}

function factorMatrix(cols: readonly Float64Array[], n: number): Matrix {
  const k = cols.length;
  const z = zeros(n, k);
  for (let c = 0; c < k; c++) {
    const v = cols[c];
    for (let i = 0; i < n; i++) z.data[i * k + c] = v[i];
  }
  return z;
}

/** One equation's iteration state. */
class AdiSide {
  readonly z: Float64Array[] = [];
  readonly history: number[] = [];
  iterations = 0;
  residual = 1;
  private readonly b2: number;
  constructor(
    private w: Float64Array[],
    private readonly e: CscMatrix | undefined,
    readonly transpose: boolean,
    private readonly tol: number,
  ) {
    this.b2 = spectralNormSquared(w);
    if (this.b2 === 0) this.residual = 0;
  }
  get done(): boolean {
    return this.residual <= this.tol;
  }
  private eTimes(v: Float64Array): Float64Array {
    return this.e ? cscTimesVector(this.e, v, this.transpose) : v;
  }
  step(p: Shift, lu: SparseLu): void {
    const n = this.w[0].length;
    if (p.im === 0) {
      const s = Math.sqrt(-2 * p.re);
      for (let c = 0; c < this.w.length; c++) {
        const v = lu.solve(this.w[c], { transpose: this.transpose });
        const ev = this.eTimes(v);
        const w = this.w[c];
        for (let i = 0; i < n; i++) w[i] -= 2 * p.re * ev[i];
        for (let i = 0; i < n; i++) v[i] *= s;
        this.z.push(v);
      }
      this.iterations += 1;
    } else {
      const gamma = 2 * Math.sqrt(-p.re), delta = p.re / p.im, g2 = gamma * gamma, s2 = gamma * Math.sqrt(delta * delta + 1);
      for (let c = 0; c < this.w.length; c++) {
        const { re, im } = lu.solveComplex(this.w[c], null, { transpose: this.transpose });
        for (let i = 0; i < n; i++) re[i] += delta * im[i];
        const ev = this.eTimes(re);
        const w = this.w[c];
        for (let i = 0; i < n; i++) w[i] += g2 * ev[i];
        for (let i = 0; i < n; i++) {
          re[i] *= gamma;
          im[i] *= s2;
        }
        this.z.push(re, im);
      }
      this.iterations += 2;
    }
    this.residual = this.b2 === 0 ? 0 : spectralNormSquared(this.w) / this.b2;
    this.history.push(this.residual);
  }
  result(n: number): AdiFactor {
    return {
      Z: factorMatrix(this.z, n),
      iterations: this.iterations,
      residualHistory: this.history,
      residual: this.residual,
      converged: this.done,
    };
  }
}

/** A deterministic start vector for Arnoldi (a fixed pseudo-random sequence plus the given direction). */
function startVector(n: number, direction: Float64Array | null): Float64Array {
  const v = new Float64Array(n);
  let s = 0x9e3779b9 >>> 0;
  for (let i = 0; i < n; i++) {
    s = (Math.imul(s ^ (s >>> 15), 0x2c1b3c6d) + 0x6d2b79f5) >>> 0;
    v[i] = s / 4294967296 - 0.5;
  }
  if (direction) {
    let norm = 0;
    for (let i = 0; i < n; i++) norm += direction[i] * direction[i];
    norm = Math.sqrt(norm);
    if (norm > 0) for (let i = 0; i < n; i++) v[i] += direction[i] / norm * Math.sqrt(n) * 0.5;
  }
  return v;
}

/** Ritz values of an operator after k Arnoldi steps (modified Gram–Schmidt, reorthogonalised once). */
export function arnoldiRitzValues(op: (x: Float64Array) => Float64Array, start: Float64Array, k: number): { re: Float64Array; im: Float64Array } {
  const n = start.length;
  const steps = Math.min(k, n);
  const V: Float64Array[] = [];
  const H = zeros(steps + 1, steps);
  let norm = Math.sqrt(start.reduce((s, x) => s + x * x, 0));
  V.push(start.map((x) => x / norm));
  let m = steps;
  for (let j = 0; j < steps; j++) {
    const w = op(V[j]);
    for (let pass = 0; pass < 2; pass++) {
      for (let i = 0; i <= j; i++) {
        let h = 0;
        const vi = V[i];
        for (let t = 0; t < n; t++) h += vi[t] * w[t];
        H.data[i * steps + j] += h;
        for (let t = 0; t < n; t++) w[t] -= h * vi[t];
      }
    }
    norm = Math.sqrt(w.reduce((s, x) => s + x * x, 0));
    if (j + 1 < steps) H.data[(j + 1) * steps + j] = norm;
    let scale = 0;
    for (let i = 0; i <= j; i++) scale = Math.max(scale, Math.abs(H.data[i * steps + j]));
    if (norm <= 1e-12 * Math.max(scale, 1e-300)) {
      m = j + 1; // invariant subspace found: its Ritz values are eigenvalues
      break;
    }
    if (j + 1 < steps) V.push(w.map((x) => x / norm));
  }
  const Hm = zeros(m, m);
  for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) Hm.data[i * m + j] = H.data[i * steps + j];
  return eigenvalues(Hm);
}

/**
 * Penzl's heuristic: from candidates (closed under conjugation, in the open left half-plane) choose about
 * l₀ shifts (a complex pair counts as two) greedily minimising max_t ∏ |t − p|/|t + p|.
 */
export function penzlShifts(candidates: readonly Shift[], l0: number): Shift[] {
  // Work with the full conjugate-closed set of candidates.
  const all: { re: number; im: number }[] = [];
  for (const c of candidates) {
    all.push({ re: c.re, im: c.im });
    if (c.im !== 0) all.push({ re: c.re, im: -c.im });
  }
  const factor = (t: { re: number; im: number }, p: { re: number; im: number }) =>
    Math.hypot(t.re - p.re, t.im - p.im) / Math.hypot(t.re + p.re, t.im + p.im);
  const withPair = (p: Shift) => (p.im === 0 ? [p] : [p, { re: p.re, im: -p.im }]);
  // First shift: the candidate whose own rational function is smallest at its worst candidate.
  let best: Shift | null = null;
  let bestMax = Infinity;
  for (const c of candidates) {
    let worst = 0;
    for (const t of all) {
      let v = 1;
      for (const p of withPair(c)) v *= factor(t, p);
      worst = Math.max(worst, v);
    }
    if (worst < bestMax) {
      bestMax = worst;
      best = c;
    }
  }
  if (!best) return [];
  const chosen: Shift[] = [best];
  let count = best.im === 0 ? 1 : 2;
  const value = all.map((t) => withPair(best!).reduce((v, p) => v * factor(t, p), 1));
  while (count < l0) {
    let k = -1, worst = -1;
    for (let i = 0; i < all.length; i++) {
      if (value[i] > worst) {
        worst = value[i];
        k = i;
      }
    }
    if (k < 0 || worst <= 0) break;
    const t = all[k];
    const p: Shift = { re: t.re, im: Math.abs(t.im) };
    if (chosen.some((c) => c.re === p.re && c.im === p.im)) break;
    chosen.push(p);
    count += p.im === 0 ? 1 : 2;
    for (let i = 0; i < all.length; i++) for (const q of withPair(p)) value[i] *= factor(all[i], q);
  }
  return chosen;
}

/** Shifts by Penzl's heuristic from Arnoldi Ritz values of E⁻¹A and A⁻¹E (through sparse solves). */
export function heuristicShifts(
  model: SparseStateSpaceModel,
  options: AdiOptions = {},
): { shifts: Shift[]; notes: string[]; decayRates: { slowest: number; fastest: number } } {
  const { A, E, B } = model;
  const n = A.n;
  const kp = options.arnoldiSteps ?? 30, km = options.inverseArnoldiSteps ?? 20, l0 = options.shiftCount ?? 16;
  const notes: string[] = [];
  const bsum = new Float64Array(n);
  for (let i = 0; i < n; i++) for (let c = 0; c < B.cols; c++) bsum[i] += B.data[i * B.cols + c];
  const start = startVector(n, bsum);
  const budget = options.memoryBudgetBytes ?? Infinity;
  const aLu = SparseLu.analyze(A, 'A');
  checkFactorBudget(aLu, budget, 'A');
  let eLu: SparseLu | null = null;
  try {
    factorOrRefuse(aLu, undefined, undefined, 'A', 'A is singular (a pole at 0): the sparse path needs a stable model');
    if (E) {
      eLu = SparseLu.analyze(E, 'E');
      checkFactorBudget(eLu, budget, 'E', aLu.factorInfo?.memoryBytes ?? 0);
      factorOrRefuse(eLu, undefined, undefined, 'E', 'E is singular: the descriptor matrix must be nonsingular (a mass matrix)');
    }
    const eInvA = (x: Float64Array) => {
      const ax = cscTimesVector(A, x);
      return eLu ? eLu.solve(ax) : ax;
    };
    const aInvE = (x: Float64Array) => aLu.solve(E ? cscTimesVector(E, x) : x);
    const plus = arnoldiRitzValues(eInvA, start, kp);
    const minus = arnoldiRitzValues(aInvE, start, km);
    const cands: Shift[] = [];
    const add = (re: number, im: number) => {
      if (!(re < 0) || !Number.isFinite(re) || !Number.isFinite(im)) return false;
      const mag = Math.hypot(re, im);
      const imag = Math.abs(im) <= 1e-10 * mag ? 0 : Math.abs(im);
      if (!cands.some((c) => Math.abs(c.re - re) <= 1e-12 * mag && Math.abs(c.im - imag) <= 1e-12 * mag)) cands.push({ re, im: imag });
      return true;
    };
    let dropped = 0;
    for (let i = 0; i < plus.re.length; i++) if (plus.im[i] >= 0 && !add(plus.re[i], plus.im[i])) dropped++;
    for (let i = 0; i < minus.re.length; i++) {
      const d = minus.re[i] * minus.re[i] + minus.im[i] * minus.im[i];
      if (d === 0) continue;
      // 1/μ = μ̄/|μ|²
      if (-minus.im[i] >= 0 && !add(minus.re[i] / d, -minus.im[i] / d)) dropped++;
    }
    if (dropped > 0) notes.push(`${dropped} Ritz value(s) in the closed right half-plane were not used as ADI shifts`);
    if (cands.length === 0) {
      throw new ModelError('unstable', 'A', 'no stable Ritz values of E⁻¹A were found: the low-rank gramians need a stable model');
    }
    let slowest = Infinity, fastest = 0;
    for (const c of cands) {
      slowest = Math.min(slowest, -c.re);
      fastest = Math.max(fastest, -c.re);
    }
    return { shifts: penzlShifts(cands, l0), notes, decayRates: { slowest, fastest } };
  } finally {
    aLu.dispose();
    eLu?.dispose();
  }
}

/** Factor columns a projection looks at: the most recent ones of each equation (a choice of ours). */
const PROJECTION_COLUMNS = 32;

/**
 * Projection shifts (Benner, Kürschner & Saak 2014, §4.1): the eigenvalues of (UᵀAU, UᵀEU) for an
 * orthonormal basis U of `columns` (at most `maxColumns` of them, the last ones), mirrored into the open
 * left half-plane, one per conjugate pair (im ≥ 0). Empty when the columns span nothing.
 */
export function projectionShifts(model: SparseStateSpaceModel, columns: readonly Float64Array[], maxColumns = PROJECTION_COLUMNS): Shift[] {
  const n = model.A.n;
  const basis: Float64Array[] = [];
  for (const col of columns.slice(-maxColumns)) {
    const v = Float64Array.from(col);
    const norm0 = Math.sqrt(v.reduce((t, x) => t + x * x, 0));
    if (!(norm0 > 0)) continue;
    for (let pass = 0; pass < 2; pass++) {
      for (const u of basis) {
        let h = 0;
        for (let i = 0; i < n; i++) h += u[i] * v[i];
        for (let i = 0; i < n; i++) v[i] -= h * u[i];
      }
    }
    const norm = Math.sqrt(v.reduce((t, x) => t + x * x, 0));
    if (norm > 1e-8 * norm0) basis.push(v.map((x) => x / norm));
  }
  const r = basis.length;
  if (r === 0) return [];
  const project = (op: (x: Float64Array) => Float64Array): Matrix => {
    const out = zeros(r, r);
    for (let j = 0; j < r; j++) {
      const w = op(basis[j]);
      for (let i = 0; i < r; i++) {
        let h = 0;
        const u = basis[i];
        for (let t = 0; t < n; t++) h += u[t] * w[t];
        out.data[i * r + j] = h;
      }
    }
    return out;
  };
  const H = project((x) => cscTimesVector(model.A, x));
  const pencil = model.E ? solve(project((x) => cscTimesVector(model.E!, x)), H) : H;
  const ev = eigenvalues(pencil);
  const shifts: Shift[] = [];
  for (let i = 0; i < ev.re.length; i++) {
    const re = -Math.abs(ev.re[i]);
    const mag = Math.hypot(ev.re[i], ev.im[i]);
    if (!(re < 0) || !Number.isFinite(mag) || ev.im[i] < 0) continue;
    const im = ev.im[i] <= 1e-10 * mag ? 0 : ev.im[i];
    if (!shifts.some((c) => Math.abs(c.re - re) <= 1e-10 * mag && Math.abs(c.im - im) <= 1e-10 * mag)) shifts.push({ re, im });
  }
  return shifts;
}

/**
 * Low-rank factors of the controllability and observability gramians by LR-ADI (see the header).
 * Throws ModelError('unstable') when no stable shift exists; a run that reaches maxIterations returns
 * with `converged: false` and its residual.
 */
export function lowRankGramians(model: SparseStateSpaceModel, options: AdiOptions = {}): AdiResult {
  const started = performance.now();
  const tol = options.tolerance ?? 1e-10;
  const maxIt = options.maxIterations ?? 300;
  if (!(tol > 0)) throw new ModelError('invalid_option', 'tolerance', `the ADI tolerance must be positive, got ${tol}`);
  const n = model.A.n;
  const notes: string[] = [];
  let shifts: Shift[];
  let ritzDecayRates: { slowest: number; fastest: number } | undefined;
  if (options.shifts) {
    shifts = [...options.shifts];
    for (const p of shifts) {
      if (!(p.re < 0) || p.im < 0) throw new ModelError('invalid_option', 'shifts', `ADI shifts need Re p < 0 and Im p ≥ 0 (pairs), got ${p.re} + ${p.im}i`);
    }
  } else {
    const h = heuristicShifts(model, options);
    shifts = h.shifts;
    ritzDecayRates = h.decayRates;
    notes.push(...h.notes);
  }
  const which = options.equations ?? ['controllability', 'observability'];
  const sides: { name: 'controllability' | 'observability'; side: AdiSide }[] = [];
  if (which.includes('controllability')) sides.push({ name: 'controllability', side: new AdiSide(columnsOf(model.B, false), model.E, false, tol) });
  if (which.includes('observability')) sides.push({ name: 'observability', side: new AdiSide(columnsOf(model.C, true), model.E, true, tol) });
  const solvers = new ShiftedSolvers(shiftPattern(model.A, model.E), options.cacheBudgetBytes ?? 2 ** 30, options.memoryBudgetBytes ?? Infinity);
  const worstResidual = () => Math.max(...sides.map((s) => (s.side.done ? 0 : s.side.residual)));
  const used: Shift[] = [...shifts];
  let projecting = false;
  try {
    let k = 0;
    let passResidual = worstResidual();
    while (sides.some((s) => !s.side.done && s.side.iterations < maxIt)) {
      throwIfStopped(options.signal, 'the low-rank ADI');
      if (k === shifts.length) {
        // A pass over the shifts is done: go on with the same shifts, or (slow progress, or already
        // projecting) with projection shifts from the most recent columns.
        const now = worstResidual();
        if (!options.shifts && options.projectionShifts !== false && (projecting || now > 1e-2 * passResidual)) {
          const fresh = projectionShifts(model, sides.flatMap((s) => s.side.z.slice(-PROJECTION_COLUMNS)));
          if (fresh.length > 0) {
            if (!projecting) notes.push(`a pass over Penzl's ${shifts.length} shifts lowered the residual by less than 100×: went on with projection shifts (Benner, Kürschner & Saak 2014)`);
            projecting = true;
            shifts = fresh;
          }
        }
        k = 0;
        passResidual = now;
      }
      const p = shifts[k++];
      if (projecting) used.push(p);
      const lu = solvers.get(p, !projecting);
      for (const s of sides) {
        if (s.side.done || s.side.iterations >= maxIt) continue;
        s.side.step(p, lu);
        options.onStep?.({ equation: s.name, step: s.side.iterations, maxSteps: maxIt, residual: s.side.residual, tolerance: tol });
      }
    }
  } finally {
    solvers.dispose();
  }
  const out: { controllability?: AdiFactor; observability?: AdiFactor } = {};
  for (const s of sides) {
    out[s.name] = s.side.result(n);
    if (!s.side.done) notes.push(`the ${s.name} ADI stopped at ${maxIt} steps with normalised residual ${s.side.residual.toExponential(2)}`);
  }
  return {
    ...out,
    shifts: used,
    factorizations: solvers.factorizations,
    analyses: solvers.analyses,
    seconds: (performance.now() - started) / 1000,
    ...(ritzDecayRates ? { ritzDecayRates } : {}),
    notes,
  };
}
