/**
 * Eigen-decomposition of a real symmetric matrix, A = V·diag(λ)·Vᵀ.
 *
 * Method: Householder tridiagonalisation (Golub & Van Loan, Matrix Computations, 4th ed., 2013,
 * §8.3, the symmetric rank-two update form) and the implicitly shifted QL algorithm on the
 * tridiagonal (Bowdler, Martin, Reinsch & Wilkinson, "The QR and QL algorithms for symmetric
 * matrices", Numer. Math. 11, 1968; the tql2 procedure of the Handbook for Automatic Computation II).
 * Only the lower triangle of A is read. Rotations act on rows of Vᵀ so they run with unit stride.
 *
 * Accuracy: backward stable; |λᵢ − λ̂ᵢ| ≤ O(ε)·‖A‖₂ and the vectors are orthonormal to O(ε)
 * (Golub & Van Loan §8.3).
 */
import { type Matrix, zeros } from './matrix';

const EPS = Number.EPSILON;

/** Tridiagonalises the symmetric n×n row-major `a` (destroyed); returns d, e (e[i] = T[i, i−1]) and Qᵀ rows. */
function tridiagonalise(a: Float64Array, n: number, wantVectors: boolean): { d: Float64Array; e: Float64Array; qt: Float64Array | null } {
  const d = new Float64Array(n);
  const e = new Float64Array(n);
  const taus = new Float64Array(n);
  const p = new Float64Array(n);
  // Symmetrise from the lower triangle so that rows can be used as columns.
  for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) a[i * n + j] = a[j * n + i];
  for (let k = 0; k < n - 2; k++) {
    const rk = k * n;
    // Reflector from row k (= column k), entries k+1..n−1; v stored in place of row k.
    const alpha = a[rk + k + 1];
    let xn = 0;
    for (let j = k + 2; j < n; j++) xn += a[rk + j] ** 2;
    if (xn === 0) {
      taus[k] = 0;
      e[k + 1] = alpha;
      continue;
    }
    const beta = -(alpha >= 0 ? 1 : -1) * Math.sqrt(alpha * alpha + xn);
    const tau = (beta - alpha) / beta;
    const sc = 1 / (alpha - beta);
    a[rk + k + 1] = 1;
    for (let j = k + 2; j < n; j++) a[rk + j] *= sc;
    taus[k] = tau;
    e[k + 1] = beta;
    // p = τ·A₂₂·v (rows of the trailing block are its columns), w = p − (τ/2)(pᵀv)·v.
    let pv = 0;
    for (let i = k + 1; i < n; i++) {
      const ri = i * n;
      let s = 0;
      for (let j = k + 1; j < n; j++) s += a[ri + j] * a[rk + j];
      p[i] = tau * s;
      pv += p[i] * a[rk + i];
    }
    const half = 0.5 * tau * pv;
    for (let i = k + 1; i < n; i++) p[i] -= half * a[rk + i];
    // A₂₂ ← A₂₂ − v·wᵀ − w·vᵀ
    for (let i = k + 1; i < n; i++) {
      const ri = i * n;
      const vi = a[rk + i], wi = p[i];
      for (let j = k + 1; j < n; j++) a[ri + j] -= vi * p[j] + wi * a[rk + j];
    }
  }
  for (let i = 0; i < n; i++) d[i] = a[i * n + i];
  if (n >= 2) e[n - 1] = a[(n - 1) * n + n - 2];
  if (!wantVectors) return { d, e, qt: null };
  // Qᵀ = H_{n−3}·…·H₀: start from I and apply the reflectors to the rows from the right, last first
  // (rows r ≤ k are untouched by H_k, which acts on coordinates k+1..n−1).
  const qt = new Float64Array(n * n);
  for (let i = 0; i < n; i++) qt[i * n + i] = 1;
  for (let k = n - 3; k >= 0; k--) {
    const t = taus[k];
    if (t === 0) continue;
    const rk = k * n;
    for (let r = k + 1; r < n; r++) {
      const rr = r * n;
      let s = 0;
      for (let j = k + 1; j < n; j++) s += qt[rr + j] * a[rk + j];
      if (s === 0) continue;
      const f = t * s;
      for (let j = k + 1; j < n; j++) qt[rr + j] -= f * a[rk + j];
    }
  }
  return { d, e, qt };
}

