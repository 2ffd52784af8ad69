/**
 * Dense real matrices for the engine: row-major `Float64Array` storage with explicit dimensions.
 *
 * Every kernel in `reduction/linalg/` takes and returns this type. Entry (i, j) lives at
 * `data[i * cols + j]`. Functions here allocate their result; hot kernels elsewhere may write into
 * a caller-provided output instead (documented where they do).
 */
export interface Matrix {
  readonly rows: number;
  readonly cols: number;
  readonly data: Float64Array;
}

/** A complex vector or list of complex numbers, as two parallel real arrays. */
export interface ComplexVector {
  readonly re: Float64Array;
  readonly im: Float64Array;
}

export function zeros(rows: number, cols: number): Matrix {
  return { rows, cols, data: new Float64Array(rows * cols) };
}

export function identity(n: number): Matrix {
  const m = zeros(n, n);
  for (let i = 0; i < n; i++) m.data[i * n + i] = 1;
  return m;
}

export function fromRows(rows: readonly (readonly number[])[]): Matrix {
  const r = rows.length;
  const c = r === 0 ? 0 : rows[0].length;
  const m = zeros(r, c);
  for (let i = 0; i < r; i++) {
    const row = rows[i];
    for (let j = 0; j < c; j++) m.data[i * c + j] = row[j];
  }
  return m;
}

export function toRows(m: Matrix): number[][] {
  const out: number[][] = [];
  for (let i = 0; i < m.rows; i++) out.push(Array.from(m.data.subarray(i * m.cols, (i + 1) * m.cols)));
  return out;
}

export function get(m: Matrix, i: number, j: number): number {
  return m.data[i * m.cols + j];
}

export function transpose(m: Matrix): Matrix {
  const t = zeros(m.cols, m.rows);
  const { rows, cols, data } = m;
  for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) t.data[j * rows + i] = data[i * cols + j];
  return t;
}

export function add(a: Matrix, b: Matrix): Matrix {
  const out = zeros(a.rows, a.cols);
  for (let k = 0; k < out.data.length; k++) out.data[k] = a.data[k] + b.data[k];
  return out;
}

export function sub(a: Matrix, b: Matrix): Matrix {
  const out = zeros(a.rows, a.cols);
  for (let k = 0; k < out.data.length; k++) out.data[k] = a.data[k] - b.data[k];
  return out;
}

export function scale(a: Matrix, s: number): Matrix {
  const out = zeros(a.rows, a.cols);
  for (let k = 0; k < out.data.length; k++) out.data[k] = a.data[k] * s;
  return out;
}

/** Rows r0..r1-1 and columns c0..c1-1 (half-open ranges) as a new matrix. */
export function block(m: Matrix, r0: number, r1: number, c0: number, c1: number): Matrix {
  const out = zeros(r1 - r0, c1 - c0);
  for (let i = r0; i < r1; i++) {
    out.data.set(m.data.subarray(i * m.cols + c0, i * m.cols + c1), (i - r0) * out.cols);
  }
  return out;
}

export function frobeniusNorm(m: Matrix): number {
  let s = 0;
  for (let k = 0; k < m.data.length; k++) s += m.data[k] * m.data[k];
  return Math.sqrt(s);
}

/** Largest absolute row sum (the induced infinity norm). */
export function normInf(m: Matrix): number {
  let best = 0;
  for (let i = 0; i < m.rows; i++) {
    let s = 0;
    for (let j = 0; j < m.cols; j++) s += Math.abs(m.data[i * m.cols + j]);
    if (s > best) best = s;
  }
  return best;
}

/** Largest absolute column sum (the induced 1-norm). */
export function norm1(m: Matrix): number {
  const sums = new Float64Array(m.cols);
  for (let i = 0; i < m.rows; i++) for (let j = 0; j < m.cols; j++) sums[j] += Math.abs(m.data[i * m.cols + j]);
  let best = 0;
  for (let j = 0; j < m.cols; j++) if (sums[j] > best) best = sums[j];
  return best;
}
