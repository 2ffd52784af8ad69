/**
 * Largest stable fixed steps of forward Euler and classical RK4 (stability functions and regions:
 * Hairer & Wanner, "Solving ODE II", 1996, §IV.2), checked against closed forms and against roots of
 * |R(tλ)|² = 1 found independently with numpy.roots (Debian python3-numpy).
 */
import { describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import {
  forwardEulerPoleLimit,
  realTimeReadiness,
  rk4Amplification,
  rk4PoleLimit,
  stepLimits,
  stepLimitsFromPoles,
} from '@/reduction/step-limits';
import { assembleModel } from '@/reduction/io';
import { fromRows } from '@/reduction/linalg/matrix';
import { modelWithRates } from './simulate-reference';

/**
 * Smallest positive real root t of |R(t·u)|² = 1 for the unit direction u = (ux, uy), R the RK4
 * polynomial: numpy.polynomial arithmetic on the real and imaginary parts, then numpy.roots.
 */
function numpyRk4Limits(directions: [number, number][]): number[] {
  const script = `
import json, math, sys, numpy as np
from numpy.polynomial import polynomial as P
out = []
for ux, uy in json.load(sys.stdin):
    # R(z) = sum z^k/k!, z = t(ux + i uy): coefficients of t^k are (ux + i uy)^k / k!
    c = [complex(ux, uy) ** k / math.factorial(k) for k in range(5)]
    re, im = np.array([x.real for x in c]), np.array([x.imag for x in c])
    q = P.polysub(P.polyadd(P.polymul(re, re), P.polymul(im, im)), [1.0])
    r = np.roots(q[::-1])
    pos = sorted(x.real for x in r if abs(x.imag) < 1e-7 and x.real > 1e-9)
    out.append(pos[0] if pos else None)
print(json.dumps(out))`;
  return JSON.parse(execFileSync('/usr/bin/python3', ['-c', script], { input: JSON.stringify(directions) }).toString());
}

describe('forward Euler: |1 + hλ| ≤ 1', () => {
  it('real pole: h = 2/|λ| (Hairer & Wanner 1996, §IV.2)', () => {
    for (const lam of [1, 37.5, 1e4]) expect(forwardEulerPoleLimit(-lam, 0)).toBeCloseTo(2 / lam, 15);
  });
  it('complex pole −a ± ib: h = 2a/(a² + b²) (the disc |1 + z| ≤ 1)', () => {
    expect(forwardEulerPoleLimit(-1, 3)).toBeCloseTo(2 / 10, 15);
    expect(forwardEulerPoleLimit(-0.05, 20)).toBeCloseTo(0.1 / (0.0025 + 400), 15);
  });
  it('a pole on the imaginary axis or in the right half-plane allows no step; an integrator no limit', () => {
    expect(forwardEulerPoleLimit(0, 5)).toBe(0);
    expect(forwardEulerPoleLimit(0.1, 0)).toBe(0);
    expect(forwardEulerPoleLimit(0, 0)).toBe(Infinity);
  });
});

describe('classical RK4: |1 + z + z²/2 + z³/6 + z⁴/24| ≤ 1 along each ray', () => {
  it('real pole: h ≈ 2.785/|λ| (Hairer & Wanner 1996, §IV.2), equal to the numpy root of |R(−x)| = 1', () => {
    const [ref] = numpyRk4Limits([[-1, 0]]);
    expect(ref).toBeCloseTo(2.785, 3);
    for (const lam of [1, 250, 1e5]) expect(rk4PoleLimit(-lam, 0) * lam).toBeCloseTo(ref, 10);
  });
  it('imaginary axis: h = 2√2/|ω| (|R(iy)|² = 1 − y⁶/72 + y⁸/576, Hairer & Wanner 1996, §IV.2)', () => {
    expect(rk4PoleLimit(0, 10) * 10).toBeCloseTo(2 * Math.SQRT2, 10);
  });
  it('complex poles at several angles match the numpy roots', () => {
    const angles = [100, 120, 135, 150, 170, 179];
    const dirs = angles.map((deg) => [Math.cos((deg * Math.PI) / 180), Math.sin((deg * Math.PI) / 180)] as [number, number]);
    const ref = numpyRk4Limits(dirs);
    dirs.forEach(([ux, uy], k) => {
      const mod = 7;
      expect(rk4PoleLimit(mod * ux, mod * uy) * mod).toBeCloseTo(ref[k], 9);
      // At the limit the amplification is 1 (the boundary of the stability region).
      const z = rk4PoleLimit(ux, uy);
      expect(rk4Amplification(z * ux, z * uy)).toBeCloseTo(1, 10);
    });
  });
  it('a right-half-plane pole allows no step', () => {
    expect(rk4PoleLimit(0.5, 2)).toBe(0);
  });
});

describe('model step limits and real-time readiness', () => {
  it('the overall limit is set by the worst pole, and names it', () => {
    const poles = { re: Float64Array.of(-1, -100, -3, -3), im: Float64Array.of(0, 0, 40, -40) };
    const l = stepLimitsFromPoles(poles);
    // Euler: min(2, 0.02, 6/1609) = 6/1609 from the lightly damped pair.
    expect(l.forwardEuler.maxStep).toBeCloseTo(6 / 1609, 15);
    expect(Math.abs(l.forwardEuler.limitingPole![1])).toBe(40);
    expect(l.rk4.maxStep).toBeLessThan(2.83 / 40);
  });
  it('a mass-spring-damper’s limits follow from its poles', () => {
    // m = 2, c = 0.4, k = 8 → λ = −0.1 ± i·√3.99.
    const model = assembleModel({ A: fromRows([[0, 1], [-4, -0.2]]), B: fromRows([[0], [0.5]]), C: fromRows([[1, 0]]) });
    const l = stepLimits(model);
    expect(l.forwardEuler.maxStep).toBeCloseTo(0.2 / 4, 12);
    expect(l.rk4.maxStep).toBeGreaterThan(1);
  });
  it('readiness at a sample time: discrete poles inside the unit circle and the stability verdicts', () => {
    const model = modelWithRates([1, 10, 100], 1, 1, 3);
    const r = realTimeReadiness(model, 0.015);
    expect(r.spectralRadius).toBeLessThan(1);
    expect(r.spectralRadius).toBeCloseTo(Math.exp(-0.015), 8);
    expect(r.forwardEulerStableAtTs).toBe(0.015 <= 0.02);
    expect(r.rk4StableAtTs).toBe(true);
    expect(realTimeReadiness(model, 0.03).rk4StableAtTs).toBe(false);
  });
});
