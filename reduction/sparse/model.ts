/**
 * Sparse state-space models for the large-model path: E ẋ = A x + B u, y = C x + D u with A (and E, when
 * given) square in compressed sparse column form (`CscMatrix`, 0-based Int32 indices, from
 * `reduction/linalg/sparse.ts`), and B, C, D dense and thin. E is a nonsingular matrix (a finite-element
 * mass matrix, say); nothing here ever forms E⁻¹A — every use of E⁻¹ is a sparse solve.
 *
 * The helpers are the few sparse operations the large-model path needs: CSC from coordinates (duplicates
 * summed), products with a dense block, the transpose, and the union pattern of A and E on which the
 * values of A − σE are written for every shift σ, so that one symbolic analysis serves all shifts.
 * Nothing here allocates n² numbers.
 */
import { ModelError } from '../errors';
import { type Matrix, zeros } from '../linalg/index';
import type { CscMatrix } from '../linalg/sparse';

export type { CscMatrix } from '../linalg/sparse';

export interface SparseStateSpaceModel {
  readonly A: CscMatrix; // n×n sparse
  /** Nonsingular n×n sparse descriptor matrix; absent means the identity. */
  readonly E?: CscMatrix;
  readonly B: Matrix; // n×m dense
  readonly C: Matrix; // p×n dense
  readonly D: Matrix; // p×m dense (zeros when the input gave none)
}

export function sparseStateCount(m: SparseStateSpaceModel): number {
  return m.A.n;
}

/** Checks the shapes once at the boundary (as `reduction/model.ts` does for dense models); D defaults to zeros. */
export function createSparseModel(parts: { A: CscMatrix; E?: CscMatrix; B: Matrix; C: Matrix; D?: Matrix }): SparseStateSpaceModel {
  const { A, E, B, C } = parts;
  const n = A.n;
  if (n === 0) throw new ModelError('empty_matrix', 'A', 'A is empty');
  checkCsc(A, 'A');
  if (E) {
    checkCsc(E, 'E');
    if (E.n !== n) throw new ModelError('dimension_mismatch', 'E', `E is ${E.n}×${E.n} but A is ${n}×${n}`);
  }
  if (B.rows !== n) throw new ModelError('dimension_mismatch', 'B', `B has ${B.rows} rows but A has ${n} states`);
  if (C.cols !== n) throw new ModelError('dimension_mismatch', 'C', `C has ${C.cols} columns but A has ${n} states`);
  if (B.cols === 0) throw new ModelError('empty_matrix', 'B', 'B has no columns (no inputs)');
  if (C.rows === 0) throw new ModelError('empty_matrix', 'C', 'C has no rows (no outputs)');
  const D = parts.D ?? zeros(C.rows, B.cols);
  if (D.rows !== C.rows || D.cols !== B.cols) {
    throw new ModelError('dimension_mismatch', 'D', `D is ${D.rows}×${D.cols} but C and B need ${C.rows}×${B.cols}`);
  }
  for (const [name, m] of [['B', B], ['C', C], ['D', D]] as const) {
    for (let k = 0; k < m.data.length; k++) {
      if (!Number.isFinite(m.data[k])) throw new ModelError('non_finite', name, `${name} has a non-finite entry`);
    }
  }
  return { A, E, B, C, D };
}

function checkCsc(a: CscMatrix, name: string): void {
  const { n, colPtr, rowIndex, values } = a;
  if (colPtr.length !== n + 1 || colPtr[0] !== 0 || colPtr[n] !== rowIndex.length || values.length !== rowIndex.length) {
    throw new ModelError('parse_error', name, `${name} is not a consistent compressed-column matrix`);
  }
  for (let k = 0; k < values.length; k++) {
    if (!Number.isFinite(values[k])) throw new ModelError('non_finite', name, `${name} has a non-finite entry`);
  }
}

/**
 * CSC (square n×n) from coordinates, 0-based, duplicates summed, row indices sorted within each column.
 * Entries that sum to exactly zero are kept (the pattern is what the file declared).
 */
