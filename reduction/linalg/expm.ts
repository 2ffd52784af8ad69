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
 * Contract: A square with finite entries. Returns e^A with a relative backward error ~u‖A‖ for the
 * rounding-free evaluation; the forward error is governed by the conditioning of the exponential
 * (Higham 2005, §1). Nothing is checked here beyond squareness: callers validate their models once
 * at the boundary (`reduction/io`).
 */
import { type Matrix, zeros, identity, norm1, matmul, solve } from './index';

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

/** Σ c_k·M_k + c_I·I, in one pass over the entries. */
function combine(n: number, terms: readonly (readonly [number, Matrix])[], identityCoef: number): Matrix {
  const out = zeros(n, n);
  const o = out.data;
  for (const [c, m] of terms) {
    const d = m.data;
    for (let k = 0; k < o.length; k++) o[k] += c * d[k];
  }
  if (identityCoef !== 0) for (let i = 0; i < n; i++) o[i * n + i] += identityCoef;
  return out;
}

/** r_m(A) = (V − U)⁻¹(V + U) with U the odd and V the even part of the Padé numerator. */
function padeApproximant(a: Matrix, m: number): { r: Matrix; products: number } {
  const n = a.rows;
  const b = PADE[m];
  const A2 = matmul(a, a);
  let products = 1;
  let U: Matrix;
  let V: Matrix;
  if (m === 13) {
    // Higham (2005) eq. (2.10): U = A[A6(b13 A6 + b11 A4 + b9 A2) + b7 A6 + b5 A4 + b3 A2 + b1 I],
    // V = A6(b12 A6 + b10 A4 + b8 A2) + b6 A6 + b4 A4 + b2 A2 + b0 I.
    const A4 = matmul(A2, A2);
    const A6 = matmul(A4, A2);
    products += 2;
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
      powers.push(matmul(powers[k - 1], A2));
      products++;
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

/** e^A with the degree and scaling used (Higham 2005, Algorithm 2.3). */
export function expmWithInfo(a: Matrix): ExpmResult {
  if (a.rows !== a.cols) throw new Error(`expm: matrix must be square, got ${a.rows}×${a.cols}`);
  const n = a.rows;
  if (n === 0) return { value: zeros(0, 0), padeDegree: 0, squarings: 0, products: 0 };
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

/** e^A (Higham 2005, Algorithm 2.3). */
export function expm(a: Matrix): Matrix {
  return expmWithInfo(a).value;
}
