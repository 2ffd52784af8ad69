/**
 * JSON output for the command line: matrices as arrays of rows, and non-finite numbers (which JSON
 * cannot hold) as null, so every document parses with a plain JSON reader.
 */
import type { Matrix, ComplexVector } from '../linalg/matrix';

export function finiteOrNull(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}

export function matrixRows(m: Matrix): (number | null)[][] {
  const out: (number | null)[][] = [];
  for (let i = 0; i < m.rows; i++) {
    const row: (number | null)[] = [];
    for (let j = 0; j < m.cols; j++) row.push(finiteOrNull(m.data[i * m.cols + j]));
    out.push(row);
  }
  return out;
}

/** A model's A, B, C, D as the documents print them. */
export function modelMatrices(m: { A: Matrix; B: Matrix; C: Matrix; D: Matrix }): Record<'A' | 'B' | 'C' | 'D', (number | null)[][]> {
  return { A: matrixRows(m.A), B: matrixRows(m.B), C: matrixRows(m.C), D: matrixRows(m.D) };
}

export function numberList(values: ArrayLike<number>): (number | null)[] {
  return Array.from(values, finiteOrNull);
}

/** Complex numbers as [re, im] pairs. */
export function complexPairs(v: ComplexVector): [number | null, number | null][] {
  return Array.from(v.re, (re, i) => [finiteOrNull(re), finiteOrNull(v.im[i])]);
}

/** How an H∞ figure was certified: its bracket, the method and the Hamiltonian eigenvalue computations it took. */
export function hInfinityCertificate(h: {
  lowerBound: number;
  upperBound: number;
  method: string;
  hamiltonianSolves: number;
  hamiltonianOrder: number;
  certificationSlack: number;
}): Record<string, number | string | null> {
  return {
    lowerBound: finiteOrNull(h.lowerBound),
    upperBound: finiteOrNull(h.upperBound),
    method: h.method,
    hamiltonianSolves: h.hamiltonianSolves,
    hamiltonianOrder: h.hamiltonianOrder,
    slack: h.certificationSlack,
  };
}
