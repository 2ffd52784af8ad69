/**
 * IRKA: the iterative rational Krylov algorithm for H2-optimal reduction, with tangential directions for
 * models with several inputs and outputs.
 *
 * Method: S. Gugercin, A. C. Antoulas & C. Beattie, "H2 model reduction for large-scale linear dynamical
 * systems", SIAM J. Matrix Anal. Appl. 30(2):609–638, 2008, Algorithm 4.1 (IRKA), in the tangential form
 * for p×m transfer functions. A reduced model Hr(s) = Σᵢ ĉᵢ b̂ᵢᵀ/(s − λ̂ᵢ) with simple poles that is a local
 * H2-optimal approximation of H satisfies, for every i (first-order conditions: for one input and output
 * the Meier–Luenberger conditions, Theorem 3.4 of Gugercin, Antoulas & Beattie 2008 as recalled; for p×m
 * models the tangential conditions of P. Van Dooren, K. A. Gallivan & P.-A. Absil, "H2-optimal model
 * reduction of MIMO systems", Appl. Math. Lett. 21(12), 2008, stated for the tangential IRKA by
 * Gugercin, Antoulas & Beattie 2008 as recalled):
 *
 *   H(−λ̂ᵢ) b̂ᵢ = Hr(−λ̂ᵢ) b̂ᵢ,    ĉᵢᵀ H(−λ̂ᵢ) = ĉᵢᵀ Hr(−λ̂ᵢ),    ĉᵢᵀ H′(−λ̂ᵢ) b̂ᵢ = ĉᵢᵀ Hr′(−λ̂ᵢ) b̂ᵢ.
 *
 * A Petrov–Galerkin projection enforces such conditions at chosen points σᵢ and directions bᵢ, cᵢ
 * (K. Gallivan, A. Vandendorpe & P. Van Dooren, "Model reduction of MIMO systems via tangential
 * interpolation", SIAM J. Matrix Anal. Appl. 26(2), 2004): with
 *
 *   range V ∋ (σᵢE − A)⁻¹ B bᵢ,   range W ∋ (σᵢE − A)⁻ᵀ Cᵀ cᵢ,
 *   Er = Wᵀ E V,  Ar = Wᵀ A V,  Br = Wᵀ B,  Cr = C V,   Hr(s) = Cr (s Er − Ar)⁻¹ Br + D,
 *
 * Hr(σᵢ) bᵢ = H(σᵢ) bᵢ, cᵢᵀ Hr(σᵢ) = cᵢᵀ H(σᵢ) and cᵢᵀ Hr′(σᵢ) bᵢ = cᵢᵀ H′(σᵢ) bᵢ. IRKA repeats the
 * projection with σᵢ ← −λ̂ᵢ and (bᵢ, cᵢ) ← (b̂ᵢ, ĉᵢ), the poles and residue directions of the last reduced
 * model, until the relative change of the shifts is at most the tolerance (default 1e-6): the change is
 * maxᵢ |σᵢ(new) − σᵢ(old)| / |σᵢ(new)| after pairing each new shift with the nearest unpaired old one.
 * The reduced model is the projection at the last shifts (Algorithm 4.1, step 4).
 *
 * Real arithmetic: the shifts are closed under conjugation, and for a pair σ, σ̄ (directions b, b̄) the
 * columns Re v, Im v of v = (σE − A)⁻¹ B b span the same space as v and v̄ (common practice), so V and W are
 * real n×r matrices (orthonormalised by QR) and the reduced model is real. Only the member σ with Im σ > 0
 * of a pair is stored and solved with.
 *
 * Dense models: A = Q H Qᵀ (Hessenberg form, once), then each shifted solve is an O(n²) Hessenberg LU of
 * σI − H (`linalg/shifted-hessenberg.ts`; transposed solves on the same factors) instead of an O(n³) dense
 * LU per shift. Large sparse models: `sparse/irka.ts`, on the same iteration (`iterateIrka`).
 *
 * What is and is not guaranteed: IRKA converges to a point satisfying the first-order conditions in the
 * cases studied by Gugercin, Antoulas & Beattie 2008 (and for symmetric models, Flagg, Beattie & Gugercin,
 * "Convergence of the iterative rational Krylov algorithm", Systems & Control Letters 61(6), 2012), not
 * always; the reduced model need not be stable. Both are reported (`converged`, `reducedStable`), never
 * assumed. A reduced pole in the right half-plane during the iteration gives the shift −λ̂ in the left
 * half-plane, where it could meet a pole of the model; it is reflected to λ̂̄ (common practice) and counted.
 * There is no a-priori error bound; the H2 and H∞ errors are measured (`reduce.ts`).
 *
 * Initial shifts, unless given: the mirror images −λ of the r slowest poles (smallest |λ|; a conjugate pair
 * gives the pair of shifts, and when one place is left for a pair it gets the real shift |λ|; common
 * practice: mirror images of poles of the model are a usual IRKA start); near duplicates are skipped and,
 * when too few poles remain, the rest are logarithmically spaced real shifts above them. The dense path
 * uses the exact poles, the sparse path Ritz estimates of the slowest ones. Shifts spread up to the fastest
 * pole of a stiff model are a poor start: there the transfer function is negligible and the bases V and W
 * can be nearly orthogonal. The tangential directions start fixed (not random), so that a run is
 * reproducible and both paths start alike.
 */
