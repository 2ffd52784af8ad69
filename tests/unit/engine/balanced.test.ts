import { describe, it, expect } from 'vitest';
import {
  balancedRealization,
  balancedResidualization,
  balancedTruncation,
  hankelSingularValues,
} from '../../../reduction/balanced';
import { controllabilityGramian, observabilityGramian } from '../../../reduction/gramians';
import { PreparationCache, prepareReduction, reduceModel } from '../../../reduction/reduce';
import { zeroFrequencyGain } from '../../../reduction/analysis';
import { hInfinityNorm } from '../../../reduction/norms';
import { ModelError } from '../../../reduction/errors';
import { fromRows, get, matmul, transpose, zeros, frobeniusNorm } from '../../../reduction/linalg/index';
import {
  randomStableModel,
  firstOrderLag,
  rigidBodyModel,
  duplicatedStates,
  disguise,
  heatEquation,
} from '../../fixtures/engine/models';
import { runReference } from '../../fixtures/engine/reference';
import { blockDiagonal } from '../../../reduction/realization';
import type { StateSpaceModel } from '../../../reduction/model';

function allFinite(m: StateSpaceModel): boolean {
  return [m.A, m.B, m.C, m.D].every((x) => x.data.every(Number.isFinite));
}

function lyapunovResidual(A: ReturnType<typeof fromRows>, X: ReturnType<typeof fromRows>, Q: ReturnType<typeof fromRows>): number {
  const r = matmul(A, X);
  const rt = matmul(X, transpose(A));
  const out = zeros(A.rows, A.rows);
  for (let k = 0; k < out.data.length; k++) out.data[k] = r.data[k] + rt.data[k] + Q.data[k];
  return frobeniusNorm(out) / frobeniusNorm(Q);
}

describe('gramians', () => {
  it('of a diagonal A with B = Cᵀ = ones are the Cauchy matrix P_ij = −1/(λ_i + λ_j) (closed form)', () => {
    const lambda = [-0.5, -1, -3, -7, -20];
    const n = lambda.length;
    const A = zeros(n, n);
    lambda.forEach((l, i) => (A.data[i * n + i] = l));
    const ones = zeros(n, 1);
    ones.data.fill(1);
    const model = { A, B: ones, C: transpose(ones), D: zeros(1, 1) };
    const P = controllabilityGramian(model);
    const Q = observabilityGramian(model);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        const exact = -1 / (lambda[i] + lambda[j]);
        expect(get(P, i, j) / exact - 1).toBeLessThan(1e-12);
        expect(get(Q, i, j) / exact - 1).toBeLessThan(1e-12);
      }
    }
  });

  it('leave a Lyapunov residual small relative to ‖BBᵀ‖ on random models', () => {
    for (const seed of [31, 32, 33]) {
      const model = randomStableModel(seed, 30, 2, 2, { decades: 3 });
      const P = controllabilityGramian(model);
      expect(lyapunovResidual(model.A, P, matmul(model.B, transpose(model.B)))).toBeLessThan(1e-10);
    }
  });
});

describe('Hankel singular values', () => {
  it('of k/(s+a) is the single value k/(2a) (closed form)', () => {
    const hsv = hankelSingularValues(firstOrderLag(3, 5));
    expect(hsv.length).toBe(1);
    expect(hsv[0]).toBeCloseTo(3 / 10, 14);
  });

  it('agree with SciPy (solve_continuous_lyapunov gramians, LAPACK SVD of the factor product) on seeded models', () => {
    const models = [
      randomStableModel(41, 6, 1, 1),
      randomStableModel(42, 16, 2, 2),
      randomStableModel(43, 30, 3, 2, { decades: 3 }),
      disguise(heatEquation(20), 44),
    ];
    const ref = runReference(models.map((model, i) => ({ name: `hsv-${i}`, model, tasks: ['hsv'] })));
    models.forEach((model, i) => {
      const ours = hankelSingularValues(model);
      const theirs = ref[i].hsv!;
      expect(ours.length).toBe(theirs.length);
      // Relative 1e-8 plus an absolute 1e-11·σ₁: the gramians carry absolute errors of order ε‖P‖ times
      // their conditioning, so the small values are only determined to about that absolute level.
      ours.forEach((s, k) => {
        expect(Math.abs(s - theirs[k])).toBeLessThan(1e-8 * theirs[k] + 1e-11 * theirs[0]);
      });
    });
  });

  it('are invariant under a state transformation (Moore 1981)', () => {
    const model = randomStableModel(45, 12, 2, 2);
    const a = hankelSingularValues(model);
    const b = hankelSingularValues(disguise(model, 46));
    a.forEach((s, k) => expect(Math.abs(b[k] - s)).toBeLessThan(1e-9 * a[0]));
  });
});

