/**
 * Matrix exponential e^A by scaling and squaring with diagonal Padé approximants.
 *
 * Method: N. J. Higham, "The scaling and squaring method for the matrix exponential revisited",
 * SIAM J. Matrix Anal. Appl. 26(4):1179–1193, 2005, Algorithm 2.3. The Padé degree m ∈ {3, 5, 7, 9, 13}
 * is the smallest whose bound θ_m (Table 2.3) covers ‖A‖₁; above θ₁₃ the matrix is scaled by 2^−s so that
 * ‖A/2^s‖₁ ≤ θ₁₃ and the [13/13] approximant is squared s times. The θ_m are chosen so that the backward
 * error of r_m(A) in exact arithmetic is at most the unit roundoff u = 2^−53 (Higham 2005, §2–3).
 * U and V are evaluated with the operation counts of Higham's eqs. (2.9)–(2.10): m = 13 costs six matrix
 * products and one solve; the squarings cost one product each.
 *
 * Scaling: by default the degree and s are chosen from the norms of powers d_k = ‖A^k‖₁^{1/k} instead of
 * ‖A‖₁, following A. H. Al-Mohy & N. J. Higham, "A new scaling and squaring algorithm for the matrix
 * exponential", SIAM J. Matrix Anal. Appl. 31(3):970–989, 2009, Algorithm 5.1 (the algorithm behind
 * scipy.linalg.expm). For non-normal matrices — stiff state-space models after a similarity, say —
 * ‖A^k‖^{1/k} is far below ‖A‖, and the 2005 rule over-scales: every extra squaring costs a product and
 * loses accuracy. d4 and d6 come from the exact powers the Padé evaluation needs anyway; d8 and d10 from
 * a 1-norm estimate of the products (Hager 1984; Higham 1988). The extra squarings ℓ(A, m) of AH2009
 * eq. (5.3) guard against the rounding of a large r_m: ℓ = max(⌈log2(α/u)/(2m)⌉, 0) with
 * α = |c_{2m+1}|·‖|A|^{2m+1}‖₁/‖A‖₁ and c_{2m+1} = (m!)²/((2m)!(2m+1)!) the leading Padé remainder
 * coefficient (both recalled from the paper; the tests compare every degree with scipy.linalg.expm).
 * `scaling: 'norm'` gives the plain 2005 rule.
 *
 * Contract: A square with finite entries. Returns e^A with a relative backward error ~u‖A‖ for the
 * rounding-free evaluation; the forward error is governed by the conditioning of the exponential
 * (Higham 2005, §1). Nothing is checked here beyond squareness: callers validate their models once
 * at the boundary (`reduction/io`).
 */
import { type Matrix, zeros, identity, norm1, matmul, solve } from './index';
import { productZeros } from './gemm';
import { matVecRows } from './matvec';

/** θ_m of Higham (2005), Table 2.3 (double precision). */
const THETA: Record<number, number> = {
  3: 1.495585217958292e-2,
  5: 2.539398330063230e-1,
  7: 9.504178996162932e-1,
  9: 2.097847961257068e0,
  13: 5.371920351148152e0,
};

/** Coefficients b_0..b_m of the [m/m] Padé approximant to e^x (Higham 2005, p. 1183; integer values). */
const PADE: Record<number, readonly number[]> = {
  3: [120, 60, 12, 1],
  5: [30240, 15120, 3360, 420, 30, 1],
  7: [17297280, 8648640, 1995840, 277200, 25200, 1512, 56, 1],
  9: [17643225600, 8821612800, 2075673600, 302702400, 30270240, 2162160, 110880, 3960, 90, 1],
  13: [
    64764752532480000, 32382376266240000, 7771770303897600, 1187353796428800, 129060195264000, 10559470521600,
    670442572800, 33522128640, 1323241920, 40840800, 960960, 16380, 182, 1,
  ],
};

export interface ExpmResult {
  readonly value: Matrix;
  /** Padé degree used (3, 5, 7, 9 or 13). */
  readonly padeDegree: number;
  /** Number of squarings s (the matrix was scaled by 2^−s). */
  readonly squarings: number;
  /** Matrix products performed (excluding the one solve). */
  readonly products: number;
}

