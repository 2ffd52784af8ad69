/**
 * The quasi-triangular Sylvester kernel of Bartels & Stewart ("Algorithm 432: Solution of the matrix
 * equation AX + XB = C", Comm. ACM 15(9), 1972): T·Y + Y·S = F for upper quasi-triangular T and S,
 * by substitution over their 1×1 and 2×2 diagonal blocks (small systems of order 1, 2 or 4, as in
 * LAPACK's dtrsyl). The portable backend's implementation; the native one calls dtrsyl3.
 */
import type { Matrix } from './matrix';

/** Diagonal block starts of a quasi-triangular matrix: [start, size] pairs. */
function blocks(t: Matrix): [number, number][] {
  const n = t.rows;
  const out: [number, number][] = [];
  for (let i = 0; i < n; ) {
    const two = i + 1 < n && t.data[(i + 1) * n + i] !== 0;
    out.push([i, two ? 2 : 1]);
    i += two ? 2 : 1;
  }
  return out;
}

/** Solves the dense k×k system M·x = r (k ≤ 4) by Gaussian elimination with partial pivoting. */
function smallSolve(m: Float64Array, r: Float64Array, k: number, tiny: number): boolean {
  let perturbed = false;
  for (let c = 0; c < k; c++) {
    let p = c;
    for (let i = c + 1; i < k; i++) if (Math.abs(m[i * k + c]) > Math.abs(m[p * k + c])) p = i;
    if (p !== c) {
      for (let j = 0; j < k; j++) {
        const t = m[c * k + j];
        m[c * k + j] = m[p * k + j];
        m[p * k + j] = t;
      }
      const t = r[c];
      r[c] = r[p];
      r[p] = t;
    }
    if (Math.abs(m[c * k + c]) < tiny) {
      // As dtrsyl: perturb a (near-)singular pivot and report it.
      m[c * k + c] = m[c * k + c] >= 0 ? tiny : -tiny;
      perturbed = true;
    }
    for (let i = c + 1; i < k; i++) {
      const f = m[i * k + c] / m[c * k + c];
      if (f === 0) continue;
      for (let j = c; j < k; j++) m[i * k + j] -= f * m[c * k + j];
      r[i] -= f * r[c];
    }
  }
  for (let c = k - 1; c >= 0; c--) {
    let s = r[c];
    for (let j = c + 1; j < k; j++) s -= m[c * k + j] * r[j];
    r[c] = s / m[c * k + c];
  }
  return perturbed;
}

/**
 * Y with T·Y + Y·S = F for upper quasi-triangular T (n×n) and S (m×m), F n×m (overwritten by Y).
 * Returns whether a pivot had to be perturbed (T and −S share an eigenvalue to working precision).
 */
export function quasiTriangularSylvester(t: Matrix, s: Matrix, f: Matrix): boolean {
  const n = t.rows, m = s.rows;
  const T = t.data, S = s.data, Y = f.data;
  let norm = 0;
  for (const v of T) norm = Math.max(norm, Math.abs(v));
  for (const v of S) norm = Math.max(norm, Math.abs(v));
  const tiny = Math.max(Number.EPSILON * norm, Number.MIN_VALUE * 1e10);
  const tb = blocks(t), sb = blocks(s);
  const M = new Float64Array(16);
  const r = new Float64Array(4);
  let perturbed = false;
  // Columns of Y left to right (S is upper triangular), rows bottom-up within each (T is upper).
  for (const [j, q] of sb) {
    for (let bi = tb.length - 1; bi >= 0; bi--) {
      const [i, p] = tb[bi];
      // r = F[i.., j..] − T[i.., i+p..]·Y[i+p.., j..] (the S coupling was already subtracted).
      for (let a = 0; a < p; a++) {
        for (let b = 0; b < q; b++) {
          let sum = Y[(i + a) * m + j + b];
          const ti = (i + a) * n;
          for (let c = i + p; c < n; c++) sum -= T[ti + c] * Y[c * m + j + b];
          r[a * q + b] = sum;
        }
      }
      // Σ_c T[i+a, i+c]·X[c, b] + Σ_d X[a, d]·S[j+d, j+b] = r[a, b], unknowns X[a, b] at a·q + b.
      const k = p * q;
      M.fill(0, 0, k * k);
      for (let a = 0; a < p; a++)
        for (let b = 0; b < q; b++) {
          const row = (a * q + b) * k;
          for (let c = 0; c < p; c++) M[row + c * q + b] += T[(i + a) * n + i + c];
          for (let d = 0; d < q; d++) M[row + a * q + d] += S[(j + d) * m + j + b];
        }
      if (smallSolve(M, r, k, tiny)) perturbed = true;
      for (let a = 0; a < p; a++) for (let b = 0; b < q; b++) Y[(i + a) * m + j + b] = r[a * q + b];
    }
    // Later columns: F[:, j+q..] −= Y[:, j..j+q]·S[j..j+q, j+q..].
    for (let row = 0; row < n; row++) {
      const yr = row * m;
      for (let d = 0; d < q; d++) {
        const y = Y[yr + j + d];
        if (y === 0) continue;
        const sr = (j + d) * m;
        for (let c = j + q; c < m; c++) Y[yr + c] -= y * S[sr + c];
      }
    }
  }
  return perturbed;
}
