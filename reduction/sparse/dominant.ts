/**
 * Dominant poles of a large sparse model E ẋ = A x + B u, y = C x + D u: the poles λ whose residues
 * Rᵢ = (C xᵢ)(yᵢᴴ B) / (yᵢᴴ E xᵢ) weigh most in G(s) = Σ Rᵢ/(s − λᵢ) + D, ranked as on the dense path
 * (`reduction/modal.ts`): dominance ‖Rᵢ‖₂/|Re λᵢ| for a real pole and 2‖Rᵢ‖₂/|Re λᵢ| for a complex pair.
 *
 * Method: the subspace-accelerated dominant pole algorithm (J. Rommes & N. Martins, "Efficient computation
 * of transfer function dominant poles using subspace acceleration", IEEE Trans. Power Systems 21(3), 2006),
 * in its MIMO form (J. Rommes & N. Martins, "Efficient computation of multivariable transfer function
 * dominant poles using subspace acceleration", IEEE Trans. Power Systems 21(4), 2006): at a shift s the
 * dominant singular triplet (σ, u, z) of G(s) gives the expansion vectors v = (sE − A)⁻¹ B u and
 * w = (sE − A)⁻ᴴ Cᵀ z; the right and left search spaces V, W are kept real (both Re and Im of each vector
 * are added, so conjugate pairs come together), the projected pencil (Wᵀ A V, Wᵀ E V) is solved densely,
 * its Ritz triplets are ranked by their residues' dominance, and the most dominant Ritz value is the next
 * shift (a Newton step on 1/G). A Ritz pair is accepted when ‖A x − λ E x‖₂ / (‖A‖₁‖x‖₂) is below the
 * tolerance; it is then deflated from B, C (b ← (I − E x yᴴ) b, c ← c (I − x yᴴ E), with yᴴ E x = 1) and
 * from the search spaces, and the search continues from the next most dominant Ritz value. One symbolic
 * analysis of A − sE (UMFPACK, complex) serves every shift; each shift costs one numeric factorization,
 * m solves and one transposed solve.
 *
 * The poles found are dominant, but which dominant poles the iteration reaches depends on the initial
 * shifts (a frequency sweep's peaks are good ones, `sweepPeakShifts`); the list is not certified to hold
 * the most dominant poles of the model.
 */
import { ModelError } from '../errors';
import { modalFigures } from '../poles';
import { type Matrix, zeros, eig, inverse, solve, svd } from '../linalg/index';
import { largestSingularValue } from '../frequency';
import { SparseLu } from '../linalg/sparse';
import { throwIfStopped, type StopSignal } from '../stop';
import { checkFactorBudget } from './budget';
import { cscNorm1, eigenResidual } from './eigs';
import { sparseFrequencyResponse } from './frequency';
import { cscTimesVector, shiftPattern, shiftedValues, type SparseStateSpaceModel } from './model';

export interface DominantPoleOptions {
  /** How many dominant poles (a complex pair counts once). */
  readonly count: number;
  /** Initial shifts, tried in turn whenever the search space is empty (default i·1). */
  readonly initialShifts?: readonly { readonly re: number; readonly im: number }[];
  /** Accept a Ritz pair when ‖A x − λ E x‖₂/(‖A‖₁‖x‖₂) ≤ tolerance (default 1e-10). */
  readonly tolerance?: number;
  /** Most shifts (numeric factorizations) in all (default 30 + 15·count). */
  readonly maxIterations?: number;
  /** Search-space size (real columns) at which it restarts with the most dominant Ritz vectors (default 40, keeping 8). */
  readonly maxSearchSpace?: number;
  readonly restartSize?: number;
  readonly memoryBudgetBytes?: number;
  /** Looked at before each shift (StoppedError when set). */
  readonly signal?: StopSignal;
}

export interface DominantPole {
  readonly re: number;
  /** ≥ 0; a pair is one pole with `states` = 2. */
  readonly im: number;
  readonly states: 1 | 2;
  readonly naturalFrequency: number;
  readonly dampingRatio: number;
  /** ‖Rᵢ‖₂ of the residue (C x)(yᴴ B)/(yᴴ E x) of the member with Im ≥ 0, with the model's own B and C. */
  readonly residueNorm: number;
  /** ‖Rᵢ‖/|Re λ| (real) or 2‖Rᵢ‖/|Re λ| (pair), as on the dense path. */
  readonly dominance: number;
  /** ‖A x − λ E x‖₂/(‖A‖₁‖x‖₂) and the same for the left vector (‖yᴴA − λ yᴴE‖). */
  readonly residual: number;
  readonly leftResidual: number;
}

