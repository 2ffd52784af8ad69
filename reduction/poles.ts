/**
 * Pole classification and the modal figures of a pole: pure functions of the poles, with no linear algebra
 * and no imports, so the engine, the worker and the pages (pole map, modes table) apply the same rule.
 *
 * Classification. A pole is marginal when |Re λ| ≤ tol·scale, stable below, unstable above, where scale
 * is the spectral radius max|λ| (1 when every pole is 0). The tolerance is relative because the
 * eigenvalue solver's rounding scales with ‖A‖ ≥ max|λ| (a backward-stable solver returns the exact
 * eigenvalues of A + E with ‖E‖ ≈ ε‖A‖: Golub & Van Loan, "Matrix Computations", 4th ed. 2013, §7.5.6).
 * The default 1e-7 sits above √ε ≈ 1.5e-8 because rounding spreads the two eigenvalues of a defective
 * double pole at 0 (a rigid-body mode) by about √(ε‖A‖) relative to the spectrum's scale (an eigenvalue
 * of a k×k Jordan block moves by ε^(1/k) under a perturbation ε: Wilkinson, "The Algebraic Eigenvalue
 * Problem", 1965, ch. 2), and both must land on the same side: marginal. A tolerance of 1e-9 would call one
 * of them stable and the other unstable.
 *
 * Modal figures of λ = σ + jω, from the second-order parametrisation λ = −ζωn ± jωn√(1−ζ²)
 * (K. Ogata, "Modern Control Engineering", 5th ed. 2010, ch. 5): natural frequency ωn = |λ|, damping
 * ratio ζ = −σ/|λ| (undefined at λ = 0), time constant τ = 1/|σ|: the decay time of a stable pole, the
 * e-folding growth time of an unstable one (`growing`), none for a marginal pole (its |σ| is rounding).
 *
 * Stiffness ratio: the fastest over the slowest decay rate −Re λ of the stable poles (J. D. Lambert,
 * "Numerical Methods for Ordinary Differential Systems", Wiley 1991, ch. 6).
 */

export type PoleStability = 'stable' | 'marginal' | 'unstable';

/** Relative tolerance for "marginal" (see the file header). */
export const DEFAULT_STABILITY_TOLERANCE = 1e-7;

/** Real and imaginary parts of a set of poles (typed arrays or plain arrays). */
export interface PoleSet {
  readonly re: ArrayLike<number>;
  readonly im: ArrayLike<number>;
}

export interface PoleClassification<P extends PoleSet = PoleSet> {
  readonly poles: P;
  readonly stability: readonly PoleStability[];
  /** The spectral radius used to make the tolerance relative (1 when every pole is 0). */
  readonly scale: number;
  readonly tolerance: number;
}

/** The spectral radius max|λ| (0 without poles). */
export function spectralRadius(poles: PoleSet): number {
  let radius = 0;
  for (let i = 0; i < poles.re.length; i++) radius = Math.max(radius, Math.hypot(poles.re[i], poles.im[i]));
  return radius;
}

/** max|λ|, or 1 when there is no pole away from 0: the scale the stability tolerance is relative to. */
export function spectralScale(poles: PoleSet): number {
  const radius = spectralRadius(poles);
  return radius > 0 ? radius : 1;
}

/** One pole's class for an absolute threshold t = tol·scale: stable Re λ < −t, unstable Re λ > t, else marginal. */
export function poleStability(re: number, threshold: number): PoleStability {
  return re < -threshold ? 'stable' : re > threshold ? 'unstable' : 'marginal';
}

/** Classify poles: stable Re λ < −t, marginal |Re λ| ≤ t, unstable Re λ > t, with t = tol·scale. */
export function classifyPoles<P extends PoleSet>(poles: P, tolerance = DEFAULT_STABILITY_TOLERANCE): PoleClassification<P> {
  if (poles.re.length !== poles.im.length) {
    throw new RangeError(`classifyPoles: im must have as many entries as re (${poles.re.length}), got ${poles.im.length}`);
  }
  if (!(tolerance >= 0 && tolerance < 1)) throw new RangeError(`classifyPoles: tolerance must be in [0, 1), got ${tolerance}`);
  const scale = spectralScale(poles);
  const t = tolerance * scale;
  const stability: PoleStability[] = [];
  for (let i = 0; i < poles.re.length; i++) stability.push(poleStability(poles.re[i], t));
  return { poles, stability, scale, tolerance };
}

export interface ModalFigures {
  /** ωn = |λ|, rad per time unit */
  readonly naturalFrequency: number;
  /** ζ = −Re λ/|λ|; null at λ = 0 */
  readonly dampingRatio: number | null;
  /** τ = 1/|Re λ| (decay time, or growth time when `growing`); null for a marginal pole */
  readonly timeConstant: number | null;
  /** an unstable pole: τ is its e-folding growth time */
  readonly growing: boolean;
}

/** ωn, ζ and τ of one pole of the given class (see the file header). */
export function modalFigures(re: number, im: number, stability: PoleStability): ModalFigures {
  const naturalFrequency = Math.hypot(re, im);
  return {
    naturalFrequency,
    dampingRatio: naturalFrequency > 0 ? -re / naturalFrequency : null,
    timeConstant: stability === 'marginal' || re === 0 ? null : 1 / Math.abs(re),
    growing: stability === 'unstable',
  };
}

export interface Stiffness {
  /** fastest over slowest decay rate; null without a decaying pole */
  readonly stiffnessRatio: number | null;
  readonly slowestDecayRate: number | null;
  readonly fastestDecayRate: number | null;
}

/** The stiffness ratio of a set of decay rates −Re λ (those ≤ 0 are left out: they do not decay). */
export function stiffnessFromRates(rates: Iterable<number>): Stiffness {
  let slow = Infinity;
  let fast = 0;
  for (const rate of rates) {
    if (!(rate > 0)) continue;
    slow = Math.min(slow, rate);
    fast = Math.max(fast, rate);
  }
  if (fast === 0) return { stiffnessRatio: null, slowestDecayRate: null, fastestDecayRate: null };
  return { stiffnessRatio: fast / slow, slowestDecayRate: slow, fastestDecayRate: fast };
}
