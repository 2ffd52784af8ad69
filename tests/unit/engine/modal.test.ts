import { describe, it, expect } from 'vitest';
import { rankedModalForm, modalForm, modalErrorBound, modalCutPoints } from '../../../reduction/modal';
import { reduceModel, prepareReduction } from '../../../reduction/reduce';
import { ModelError } from '../../../reduction/errors';
import { fromRows, eigenvalues, zeros } from '../../../reduction/linalg/index';
import { frequencyResponse } from '../../../reduction/frequency';
import { randomStableModel, disguise, lagCascade, rigidBodyModel, secondOrder, appendModels } from '../../fixtures/engine/models';
import { runReference, spectrumDistance } from '../../fixtures/engine/reference';
import type { StateSpaceModel } from '../../../reduction/model';
import { blockDiagonal } from '../../../reduction/realization';

function pairs(v: { re: Float64Array; im: Float64Array }): [number, number][] {
  return Array.from(v.re, (re, i) => [re, v.im[i]] as [number, number]);
}

/** Three lightly damped resonances at 1, 10 and 100 rad/s with given peak heights, disguised. */
function threeResonances(): StateSpaceModel {
  const parts = [
    { wn: 1, zeta: 0.05, gain: 1 },
    { wn: 10, zeta: 0.02, gain: 0.2 },
    { wn: 100, zeta: 0.1, gain: 3 },
  ].map(({ wn, zeta, gain }) => {
    const g = secondOrder(wn, zeta);
    return { ...g, C: fromRows([[gain, 0]]) };
  });
  return disguise(appendModels(appendModels(parts[0], parts[1]), parts[2]), 701);
}

describe('modal form', () => {
  it('is real block diagonal with the eigenvalues of A (checked against numpy.linalg.eigvals)', () => {
    const model = randomStableModel(702, 16, 2, 2);
    const form = modalForm(model);
    const A = form.realization.A;
    const n = A.rows;
    // Only 1×1 and 2×2 diagonal blocks.
    let k = 0;
    for (const m of form.modes) {
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) {
          const inBlock = i >= k && i < k + m.states && j >= k && j < k + m.states;
          if (!inBlock && i >= k && i < k + m.states) expect(A.data[i * n + j]).toBe(0);
        }
      }
      k += m.states;
    }
    const [ref] = runReference([{ name: 'modal-eig', model, tasks: ['eig'] }]);
    expect(spectrumDistance(pairs(eigenvalues(A)), ref.eig!)).toBeLessThan(1e-10);
    // Same transfer function as the original realization.
    const w = [0, 0.3, 3, 30];
    const a = frequencyResponse(model, w);
    const b = frequencyResponse(form.realization, w);
    a.response.forEach((h, i) => {
      for (let e = 0; e < h.re.data.length; e++) {
        expect(b.response[i].re.data[e]).toBeCloseTo(h.re.data[e], 9);
        expect(b.response[i].im.data[e]).toBeCloseTo(h.im.data[e], 9);
      }
    });
  });

  it('ranks modes by 2‖R‖/|Re λ| = gain/(ζ√(1−ζ²)) per pair, twice the resonant peak (Ogata ch. 5)', () => {
    // gain·ωn²/(s² + 2ζωn s + ωn²) = R/(s − λ) + conj, R = gain·ωn²/(2jωd), Re λ = −ζωn, ωd = ωn√(1−ζ²):
    // 2|R|/|Re λ| = gain/(ζ√(1−ζ²)); the resonant peak is half of that.
    const form = rankedModalForm(threeResonances(), { rule: 'dominance' });
    const expected = new Map([
      [1, 1 / (0.05 * Math.sqrt(1 - 0.05 ** 2))],
      [10, 0.2 / (0.02 * Math.sqrt(1 - 0.02 ** 2))],
      [100, 3 / (0.1 * Math.sqrt(1 - 0.1 ** 2))],
    ]);
    expect(form.modes.map((m) => Math.round(m.naturalFrequency))).toEqual([100, 1, 10]);
    for (const m of form.modes) {
      expect(m.states).toBe(2);
      expect(Math.abs(m.dominance / expected.get(Math.round(m.naturalFrequency))! - 1)).toBeLessThan(1e-9);
    }
  });
});