export interface DominantPoleResult {
  /** Poles found, most dominant first. */
  readonly poles: readonly DominantPole[];
  /**
   * Right eigenvectors (n×k, real packed in the order of `poles`: one column per real pole, Re and Im of the
   * vector of the member with Im > 0 for a pair) and left ones in the same form (vectors ỹ of the transposed
   * pencil, Aᵀ ỹ = λ Eᵀ ỹ, i.e. ỹ = ȳ).
   */
  readonly right: Matrix;
  readonly left: Matrix;
  readonly converged: boolean;
  readonly iterations: number;
  readonly factorizations: number;
  readonly notes: readonly string[];
}

type Cx = { re: Float64Array; im: Float64Array };

function dot(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
}

/** Adds x to the orthonormal columns `basis` (Gram–Schmidt twice) unless it lies in their span. */
function expand(basis: Float64Array[], x: Float64Array): boolean {
  const v = Float64Array.from(x);
  const n0 = Math.sqrt(dot(v, v));
  if (!(n0 > 0)) return false;
  for (let pass = 0; pass < 2; pass++) {
    for (const q of basis) {
      const h = dot(q, v);
      for (let i = 0; i < v.length; i++) v[i] -= h * q[i];
    }
  }
  const nv = Math.sqrt(dot(v, v));
  if (!(nv > 1e-13 * n0)) return false;
  for (let i = 0; i < v.length; i++) v[i] /= nv;
  basis.push(v);
  return true;
}

/** Orthonormal basis of the given vectors (rank-revealing by the drop test in `expand`). */
function orthonormalise(vectors: readonly Float64Array[]): Float64Array[] {
  const out: Float64Array[] = [];
  for (const v of vectors) expand(out, v);
  return out;
}

interface RitzTriplet {
  re: number;
  im: number; // ≥ 0
  states: 1 | 2;
  /** Coefficients of the right vector in V (complex k) and of the left row vector ŷᴴ … in W-coordinates (g: y_row = g·Wᵀ). */
  s: Cx;
  g: Cx;
  dominance: number;
}

/** The projected pencil's Ritz triplets with their dominance for the (deflated) B, C. */
function ritzTriplets(V: Float64Array[], W: Float64Array[], AV: Float64Array[], EV: Float64Array[], B: Matrix, C: Matrix): RitzTriplet[] {
  const k = V.length;
  if (k === 0 || W.length !== k) return [];
  const n = V[0].length, m = B.cols, p = C.rows;
  const At = zeros(k, k), Et = zeros(k, k);
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) {
      At.data[i * k + j] = dot(W[i], AV[j]);
      Et.data[i * k + j] = dot(W[i], EV[j]);
    }
  }
  let M: Matrix, EtInv: Matrix;
  try {
    EtInv = inverse(Et);
    M = solve(Et, At);
  } catch {
    return [];
  }
  const { values, vectors: S } = eig(M);
  let Sinv: Matrix;
  try {
    Sinv = inverse(S);
  } catch {
    return [];
  }
  // WᵀB (k×m) and C V (p×k).
  const WB = zeros(k, m);
  for (let i = 0; i < k; i++) for (let c = 0; c < m; c++) {
    let s = 0;
    for (let r = 0; r < n; r++) s += W[i][r] * B.data[r * m + c];
    WB.data[i * m + c] = s;
  }
  const CV = zeros(p, k);
  for (let r = 0; r < p; r++) for (let j = 0; j < k; j++) {
    let s = 0;
    const off = r * n;
    for (let i = 0; i < n; i++) s += C.data[off + i] * V[j][i];
    CV.data[r * k + j] = s;
  }
  const out: RitzTriplet[] = [];
  for (let j = 0; j < k; j++) {
    const pair = values.im[j] !== 0 && j + 1 < k;
    const sRe = new Float64Array(k), sIm = new Float64Array(k);
    const zRe = new Float64Array(k), zIm = new Float64Array(k);
    for (let i = 0; i < k; i++) {
      sRe[i] = S.data[i * k + j];
      if (pair) sIm[i] = S.data[i * k + j + 1];
      // Row of the complex inverse: ½(Sinv_j − i·Sinv_{j+1}) for a pair (packed form).
      zRe[i] = pair ? 0.5 * Sinv.data[j * k + i] : Sinv.data[j * k + i];
      zIm[i] = pair ? -0.5 * Sinv.data[(j + 1) * k + i] : 0;
    }
    // g = z·Ẽ⁻¹ (row); y_row = g·Wᵀ, yᴴ B = g·(WᵀB).
    const gRe = new Float64Array(k), gIm = new Float64Array(k);
    for (let c = 0; c < k; c++) {
      let a = 0, b = 0;
      for (let i = 0; i < k; i++) {
        a += zRe[i] * EtInv.data[i * k + c];
        b += zIm[i] * EtInv.data[i * k + c];
      }
      gRe[c] = a;
      gIm[c] = b;
    }
    let c2 = 0;
    for (let r = 0; r < p; r++) {
      let a = 0, b = 0;
      for (let i = 0; i < k; i++) {
        a += CV.data[r * k + i] * sRe[i];
        b += CV.data[r * k + i] * sIm[i];
      }
      c2 += a * a + b * b;
    }
    let b2 = 0;
    for (let c = 0; c < m; c++) {
      let a = 0, b = 0;
      for (let i = 0; i < k; i++) {
        a += gRe[i] * WB.data[i * m + c];
        b += gIm[i] * WB.data[i * m + c];
      }
      b2 += a * a + b * b;
    }
    const residue = Math.sqrt(c2 * b2);
    const re = values.re[j], im = values.im[j];
    const denom = Math.max(Math.abs(re), Number.MIN_VALUE);
    out.push({
      re,
      im: Math.abs(im),
      states: pair ? 2 : 1,
      s: { re: sRe, im: pair ? (im > 0 ? sIm : sIm.map((x) => -x)) : sIm },
      g: { re: gRe, im: pair ? (im > 0 ? gIm : gIm.map((x) => -x)) : gIm },
      dominance: ((pair ? 2 : 1) * residue) / denom,
    });
    if (pair) j++;
  }
  return out.sort((a, b) => b.dominance - a.dominance);
}