export function cscFromCoo(n: number, rows: ArrayLike<number>, cols: ArrayLike<number>, vals: ArrayLike<number>): CscMatrix {
  const nnzIn = vals.length;
  const count = new Int32Array(n + 1);
  for (let k = 0; k < nnzIn; k++) count[cols[k] + 1]++;
  for (let j = 0; j < n; j++) count[j + 1] += count[j];
  const next = count.slice(0, n);
  const ri = new Int32Array(nnzIn);
  const rv = new Float64Array(nnzIn);
  for (let k = 0; k < nnzIn; k++) {
    const p = next[cols[k]]++;
    ri[p] = rows[k];
    rv[p] = vals[k];
  }
  // Sort each column by row (insertion sort: columns of FE matrices are short), then sum duplicates.
  const colPtr = new Int32Array(n + 1);
  let out = 0;
  for (let j = 0; j < n; j++) {
    const s = count[j], e = count[j + 1];
    for (let p = s + 1; p < e; p++) {
      const r = ri[p], v = rv[p];
      let q = p - 1;
      while (q >= s && ri[q] > r) {
        ri[q + 1] = ri[q];
        rv[q + 1] = rv[q];
        q--;
      }
      ri[q + 1] = r;
      rv[q + 1] = v;
    }
    colPtr[j] = out;
    for (let p = s; p < e; p++) {
      if (out > colPtr[j] && ri[out - 1] === ri[p]) rv[out - 1] += rv[p];
      else {
        ri[out] = ri[p];
        rv[out] = rv[p];
        out++;
      }
    }
  }
  colPtr[n] = out;
  return { n, colPtr, rowIndex: ri.slice(0, out), values: rv.slice(0, out) };
}

/** The n×n sparse identity. */
export function cscIdentity(n: number): CscMatrix {
  const colPtr = new Int32Array(n + 1);
  const rowIndex = new Int32Array(n);
  for (let j = 0; j < n; j++) {
    colPtr[j + 1] = j + 1;
    rowIndex[j] = j;
  }
  return { n, colPtr, rowIndex, values: new Float64Array(n).fill(1) };
}

/** Aᵀ in CSC (row indices sorted). */
export function cscTranspose(a: CscMatrix): CscMatrix {
  const { n, colPtr, rowIndex, values } = a;
  const nnz = colPtr[n];
  const count = new Int32Array(n + 1);
  for (let p = 0; p < nnz; p++) count[rowIndex[p] + 1]++;
  for (let i = 0; i < n; i++) count[i + 1] += count[i];
  const next = count.slice(0, n);
  const ri = new Int32Array(nnz), rv = new Float64Array(nnz);
  for (let j = 0; j < n; j++) {
    for (let p = colPtr[j]; p < colPtr[j + 1]; p++) {
      const q = next[rowIndex[p]]++;
      ri[q] = j;
      rv[q] = values[p];
    }
  }
  return { n, colPtr: count, rowIndex: ri, values: rv };
}

/** A·X for a dense n×k block X (row-major); returns n×k. */
export function cscTimesDense(a: CscMatrix, x: Matrix): Matrix {
  const { n, colPtr, rowIndex, values } = a;
  if (x.rows !== n) throw new Error(`sparse product: A is ${n}×${n}, the block has ${x.rows} rows`);
  const k = x.cols;
  const y = zeros(n, k);
  const xd = x.data, yd = y.data;
  for (let j = 0; j < n; j++) {
    const xo = j * k;
    for (let p = colPtr[j]; p < colPtr[j + 1]; p++) {
      const v = values[p], yo = rowIndex[p] * k;
      for (let c = 0; c < k; c++) yd[yo + c] += v * xd[xo + c];
    }
  }
  return y;
}

/** Aᵀ·X for a dense n×k block X (row-major); returns n×k. */
export function cscTransposeTimesDense(a: CscMatrix, x: Matrix): Matrix {
  const { n, colPtr, rowIndex, values } = a;
  if (x.rows !== n) throw new Error(`sparse product: A is ${n}×${n}, the block has ${x.rows} rows`);
  const k = x.cols;
  const y = zeros(n, k);
  const xd = x.data, yd = y.data;
  for (let j = 0; j < n; j++) {
    const yo = j * k;
    for (let p = colPtr[j]; p < colPtr[j + 1]; p++) {
      const v = values[p], xo = rowIndex[p] * k;
      for (let c = 0; c < k; c++) yd[yo + c] += v * xd[xo + c];
    }
  }
  return y;
}

/** A·x for one vector. */
export function cscTimesVector(a: CscMatrix, x: Float64Array, transpose = false): Float64Array {
  const { n, colPtr, rowIndex, values } = a;
  const y = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    if (transpose) {
      let s = 0;
      for (let p = colPtr[j]; p < colPtr[j + 1]; p++) s += values[p] * x[rowIndex[p]];
      y[j] = s;
    } else {
      const xj = x[j];
      if (xj === 0) continue;
      for (let p = colPtr[j]; p < colPtr[j + 1]; p++) y[rowIndex[p]] += values[p] * xj;
    }
  }
  return y;
}

