import { describe, it, expect } from 'vitest';
import { analyzeModel, zeroFrequencyGain, stiffnessRatio } from '../../../reduction/analysis';
import { fromRows, get } from '../../../reduction/linalg/matrix';
import {
  randomStableModel,
  firstOrderLag,
  secondOrder,
  heatEquation,
  heatEquationEigenvalues,
  rigidBodyModel,
  appendModels,
  disguise,
} from '../../fixtures/engine/models';
import { runReference, spectrumDistance } from '../../fixtures/engine/reference';
import type { StateSpaceModel } from '../../../reduction/model';

function polePairs(a: ReturnType<typeof analyzeModel>): [number, number][] {
  return a.poles.map((p) => [p.re, p.im]);
}

describe('poles', () => {
  it('agree with numpy.linalg.eigvals (LAPACK dgeev) on seeded random models', () => {
    const models = [
      randomStableModel(1, 8, 1, 1),
      randomStableModel(2, 20, 2, 3, { decades: 4 }),
      randomStableModel(3, 40, 3, 2, { withD: true }),
    ];
    const ref = runReference(models.map((model, i) => ({ name: `random-${i}`, model, tasks: ['eig'] })));
    models.forEach((model, i) => {
      const ours = polePairs(analyzeModel(model));
      expect(spectrumDistance(ours, ref[i].eig!)).toBeLessThan(1e-9);
    });
  });

  it('match the closed-form eigenvalues of the 1-D heat equation −(4/h²)sin²(kπ/(2(N+1))) (LeVeque 2007)', () => {
    const N = 30;
    const ours = polePairs(analyzeModel(heatEquation(N)));
    const exact = heatEquationEigenvalues(N).map((x) => [x, 0] as [number, number]);
    expect(spectrumDistance(ours, exact)).toBeLessThan(1e-11);
  });

  it('carry ωn = |λ|, ζ = −Re λ/|λ| and τ = −1/Re λ (Ogata, Modern Control Engineering, ch. 5)', () => {
    const a = analyzeModel(secondOrder(5, 0.3));
    for (const p of a.poles) {
      expect(p.naturalFrequency).toBeCloseTo(5, 12);
      expect(p.dampingRatio!).toBeCloseTo(0.3, 12);
      expect(p.timeConstant!).toBeCloseTo(1 / (0.3 * 5), 12);
      expect(Math.abs(p.im)).toBeCloseTo(5 * Math.sqrt(1 - 0.09), 12);
    }
  });
});

describe('stability split', () => {
  it('counts a rigid-body double pole at 0 (a Jordan block) as two marginal poles', () => {
    const a = analyzeModel(disguise(rigidBodyModel(), 11));
    expect(a.marginalPoles).toBe(2);
    expect(a.stablePoles).toBe(2);
    expect(a.unstablePoles).toBe(0);
    expect(a.stable).toBe(false);
  });

  it('separates unstable, marginal (integrator) and stable poles with a relative tolerance', () => {
    const A = fromRows([
      [3, 0, 0, 0],
      [0, 0, 0, 0],
      [0, 0, -5e-4, 0],
      [0, 0, 0, -1e4],
    ]);
    const model: StateSpaceModel = { A, B: fromRows([[1], [1], [1], [1]]), C: fromRows([[1, 1, 1, 1]]), D: fromRows([[0]]) };
    // Scale = spectral radius 1e4, so the default tolerance 1e-7 puts the line at −1e-3: the pole at −5e-4
    // is right of it and counts as marginal; a tighter tolerance makes it stable.
    const loose = analyzeModel(model);
    expect([loose.stablePoles, loose.marginalPoles, loose.unstablePoles]).toEqual([1, 2, 1]);
    const tight = analyzeModel(model, { stabilityTolerance: 1e-9 });
    expect([tight.stablePoles, tight.marginalPoles, tight.unstablePoles]).toEqual([2, 1, 1]);
  });
});

describe('stiffness ratio', () => {
  it('is the fastest over the slowest decay rate of the stable poles (Lambert 1991, ch. 6)', () => {
    const A = fromRows([
      [-0.5, 0, 0],
      [0, -2000, 0],
      [0, 0, 0],
    ]);
    const model = { A, B: fromRows([[1], [1], [1]]), C: fromRows([[1, 1, 1]]), D: fromRows([[0]]) };
    const a = analyzeModel(model);
    expect(a.stiffnessRatio).toBeCloseTo(4000, 9);
    expect(a.slowestDecayRate).toBeCloseTo(0.5, 12);
    expect(a.fastestDecayRate).toBeCloseTo(2000, 9);
  });

  it('uses decay rates, not magnitudes: a lightly damped pair counts by |Re λ|', () => {
    // Poles −0.1 ± 10j and −5: rates 0.1 and 5.
    const poles = { re: Float64Array.of(-0.1, -0.1, -5), im: Float64Array.of(10, -10, 0) };
    expect(stiffnessRatio(poles)).toBeCloseTo(50, 12);
  });

  it('of the heat equation is sin²(Nπ/(2(N+1)))/sin²(π/(2(N+1))) (closed-form eigenvalues, LeVeque 2007)', () => {
    const N = 25;
    const expected = Math.sin((N * Math.PI) / (2 * (N + 1))) ** 2 / Math.sin(Math.PI / (2 * (N + 1))) ** 2;
    expect(analyzeModel(heatEquation(N)).stiffnessRatio! / expected - 1).toBeLessThan(1e-10);
  });
});

