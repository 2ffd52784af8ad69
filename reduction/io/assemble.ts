/**
 * Building a validated `StateSpaceModel` from four matrices. This is the one place shapes and values are
 * checked (DESIGN §5, STYLE "validates once at the boundary"): every loader ends here, and nothing deeper
 * in the engine re-checks. Messages name the matrix and say which dimension disagrees with which.
 */
import { ModelError } from '../errors';
import { type Matrix, zeros } from '../linalg/matrix';
import type { ModelLabels, StateSpaceModel } from '../model';

export interface ModelMatrices {
  A: Matrix;
  B: Matrix;
  C: Matrix;
  D?: Matrix;
}

/** What a model file may say besides its matrices: labels of the inputs, outputs and states, and its time base. */
export interface ModelDescription {
  labels?: ModelLabels;
  timeBase?: string;
}

function plural(n: number, word: string): string {
  return `${n} ${word}${n === 1 ? '' : 's'}`;
}

/** Throws empty_matrix for a matrix with no rows or no columns. */
export function requireNonEmpty(m: Matrix, field: string): void {
  if (m.rows === 0 || m.cols === 0) {
    throw new ModelError('empty_matrix', field, `${field} is empty (${m.rows}×${m.cols})`);
  }
}

/** Throws non_finite naming the first NaN or infinite entry (1-based row and column). */
export function requireFinite(m: Matrix, field: string): void {
  for (let k = 0; k < m.data.length; k++) {
    if (!Number.isFinite(m.data[k])) {
      const i = Math.floor(k / m.cols);
      const j = k % m.cols;
      throw new ModelError('non_finite', field, `${field} row ${i + 1}, column ${j + 1} is not finite (${m.data[k]})`);
    }
  }
}

function checkLabels(names: readonly string[] | undefined, field: string, count: number, what: string): void {
  if (names === undefined) return;
  if (!Array.isArray(names) || names.some((s) => typeof s !== 'string')) {
    throw new ModelError('parse_error', field, `${field} must be a list of strings`);
  }
  if (names.length !== count) {
    throw new ModelError(
      'dimension_mismatch',
      field,
      `${field} has ${plural(names.length, 'name')} but the model has ${plural(count, what)}`,
    );
  }
}

/**
 * Validate and assemble ẋ = Ax + Bu, y = Cx + Du. D defaults to zeros (p×m).
 * Throws ModelError: empty_matrix, not_square, dimension_mismatch, non_finite, parse_error (labels, time base).
 */
export function assembleModel(matrices: ModelMatrices, description: ModelDescription = {}): StateSpaceModel {
  const { A, B, C } = matrices;
  requireNonEmpty(A, 'A');
  if (A.rows !== A.cols) {
    throw new ModelError('not_square', 'A', `A must be square but is ${A.rows}×${A.cols}`);
  }
  const n = A.rows;
  requireNonEmpty(B, 'B');
  requireNonEmpty(C, 'C');
  if (B.rows !== n) {
    throw new ModelError('dimension_mismatch', 'B', `B has ${plural(B.rows, 'row')} but A is ${n}×${n}`);
  }
  if (C.cols !== n) {
    throw new ModelError('dimension_mismatch', 'C', `C has ${plural(C.cols, 'column')} but A is ${n}×${n}`);
  }
  const m = B.cols;
  const p = C.rows;
  const D = matrices.D ?? zeros(p, m);
  if (matrices.D) {
    requireNonEmpty(D, 'D');
    if (D.rows !== p) {
      throw new ModelError(
        'dimension_mismatch',
        'D',
        `D has ${plural(D.rows, 'row')} but C has ${plural(p, 'row')} (one per output)`,
      );
    }
    if (D.cols !== m) {
      throw new ModelError(
        'dimension_mismatch',
        'D',
        `D has ${plural(D.cols, 'column')} but B has ${plural(m, 'column')} (one per input)`,
      );
    }
  }
  requireFinite(A, 'A');
  requireFinite(B, 'B');
  requireFinite(C, 'C');
  requireFinite(D, 'D');
  const { labels = {}, timeBase } = description;
  checkLabels(labels.inputs, 'labels.inputs', m, 'input');
  checkLabels(labels.outputs, 'labels.outputs', p, 'output');
  checkLabels(labels.states, 'labels.states', n, 'state');
  if (timeBase !== undefined && (typeof timeBase !== 'string' || timeBase.trim() === '')) {
    throw new ModelError('parse_error', 'timeBase', 'timeBase must be a non-empty string such as "s"');
  }
  const kept: ModelLabels = {
    ...(labels.inputs ? { inputs: [...labels.inputs] } : {}),
    ...(labels.outputs ? { outputs: [...labels.outputs] } : {}),
    ...(labels.states ? { states: [...labels.states] } : {}),
  };
  const model: StateSpaceModel = {
    A,
    B,
    C,
    D,
    ...(Object.keys(kept).length > 0 ? { labels: kept } : {}),
    ...(timeBase ? { timeBase } : {}),
  };
  return model;
}
