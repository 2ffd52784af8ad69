/**
 * Real-time readiness: the largest fixed step at which forward Euler and the classical fourth-order
 * Runge–Kutta method stay stable on the model's spectrum, and the discretised model a fixed-rate target
 * would run.
 *
 * A fixed-step method applied to ẋ = λx multiplies the state by its stability function R(hλ) each step;
 * it is stable when |R(hλ)| ≤ 1 for every pole λ (E. Hairer & G. Wanner, "Solving Ordinary Differential
 * Equations II", 2nd ed., Springer 1996, §IV.2, stability functions and regions of explicit RK methods):
 *
 *   forward Euler  R(z) = 1 + z                     → h ≤ −2·Re λ / |λ|²  (2/|λ| for a real pole)
 *   classical RK4  R(z) = 1 + z + z²/2 + z³/6 + z⁴/24 → along each ray z = hλ, the first h where
 *                  |R| exceeds 1, found by a scan and bisection (≈ 2.785/|λ| for a real pole, 2√2/|λ|
 *                  on the imaginary axis).
 *
 * Poles at the origin (integrators) never limit the step (R(0) = 1). Poles in the open right half-plane
 * are unstable for every explicit step (|R(z)| ≥ |e^z|-like growth near 0), and forward Euler is
 * unstable on the imaginary axis; those give a limit of 0 with the pole that causes it.
 */
import type { ComplexVector } from './linalg/matrix';
import { discretizeZoh, discretePoles, type DiscreteModel } from './discretize';
import { eigenvalues } from './linalg/index';
import type { StateSpaceModel } from './model';

/**
 * Dormand–Prince 5(4), the adaptive explicit solver (simulate/dormand-prince.ts), is stable along the
 * negative real axis for |hλ| up to about 3.3 (E. Hairer & G. Wanner, "Solving Ordinary Differential
 * Equations II", 2nd ed., Springer 1996, §IV.2, the stability region of DOPRI5; the value is read from its
 * figure, so "about").
 */
export const DORMAND_PRINCE_STABILITY_RADIUS = 3.3;

/**
 * Steps an explicit solver needs over `duration` for stability alone when the fastest pole has modulus
 * (or decay rate) `fastestRate`: duration·rate/3.3. On a stiff model this, not the accuracy asked for,
 * sets the step count (common practice).
 */
export function explicitStabilitySteps(fastestRate: number, duration: number): number {
  return (fastestRate * duration) / DORMAND_PRINCE_STABILITY_RADIUS;
}

export interface StepLimit {
  /** Largest stable fixed step (Infinity when no pole limits it, 0 when no step is stable). */
  maxStep: number;
  /** The pole that sets the limit, [re, im]; null when none does. */
  limitingPole: [number, number] | null;
}

export interface StepLimits {
  forwardEuler: StepLimit;
  rk4: StepLimit;
}

/** |R(z)| for classical RK4 at z = x + iy. */
export function rk4Amplification(x: number, y: number): number {
  // Horner in complex arithmetic: R = 1 + z(1 + z/2(1 + z/3(1 + z/4))).
  let re = 1 + x / 4, im = y / 4;
  let t = 1 + (x * re - y * im) / 3;
  im = (x * im + y * re) / 3;
  re = t;
  t = 1 + (x * re - y * im) / 2;
  im = (x * im + y * re) / 2;
  re = t;
  t = 1 + (x * re - y * im);
  im = x * im + y * re;
  re = t;
  return Math.hypot(re, im);
}

/** Largest h with |1 + hλ| ≤ 1: −2 Re λ / |λ|² (Hairer & Wanner 1996, §IV.2). */
export function forwardEulerPoleLimit(re: number, im: number): number {
  const mod2 = re * re + im * im;
  if (mod2 === 0) return Infinity;
  if (re >= 0) return 0;
  return (-2 * re) / mod2;
}