/** Implicit QL (tql2) on (d, e); rotations applied to rows of `zt` (eigenvector rows) when given. */
function tridiagonalQL(d: Float64Array, e: Float64Array, zt: Float64Array | null, n: number): void {
  for (let i = 1; i < n; i++) e[i - 1] = e[i];
  if (n > 0) e[n - 1] = 0;
  let f = 0;
  let tst1 = 0;
  for (let l = 0; l < n; l++) {
    tst1 = Math.max(tst1, Math.abs(d[l]) + Math.abs(e[l]));
    let m = l;
    while (m < n) {
      if (Math.abs(e[m]) <= EPS * tst1) break;
      m++;
    }
    if (m > l) {
      let iter = 0;
      do {
        if (++iter > 60) throw new Error(`symmetricEig: the QL iteration did not converge for eigenvalue ${l + 1} of ${n}`);
        let g = d[l];
        let p = (d[l + 1] - g) / (2 * e[l]);
        let r = Math.hypot(p, 1);
        if (p < 0) r = -r;
        d[l] = e[l] / (p + r);
        d[l + 1] = e[l] * (p + r);
        const dl1 = d[l + 1];
        let h = g - d[l];
        for (let i = l + 2; i < n; i++) d[i] -= h;
        f += h;
        p = d[m];
        let c = 1, c2 = c, c3 = c;
        const el1 = e[l + 1];
        let s = 0, s2 = 0;
        for (let i = m - 1; i >= l; i--) {
          c3 = c2;
          c2 = c;
          s2 = s;
          g = c * e[i];
          h = c * p;
          r = Math.hypot(p, e[i]);
          e[i + 1] = s * r;
          s = e[i] / r;
          c = p / r;
          p = c * d[i] - s * g;
          d[i + 1] = h + s * (c * g + s * d[i]);
          if (zt) {
            const ri = i * n, rj = (i + 1) * n;
            for (let k = 0; k < n; k++) {
              const hk = zt[rj + k];
              zt[rj + k] = s * zt[ri + k] + c * hk;
              zt[ri + k] = c * zt[ri + k] - s * hk;
            }
          }
        }
        p = (-s * s2 * c3 * el1 * e[l]) / dl1;
        e[l] = s * p;
        d[l] = c * p;
      } while (Math.abs(e[l]) > EPS * tst1);
    }
    d[l] += f;
    e[l] = 0;
  }
}

function prepare(what: string, a: Matrix): Float64Array {
  if (a.rows !== a.cols) throw new Error(`${what}: matrix must be square, got ${a.rows}×${a.cols}`);
  const n = a.rows;
  for (let i = 0; i < n; i++)
    for (let j = 0; j <= i; j++) {
      if (!Number.isFinite(a.data[i * n + j])) throw new Error(`${what}: entry (${i}, ${j}) is not finite`);
    }
  return new Float64Array(a.data);
}

/**
 * Eigenvalues ascending and orthonormal eigenvectors (columns of `vectors`) of a symmetric matrix,
 * read from its lower triangle.
 */
export function symmetricEig(a: Matrix): { values: Float64Array; vectors: Matrix } {
  const w = prepare('symmetricEig', a);
  const n = a.rows;
  const { d, e, qt } = tridiagonalise(w, n, true);
  tridiagonalQL(d, e, qt, n);
  // Sort ascending; row i of qt is the vector of d[i].
  const order = Array.from({ length: n }, (_, i) => i).sort((x, y) => d[x] - d[y]);
  const values = new Float64Array(n);
  const vectors = zeros(n, n);
  for (let c = 0; c < n; c++) {
    const src = order[c];
    values[c] = d[src];
    for (let r = 0; r < n; r++) vectors.data[r * n + c] = qt![src * n + r];
  }
  return { values, vectors };
}

/** Eigenvalues of a symmetric matrix, ascending (no vectors: about 4n³/3 flops). */
export function symmetricEigenvalues(a: Matrix): Float64Array {
  const w = prepare('symmetricEigenvalues', a);
  const { d, e } = tridiagonalise(w, a.rows, false);
  tridiagonalQL(d, e, null, a.rows);
  return d.sort();
}