describe('modal truncation', () => {
  it('keeps complex pairs together: an order inside a pair is raised to include it', () => {
    const model = threeResonances();
    const r = reduceModel(model, { method: 'modal', order: 3 });
    expect(r.order).toBe(4);
    expect(r.orderChoice.requestedOrder).toBe(3);
    expect(r.notes.join(' ')).toMatch(/split a complex pair/);
    const poles = pairs(r.poles);
    expect(poles.filter(([, im]) => im > 0).length).toBe(2);
    expect(poles.filter(([, im]) => im < 0).length).toBe(2);
    expect(prepareReduction(model, { method: 'modal' }).allowedOrders()).toEqual([0, 2, 4, 6]);
  });

  it('keeps the slowest modes with rule "slowest", and the modes in a band with rule "band"', () => {
    const model = threeResonances();
    const slow = reduceModel(model, { method: 'modal', order: 2, modalSelection: { rule: 'slowest' } });
    // Decay rates ζωn: 0.05, 0.2, 10 → slowest is the 1 rad/s pair.
    expect(Math.abs(slow.poles.re[0] + 0.05)).toBeLessThan(1e-9);
    const band = reduceModel(model, { method: 'modal', modalSelection: { rule: 'band', band: [5, 50] } });
    expect(band.order).toBe(2);
    expect(Math.hypot(band.poles.re[0], band.poles.im[0])).toBeCloseTo(10, 9);
  });

  it('meets its bound Σ‖cᵢbᵢᵀ‖/|Re λᵢ| on seeded random models (diagonalizable A)', () => {
    let checked = 0;
    for (let seed = 710; seed < 720; seed++) {
      const model = randomStableModel(seed, 8 + (seed % 5) * 4, 1 + (seed % 2), 2, { decades: 3 });
      const basis = prepareReduction(model, { method: 'modal' });
      const cuts = basis.cutPoints;
      for (const cut of [cuts[1], cuts[Math.floor(cuts.length / 2)]]) {
        const r = basis.truncateAt(cut);
        const measured = reduceModel(model, { method: 'modal', order: cut });
        expect(measured.hInfinityError.finite).toBe(true);
        if (!measured.hInfinityError.finite) continue;
        expect(measured.hInfinityError.value).toBeLessThanOrEqual(r.errorBound * (1 + 1e-8));
        checked++;
      }
    }
    expect(checked).toBe(20);
  });

  it('bound is the sum of the discarded modes’ terms and 0 at full order', () => {
    const form = rankedModalForm(threeResonances());
    const cuts = modalCutPoints(form);
    expect(cuts).toEqual([0, 2, 4, 6]);
    expect(modalErrorBound(form, 6)).toBe(0);
    expect(modalErrorBound(form, 2)).toBeCloseTo(form.modes[1].dominance + form.modes[2].dominance, 12);
  });

  it('refuses a defective A (a cascade of equal lags is one Jordan block) with ModelError on "method"', () => {
    let caught: unknown;
    try {
      reduceModel(lagCascade(4, 2), { method: 'modal', order: 2 });
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(ModelError);
    expect((caught as ModelError).field).toBe('method');
    expect((caught as ModelError).message).toMatch(/balanced truncation/);
    // Balanced truncation handles the same model.
    const bt = reduceModel(lagCascade(4, 2), { method: 'balanced', order: 2 });
    expect(bt.hInfinityError.finite).toBe(true);
  });

  it('keeps the rigid-body pole pair at 0 of a Jordan block and reduces the stable pair to nothing at order 2', () => {
    const r = reduceModel(disguise(rigidBodyModel(), 730), { method: 'modal', order: 2 });
    expect(r.unstableStatesKept).toBe(2);
    expect(r.stableOrder).toBe(0);
    for (let i = 0; i < 2; i++) expect(Math.hypot(r.poles.re[i], r.poles.im[i])).toBeLessThan(1e-6);
    // G − Gr is the dropped oscillator (1/2)/(s² + 0.2s + 2): its peak 0.5/(2ζωn²·√(1−ζ²)) with
    // ωn = √2, ζ = 0.1/√2 (Ogata ch. 5).
    const wn = Math.SQRT2;
    const zeta = 0.1 / wn;
    const peak = 0.5 / (wn * wn * 2 * zeta * Math.sqrt(1 - zeta * zeta));
    expect(r.hInfinityError.finite && Math.abs(r.hInfinityError.value / peak - 1)).toBeLessThan(1e-7);
  });

  it('with repeated poles (two identical resonators) meets its bound or refuses — never a wrong bound', () => {
    // Repeated semisimple poles are where eigenvector solvers are least accurate; the modal form checks
    // ‖AV − VΛ‖ and refuses rather than report a bound its realization does not satisfy.
    const g = secondOrder(3, 0.05);
    const twin = disguise(
      {
        A: blockDiagonal(g.A, g.A, randomStableModel(740, 4, 1, 1).A),
        B: blockDiagonal(g.B, g.B, zeros(4, 0)),
        C: blockDiagonal(g.C, g.C, zeros(0, 4)),
        D: zeros(2, 2),
      },
      741,
    );
    let result: ReturnType<typeof reduceModel> | undefined;
    try {
      result = reduceModel(twin, { method: 'modal', order: 4 });
    } catch (e) {
      expect(e).toBeInstanceOf(ModelError);
      expect((e as ModelError).field).toBe('method');
    }
    if (result) {
      expect(result.hInfinityError.finite).toBe(true);
      if (result.hInfinityError.finite) expect(result.hInfinityError.value).toBeLessThanOrEqual(result.errorBound * (1 + 1e-8) + 1e-12);
    }
    // Balanced truncation reduces the same model and keeps both resonators (4 states, error at rounding level).
    const bt = reduceModel(twin, { method: 'balanced', order: 4 });
    expect(bt.hInfinityError.finite && bt.hInfinityError.value).toBeLessThan(1e-8);
  });

  it('rejects a band with low ≥ high, on field "band"', () => {
    expect(() =>
      reduceModel(threeResonances(), { method: 'modal', modalSelection: { rule: 'band', band: [10, 1] } }),
    ).toThrow(expect.objectContaining({ field: 'band' }));
  });

  it('of a model without stable part returns the kept part only', () => {
    const model = { A: fromRows([[0, 1], [0, 0]]), B: fromRows([[0], [1]]), C: fromRows([[1, 0]]), D: zeros(1, 1) };
    const r = reduceModel(model, { method: 'modal', order: 2 });
    expect(r.order).toBe(2);
    expect(r.errorBound).toBe(0);
    expect(r.hInfinityError.finite && r.hInfinityError.value).toBe(0);
  });
});