/**
 * Largest h with |R(hλ)| ≤ 1 on all of (0, h] for classical RK4: scan the ray in steps of |z| = 0.01 up
 * to |z| = 4 (the stability region lies inside |z| < 3; Hairer & Wanner 1996, Fig. IV.2.1) and bisect the
 * first crossing to 1e-13 relative.
 */
export function rk4PoleLimit(re: number, im: number): number {
  const mod = Math.hypot(re, im);
  if (mod === 0) return Infinity;
  const ux = re / mod, uy = im / mod;
  // |R(z)| ≤ 1 has a tolerance of a few ulps so a pole exactly on the imaginary axis, where |R(iy)|² =
  // 1 − y⁶/72 + y⁸/576 ≤ 1 for |y| ≤ 2√2, is not declared unstable by rounding.
  const stable = (r: number) => rk4Amplification(r * ux, r * uy) <= 1 + 1e-14;
  const dr = 0.01;
  let lo = 0;
  let hi = NaN;
  for (let r = dr; r <= 4 + 1e-12; r += dr) {
    if (!stable(r)) {
      hi = r;
      break;
    }
    lo = r;
  }
  if (Number.isNaN(hi)) return Infinity;
  if (lo === 0) {
    // Unstable right from the origin (a pole in the right half-plane) — or a tiny stable stretch.
    let a = 0, b = dr;
    if (!stable(b * 1e-6)) return 0;
    for (let k = 0; k < 200 && b - a > 1e-13 * b; k++) {
      const m = 0.5 * (a + b);
      if (stable(m)) a = m;
      else b = m;
    }
    return a / mod;
  }
  for (let k = 0; k < 200 && hi - lo > 1e-13 * hi; k++) {
    const m = 0.5 * (lo + hi);
    if (stable(m)) lo = m;
    else hi = m;
  }
  return lo / mod;
}

function overall(poles: ComplexVector, limit: (re: number, im: number) => number): StepLimit {
  let best = Infinity;
  let pole: [number, number] | null = null;
  for (let k = 0; k < poles.re.length; k++) {
    const h = limit(poles.re[k], poles.im[k]);
    if (h < best) {
      best = h;
      pole = [poles.re[k], poles.im[k]];
    }
  }
  return { maxStep: best, limitingPole: pole };
}

/** Forward Euler and RK4 limits for a set of poles. */
export function stepLimitsFromPoles(poles: ComplexVector): StepLimits {
  return { forwardEuler: overall(poles, forwardEulerPoleLimit), rk4: overall(poles, rk4PoleLimit) };
}

/** Forward Euler and RK4 limits for a model's spectrum (eigenvalues of A). */
export function stepLimits(model: StateSpaceModel): StepLimits {
  return stepLimitsFromPoles(eigenvalues(model.A));
}

export interface RealTimeReadiness extends StepLimits {
  /** The zero-order-hold model at the target's sample time ts, and its poles. */
  discrete: DiscreteModel;
  discretePoles: ComplexVector;
  /** Largest discrete pole modulus (< 1 for a stable model). */
  spectralRadius: number;
  /** Whether forward Euler / RK4 at step ts would be stable. */
  forwardEulerStableAtTs: boolean;
  rk4StableAtTs: boolean;
}

/** Step limits plus the discretised model at sample time ts (Van Loan 1978, `discretize.ts`). */
export function realTimeReadiness(model: StateSpaceModel, ts: number, poles?: ComplexVector): RealTimeReadiness {
  const discrete = discretizeZoh(model, ts);
  const limits = stepLimitsFromPoles(poles ?? eigenvalues(model.A));
  const zp = discretePoles(discrete);
  let rho = 0;
  for (let k = 0; k < zp.re.length; k++) rho = Math.max(rho, Math.hypot(zp.re[k], zp.im[k]));
  return {
    ...limits,
    discrete,
    discretePoles: zp,
    spectralRadius: rho,
    forwardEulerStableAtTs: ts <= limits.forwardEuler.maxStep,
    rk4StableAtTs: ts <= limits.rk4.maxStep,
  };
}