import { ModelError } from './errors';
import {
  type Matrix,
  type ComplexVector,
  zeros,
  matmul,
  multiplyTransposeA,
  hessenberg,
  eig,
  inverse,
  qr,
  luFactor,
  luSolve,
  luReciprocalCondition,
  norm1,
} from './linalg/index';
import { ShiftedHessenbergLu } from './linalg/shifted-hessenberg';
import type { StateSpaceModel } from './model';
import { modelPoles } from './spectral-split';
import { throwIfStopped, type StopSignal } from './stop';

/** A shift σ = re + i·im with im ≥ 0; im > 0 stands for the conjugate pair σ, σ̄ (two of the r shifts). */
export interface Shift {
  readonly re: number;
  readonly im: number;
}

/** A shift with its right (b, length m) and left (c, length p) tangential directions; for a pair, those of σ (Im σ > 0). */
export interface InterpolationPoint extends Shift {
  readonly b: ComplexVector;
  readonly c: ComplexVector;
}

export interface IrkaOptions {
  /** Relative change of the shifts at which the iteration stops (default 1e-6). */
  readonly tolerance?: number;
  /** Most shift updates (default 100). */
  readonly maxIterations?: number;
  /** Initial shifts (Re > 0, Im ≥ 0, a pair as one entry with Im > 0), r in all; default: mirrors of the slowest poles. */
  readonly initialShifts?: readonly Shift[];
  /** Looked at before each projection; when set, the run throws StoppedError (stop.ts) and returns nothing. */
  readonly signal?: StopSignal;
  /** Called after each shift update (a worker's progress). */
  readonly onStep?: (step: IrkaStep) => void;
}

/** One IRKA iteration as `onStep` reports it. */
export interface IrkaStep {
  /** shift updates made so far */
  readonly iteration: number;
  /** the most it will make; it stops earlier at the tolerance */
  readonly maxIterations: number;
  /** relative shift change of this update */
  readonly shiftChange: number;
  readonly tolerance: number;
}

export const DEFAULT_IRKA_TOLERANCE = 1e-6;

/** Where the initial shifts came from: given, or the mirror images of the slowest poles (exact, or Ritz estimates). */
export type InitialShiftRule = 'given' | 'slowest-poles' | 'slowest-pole-estimates';
export const DEFAULT_IRKA_MAX_ITERATIONS = 100;

export interface IrkaReport {
  /** Shift updates made (each followed by one projection). */
  readonly iterations: number;
  readonly converged: boolean;
  /** Relative shift change of the last update (see the header); NaN when no update was made. */
  readonly shiftChange: number;
  readonly shiftChangeHistory: readonly number[];
  readonly tolerance: number;
  readonly maxIterations: number;
  readonly initialShiftRule: InitialShiftRule;
  readonly initialShifts: readonly Shift[];
  /** The shifts and directions the reduced model interpolates at (Algorithm 4.1, step 4). */
  readonly interpolationPoints: readonly InterpolationPoint[];
  /** Shifts reflected into the right half-plane because a reduced pole was unstable (summed over the run). */
  readonly reflectedShifts: number;
  /** Whether every pole of the reduced model is in the open left half-plane. */
  readonly reducedStable: boolean;
  readonly reducedPoles: ComplexVector;
}