/** Σ c_k·M_k + c_I·I, in one pass over the entries (up to four terms at a time). */
function combine(n: number, terms: readonly (readonly [number, Matrix])[], identityCoef: number): Matrix {
  const out = productZeros(n, n);
  const o = out.data;
  const len = o.length;
  for (let t = 0; t < terms.length; t += 4) {
    const group = terms.slice(t, t + 4);
    const [c0, m0] = group[0];
    const d0 = m0.data;
    if (group.length === 4) {
      const c1 = group[1][0], c2 = group[2][0], c3 = group[3][0];
      const d1 = group[1][1].data, d2 = group[2][1].data, d3 = group[3][1].data;
      for (let k = 0; k < len; k++) o[k] += c0 * d0[k] + c1 * d1[k] + c2 * d2[k] + c3 * d3[k];
    } else if (group.length === 3) {
      const c1 = group[1][0], c2 = group[2][0];
      const d1 = group[1][1].data, d2 = group[2][1].data;
      for (let k = 0; k < len; k++) o[k] += c0 * d0[k] + c1 * d1[k] + c2 * d2[k];
    } else if (group.length === 2) {
      const c1 = group[1][0];
      const d1 = group[1][1].data;
      for (let k = 0; k < len; k++) o[k] += c0 * d0[k] + c1 * d1[k];
    } else {
      for (let k = 0; k < len; k++) o[k] += c0 * d0[k];
    }
  }
  if (identityCoef !== 0) for (let i = 0; i < n; i++) o[i * n + i] += identityCoef;
  return out;
}

/** r_m(A) = (V − U)⁻¹(V + U) with U the odd and V the even part of the Padé numerator. */
function padeApproximant(
  a: Matrix,
  m: number,
  given: { A2?: Matrix; A4?: Matrix; A6?: Matrix } = {},
): { r: Matrix; products: number } {
  const n = a.rows;
  const b = PADE[m];
  let products = 0;
  const power = (have: Matrix | undefined, x: Matrix, y: Matrix): Matrix => {
    if (have) return have;
    products++;
    return matmul(x, y);
  };
  const A2 = power(given.A2, a, a);
  let U: Matrix;
  let V: Matrix;
  if (m === 13) {
    // Higham (2005) eq. (2.10): U = A[A6(b13 A6 + b11 A4 + b9 A2) + b7 A6 + b5 A4 + b3 A2 + b1 I],
    // V = A6(b12 A6 + b10 A4 + b8 A2) + b6 A6 + b4 A4 + b2 A2 + b0 I.
    const A4 = power(given.A4, A2, A2);
    const A6 = power(given.A6, A4, A2);
    const innerU = matmul(A6, combine(n, [[b[13], A6], [b[11], A4], [b[9], A2]], 0));
    const u = combine(n, [[1, innerU], [b[7], A6], [b[5], A4], [b[3], A2]], b[1]);
    U = matmul(a, u);
    const innerV = matmul(A6, combine(n, [[b[12], A6], [b[10], A4], [b[8], A2]], 0));
    V = combine(n, [[1, innerV], [b[6], A6], [b[4], A4], [b[2], A2]], b[0]);
    products += 3;
  } else {
    // Higham (2005) eq. (2.9): powers A2, A4, …, A_{m−1}; U = A Σ b_{2k+1} A_{2k}, V = Σ b_{2k} A_{2k}.
    const powers: Matrix[] = [identity(n), A2];
    for (let k = 2; 2 * k < m; k++) {
      const known = k === 2 ? given.A4 : k === 3 ? given.A6 : undefined;
      powers.push(power(known, powers[k - 1], A2));
    }
    const oddTerms: [number, Matrix][] = [];
    const evenTerms: [number, Matrix][] = [];
    for (let k = 1; k < powers.length; k++) {
      oddTerms.push([b[2 * k + 1], powers[k]]);
      evenTerms.push([b[2 * k], powers[k]]);
    }
    U = matmul(a, combine(n, oddTerms, b[1]));
    V = combine(n, evenTerms, b[0]);
    products++;
  }
  const numerator = combine(n, [[1, V], [1, U]], 0);
  const denominator = combine(n, [[1, V], [-1, U]], 0);
  return { r: solve(denominator, numerator), products };
}

// ---- 1-norm estimation for the power norms (Al-Mohy & Higham 2009) ----------------------------------