describe('balanced realization', () => {
  it('has both gramians equal to diag(σ) (Laub, Heath, Paige & Ward 1987)', () => {
    const model = randomStableModel(51, 14, 2, 3);
    const real = balancedRealization(model);
    const P = controllabilityGramian(real.balanced);
    const Q = observabilityGramian(real.balanced);
    const k = real.minimalOrder;
    for (let i = 0; i < k; i++) {
      for (let j = 0; j < k; j++) {
        const expected = i === j ? real.hankelSingularValues[i] : 0;
        expect(Math.abs(get(P, i, j) - expected)).toBeLessThan(1e-9 * real.hankelSingularValues[0]);
        expect(Math.abs(get(Q, i, j) - expected)).toBeLessThan(1e-9 * real.hankelSingularValues[0]);
      }
    }
  });
});

describe('balanced truncation and residualization error bounds', () => {
  // 12 seeded random stable MIMO models, several orders each.
  const cases = Array.from({ length: 12 }, (_, i) => ({
    seed: 100 + i,
    n: 6 + 3 * i,
    m: 1 + (i % 3),
    p: 1 + ((i + 1) % 3),
    withD: i % 4 === 0,
  }));

  for (const method of ['balanced', 'residualization'] as const) {
    it(`${method}: σ(r+1) ≤ ‖G − Gr‖∞ ≤ 2Σσ(r+1..n) on random MIMO models (Glover 1984; Liu & Anderson 1989)`, () => {
      let checked = 0;
      for (const c of cases) {
        const model = randomStableModel(c.seed, c.n, c.m, c.p, { decades: 3, withD: c.withD });
        const basis = prepareReduction(model, { method });
        const hsv = basis.hankelSingularValues!;
        for (const r of [1, Math.floor(c.n / 3), Math.floor((2 * c.n) / 3)]) {
          if (hsv[r - 1] - hsv[r] < 1e-8 * hsv[0]) continue; // σ_r = σ_{r+1}: the cut is not unique
          const result = reduceModel(model, { method, order: r });
          expect(result.order).toBe(r);
          expect(result.hInfinityError.finite).toBe(true);
          if (!result.hInfinityError.finite) continue;
          const err = result.hInfinityError.value;
          expect(err).toBeGreaterThanOrEqual(hsv[r] * (1 - 1e-7));
          expect(err).toBeLessThanOrEqual(result.errorBound * (1 + 1e-7));
          checked++;
        }
      }
      expect(checked).toBeGreaterThan(25);
    });
  }

  it('measured H∞ error agrees with a dense frequency sweep of G − Gr in numpy, down to errors 1e-7·‖G‖∞', () => {
    // The heat-equation orders give errors of 3e-5 to 3e-7 of ‖G‖∞, where the Hamiltonian's imaginary
    // eigenvalues are ill-conditioned and residualization's error peaks off the poles (its D − Dr ≠ 0).
    const random = randomStableModel(150, 24, 2, 2, { decades: 3 });
    const heat = disguise(heatEquation(30), 151);
    const cases = [
      ...(['balanced', 'residualization'] as const).map((method) => ({ model: random, method, order: 8 })),
      ...(['balanced', 'residualization'] as const).flatMap((method) =>
        [6, 9].map((order) => ({ model: heat, method, order })),
      ),
    ].map((c) => ({ ...c, r: reduceModel(c.model, { method: c.method, order: c.order }) }));
    const ref = runReference(
      cases.map(({ model, method, order, r }) => ({ name: `${method}-${order}`, model, tasks: ['error'], reduced: r.model })),
    );
    cases.forEach(({ r }, i) => {
      expect(r.hInfinityError.finite).toBe(true);
      if (!r.hInfinityError.finite) return;
      // The sweep is a lower estimate refined to ~1e-10; the Hamiltonian bracket is 2e-9 wide.
      expect(Math.abs(r.hInfinityError.value / ref[i].error!.value - 1)).toBeLessThan(1e-6);
    });
  });
});

describe('one preparation shared by both balanced methods (PreparationCache)', () => {
  it('gives the same reduced models as separate preparations, from one split and one balanced realization', () => {
    const model = randomStableModel(41, 24, 2, 3, { decades: 3, withD: true });
    const cache = new PreparationCache();
    const shared = (['balanced', 'residualization'] as const).map((method) => prepareReduction(model, { method }, cache));
    const separate = (['balanced', 'residualization'] as const).map((method) => prepareReduction(model, { method }));
    expect(shared[1].split).toBe(shared[0].split);
    expect(shared[1].hankelSingularValues).toBe(shared[0].hankelSingularValues);
    expect(separate[1].split).not.toBe(separate[0].split);
    for (let k = 0; k < 2; k++) {
      for (const r of [3, 8]) {
        const a = shared[k].truncateAt(r);
        const b = separate[k].truncateAt(r);
        expect(Array.from(a.model.A.data)).toEqual(Array.from(b.model.A.data));
        expect(Array.from(a.model.D.data)).toEqual(Array.from(b.model.D.data));
        expect(a.errorBound).toBe(b.errorBound);
      }
    }
  });
});