/** The reduced model of one projection: Er⁻¹ folded into Ar and Br. */
export interface ProjectedModel {
  readonly A: Matrix;
  readonly B: Matrix;
  readonly C: Matrix;
}

/** What the iteration needs from a path: the projection on the tangential rational Krylov bases of the points. */
export interface TangentialProjector {
  readonly states: number;
  readonly inputs: number;
  readonly outputs: number;
  project(points: readonly InterpolationPoint[]): ProjectedModel;
}

/** How many of the r shifts a list stands for (a pair counts twice). */
export function shiftCount(shifts: readonly Shift[]): number {
  return shifts.reduce((s, p) => s + (p.im > 0 ? 2 : 1), 0);
}

/** Checks the iteration options once (ModelError naming the option). */
export function irkaSettings(options: IrkaOptions, order: number): { tolerance: number; maxIterations: number } {
  const tolerance = options.tolerance ?? DEFAULT_IRKA_TOLERANCE;
  const maxIterations = options.maxIterations ?? DEFAULT_IRKA_MAX_ITERATIONS;
  if (!(Number.isFinite(tolerance) && tolerance > 0 && tolerance < 1)) {
    throw new ModelError('invalid_option', 'irkaTolerance', `the IRKA tolerance must be in (0, 1), got ${tolerance}`);
  }
  if (!Number.isInteger(maxIterations) || maxIterations < 1) {
    throw new ModelError('invalid_option', 'irkaMaxIterations', `the most IRKA iterations must be a whole number ≥ 1, got ${maxIterations}`);
  }
  if (options.initialShifts) {
    for (const s of options.initialShifts) {
      if (!(Number.isFinite(s.re) && Number.isFinite(s.im) && s.re > 0 && s.im >= 0)) {
        throw new ModelError('invalid_option', 'initialShifts', `IRKA shifts need Re σ > 0 and Im σ ≥ 0 (a pair as one shift), got ${s.re} + ${s.im}i`);
      }
    }
    const count = shiftCount(options.initialShifts);
    if (count !== order) {
      throw new ModelError('invalid_option', 'initialShifts', `the initial shifts stand for ${count} shifts (a pair counts twice) but the order asks for ${order}`);
    }
  }
  return { tolerance, maxIterations };
}

/** r real shifts at the centres of r equal logarithmic intervals of [lo, hi] (widened when narrower than a factor 4). */
export function logSpacedShifts(lo: number, hi: number, r: number): Shift[] {
  if (!(lo > 0 && hi >= lo && Number.isFinite(hi))) throw new Error(`logSpacedShifts: need 0 < lo ≤ hi, got ${lo}, ${hi}`);
  if (hi < 4 * lo) {
    lo /= 2;
    hi *= 2;
  }
  const a = Math.log(lo), b = Math.log(hi);
  return Array.from({ length: r }, (_, k) => ({ re: Math.exp(a + ((k + 0.5) / r) * (b - a)), im: 0 }));
}

/**
 * Relative distance below which two candidate initial shifts count as one (common practice: nearly equal
 * shifts, such as the Ritz estimates of a double pole, give nearly dependent basis columns; 1 % keeps them
 * apart by far more than rounding and costs IRKA nothing, which moves the shifts anyway).
 */
const DUPLICATE_SHIFT_TOLERANCE = 1e-2;

/**
 * r initial shifts from candidate poles (stable, with Re λ < 0): the mirror images of the slowest ones (see
 * the header), filled with log-spaced real shifts from the last one used up to `hi` when too few remain.
 */
