import { describe, it, expect } from 'vitest';
import { hInfinityNorm, h2Norm, hamiltonian } from '../../../reduction/norms';
import { fromRows, eigenvalues } from '../../../reduction/linalg/index';
import { frequencyEvaluator, largestSingularValue } from '../../../reduction/frequency';
import { errorSystem } from '../../../reduction/realization';
import { randomStableModel, firstOrderLag, secondOrder, rigidBodyModel, disguise, heatEquation } from '../../fixtures/engine/models';
import { runReference } from '../../fixtures/engine/reference';

describe('H∞ norm by the Hamiltonian method (Boyd & Balakrishnan 1990; Bruinsma & Steinbuch 1990)', () => {
  it('of k/(s+a) is k/a, attained at ω = 0 (closed form)', () => {
    const r = hInfinityNorm(firstOrderLag(3, 0.5));
    expect(r.finite).toBe(true);
    if (!r.finite) return;
    expect(r.value).toBeCloseTo(6, 12);
    expect(r.peakFrequency).toBe(0);
  });

  for (const zeta of [0.005, 0.02, 0.1, 0.3, 0.6]) {
    it(`of a second-order system with ζ = ${zeta} is the resonant peak 1/(2ζ√(1−ζ²)) at ωn√(1−2ζ²) (Ogata, Modern Control Engineering, ch. 5)`, () => {
      const wn = 40;
      const r = hInfinityNorm(disguise(secondOrder(wn, zeta), 7));
      expect(r.finite).toBe(true);
      if (!r.finite) return;
      const peak = 1 / (2 * zeta * Math.sqrt(1 - zeta * zeta));
      expect(Math.abs(r.value / peak - 1)).toBeLessThan(1e-8);
      expect(r.lowerBound).toBeLessThanOrEqual(peak * (1 + 1e-12));
      expect(r.upperBound).toBeGreaterThanOrEqual(peak * (1 - 1e-12));
      // The peak is flat (quadratic), so its frequency is only determined to about √ε relative.
      expect(Math.abs(r.peakFrequency / (wn * Math.sqrt(1 - 2 * zeta * zeta)) - 1)).toBeLessThan(1e-4);
      // The starting bound is polished on σ_max before the first Hamiltonian test, which then certifies
      // it: no level-set iteration is needed.
      expect(r.iterations).toBe(0);
    });
  }

  it('of a well-damped second-order system (ζ = 0.8 > 1/√2) is the DC gain 1 (no resonant peak)', () => {
    const r = hInfinityNorm(secondOrder(3, 0.8));
    expect(r.finite && r.value).toBeCloseTo(1, 10);
  });

  it('agrees with a dense sweep refined by scipy.optimize on seeded random MIMO models, with and without D', () => {
    const models = [
      randomStableModel(601, 8, 1, 1),
      randomStableModel(602, 20, 2, 3, { decades: 3 }),
      randomStableModel(603, 30, 3, 3, { withD: true }),
      randomStableModel(604, 40, 2, 2, { decades: 4, withD: true }),
      disguise(heatEquation(30), 605),
    ];
    const ref = runReference(models.map((model, i) => ({ name: `h-infinity-${i}`, model, tasks: ['h_infinity'] })));
    models.forEach((model, i) => {
      const r = hInfinityNorm(model);
      expect(r.finite).toBe(true);
      if (!r.finite) return;
      expect(Math.abs(r.value / ref[i].h_infinity!.value - 1)).toBeLessThan(1e-7);
      // The value is attained: σ_max at the reported frequency is the norm.
      const sigma = largestSingularValue(frequencyEvaluator(model).at(r.peakFrequency));
      expect(Math.abs(sigma / r.value - 1)).toBeLessThan(1e-12);
    });
  });

  it('builds a Hamiltonian whose imaginary eigenvalues are exactly where a singular value of G(jω) equals γ', () => {
    const model = randomStableModel(610, 10, 2, 2, { withD: true });
    const norm = hInfinityNorm(model);
    if (!norm.finite) throw new Error('expected a finite norm');
    const gamma = 0.7 * norm.value;
    const ev = eigenvalues(hamiltonian(model, gamma));
    const evaluator = frequencyEvaluator(model);
    let crossings = 0;
    for (let i = 0; i < ev.re.length; i++) {
      if (Math.abs(ev.re[i]) > 1e-8 * Math.hypot(ev.re[i], ev.im[i]) || ev.im[i] <= 0) continue;
      crossings++;
      // Some singular value of G(jω) equals γ there: for this 2×2 G, σ_max or σ_min.
      const h = evaluator.at(ev.im[i]);
      const sv = [largestSingularValue(h)];
      const det = Math.hypot(
        h.re.data[0] * h.re.data[3] - h.im.data[0] * h.im.data[3] - (h.re.data[1] * h.re.data[2] - h.im.data[1] * h.im.data[2]),
        h.re.data[0] * h.im.data[3] + h.im.data[0] * h.re.data[3] - (h.re.data[1] * h.im.data[2] + h.im.data[1] * h.re.data[2]),
      );
      sv.push(det / sv[0]);
      expect(Math.min(...sv.map((s) => Math.abs(s / gamma - 1)))).toBeLessThan(1e-7);
    }
    expect(crossings).toBeGreaterThan(0);
  });

  it('is a typed "not finite" for a model with a pole at 0 or in the right half-plane', () => {
    const rigid = hInfinityNorm(rigidBodyModel());
    expect(rigid.finite).toBe(false);
    if (!rigid.finite) expect(rigid.reason).toMatch(/imaginary axis/);
    const unstable = hInfinityNorm({ A: fromRows([[0.5]]), B: fromRows([[1]]), C: fromRows([[1]]), D: fromRows([[0]]) });
    expect(unstable.finite).toBe(false);
    if (!unstable.finite) expect(unstable.reason).toMatch(/right half-plane/);
  });
});

