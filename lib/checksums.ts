// The canonical SHA-256 of a reduced model version's matrices. The same digest is stored in
// reduced_versions.matrices_sha256 when a reduction registers a version, sent with every export of the pull
// API, and written into a controller project's lock file, so all three must compute it the one way below.
//
// Canonical form: JSON.stringify({ A, B, C, D }) with each matrix as an array of rows of numbers, keys in
// that order, nothing else (names and time unit are labels, not the model). JSON.stringify writes each
// double as the shortest string that reads back to the same double (ECMA-262 Number::toString), so the
// digest is stable across processes and machines; -0 is written as 0.
import { createHash } from 'node:crypto';

export type MatrixRows = readonly (readonly number[])[];

export interface StateSpaceRows {
  A: MatrixRows;
  B: MatrixRows;
  C: MatrixRows;
  D: MatrixRows;
}

/** The exact string the digest is taken over. Throws on a non-finite entry, which JSON would turn into null. */
export function canonicalMatricesJson(m: StateSpaceRows): string {
  for (const key of ['A', 'B', 'C', 'D'] as const) {
    for (const row of m[key]) {
      for (const v of row) {
        if (typeof v !== 'number' || !Number.isFinite(v)) {
          throw new Error(`matrix ${key} holds a non-finite entry (${String(v)}); it has no canonical form`);
        }
      }
    }
  }
  return JSON.stringify({ A: m.A, B: m.B, C: m.C, D: m.D });
}

/** Lower-case hex SHA-256 of the canonical matrices JSON (UTF-8). */
export function matricesSha256(m: StateSpaceRows): string {
  return createHash('sha256').update(canonicalMatricesJson(m), 'utf8').digest('hex');
}
