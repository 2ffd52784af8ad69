// Pole classification and modal figures (reduction/poles.ts): the one rule the engine, the worker, the
// pole map and the modes table share. Expected values are closed forms worked out beside each check.
import { describe, expect, it } from 'vitest';
import { classifyPoles, DEFAULT_STABILITY_TOLERANCE, modalFigures, stiffnessFromRates } from '@/reduction/poles';
import { explicitStabilitySteps } from '@/reduction/step-limits';
import { classifyPoles as engineClassify } from '@/reduction/spectral-split';
import { eigenvalues, fromRows } from '@/reduction/linalg/index';

describe('modal figures of a pole', () => {
  // λ = -3 + 4j: |λ| = 5 (3-4-5 triangle), ζ = 3/5, τ = 1/3, from λ = -ζωn ± jωn√(1-ζ²)
  // (K. Ogata, "Modern Control Engineering", 5th ed. 2010, ch. 5).
  it('gives ωn = |λ|, ζ = -Re λ/|λ| and τ = 1/|Re λ|', () => {
    const m = modalFigures(-3, 4, 'stable');
    expect(m.naturalFrequency).toBeCloseTo(5, 14);
    expect(m.dampingRatio!).toBeCloseTo(0.6, 14);
    expect(m.timeConstant!).toBeCloseTo(1 / 3, 14);
    expect(m.growing).toBe(false);
  });

  it('gives an unstable pole its growth time, and a marginal pole no time constant', () => {
    expect(modalFigures(0.5, 0, 'unstable')).toMatchObject({ timeConstant: 2, growing: true, dampingRatio: -1 });
    // A rigid-body pole computed as -1e-12 is marginal: its "time constant" 1e12 would be rounding, not physics.
    expect(modalFigures(-1e-12, 0, 'marginal')).toMatchObject({ timeConstant: null, growing: false });
    expect(modalFigures(0, 0, 'marginal')).toMatchObject({ naturalFrequency: 0, dampingRatio: null, timeConstant: null });
  });
});

describe('pole classification', () => {
  it('calls a pole marginal within the tolerance relative to the spectral radius', () => {
    // radius 1000, tolerance 1e-9 → t = 1e-6: −1e-9 and +2e-9 marginal, −1e-3 stable
    const c = classifyPoles({ re: [-1e-9, -1e-3, 2e-9, -1000], im: [0, 0, 0, 0] }, 1e-9);
    expect(c.stability).toEqual(['marginal', 'stable', 'marginal', 'stable']);
    expect(c.scale).toBe(1000);
    // every pole at 0: the scale is 1, so the tolerance stays meaningful
    expect(classifyPoles({ re: [0, 0], im: [0, 0] })).toMatchObject({ stability: ['marginal', 'marginal'], scale: 1 });
  });

  it('uses 1e-7: a rigid-body double pole perturbed by rounding lands on the axis, where 1e-9 would split it', () => {
    // [[0, 1], [ε, 0]] is the Jordan block of a double pole at 0 perturbed by ε in one entry; its eigenvalues are
    // ±√ε ≈ ±1.49e-8 exactly (characteristic polynomial s² − ε), the ε^(1/2) spread of Wilkinson, "The Algebraic
    // Eigenvalue Problem", 1965, ch. 2. With a slow pole at −1 the spectral radius is 1.
    const root = Math.sqrt(Number.EPSILON);
    const poles = { re: [root, -root, -1], im: [0, 0, 0] };
    expect(DEFAULT_STABILITY_TOLERANCE).toBe(1e-7);
    expect(classifyPoles(poles).stability).toEqual(['marginal', 'marginal', 'stable']);
    expect(classifyPoles(poles, 1e-9).stability).toEqual(['unstable', 'stable', 'stable']);
    // The engine's eigenvalue solver on that very matrix gives the same classification.
    const A = fromRows([
      [0, 1, 0],
      [Number.EPSILON, 0, 0],
      [0, 0, -1],
    ]);
    expect(engineClassify(eigenvalues(A)).stability.filter((s) => s === 'marginal')).toHaveLength(2);
  });

  it('is the engine’s own function (one rule, one tolerance)', () => {
    expect(engineClassify).toBe(classifyPoles);
  });

  it('names what is wrong', () => {
    expect(() => classifyPoles({ re: [1, 2], im: [0] })).toThrow(/im must have as many entries as re/);
    expect(() => classifyPoles({ re: [1], im: [0] }, -1)).toThrow(/tolerance must be in \[0, 1\)/);
  });
});

describe('stiffness and the explicit solver\'s stability limit', () => {
  it('divides the fastest by the slowest decay rate, leaving out rates that do not decay', () => {
    // rates 0.5, 2, 1000 (and a marginal 0, a growing −3): 1000 / 0.5 = 2000
    expect(stiffnessFromRates([2, 0.5, 0, -3, 1000])).toEqual({ stiffnessRatio: 2000, slowestDecayRate: 0.5, fastestDecayRate: 1000 });
    expect(stiffnessFromRates([0, -1])).toEqual({ stiffnessRatio: null, slowestDecayRate: null, fastestDecayRate: null });
  });

  it('counts the steps stability alone asks of Dormand–Prince: rate·T/3.3 (Hairer & Wanner 1996, §IV.2)', () => {
    // a pole at −1000 over 10 time units: 1000·10/3.3 = 3030.3 steps
    expect(explicitStabilitySteps(1000, 10)).toBeCloseTo(3030.303, 3);
  });
});