export function slowestPoleShifts(poles: ComplexVector, r: number, hi: number): Shift[] {
  const cands: { re: number; im: number; mag: number }[] = [];
  for (let i = 0; i < poles.re.length; i++) {
    const re = poles.re[i], im = poles.im[i];
    if (!(re < 0) || im < 0 || !Number.isFinite(re) || !Number.isFinite(im)) continue; // one member per pair
    cands.push({ re: -re, im, mag: Math.hypot(re, im) });
  }
  cands.sort((a, b) => a.mag - b.mag);
  const chosen: Shift[] = [];
  let count = 0;
  const near = (s: Shift) => chosen.some((c) => Math.hypot(c.re - s.re, c.im - s.im) <= DUPLICATE_SHIFT_TOLERANCE * Math.hypot(s.re, s.im));
  for (const c of cands) {
    if (count >= r) break;
    const pair = c.im > 1e-10 * c.mag;
    const s: Shift = pair && count + 2 <= r ? { re: c.re, im: c.im } : { re: pair ? c.mag : c.re, im: 0 };
    if (near(s)) continue;
    chosen.push(s);
    count += s.im > 0 ? 2 : 1;
  }
  if (count < r) {
    const last = chosen.reduce((m, s) => Math.max(m, Math.hypot(s.re, s.im)), 0);
    const lo = last > 0 ? last * 1.5 : hi / 10;
    for (const s of logSpacedShifts(lo, Math.max(hi, 2 * lo), r - count)) chosen.push(s);
  }
  return chosen;
}

/** A fixed unit direction of length `dim` for the k-th initial shift (not random: runs are reproducible). */
function initialDirection(k: number, dim: number): ComplexVector {
  const re = new Float64Array(dim);
  let norm = 0;
  for (let j = 0; j < dim; j++) {
    re[j] = 1 + 0.5 * Math.sin(1.7 * (k + 1) + 2.3 * (j + 1));
    norm += re[j] * re[j];
  }
  norm = Math.sqrt(norm);
  for (let j = 0; j < dim; j++) re[j] /= norm;
  return { re, im: new Float64Array(dim) };
}

/** Interpolation points for initial shifts, with fixed directions. */
export function initialPoints(shifts: readonly Shift[], inputs: number, outputs: number): InterpolationPoint[] {
  return shifts.map((s, k) => ({ re: s.re, im: s.im, b: initialDirection(k, inputs), c: initialDirection(k + 7, outputs) }));
}

/**
 * The next interpolation data from a reduced model: σᵢ = −λ̂ᵢ with the residue directions of λ̂ᵢ
 * (Hr(s) = Σ ĉᵢ b̂ᵢᵀ/(s − λ̂ᵢ), Ar = X Λ X⁻¹, b̂ᵢᵀ = row i of X⁻¹ Br, ĉᵢ = Cr xᵢ). For a pair λ̂, λ̂̄ the stored
 * member is σ = −λ̂̄ (Im > 0), whose directions are the conjugates of those of λ̂. An unstable λ̂ gives the
 * reflected shift λ̂̄ instead. Null when Ar is not diagonalizable to working precision.
 */
export function mirrorPoints(reduced: ProjectedModel): { points: InterpolationPoint[]; reflected: number } | null {
  const r = reduced.A.rows;
  const m = reduced.B.cols, p = reduced.C.rows;
  const { values, vectors } = eig(reduced.A);
  let Xinv: Matrix;
  try {
    Xinv = inverse(vectors);
  } catch {
    return null;
  }
  if (!(norm1(vectors) * norm1(Xinv) < 1e14)) return null;
  const Y = matmul(Xinv, reduced.B); // r×m
  const Z = matmul(reduced.C, vectors); // p×r
  const points: InterpolationPoint[] = [];
  let reflected = 0;
  for (let j = 0; j < r; j++) {
    const a = values.re[j], w = values.im[j];
    if (w !== 0 && j + 1 < r) {
      // λ = a + iw (w > 0) with eigenvector x = X[:, j] + i X[:, j+1]; b̂_λ ∝ Y[j] − i Y[j+1], ĉ_λ = Z[:, j] + i Z[:, j+1].
      // Stored member σ = −λ̄ = −a + iw with the conjugate directions; reflected to λ̄ = a − iw → a + iw pair when a ≥ 0.
      const b = { re: new Float64Array(m), im: new Float64Array(m) };
      const c = { re: new Float64Array(p), im: new Float64Array(p) };
      for (let k = 0; k < m; k++) {
        b.re[k] = Y.data[j * m + k];
        b.im[k] = Y.data[(j + 1) * m + k];
      }
      for (let k = 0; k < p; k++) {
        c.re[k] = Z.data[k * r + j];
        c.im[k] = -Z.data[k * r + j + 1];
      }
      const re = a < 0 ? -a : a;
      if (a >= 0) reflected += 2;
      points.push({ re, im: Math.abs(w), b, c });
      j++;
    } else {
      const b = { re: new Float64Array(m), im: new Float64Array(m) };
      const c = { re: new Float64Array(p), im: new Float64Array(p) };
      for (let k = 0; k < m; k++) b.re[k] = Y.data[j * m + k];
      for (let k = 0; k < p; k++) c.re[k] = Z.data[k * r + j];
      if (a >= 0) reflected++;
      points.push({ re: Math.abs(a), im: 0, b, c });
    }
  }
  return { points, reflected };
}