describe('DC gain', () => {
  it('of k/(s+a) is k/a (closed form)', () => {
    const g = zeroFrequencyGain(firstOrderLag(3, 4));
    expect(g.defined).toBe(true);
    if (g.defined) expect(get(g.value, 0, 0)).toBeCloseTo(0.75, 14);
  });

  it('is a typed "not defined" with a pole at 0, not NaN', () => {
    const g = analyzeModel(rigidBodyModel()).zeroFrequencyGain;
    expect(g.defined).toBe(false);
    if (!g.defined) expect(g.reason).toMatch(/pole\(s\) at s = 0/);
  });

  it('equals D − C A⁻¹ B from numpy on a random MIMO model (frequency response at ω = 0)', () => {
    const model = randomStableModel(21, 12, 2, 3, { withD: true });
    const [ref] = runReference([{ name: 'zero-frequency', model, tasks: ['response'], frequencies: [0] }]);
    const g = zeroFrequencyGain(model);
    expect(g.defined).toBe(true);
    if (!g.defined) return;
    for (let i = 0; i < 3; i++) {
      for (let j = 0; j < 2; j++) expect(get(g.value, i, j)).toBeCloseTo(ref.response![0].re[i][j], 10);
    }
  });
});

describe('norms and Hankel singular values in the analysis', () => {
  it('report H∞ and H2 as not finite for a model with a pole at 0, and HSVs of its stable part only', () => {
    // Stable part: the damped relative mode (1/2)/(s² + 0.2s + 2) of the rigid-body model, appended to an
    // exact double integrator and disguised; its HSVs must equal those of the stable part alone.
    const stablePart = disguise(
      { A: fromRows([[0, 1], [-2, -0.2]]), B: fromRows([[0], [1]]), C: fromRows([[0.5, 0]]), D: fromRows([[0]]) },
      3,
    );
    const doubleIntegrator = { A: fromRows([[0, 1], [0, 0]]), B: fromRows([[0], [1]]), C: fromRows([[0.5, 0]]), D: fromRows([[0]]) };
    const model = disguise(appendModels(stablePart, doubleIntegrator), 4);
    const a = analyzeModel(model);
    expect(a.hInfinityNorm.finite).toBe(false);
    expect(a.h2Norm.finite).toBe(false);
    const [ref] = runReference([{ name: 'stable-part', model: stablePart, tasks: ['hsv'] }]);
    expect(a.hankelSingularValues.length).toBe(2);
    a.hankelSingularValues.forEach((s, i) => expect(s / ref.hsv![i] - 1).toBeLessThan(1e-8));
  });

  it('rank modes by ‖cᵢ‖‖bᵢ‖/|Re λᵢ| (the height of each mode’s own peak)', () => {
    // Diagonal A: residues are cᵢbᵢ directly. Mode −1 with residue 1 → 1; mode −10 with residue 50 → 5;
    // mode −100 with residue 20 → 0.2.
    const model = {
      A: fromRows([[-1, 0, 0], [0, -10, 0], [0, 0, -100]]),
      B: fromRows([[1], [5], [4]]),
      C: fromRows([[1, 10, 5]]),
      D: fromRows([[0]]),
    };
    const ranking = analyzeModel(model).modalDominance;
    expect(ranking.reliable).toBe(true);
    expect(ranking.modes.map((m) => m.re)).toEqual([-10, -1, -100].map((x) => expect.closeTo(x, 10)));
    expect(ranking.modes.map((m) => m.dominance)).toEqual([5, 1, 0.2].map((x) => expect.closeTo(x, 10)));
  });
});

describe('fixed-step limits in the analysis (from reduction/step-limits.ts)', () => {
  it('forward Euler on a real pole −a allows h ≤ 2/a (Hairer & Wanner, Solving ODEs II, §IV.2)', () => {
    const a = analyzeModel(firstOrderLag(1, 50));
    expect(a.stepLimits.forwardEuler.maxStep).toBeCloseTo(2 / 50, 12);
    // Classical RK4 reaches about 2.785 on the negative real axis (Hairer & Wanner §IV.2, value from memory).
    expect(a.stepLimits.rk4.maxStep * 50).toBeCloseTo(2.785, 2);
  });

  it('are set by the damped pair of the rigid-body model, not by its rounding-spread poles at 0', () => {
    const a = analyzeModel(disguise(rigidBodyModel(), 12));
    // Damped pair −0.1 ± 1.4107j: forward Euler h ≤ −2 Re λ/|λ|² = 0.2/2 (|λ|² = 2k = 2).
    expect(a.stepLimits.forwardEuler.maxStep).toBeCloseTo(0.1, 9);
    expect(a.stepLimits.forwardEuler.limitingPole![0]).toBeCloseTo(-0.1, 9);
    expect(a.stepLimits.rk4.maxStep).toBeGreaterThan(1);
  });
});