function applyProduct(factors: readonly Matrix[], x: Float64Array, transpose: boolean): Float64Array {
  let v = x;
  const order = transpose ? factors : [...factors].reverse();
  for (const f of order) {
    const n = f.rows;
    const out = new Float64Array(n);
    const d = f.data;
    if (transpose) {
      // out = Fᵀv, four rows of F at a time.
      let i = 0;
      for (; i + 3 < n; i += 4) {
        const v0 = v[i], v1 = v[i + 1], v2 = v[i + 2], v3 = v[i + 3];
        const o0 = i * n, o1 = o0 + n, o2 = o1 + n, o3 = o2 + n;
        for (let j = 0; j < n; j++) out[j] += d[o0 + j] * v0 + d[o1 + j] * v1 + d[o2 + j] * v2 + d[o3 + j] * v3;
      }
      for (; i < n; i++) {
        const vi = v[i];
        const o = i * n;
        for (let j = 0; j < n; j++) out[j] += d[o + j] * vi;
      }
    } else {
      matVecRows(d, n, v, out, 0, n);
    }
    v = out;
  }
  return v;
}

/**
 * Lower estimate of ‖F₁F₂…F_k‖₁ without forming the product: Hager's (1984) iteration as refined by
 * Higham (1988, Algorithm 4.1), at most five sweeps, plus Higham's alternating-sign test vector.
 */
function norm1EstimateOfProduct(factors: readonly Matrix[]): number {
  const n = factors[0].rows;
  let x = new Float64Array(n).fill(1 / n);
  let estimate = 0;
  let lastJ = -1;
  for (let sweep = 0; sweep < 5; sweep++) {
    const y = applyProduct(factors, x, false);
    const ynorm = y.reduce((s, v) => s + Math.abs(v), 0);
    if (sweep > 0 && ynorm <= estimate) break;
    estimate = ynorm;
    const z = applyProduct(factors, y.map((v) => (v >= 0 ? 1 : -1)), true);
    let j = 0;
    for (let i = 1; i < n; i++) if (Math.abs(z[i]) > Math.abs(z[j])) j = i;
    const ztx = z.reduce((s, v, i) => s + v * x[i], 0);
    if (sweep > 0 && (Math.abs(z[j]) <= ztx || j === lastJ)) break;
    lastJ = j;
    x = new Float64Array(n);
    x[j] = 1;
  }
  const alt = new Float64Array(n);
  for (let i = 0; i < n; i++) alt[i] = (i % 2 === 0 ? 1 : -1) * (1 + (n > 1 ? i / (n - 1) : 0));
  const altNorm = applyProduct(factors, alt, false).reduce((s, v) => s + Math.abs(v), 0);
  return Math.max(estimate, (2 * altNorm) / (3 * n));
}

/** ‖|A|^k‖₁ exactly: for a non-negative matrix the 1-norm is ‖(|A|ᵀ)^k·1‖∞, k transposed products. */
function norm1OfAbsolutePower(a: Matrix, k: number, scale: number): number {
  const n = a.rows;
  const absA = { rows: n, cols: n, data: a.data.map((v) => Math.abs(v) * scale) };
  let v: Float64Array = new Float64Array(n).fill(1);
  for (let p = 0; p < k; p++) v = applyProduct([absA], v, true);
  return v.reduce((m, e) => Math.max(m, e), 0);
}

const UNIT_ROUNDOFF = 2 ** -53;

function factorial(k: number): number {
  let f = 1;
  for (let i = 2; i <= k; i++) f *= i;
  return f;
}

/** ℓ(2^−s·A, m): extra squarings so the rounding of r_m stays below u (Al-Mohy & Higham 2009, eq. 5.3). */
function extraSquarings(a: Matrix, m: number, scale: number, normA: number): number {
  if (normA === 0) return 0;
  const c = (factorial(m) ** 2) / (factorial(2 * m) * factorial(2 * m + 1));
  const alpha = (c * norm1OfAbsolutePower(a, 2 * m + 1, scale)) / (normA * scale);
  if (!(alpha > 0)) return 0;
  return Math.max(Math.ceil(Math.log2(alpha / UNIT_ROUNDOFF) / (2 * m)), 0);
}

export interface ExpmOptions {
  /** 'powers' (default): Al-Mohy & Higham 2009; 'norm': Higham 2005, Algorithm 2.3. */
  scaling?: 'powers' | 'norm';
}