/** The full conjugate-closed list of shifts a list of points stands for. */
function allShifts(points: readonly Shift[]): { re: number; im: number }[] {
  const out: { re: number; im: number }[] = [];
  for (const s of points) {
    out.push({ re: s.re, im: s.im });
    if (s.im > 0) out.push({ re: s.re, im: -s.im });
  }
  return out;
}

/** maxᵢ |σᵢ(new) − σᵢ(old)| / |σᵢ(new)|, each new shift paired with the nearest unpaired old one. */
export function shiftChange(previous: readonly Shift[], next: readonly Shift[]): number {
  const a = allShifts(previous), b = allShifts(next);
  const used = new Uint8Array(a.length);
  let worst = 0;
  for (const s of b) {
    let best = -1, dist = Infinity;
    for (let k = 0; k < a.length; k++) {
      if (used[k]) continue;
      const d = Math.hypot(s.re - a[k].re, s.im - a[k].im);
      if (d < dist) {
        dist = d;
        best = k;
      }
    }
    if (best < 0) return Infinity;
    used[best] = 1;
    const scale = Math.hypot(s.re, s.im);
    worst = Math.max(worst, scale > 0 ? dist / scale : dist);
  }
  return worst;
}

/** Q of a thin QR, refusing a basis whose columns are numerically dependent. */
export function orthonormalBasisOf(V: Matrix, what: string): Matrix {
  const { Q, R } = qr(V);
  const k = Math.min(R.rows, R.cols);
  let big = 0, small = Infinity;
  for (let i = 0; i < k; i++) {
    const d = Math.abs(R.data[i * R.cols + i]);
    big = Math.max(big, d);
    small = Math.min(small, d);
  }
  if (!(small > 1e-13 * big)) {
    throw new ModelError(
      'order_too_large',
      'order',
      `IRKA broke down: the ${what} basis is numerically rank deficient (the model shows fewer than ${V.cols} independent directions at these shifts); ask for a smaller order`,
    );
  }
  return Q;
}

/** Ar = Er⁻¹ Wᵀ A V, Br = Er⁻¹ Wᵀ B, Cr = C V with Er = Wᵀ E V (EV = V when E is the identity). */
export function petrovGalerkin(W: Matrix, AV: Matrix, EV: Matrix, B: Matrix, CV: Matrix): ProjectedModel {
  const Er = multiplyTransposeA(W, EV);
  const f = luFactor(Er);
  const rcond = f.zeroPivot >= 0 ? 0 : luReciprocalCondition(f, norm1(Er));
  if (!(rcond > 1e-13)) {
    throw new ModelError(
      'order_too_large',
      'order',
      `IRKA broke down: the projected matrix WᵀEV is singular to working precision (reciprocal condition ${rcond.toExponential(2)}); ask for a smaller order`,
    );
  }
  return { A: luSolve(f, multiplyTransposeA(W, AV)), B: luSolve(f, multiplyTransposeA(W, B)), C: CV };
}

