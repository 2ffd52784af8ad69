/**
 * Second-order models M q̈ + D q̇ + K q = F u,  y = Cd q + Cv q̇ with sparse M, D, K (a finite-element
 * structure), in first-order descriptor form on the state x = [q; q̇] — without M⁻¹:
 *
 *   E = [ I  0 ]    A = [  0   I  ]    B = [ 0 ]    C = [ Cd  Cv ]
 *       [ 0  M ]        [ −K  −D  ]        [ F ]
 *
 * the first companion linearisation (Tisseur & Meerbergen, "The quadratic eigenvalue problem", SIAM Review
 * 43(2), 2001, §3.4; Antoulas, "Approximation of Large-Scale Dynamical Systems", SIAM 2005, §2.2). E is
 * nonsingular exactly when M is, and G(s) = (Cd + s Cv)(s²M + sD + K)⁻¹F is unchanged. The dense path's
 * conversion (`reduction/second-order.ts`) forms M⁻¹K instead; this one keeps every block sparse, so the
 * model stays on the large-model path: 2q states, nonzeros of A = q + nnz(K) + nnz(D), of E = q + nnz(M).
 *
 * A missing damping matrix counts as zero; a missing output map counts as zero, and at least one is required.
 * Throws ModelError naming the matrix at fault (mass, damping, stiffness, force, displacementOutput,
 * velocityOutput), as the dense conversion does.
 */
import { ModelError } from '../errors';
import { zeros, type Matrix } from '../linalg/index';
import { createSparseModel, cscFromCoo, type CscMatrix, type SparseStateSpaceModel } from './model';

export interface SparseSecondOrder {
  readonly mass: CscMatrix; // q×q
  readonly damping?: CscMatrix; // q×q, zero when absent
  readonly stiffness: CscMatrix; // q×q
  readonly force: Matrix; // q×m
  readonly displacementOutput?: Matrix; // p×q
  readonly velocityOutput?: Matrix; // p×q
  /** the feedthrough D of y = … + D u (p×m), zero when absent */
  readonly feedthrough?: Matrix;
}

export function secondOrderToDescriptor(so: SparseSecondOrder): SparseStateSpaceModel {
  const q = so.mass.n;
  if (q === 0) throw new ModelError('empty_matrix', 'mass', 'mass is empty');
  for (const [m, field] of [
    [so.stiffness, 'stiffness'],
    [so.damping, 'damping'],
  ] as const) {
    if (m && m.n !== q) throw new ModelError('dimension_mismatch', field, `${field} is ${m.n}×${m.n} but mass is ${q}×${q}`);
  }
  for (const [m, field] of [
    [so.mass, 'mass'],
    [so.stiffness, 'stiffness'],
    [so.damping, 'damping'],
  ] as const) {
    if (m && !m.values.every(Number.isFinite)) throw new ModelError('non_finite', field, `${field} has a non-finite entry`);
  }
  if (so.force.rows !== q) throw new ModelError('dimension_mismatch', 'force', `force has ${so.force.rows} rows but mass is ${q}×${q}`);
  const Cd = so.displacementOutput, Cv = so.velocityOutput;
  if (!Cd && !Cv) throw new ModelError('missing_field', 'displacementOutput', 'a second-order model needs displacementOutput or velocityOutput (or both)');
  if (Cd && Cv && Cd.rows !== Cv.rows) {
    throw new ModelError('dimension_mismatch', 'velocityOutput', `velocityOutput has ${Cv.rows} rows but displacementOutput has ${Cd.rows}`);
  }
  for (const [out, field] of [
    [Cd, 'displacementOutput'],
    [Cv, 'velocityOutput'],
  ] as const) {
    if (out && out.cols !== q) throw new ModelError('dimension_mismatch', field, `${field} has ${out.cols} columns but mass is ${q}×${q}`);
  }
  const n = 2 * q;
  // A = [[0, I], [−K, −D]] and E = [[I, 0], [0, M]] from coordinates (cscFromCoo sorts and sums).
  const ar: number[] = [], ac: number[] = [], av: number[] = [];
  for (let i = 0; i < q; i++) {
    ar.push(i);
    ac.push(q + i);
    av.push(1);
  }
  // −K in block (2,1), −D in block (2,2).
  for (const [block, columnOffset] of [
    [so.stiffness, 0],
    [so.damping, q],
  ] as const) {
    if (!block) continue;
    for (let j = 0; j < q; j++) {
      for (let k = block.colPtr[j]; k < block.colPtr[j + 1]; k++) {
        ar.push(q + block.rowIndex[k]);
        ac.push(columnOffset + j);
        av.push(-block.values[k]);
      }
    }
  }
  const er: number[] = [], ec: number[] = [], ev: number[] = [];
  for (let i = 0; i < q; i++) {
    er.push(i);
    ec.push(i);
    ev.push(1);
  }
  for (let j = 0; j < q; j++) {
    for (let p = so.mass.colPtr[j]; p < so.mass.colPtr[j + 1]; p++) {
      er.push(q + so.mass.rowIndex[p]);
      ec.push(q + j);
      ev.push(so.mass.values[p]);
    }
  }
  const m = so.force.cols;
  const B = zeros(n, m);
  B.data.set(so.force.data, q * m);
  const p = (Cd ?? Cv)!.rows;
  const C = zeros(p, n);
  for (let r = 0; r < p; r++) {
    for (let j = 0; j < q; j++) {
      C.data[r * n + j] = Cd ? Cd.data[r * q + j] : 0;
      C.data[r * n + q + j] = Cv ? Cv.data[r * q + j] : 0;
    }
  }
  try {
    return createSparseModel({ A: cscFromCoo(n, ar, ac, av), E: cscFromCoo(n, er, ec, ev), B, C, D: so.feedthrough });
  } catch (e) {
    // The first-order model's names mean nothing to someone who gave M, D, K: say which given matrix is at fault.
    if (e instanceof ModelError) {
      const field = { A: 'stiffness', E: 'mass', B: 'force', C: Cd ? 'displacementOutput' : 'velocityOutput', D: 'feedthrough' }[e.field] ?? e.field;
      throw new ModelError(e.code, field, e.message.replace(/^([ABCDE]) /, `${field} `));
    }
    throw e;
  }
}
