/**
 * Second-order structural models M q̈ + D q̇ + K q = F u,  y = Cd q + Cv q̇, in first-order form with the
 * state x = [q; q̇]:
 *
 *   A = [ 0       I      ]    B = [ 0    ]    C = [ Cd  Cv ]
 *       [ −M⁻¹K   −M⁻¹D  ]        [ M⁻¹F ]
 *
 * This is the standard companion linearisation (e.g. Tisseur & Meerbergen, "The quadratic eigenvalue
 * problem", SIAM Review 43(2), 2001, §3.4; Antoulas, "Approximation of Large-Scale Dynamical Systems",
 * SIAM 2005, §2.2). A missing output map counts as zero; at least one is required.
 *
 * The mass matrix must be invertible. "Singular" is judged by the reciprocal condition number in the
 * 1-norm, rcond = 1 / (‖M‖₁ ‖M⁻¹‖₁), against n·ε — the usual numerical-rank rule (Golub & Van Loan,
 * "Matrix Computations", 4th ed., 2013, §2.6.2 and §3.5.4) — rather than an exact zero pivot, because
 * massless degrees of freedom in an FE export rarely give an exact zero after assembly.
 */
import { ModelError } from './errors';
import { type Matrix, zeros, norm1, inverse, matmul } from './linalg/index';
import { assembleModel, requireFinite, requireNonEmpty, type ModelDescription } from './io/assemble';
import type { StateSpaceModel } from './model';

export interface SecondOrderMatrices {
  mass: Matrix; // n×n
  damping?: Matrix; // n×n, zeros when absent
  stiffness: Matrix; // n×n
  force: Matrix; // n×m
  displacementOutput?: Matrix; // p×n
  velocityOutput?: Matrix; // p×n
}

function requireSquare(m: Matrix, field: string, n: number): void {
  requireNonEmpty(m, field);
  if (m.rows !== m.cols) throw new ModelError('not_square', field, `${field} must be square but is ${m.rows}×${m.cols}`);
  if (m.rows !== n) {
    throw new ModelError('dimension_mismatch', field, `${field} is ${m.rows}×${m.cols} but mass is ${n}×${n}`);
  }
}

/** 1-norm reciprocal condition number of M, or 0 when the inverse cannot be formed or is not finite. */
export function massReciprocalCondition(mass: Matrix): { rcond: number; inverse: Matrix | null } {
  const normM = norm1(mass);
  if (normM === 0) return { rcond: 0, inverse: null };
  let inv: Matrix;
  try {
    inv = inverse(mass);
  } catch {
    return { rcond: 0, inverse: null };
  }
  for (let k = 0; k < inv.data.length; k++) if (!Number.isFinite(inv.data[k])) return { rcond: 0, inverse: null };
  return { rcond: 1 / (normM * norm1(inv)), inverse: inv };
}

/**
 * Convert to the first-order model above and validate it.
 * Throws ModelError: not_square, dimension_mismatch, empty_matrix, non_finite (naming mass, damping, …),
 * missing_field (neither output map), singular_mass.
 */
export function secondOrderToFirstOrder(so: SecondOrderMatrices, description: ModelDescription = {}): StateSpaceModel {
  const M = so.mass;
  requireNonEmpty(M, 'mass');
  if (M.rows !== M.cols) throw new ModelError('not_square', 'mass', `mass must be square but is ${M.rows}×${M.cols}`);
  const n = M.rows;
  requireSquare(so.stiffness, 'stiffness', n);
  const Dm = so.damping ?? zeros(n, n);
  if (so.damping) requireSquare(Dm, 'damping', n);
  requireNonEmpty(so.force, 'force');
  if (so.force.rows !== n) {
    throw new ModelError('dimension_mismatch', 'force', `force has ${so.force.rows} rows but mass is ${n}×${n}`);
  }
  const Cd = so.displacementOutput;
  const Cv = so.velocityOutput;
  if (!Cd && !Cv) {
    throw new ModelError(
      'missing_field',
      'displacementOutput',
      'a second-order model needs displacementOutput or velocityOutput (or both)',
    );
  }
  for (const [out, field] of [
    [Cd, 'displacementOutput'],
    [Cv, 'velocityOutput'],
  ] as const) {
    if (!out) continue;
    requireNonEmpty(out, field);
    if (out.cols !== n) {
      throw new ModelError('dimension_mismatch', field, `${field} has ${out.cols} columns but mass is ${n}×${n}`);
    }
  }
  if (Cd && Cv && Cd.rows !== Cv.rows) {
    throw new ModelError(
      'dimension_mismatch',
      'velocityOutput',
      `velocityOutput has ${Cv.rows} rows but displacementOutput has ${Cd.rows} (y = Cd q + Cv q̇ needs the same outputs)`,
    );
  }
  requireFinite(M, 'mass');
  requireFinite(Dm, 'damping');
  requireFinite(so.stiffness, 'stiffness');
  requireFinite(so.force, 'force');
  if (Cd) requireFinite(Cd, 'displacementOutput');
  if (Cv) requireFinite(Cv, 'velocityOutput');

  const { rcond, inverse: Minv } = massReciprocalCondition(M);
  const EPS = 2 ** -52;
  if (!Minv || rcond < n * EPS) {
    throw new ModelError(
      'singular_mass',
      'mass',
      `mass is singular to working precision (reciprocal condition number ${rcond.toExponential(2)}); ` +
        'remove massless degrees of freedom (static condensation) before upload',
    );
  }
  const MK = matmul(Minv, so.stiffness);
  const MD = matmul(Minv, Dm);
  const MF = matmul(Minv, so.force);
  const m = so.force.cols;
  const p = (Cd ?? Cv)!.rows;
  const N = 2 * n;
  const A = zeros(N, N);
  const B = zeros(N, m);
  const C = zeros(p, N);
  for (let i = 0; i < n; i++) {
    A.data[i * N + n + i] = 1;
    for (let j = 0; j < n; j++) {
      A.data[(n + i) * N + j] = -MK.data[i * n + j];
      A.data[(n + i) * N + n + j] = -MD.data[i * n + j];
    }
    for (let j = 0; j < m; j++) B.data[(n + i) * m + j] = MF.data[i * m + j];
  }
  for (let i = 0; i < p; i++) {
    for (let j = 0; j < n; j++) {
      if (Cd) C.data[i * N + j] = Cd.data[i * n + j];
      if (Cv) C.data[i * N + n + j] = Cv.data[i * n + j];
    }
  }
  return assembleModel({ A, B, C }, description);
}

/** A second-order model's output map C: q columns map the displacements, 2q columns [displacements, velocities]. */
export function splitSecondOrderOutput(C: Matrix, q: number, name: string): { displacementOutput: Matrix; velocityOutput?: Matrix } {
  if (C.cols === q) return { displacementOutput: C };
  if (C.cols === 2 * q) {
    const d = zeros(C.rows, q);
    const v = zeros(C.rows, q);
    for (let i = 0; i < C.rows; i++) {
      d.data.set(C.data.subarray(i * 2 * q, i * 2 * q + q), i * q);
      v.data.set(C.data.subarray(i * 2 * q + q, (i + 1) * 2 * q), i * q);
    }
    return { displacementOutput: d, velocityOutput: v };
  }
  throw new ModelError(
    'dimension_mismatch',
    'C',
    `${name}: C has ${C.cols} columns, but the model has ${q} degrees of freedom: give ${q} columns (displacements) or ${2 * q} (displacements, then velocities)`,
  );
}