/** The iteration of Algorithm 4.1 on a path's projector, from given initial points (see the header). */
export function iterateIrka(
  projector: TangentialProjector,
  initial: readonly InterpolationPoint[],
  settings: { tolerance: number; maxIterations: number; signal?: StopSignal; onStep?: IrkaOptions['onStep'] },
): { reduced: ProjectedModel; points: InterpolationPoint[]; iterations: number; converged: boolean; history: number[]; reflected: number; notes: string[] } {
  let points = [...initial];
  throwIfStopped(settings.signal, 'IRKA');
  let reduced = projector.project(points);
  const history: number[] = [];
  const notes: string[] = [];
  let reflected = 0;
  let converged = false;
  let iterations = 0;
  while (iterations < settings.maxIterations) {
    const next = mirrorPoints(reduced);
    if (!next) {
      notes.push(`IRKA stopped after ${iterations} iteration(s): the reduced matrix is not diagonalizable to working precision (repeated reduced poles), so no new shifts and directions can be formed`);
      break;
    }
    const change = shiftChange(points, next.points);
    throwIfStopped(settings.signal, 'IRKA');
    let projected: ProjectedModel;
    try {
      projected = projector.project(next.points);
    } catch (e) {
      // A breakdown after the first projection ends the run with the last model formed (not converged).
      if (!(e instanceof ModelError && e.code === 'order_too_large')) throw e;
      notes.push(`IRKA stopped after ${iterations} iteration(s): ${e.message}; the reduced model is the last one formed, at the previous shifts`);
      break;
    }
    iterations++;
    history.push(change);
    reflected += next.reflected;
    points = next.points;
    reduced = projected;
    settings.onStep?.({ iteration: iterations, maxIterations: settings.maxIterations, shiftChange: change, tolerance: settings.tolerance });
    if (change <= settings.tolerance) {
      converged = true;
      break;
    }
  }
  if (!converged && iterations >= settings.maxIterations) {
    notes.push(
      `IRKA did not converge: after ${iterations} iterations the relative shift change is ${history[history.length - 1].toExponential(2)}, above the tolerance ${settings.tolerance}; the reduced model interpolates at the last shifts but need not be H2-optimal`,
    );
  }
  if (reflected > 0) {
    notes.push(`${reflected} shift(s) were reflected into the right half-plane during the iteration because a reduced pole was unstable`);
  }
  return { reduced, points, iterations, converged, history, reflected, notes };
}

/** The report of a finished run, with the reduced model's poles and stability. */
export function irkaReport(
  run: ReturnType<typeof iterateIrka>,
  settings: { tolerance: number; maxIterations: number },
  initialShifts: readonly Shift[],
  rule: InitialShiftRule,
): IrkaReport {
  const poles = modelPoles(run.reduced.A);
  const reducedStable = Array.from(poles.re).every((x) => x < 0);
  return {
    iterations: run.iterations,
    converged: run.converged,
    shiftChange: run.history.length > 0 ? run.history[run.history.length - 1] : NaN,
    shiftChangeHistory: run.history,
    tolerance: settings.tolerance,
    maxIterations: settings.maxIterations,
    initialShiftRule: rule,
    initialShifts,
    interpolationPoints: run.points,
    reflectedShifts: run.reflected,
    reducedStable,
    reducedPoles: poles,
  };
}

/** A column of a row-major n×r matrix from a vector. */
export function setColumn(M: Matrix, col: number, v: ArrayLike<number>): void {
  const r = M.cols;
  for (let i = 0; i < M.rows; i++) M.data[i * r + col] = v[i];
}

/** M·v for a real matrix and a complex vector; null imaginary part when v is real. */
export function timesComplex(M: Matrix, v: ComplexVector): { re: Float64Array; im: Float64Array | null } {
  const { rows, cols, data } = M;
  const re = new Float64Array(rows);
  const real = v.im.every((x) => x === 0);
  const im = real ? null : new Float64Array(rows);
  for (let i = 0; i < rows; i++) {
    let sr = 0, si = 0;
    for (let j = 0; j < cols; j++) {
      const a = data[i * cols + j];
      sr += a * v.re[j];
      if (!real) si += a * v.im[j];
    }
    re[i] = sr;
    if (im) im[i] = si;
  }
  return { re, im };
}

/** Mᵀ·v for a real matrix and a complex vector. */
export function transposeTimesComplex(M: Matrix, v: ComplexVector): { re: Float64Array; im: Float64Array | null } {
  const { rows, cols, data } = M;
  const re = new Float64Array(cols);
  const real = v.im.every((x) => x === 0);
  const im = real ? null : new Float64Array(cols);
  for (let i = 0; i < rows; i++) {
    const vr = v.re[i], vi = v.im[i];
    for (let j = 0; j < cols; j++) {
      const a = data[i * cols + j];
      re[j] += a * vr;
      if (im) im[j] += a * vi;
    }
  }
  return { re, im };
}