/** Dense copy, for small models only (tests, the dense/sparse comparison); refuses n above `limit`. */
export function cscToDense(a: CscMatrix, limit = 5000): Matrix {
  if (a.n > limit) throw new Error(`cscToDense: ${a.n} states is past the limit ${limit} for a dense copy`);
  const m = zeros(a.n, a.n);
  for (let j = 0; j < a.n; j++) for (let p = a.colPtr[j]; p < a.colPtr[j + 1]; p++) m.data[a.rowIndex[p] * a.n + j] += a.values[p];
  return m;
}

/** Sparse copy of a dense square matrix (exact zeros dropped), for tests and small models. */
export function cscFromDense(m: Matrix): CscMatrix {
  const rows: number[] = [], cols: number[] = [], vals: number[] = [];
  for (let j = 0; j < m.cols; j++) {
    for (let i = 0; i < m.rows; i++) {
      const v = m.data[i * m.cols + j];
      if (v !== 0) {
        rows.push(i);
        cols.push(j);
        vals.push(v);
      }
    }
  }
  return cscFromCoo(m.rows, rows, cols, vals);
}

/**
 * The union pattern of A and E (E the identity when absent), with where each entry of A and of E sits in
 * it, so that A − σE for any shift σ is written by `shiftedValues` onto one pattern and one symbolic
 * analysis of that pattern serves every shift.
 */
export interface ShiftPattern {
  readonly pattern: CscMatrix; // values: those of A
  readonly aAt: Int32Array; // position in the union of each stored entry of A
  readonly eAt: Int32Array; // position in the union of each stored entry of E
  readonly eValues: Float64Array; // E's values (ones for the identity)
}

export function shiftPattern(a: CscMatrix, e?: CscMatrix): ShiftPattern {
  const E = e ?? cscIdentity(a.n);
  const n = a.n;
  const colPtr = new Int32Array(n + 1);
  // Count the union column by column (both have sorted rows).
  let nnz = 0;
  for (let j = 0; j < n; j++) {
    let p = a.colPtr[j], q = E.colPtr[j];
    const pe = a.colPtr[j + 1], qe = E.colPtr[j + 1];
    while (p < pe || q < qe) {
      if (q >= qe || (p < pe && a.rowIndex[p] < E.rowIndex[q])) p++;
      else if (p >= pe || E.rowIndex[q] < a.rowIndex[p]) q++;
      else {
        p++;
        q++;
      }
      nnz++;
    }
    colPtr[j + 1] = nnz;
  }
  const rowIndex = new Int32Array(nnz), values = new Float64Array(nnz);
  const aAt = new Int32Array(a.colPtr[n]), eAt = new Int32Array(E.colPtr[n]);
  let k = 0;
  for (let j = 0; j < n; j++) {
    let p = a.colPtr[j], q = E.colPtr[j];
    const pe = a.colPtr[j + 1], qe = E.colPtr[j + 1];
    while (p < pe || q < qe) {
      if (q >= qe || (p < pe && a.rowIndex[p] < E.rowIndex[q])) {
        rowIndex[k] = a.rowIndex[p];
        values[k] = a.values[p];
        aAt[p++] = k;
      } else if (p >= pe || E.rowIndex[q] < a.rowIndex[p]) {
        rowIndex[k] = E.rowIndex[q];
        eAt[q++] = k;
      } else {
        rowIndex[k] = a.rowIndex[p];
        values[k] = a.values[p];
        aAt[p++] = k;
        eAt[q++] = k;
      }
      k++;
    }
  }
  return { pattern: { n, colPtr, rowIndex, values }, aAt, eAt, eValues: E.values };
}

/**
 * Values of A − σE on the union pattern, σ = sigmaRe + i·sigmaIm; `imag` is null for a real shift.
 */
export function shiftedValues(s: ShiftPattern, sigmaRe: number, sigmaIm = 0): { values: Float64Array; imag: Float64Array | null } {
  const nnz = s.pattern.values.length;
  const values = new Float64Array(nnz);
  values.set(s.pattern.values);
  for (let q = 0; q < s.eAt.length; q++) values[s.eAt[q]] -= sigmaRe * s.eValues[q];
  if (sigmaIm === 0) return { values, imag: null };
  const imag = new Float64Array(nnz);
  for (let q = 0; q < s.eAt.length; q++) imag[s.eAt[q]] -= sigmaIm * s.eValues[q];
  return { values, imag };
}