function combine(basis: readonly Float64Array[], c: Cx, n: number): Cx {
  const re = new Float64Array(n), im = new Float64Array(n);
  for (let j = 0; j < basis.length; j++) {
    const a = c.re[j], b = c.im[j], q = basis[j];
    if (a !== 0) for (let i = 0; i < n; i++) re[i] += a * q[i];
    if (b !== 0) for (let i = 0; i < n; i++) im[i] += b * q[i];
  }
  return { re, im };
}

/** Dominant poles by SAMDP (see the file header). */
export function dominantPoles(model: SparseStateSpaceModel, options: DominantPoleOptions): DominantPoleResult {
  const { A, E, B, C } = model;
  const n = A.n, m = B.cols, p = C.rows;
  const count = options.count;
  if (!Number.isInteger(count) || count < 1) throw new ModelError('invalid_option', 'count', `the number of dominant poles must be a whole number ≥ 1, got ${count}`);
  const tol = options.tolerance ?? 1e-10;
  const maxIt = options.maxIterations ?? 30 + 15 * count;
  const maxSpace = Math.max(4, options.maxSearchSpace ?? 40);
  const keepSpace = Math.max(2, Math.min(maxSpace - 2, options.restartSize ?? 8));
  const initial = [...(options.initialShifts ?? [{ re: 0, im: 1 }])];
  if (initial.length === 0) initial.push({ re: 0, im: 1 });
  const normA = cscNorm1(A);
  const eTimes = (x: Float64Array, transpose = false) => (E ? cscTimesVector(E, x, transpose) : Float64Array.from(x));
  const sp = shiftPattern(A, E);
  const notes: string[] = [];
  // Deflated B and C (copies), search spaces and their images.
  const Bd: Matrix = { rows: n, cols: m, data: Float64Array.from(B.data) };
  const Cd: Matrix = { rows: p, cols: n, data: Float64Array.from(C.data) };
  let V: Float64Array[] = [], W: Float64Array[] = [];
  let AV: Float64Array[] = [], EV: Float64Array[] = [];
  const found: { pole: DominantPole; x: Cx; y: Cx }[] = [];
  let iterations = 0, factorizations = 0, nextInitial = 0;
  const refreshImages = () => {
    AV = V.map((v) => cscTimesVector(A, v));
    EV = V.map((v) => eTimes(v));
  };
  // One symbolic analysis for real shifts (a real LU, cheaper) and one for complex shifts.
  const lus: { real: SparseLu | null; complex: SparseLu | null } = { real: null, complex: null };
  type Solver = { solveComplex(bRe: Float64Array, bIm: Float64Array | null, o?: { transpose?: boolean }): Cx };
  const factorAt = (s: { re: number; im: number }): Solver => {
    for (let attempt = 0; attempt < 3; attempt++) {
      const shift = attempt === 0 ? s : { re: s.re * (1 + 1e-7 * attempt), im: s.im * (1 + 1e-7 * attempt) + (s.im === 0 ? 0 : 1e-9 * attempt * Math.hypot(s.re, s.im)) };
      const { values, imag } = shiftedValues(sp, shift.re, shift.im);
      const slot = imag ? 'complex' : 'real';
      let f = lus[slot];
      if (!f) {
        f = SparseLu.analyze({ ...sp.pattern, values, imag: imag ?? undefined }, 'A − sE');
        checkFactorBudget(f, options.memoryBudgetBytes ?? Infinity, 'A − sE', lus.real?.factorInfo?.memoryBytes ?? lus.complex?.factorInfo?.memoryBytes ?? 0);
        lus[slot] = f;
      }
      try {
        f.factor(values, imag);
        factorizations++;
        if (imag) return f;
        const real = f;
        return {
          solveComplex: (bRe, bIm, o = {}) => ({ re: real.solve(bRe, o), im: bIm ? real.solve(bIm, o) : new Float64Array(n) }),
        };
      } catch (e) {
        if ((e as { code?: string }).code !== 'singular') throw e;
      }
    }
    throw new ModelError('invalid_option', 'shift', `A − sE stays singular near s = ${s.re} + ${s.im}i`);
  };
  let shift: { re: number; im: number } | null = null;
  try {
    while (found.length < count && iterations < maxIt) {
      if (!shift) {
        if (V.length > 0) {
          const t = ritzTriplets(V, W, AV, EV, Bd, Cd);
          shift = t.length > 0 ? { re: t[0].re, im: t[0].im } : null;
        }
        if (!shift) shift = initial[nextInitial++ % initial.length];
      }
      throwIfStopped(options.signal, 'the dominant pole iteration');
      iterations++;
      const f = factorAt(shift);
      // X = (A − sE)⁻¹ Bd, G(s) = −Cd X (deflated), its dominant singular triplet.
      const X: Cx[] = [];
      for (let c = 0; c < m; c++) {
        const b = new Float64Array(n);
        for (let i = 0; i < n; i++) b[i] = Bd.data[i * m + c];
        X.push(f.solveComplex(b, null));
      }
      const H = zeros(2 * p, 2 * m);
      for (let r = 0; r < p; r++) {
        for (let c = 0; c < m; c++) {
          let a = 0, b = 0;
          for (let i = 0; i < n; i++) {
            a -= Cd.data[r * n + i] * X[c].re[i];
            b -= Cd.data[r * n + i] * X[c].im[i];
          }
          // [[Re, −Im], [Im, Re]]
          H.data[r * 2 * m + c] = a;
          H.data[r * 2 * m + m + c] = -b;
          H.data[(p + r) * 2 * m + c] = b;
          H.data[(p + r) * 2 * m + m + c] = a;
        }
      }
      let uRe = new Float64Array(m).fill(1), uIm = new Float64Array(m), zRe = new Float64Array(p).fill(1), zIm = new Float64Array(p);
      if (m > 1 || p > 1) {
        const d = svd(H);
        uRe = Float64Array.from({ length: m }, (_, c) => d.V.data[c * d.V.cols]);
        uIm = Float64Array.from({ length: m }, (_, c) => d.V.data[(m + c) * d.V.cols]);
        zRe = Float64Array.from({ length: p }, (_, r) => d.U.data[r * d.U.cols]);
        zIm = Float64Array.from({ length: p }, (_, r) => d.U.data[(p + r) * d.U.cols]);
      }
      // v = (sE − A)⁻¹ Bd u = −X u.
      const vRe = new Float64Array(n), vIm = new Float64Array(n);
      for (let c = 0; c < m; c++) {
        for (let i = 0; i < n; i++) {
          vRe[i] -= X[c].re[i] * uRe[c] - X[c].im[i] * uIm[c];
          vIm[i] -= X[c].re[i] * uIm[c] + X[c].im[i] * uRe[c];
        }
      }
      // (sE − A)ᴴ w = Cdᵀ z  ⇔  (A − sE)ᵀ w̄ = −Cdᵀ z̄.
      const rRe = new Float64Array(n), rIm = new Float64Array(n);
      for (let r = 0; r < p; r++) {
        for (let i = 0; i < n; i++) {
          rRe[i] -= Cd.data[r * n + i] * zRe[r];
          rIm[i] += Cd.data[r * n + i] * zIm[r];
        }
      }
      const wBar = f.solveComplex(rRe, rIm, { transpose: true });
      // Real search spaces: Re and Im of each vector (w's imaginary part's sign does not change the span).
      let grew = false;
      for (const x of [vRe, vIm]) if (expand(V, x)) grew = true;
      for (const x of [wBar.re, wBar.im]) expand(W, x);
      // Keep the two spaces the same size (the projected pencil is square).
      const kk = Math.min(V.length, W.length);
      V.length = kk;
      W.length = kk;
      refreshImages();
      if (!grew && V.length === 0) {
        shift = null;
        continue;
      }
      const trip = ritzTriplets(V, W, AV, EV, Bd, Cd);
      if (trip.length === 0) {
        shift = null;
        continue;
      }
      const best = trip[0];
      const x = combine(V, best.s, n);
      const xi = best.states === 2 ? x.im : null;
      const residual = eigenResidual(model, best.re, best.im, x.re, xi, false, normA);
      // Converged, or stalled: the new vectors added nothing, so the pair is as accurate as this space makes it
      // (accepted when its residual is still small, reported as it is).
      const stalled = !grew && residual <= Math.sqrt(tol);
      if (!grew && !stalled) {
        shift = null;
        V = [];
        W = [];
        refreshImages();
        continue;
      }
      if (residual <= tol || stalled) {
        // y_row = g·Wᵀ (so yᴴ = y_row); the left vector of the transposed pencil is ỹ = y_rowᵀ.
        const y = combine(W, best.g, n);
        const yi = best.states === 2 ? y.im : null;
        const leftResidual = eigenResidual(model, best.re, best.im, y.re, yi, true, normA);
        // yᴴ E x and the residue with the model's own B, C.
        const exRe = eTimes(x.re), exIm = best.states === 2 ? eTimes(x.im) : new Float64Array(n);
        const nRe = dot(y.re, exRe) - dot(y.im, exIm), nIm = dot(y.re, exIm) + dot(y.im, exRe);
        const cx2 = (() => {
          let s = 0;
          for (let r = 0; r < p; r++) {
            let a = 0, b = 0;
            for (let i = 0; i < n; i++) {
              a += C.data[r * n + i] * x.re[i];
              b += C.data[r * n + i] * x.im[i];
            }
            s += a * a + b * b;
          }
          return s;
        })();
        let yb2 = 0;
        for (let c = 0; c < m; c++) {
          let a = 0, b = 0;
          for (let i = 0; i < n; i++) {
            a += y.re[i] * B.data[i * m + c];
            b += y.im[i] * B.data[i * m + c];
          }
          yb2 += a * a + b * b;
        }
        const residueNorm = Math.sqrt(cx2 * yb2) / Math.hypot(nRe, nIm);
        // ωn and ζ by the one definition (reduction/poles.ts); they do not depend on the pole's class.
        const figures = modalFigures(best.re, best.im, 'stable');
        found.push({
          pole: {
            re: best.re,
            im: best.im,
            states: best.states,
            naturalFrequency: figures.naturalFrequency,
            dampingRatio: figures.dampingRatio ?? 1,
            residueNorm,
            dominance: (best.states * residueNorm) / Math.max(Math.abs(best.re), Number.MIN_VALUE),
            residual,
            leftResidual,
          },
          x,
          y,
        });
        // Deflation with the normalised pair: x̂ = x / (yᴴ E x) so that yᴴ E x̂ = 1.
        const d2 = nRe * nRe + nIm * nIm;
        const xh: Cx = { re: new Float64Array(n), im: new Float64Array(n) };
        for (let i = 0; i < n; i++) {
          xh.re[i] = (x.re[i] * nRe + x.im[i] * nIm) / d2;
          xh.im[i] = (x.im[i] * nRe - x.re[i] * nIm) / d2;
        }
        const factor = best.states === 2 ? 2 : 1; // a pair deflates x and x̄: twice the real part
        const exh = { re: eTimes(xh.re), im: best.states === 2 ? eTimes(xh.im) : new Float64Array(n) };
        // Bd ← Bd − f·Re(E x̂ (y_row Bd)).
        for (let c = 0; c < m; c++) {
          let a = 0, b = 0;
          for (let i = 0; i < n; i++) {
            a += y.re[i] * Bd.data[i * m + c];
            b += y.im[i] * Bd.data[i * m + c];
          }
          for (let i = 0; i < n; i++) Bd.data[i * m + c] -= factor * (exh.re[i] * a - exh.im[i] * b);
        }
        // Cd ← Cd − f·Re((Cd x̂)(y_row E)).
        const yE = { re: eTimes(y.re, true), im: eTimes(y.im, true) };
        for (let r = 0; r < p; r++) {
          let a = 0, b = 0;
          for (let i = 0; i < n; i++) {
            a += Cd.data[r * n + i] * xh.re[i];
            b += Cd.data[r * n + i] * xh.im[i];
          }
          for (let i = 0; i < n; i++) Cd.data[r * n + i] -= factor * (a * yE.re[i] - b * yE.im[i]);
        }
        // Search spaces: V ← (I − f·Re(x̂ y_row E)) V,  W ← (I − f·Re(ỹ (E x̂)ᵀ)) W.
        const project = (cols: Float64Array[], u: Cx, wv: Cx) =>
          cols.map((q) => {
            const a = dot(wv.re, q), b = dot(wv.im, q);
            const out = Float64Array.from(q);
            for (let i = 0; i < n; i++) out[i] -= factor * (u.re[i] * a - u.im[i] * b);
            return out;
          });
        V = orthonormalise(project(V, xh, yE));
        W = orthonormalise(project(W, y, exh));
        const k = Math.min(V.length, W.length);
        V = V.slice(0, k);
        W = W.slice(0, k);
        refreshImages();
        shift = null;
        continue;
      }
      // Restart when the space is large: keep the most dominant Ritz vectors.
      if (V.length >= maxSpace) {
        const keep = trip.slice(0, keepSpace);
        const rv: Float64Array[] = [], lv: Float64Array[] = [];
        for (const t of keep) {
          const xr = combine(V, t.s, n), yl = combine(W, t.g, n);
          rv.push(xr.re);
          lv.push(yl.re);
          if (t.states === 2) {
            rv.push(xr.im);
            lv.push(yl.im);
          }
        }
        V = orthonormalise(rv);
        W = orthonormalise(lv);
        const k = Math.min(V.length, W.length);
        V = V.slice(0, k);
        W = W.slice(0, k);
        refreshImages();
      }
      shift = { re: best.re, im: best.im };
    }
  } finally {
    lus.real?.dispose();
    lus.complex?.dispose();
  }
  if (found.length < count) {
    notes.push(`found ${found.length} of the ${count} dominant poles asked for within ${maxIt} shifts`);
  }
  found.sort((a, b) => b.pole.dominance - a.pole.dominance);
  const k = found.reduce((s, f) => s + f.pole.states, 0);
  const right = zeros(n, k), left = zeros(n, k);
  let col = 0;
  for (const f of found) {
    for (let i = 0; i < n; i++) {
      right.data[i * k + col] = f.x.re[i];
      left.data[i * k + col] = f.y.re[i];
      if (f.pole.states === 2) {
        right.data[i * k + col + 1] = f.x.im[i];
        left.data[i * k + col + 1] = f.y.im[i];
      }
    }
    col += f.pole.states;
  }
  return {
    poles: found.map((f) => f.pole),
    right,
    left,
    converged: found.length >= count,
    iterations,
    factorizations,
    notes,
  };
}

/**
 * Initial shifts for `dominantPoles` from a sweep of the full model: i·ω at the local maxima of
 * σ_max(G(iω)) over the grid, highest first (at most `limit`).
 */
export function sweepPeakShifts(model: SparseStateSpaceModel, frequencies: ArrayLike<number>, limit = 6, memoryBudgetBytes = Infinity): { re: number; im: number }[] {
  const g = sparseFrequencyResponse(model, frequencies, memoryBudgetBytes);
  const s = g.response.map((h) => largestSingularValue(h));
  const peaks: { w: number; v: number }[] = [];
  for (let k = 0; k < s.length; k++) {
    const left = k === 0 ? -Infinity : s[k - 1], right = k === s.length - 1 ? -Infinity : s[k + 1];
    if (s[k] >= left && s[k] >= right) peaks.push({ w: g.frequencies[k], v: s[k] });
  }
  peaks.sort((a, b) => b.v - a.v);
  return peaks.slice(0, limit).map((p) => ({ re: 0, im: p.w }));
}