/** The dense projector: shifted solves on the Hessenberg form A = Q H Qᵀ, everything in its coordinates. */
class HessenbergProjector implements TangentialProjector {
  readonly states: number;
  readonly inputs: number;
  readonly outputs: number;
  private readonly H: Matrix;
  private readonly QtB: Matrix;
  private readonly CQ: Matrix;

  constructor(stable: StateSpaceModel) {
    const { H, Q } = hessenberg(stable.A);
    this.H = H;
    this.QtB = multiplyTransposeA(Q, stable.B);
    this.CQ = matmul(stable.C, Q);
    this.states = stable.A.rows;
    this.inputs = stable.B.cols;
    this.outputs = stable.C.rows;
  }

  project(points: readonly InterpolationPoint[]): ProjectedModel {
    const n = this.states;
    const r = shiftCount(points);
    const V = zeros(n, r), W = zeros(n, r);
    let col = 0;
    for (const pt of points) {
      const lu = new ShiftedHessenbergLu(this.H, pt.re, pt.im);
      if (!(lu.pivotRatio > 1e-15)) {
        throw new ModelError('unstable', 'A', `σ = ${pt.re} + ${pt.im}i is a pole of the model to working precision: IRKA needs the model's reduced part to be stable`);
      }
      const f = timesComplex(this.QtB, pt.b);
      const g = transposeTimesComplex(this.CQ, pt.c);
      const x = lu.solve(f.re, f.im);
      const y = lu.solveTranspose(g.re, g.im);
      setColumn(V, col, x.re);
      setColumn(W, col, y.re);
      if (pt.im > 0) {
        setColumn(V, col + 1, x.im);
        setColumn(W, col + 1, y.im);
        col += 2;
      } else col += 1;
    }
    const Vq = orthonormalBasisOf(V, 'right (input)');
    const Wq = orthonormalBasisOf(W, 'left (output)');
    return petrovGalerkin(Wq, matmul(this.H, Vq), Vq, this.QtB, matmul(this.CQ, Vq));
  }
}

export interface IrkaResult {
  /** The reduced model (states: order), D of the model. */
  readonly model: StateSpaceModel;
  readonly report: IrkaReport;
  readonly notes: readonly string[];
}

/**
 * IRKA on a stable dense model to `order` states (1 ≤ order < states). `poles` (of stable.A), when known,
 * spare the eigenvalue computation behind the default initial shifts. The caller splits off marginal and
 * unstable poles first (`reduce.ts` keeps them exactly).
 */
export function irka(stable: StateSpaceModel, order: number, options: IrkaOptions = {}, poles?: ComplexVector): IrkaResult {
  const n = stable.A.rows;
  if (!Number.isInteger(order) || order < 1 || order > n) {
    throw new ModelError('invalid_option', 'order', `IRKA needs an order from 1 to the ${n} states of the stable part, got ${order}`);
  }
  const settings = irkaSettings(options, order);
  let shifts: Shift[];
  let rule: InitialShiftRule;
  if (options.initialShifts) {
    shifts = [...options.initialShifts];
    rule = 'given';
  } else {
    const lambda = poles ?? modelPoles(stable.A);
    let hi = 0;
    for (let i = 0; i < lambda.re.length; i++) hi = Math.max(hi, Math.hypot(lambda.re[i], lambda.im[i]));
    if (!Array.from(lambda.re).some((x) => x < 0)) throw new ModelError('unstable', 'A', 'IRKA needs a stable model: this one has no stable pole');
    shifts = slowestPoleShifts(lambda, order, hi);
    rule = 'slowest-poles';
  }
  const projector = new HessenbergProjector(stable);
  const run = iterateIrka(projector, initialPoints(shifts, projector.inputs, projector.outputs), { ...settings, signal: options.signal, onStep: options.onStep });
  const report = irkaReport(run, settings, shifts, rule);
  const notes = [...run.notes];
  if (!report.reducedStable) {
    notes.push('the reduced model has poles in the closed right half-plane (IRKA does not guarantee stability): its H2 and H∞ errors are not finite; try another order or initial shifts');
  }
  return { model: { A: run.reduced.A, B: run.reduced.B, C: run.reduced.C, D: stable.D }, report, notes };
}