/** e^A with the degree and scaling used. */
export function expmWithInfo(a: Matrix, options: ExpmOptions = {}): ExpmResult {
  if (a.rows !== a.cols) throw new Error(`expm: matrix must be square, got ${a.rows}×${a.cols}`);
  const n = a.rows;
  if (n === 0) return { value: zeros(0, 0), padeDegree: 0, squarings: 0, products: 0 };
  if ((options.scaling ?? 'powers') === 'powers') return expmPowers(a);
  const normA = norm1(a);
  for (const m of [3, 5, 7, 9]) {
    if (normA <= THETA[m]) {
      const { r, products } = padeApproximant(a, m);
      return { value: r, padeDegree: m, squarings: 0, products };
    }
  }
  const s = Math.max(0, Math.ceil(Math.log2(normA / THETA[13])));
  const scaled = s === 0 ? a : { rows: n, cols: n, data: a.data.map((v) => v / 2 ** s) };
  let { r, products } = padeApproximant(scaled, 13);
  for (let k = 0; k < s; k++) {
    r = matmul(r, r);
    products++;
  }
  return { value: r, padeDegree: 13, squarings: s, products };
}

/** Al-Mohy & Higham (2009), Algorithm 5.1, with the Padé evaluation of Higham (2005). */
function expmPowers(a: Matrix): ExpmResult {
  const n = a.rows;
  const normA = norm1(a);
  if (normA === 0) return { value: identity(n), padeDegree: 3, squarings: 0, products: 0 };
  // Degrees 3 and 5 from estimates of ‖A⁴‖ and ‖A⁶‖ through A²; A² is needed by every degree.
  const A2 = matmul(a, a);
  const eta1 = Math.max(norm1EstimateOfProduct([A2, A2]) ** (1 / 4), norm1EstimateOfProduct([A2, A2, A2]) ** (1 / 6));
  for (const m of [3, 5]) {
    if (eta1 <= THETA[m] && extraSquarings(a, m, 1, normA) === 0) {
      const { r, products } = padeApproximant(a, m, { A2 });
      return { value: r, padeDegree: m, squarings: 0, products: products + 1 };
    }
  }
  // Degrees 7 and 9 from the exact ‖A⁴‖ and ‖A⁶‖.
  const A4 = matmul(A2, A2);
  const A6 = matmul(A4, A2);
  const d4 = norm1(A4) ** (1 / 4);
  const d6 = norm1(A6) ** (1 / 6);
  const eta2 = Math.max(d4, d6);
  for (const m of [7, 9]) {
    if (eta2 <= THETA[m] && extraSquarings(a, m, 1, normA) === 0) {
      const { r, products } = padeApproximant(a, m, { A2, A4, A6 });
      return { value: r, padeDegree: m, squarings: 0, products: products + 3 };
    }
  }
  // Degree 13: s from min(max(d6, d8), max(d8, d10)), then the rounding guard ℓ.
  const d8 = norm1EstimateOfProduct([A4, A4]) ** (1 / 8);
  const d10 = norm1EstimateOfProduct([A4, A6]) ** (1 / 10);
  const eta5 = Math.min(Math.max(d6, d8), Math.max(d8, d10));
  let s = Math.max(0, Math.ceil(Math.log2(eta5 / THETA[13])));
  s += extraSquarings(a, 13, 2 ** -s, normA);
  const scaledBy = (m: Matrix, k: number): Matrix => {
    if (s === 0) return m;
    const out = productZeros(n, n);
    const f = 2 ** (-k * s);
    for (let i = 0; i < out.data.length; i++) out.data[i] = m.data[i] * f;
    return out;
  };
  let { r, products } = padeApproximant(scaledBy(a, 1), 13, { A2: scaledBy(A2, 2), A4: scaledBy(A4, 4), A6: scaledBy(A6, 6) });
  products += 3;
  for (let k = 0; k < s; k++) {
    r = matmul(r, r);
    products++;
  }
  return { value: r, padeDegree: 13, squarings: s, products };
}

/** e^A (Al-Mohy & Higham 2009 scaling; Higham 2005 Padé evaluation). */
export function expm(a: Matrix, options: ExpmOptions = {}): Matrix {
  return expmWithInfo(a, options).value;
}