describe('H2 norm from the controllability gramian (Zhou, Doyle & Glover 1996)', () => {
  it('of k/(s+a) is k/√(2a) (closed form: ∫|k/(jω+a)|² dω/2π = k²/(2a))', () => {
    const r = h2Norm(firstOrderLag(3, 2));
    expect(r.finite && r.value).toBeCloseTo(1.5, 12);
  });

  it('of ωn²/(s² + 2ζωn s + ωn²) is √(ωn/(4ζ)) (closed form of the same integral)', () => {
    const r = h2Norm(secondOrder(9, 0.25));
    expect(r.finite && r.value).toBeCloseTo(Math.sqrt(9 / (4 * 0.25)), 10);
  });

  it('agrees with sqrt(trace(C P Cᵀ)) from scipy.linalg.solve_continuous_lyapunov', () => {
    const models = [randomStableModel(620, 12, 2, 2), randomStableModel(621, 35, 3, 1, { decades: 3 })];
    const ref = runReference(models.map((model, i) => ({ name: `h2-${i}`, model, tasks: ['h2'] })));
    models.forEach((model, i) => {
      const r = h2Norm(model);
      expect(r.finite).toBe(true);
      if (r.finite) expect(Math.abs(r.value / ref[i].h2! - 1)).toBeLessThan(1e-9);
    });
  });

  it('of an error system G − Gr far smaller than G keeps its relative accuracy (factored form, no trace cancellation)', () => {
    // Gr = G with C → C − δ·C′, in other coordinates: G − Gr = δ·C′(sI − A)⁻¹B exactly, whose norm is
    // computed without cancellation from the small model. δ = 1e-9 is below the √ε·‖G‖₂ floor of the
    // dense trace(C P Cᵀ) formula, which is off by a factor of about 20 here.
    const g = randomStableModel(623, 14, 2, 2);
    const cPrime = randomStableModel(624, 14, 2, 2).C;
    const delta = 1e-9;
    const Cr = { rows: g.C.rows, cols: g.C.cols, data: g.C.data.map((x, k) => x - delta * cPrime.data[k]) };
    const error = errorSystem(g, disguise({ ...g, C: Cr }, 625));
    const direct = h2Norm({ ...g, C: cPrime });
    const measured = h2Norm(error);
    expect(direct.finite && measured.finite).toBe(true);
    if (direct.finite && measured.finite) expect(Math.abs(measured.value / (delta * direct.value) - 1)).toBeLessThan(1e-6);
  });

  it('is not finite with a direct feedthrough', () => {
    const r = h2Norm(randomStableModel(622, 5, 1, 1, { withD: true }));
    expect(r.finite).toBe(false);
    if (!r.finite) expect(r.reason).toMatch(/feedthrough/);
  });
});