describe('balanced residualization', () => {
  it('keeps the DC gain exactly (Liu & Anderson 1989)', () => {
    for (const seed of [201, 202, 203, 204]) {
      const model = randomStableModel(seed, 20, 2, 3, { decades: 3, withD: seed % 2 === 0 });
      const full = zeroFrequencyGain(model);
      for (const r of [1, 4, 9]) {
        const result = reduceModel(model, { method: 'residualization', order: r });
        const reduced = zeroFrequencyGain(result.model);
        expect(full.defined && reduced.defined).toBe(true);
        if (!full.defined || !reduced.defined) continue;
        const scale = frobeniusNorm(full.value);
        for (let k = 0; k < full.value.data.length; k++) {
          expect(Math.abs(full.value.data[k] - reduced.value.data[k])).toBeLessThan(1e-9 * scale);
        }
        expect(result.zeroFrequencyGainError).toBeLessThan(1e-9 * scale);
      }
    }
  });

  it('differs from truncation only through the discarded states (same bound, same HSVs)', () => {
    const model = randomStableModel(210, 15, 1, 1);
    const real = balancedRealization(model);
    const t = balancedTruncation(real, 5);
    const s = balancedResidualization(real, 5);
    expect(t.A.rows).toBe(5);
    expect(s.A.rows).toBe(5);
    const bt = reduceModel(model, { method: 'balanced', order: 5 });
    const spa = reduceModel(model, { method: 'residualization', order: 5 });
    expect(bt.errorBound).toBe(spa.errorBound);
  });
});

