/**
 * Assembling state-space realizations from parts: block-diagonal and stacked matrices, the parallel
 * connection and the error system G − Gr, slicing a realization's leading states.
 *
 * These are the interconnection formulas of any linear-systems text (e.g. Zhou, Doyle & Glover,
 * Robust and Optimal Control, 1996, §3.6): for G1 = (A1, B1, C1, D1) and G2 = (A2, B2, C2, D2) with the
 * same inputs and outputs, G1 − G2 = (diag(A1, A2), [B1; B2], [C1, −C2], D1 − D2).
 */
import { type Matrix, zeros, block } from './linalg/matrix';
import type { StateSpaceModel } from './model';

/** diag(X1, X2, …) for square or rectangular blocks. */
export function blockDiagonal(...parts: readonly Matrix[]): Matrix {
  const rows = parts.reduce((s, p) => s + p.rows, 0);
  const cols = parts.reduce((s, p) => s + p.cols, 0);
  const out = zeros(rows, cols);
  let r0 = 0;
  let c0 = 0;
  for (const p of parts) {
    for (let i = 0; i < p.rows; i++) out.data.set(p.data.subarray(i * p.cols, (i + 1) * p.cols), (r0 + i) * cols + c0);
    r0 += p.rows;
    c0 += p.cols;
  }
  return out;
}

/** [X1; X2; …] (same column count). */
export function stackRows(...parts: readonly Matrix[]): Matrix {
  const cols = parts.length > 0 ? parts[0].cols : 0;
  const rows = parts.reduce((s, p) => s + p.rows, 0);
  const out = zeros(rows, cols);
  let offset = 0;
  for (const p of parts) {
    out.data.set(p.data, offset);
    offset += p.data.length;
  }
  return out;
}

/** [X1, X2, …] (same row count). */
export function stackColumns(...parts: readonly Matrix[]): Matrix {
  const rows = parts.length > 0 ? parts[0].rows : 0;
  const cols = parts.reduce((s, p) => s + p.cols, 0);
  const out = zeros(rows, cols);
  let c0 = 0;
  for (const p of parts) {
    for (let i = 0; i < rows; i++) out.data.set(p.data.subarray(i * p.cols, (i + 1) * p.cols), i * cols + c0);
    c0 += p.cols;
  }
  return out;
}

/** The columns listed in `indices`, in that order. */
export function selectColumns(m: Matrix, indices: readonly number[]): Matrix {
  const out = zeros(m.rows, indices.length);
  for (let i = 0; i < m.rows; i++) {
    for (let k = 0; k < indices.length; k++) out.data[i * indices.length + k] = m.data[i * m.cols + indices[k]];
  }
  return out;
}

/** The rows listed in `indices`, in that order. */
export function selectRows(m: Matrix, indices: readonly number[]): Matrix {
  const out = zeros(indices.length, m.cols);
  for (let k = 0; k < indices.length; k++) {
    out.data.set(m.data.subarray(indices[k] * m.cols, (indices[k] + 1) * m.cols), k * m.cols);
  }
  return out;
}

/** (X + Xᵀ)/2: removes the rounding asymmetry of a computed gramian before a symmetric decomposition. */
export function symmetricPart(m: Matrix): Matrix {
  const n = m.rows;
  const out = zeros(n, n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) out.data[i * n + j] = 0.5 * (m.data[i * n + j] + m.data[j * n + i]);
  }
  return out;
}

/** The realization's first `r` states (truncation of an ordered realization); D unchanged. */
export function leadingStates(model: StateSpaceModel, r: number): StateSpaceModel {
  return {
    A: block(model.A, 0, r, 0, r),
    B: block(model.B, 0, r, 0, model.B.cols),
    C: block(model.C, 0, model.C.rows, 0, r),
    D: model.D,
  };
}

/** G1 + G2 with the states of G1 first (parallel connection, same inputs and outputs). */
export function parallel(g1: StateSpaceModel, g2: StateSpaceModel): StateSpaceModel {
  const D = zeros(g1.D.rows, g1.D.cols);
  for (let k = 0; k < D.data.length; k++) D.data[k] = g1.D.data[k] + g2.D.data[k];
  return {
    A: blockDiagonal(g1.A, g2.A),
    B: stackRows(g1.B, g2.B),
    C: stackColumns(g1.C, g2.C),
    D,
  };
}

/** The error system G − Gr (Zhou, Doyle & Glover 1996, §3.6). */
export function errorSystem(g: StateSpaceModel, gr: StateSpaceModel): StateSpaceModel {
  const negC = zeros(gr.C.rows, gr.C.cols);
  for (let k = 0; k < negC.data.length; k++) negC.data[k] = -gr.C.data[k];
  const negD = zeros(gr.D.rows, gr.D.cols);
  for (let k = 0; k < negD.data.length; k++) negD.data[k] = -gr.D.data[k];
  return parallel(g, { A: gr.A, B: gr.B, C: negC, D: negD });
}