describe('non-minimal and non-stable models', () => {
  it('reduce a model with duplicated states (HSVs at rounding level) without NaN (Tombs & Postlethwaite 1987)', () => {
    const g = randomStableModel(301, 10, 2, 2);
    const doubled = disguise(duplicatedStates(g), 302);
    const hsvG = hankelSingularValues(g);
    const hsv2 = hankelSingularValues(doubled);
    hsvG.forEach((s, k) => expect(Math.abs(hsv2[k] / s - 1)).toBeLessThan(1e-7));
    for (let k = 10; k < 20; k++) expect(hsv2[k]).toBeLessThan(1e-7 * hsvG[0]);
    for (const method of ['balanced', 'residualization'] as const) {
      for (const order of [3, 10, 15, 20]) {
        const r = reduceModel(doubled, { method, order });
        expect(allFinite(r.model)).toBe(true);
        expect(r.hInfinityError.finite).toBe(true);
        if (r.hInfinityError.finite) expect(r.hInfinityError.value).toBeLessThanOrEqual(r.errorBound * (1 + 1e-6) + 1e-9 * hsvG[0]);
        if (order > 10) expect(r.notes.join(' ')).toMatch(/numerically of order/);
      }
    }
  });

  it('keep the rigid-body double pole at 0 exactly and reduce only the stable part', () => {
    // Rigid body plus an appended stable random part, disguised so no state is purely rigid.
    const stable = randomStableModel(311, 8, 1, 1);
    const rigid = rigidBodyModel();
    const n = 12;
    const A = zeros(n, n);
    for (let i = 0; i < 4; i++) for (let j = 0; j < 4; j++) A.data[i * n + j] = get(rigid.A, i, j);
    for (let i = 0; i < 8; i++) for (let j = 0; j < 8; j++) A.data[(4 + i) * n + 4 + j] = get(stable.A, i, j);
    const B = zeros(n, 1);
    const C = zeros(1, n);
    for (let i = 0; i < 4; i++) {
      B.data[i] = rigid.B.data[i];
      C.data[i] = rigid.C.data[i];
    }
    for (let i = 0; i < 8; i++) {
      B.data[4 + i] = stable.B.data[i];
      C.data[4 + i] = stable.C.data[i];
    }
    const model = disguise({ A, B, C, D: zeros(1, 1) }, 312);
    for (const method of ['balanced', 'residualization', 'modal'] as const) {
      const r = reduceModel(model, { method, order: 6 });
      expect(r.unstableStatesKept).toBe(2);
      expect(r.stableOrder).toBe(4);
      const nearZero = Array.from(r.poles.re).filter((re, i) => Math.hypot(re, r.poles.im[i]) < 1e-6);
      expect(nearZero.length).toBe(2);
      expect(r.hInfinityError.finite).toBe(true);
      if (r.hInfinityError.finite) expect(r.hInfinityError.value).toBeLessThanOrEqual(r.errorBound * (1 + 1e-6));
    }
  });

  it('refuse an order above the stable part with ModelError on field "order"', () => {
    const model = disguise(rigidBodyModel(), 320);
    let caught: unknown;
    try {
      reduceModel(model, { method: 'balanced', order: 5 });
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(ModelError);
    expect((caught as ModelError).field).toBe('order');
    expect((caught as ModelError).code).toBe('order_too_large');
    expect(() => reduceModel(model, { method: 'balanced', order: 1 })).toThrow(/kept exactly for marginal/);
    expect(() => reduceModel(model, { method: 'balanced' })).toThrow(ModelError);
    expect(() => reduceModel(model, { method: 'balanced', order: 2, tolerance: 0.1 })).toThrow(/exactly one/);
    expect(() => reduceModel(model, { method: 'balanced', order: 2.5 })).toThrow(expect.objectContaining({ field: 'order' }));
    expect(() => reduceModel(model, { method: 'balanced', tolerance: -1 })).toThrow(expect.objectContaining({ field: 'tolerance' }));
    expect(() => reduceModel(model, { method: 'balanced', order: 2, stabilityTolerance: Number.NaN })).toThrow(
      expect.objectContaining({ field: 'stabilityTolerance' }),
    );
    expect(() => reduceModel(model, { method: 'fastest' as never, order: 2 })).toThrow(expect.objectContaining({ field: 'method' }));
  });
});

describe('equal Hankel singular values', () => {
  it('are never separated: an order between them is raised (Pernebo & Silverman 1982 need σ_r > σ_{r+1})', () => {
    // Two identical subsystems on separate channels: every HSV appears twice (Moore 1981: the HSVs of a
    // block-diagonal system are the union of the blocks' HSVs).
    const g = randomStableModel(330, 4, 1, 1);
    const twin = disguise(
      { A: blockDiagonal(g.A, g.A), B: blockDiagonal(g.B, g.B), C: blockDiagonal(g.C, g.C), D: zeros(2, 2) },
      331,
    );
    const hsv = hankelSingularValues(twin);
    for (let k = 0; k < 8; k += 2) expect(Math.abs(hsv[k] - hsv[k + 1])).toBeLessThan(1e-10 * hsv[0]);
    for (const method of ['balanced', 'residualization'] as const) {
      const basis = prepareReduction(twin, { method });
      expect(basis.allowedOrders()).toEqual([0, 2, 4, 6, 8]);
      const r = reduceModel(twin, { method, order: 3 });
      expect(r.order).toBe(4);
      expect(r.notes.join(' ')).toMatch(/equal Hankel singular values/);
      expect(allFinite(r.model)).toBe(true);
      expect(r.hInfinityError.finite && r.hInfinityError.value).toBeLessThanOrEqual(r.errorBound * (1 + 1e-7));
    }
  });
});

describe('order by tolerance and the reduction basis', () => {
  it('picks the smallest r with 2Σσ(r+1..n) ≤ tolerance·‖G‖∞', () => {
    const model = randomStableModel(401, 30, 2, 2, { decades: 3 });
    const norm = hInfinityNorm(model);
    expect(norm.finite).toBe(true);
    if (!norm.finite) return;
    const tol = 1e-3;
    const r = reduceModel(model, { method: 'balanced', tolerance: tol });
    const basis = r.basis;
    expect(r.errorBound).toBeLessThanOrEqual(tol * norm.value);
    expect(basis.errorBoundAt(r.stableOrder - 1)).toBeGreaterThan(tol * norm.value);
    expect(r.referenceNorm! / norm.value - 1).toBeLessThan(1e-12);
    expect(r.hInfinityError.finite && r.hInfinityError.value <= tol * norm.value).toBe(true);
  });

  it('slices any order from one balanced realization: truncateAt(r) equals a fresh reduction', () => {
    const model = randomStableModel(402, 18, 2, 2);
    const basis = prepareReduction(model, { method: 'balanced' });
    for (const r of [2, 7, 12]) {
      const sliced = basis.truncateAt(r).model;
      const fresh = reduceModel(model, { method: 'balanced', order: r }).model;
      for (const key of ['A', 'B', 'C', 'D'] as const) {
        for (let k = 0; k < sliced[key].data.length; k++) {
          expect(sliced[key].data[k]).toBeCloseTo(fresh[key].data[k], 10);
        }
      }
      const summary = basis.summaryAt(r);
      expect(summary.order).toBe(r);
      expect(summary.errorBound).toBe(basis.errorBoundAt(r));
      expect(summary.stiffnessRatio).not.toBeNull();
    }
    expect(basis.allowedOrders()).toEqual(Array.from({ length: 19 }, (_, i) => i));
  });
});
