/**
 * Zero-order-hold discretisation by the augmented exponential (Van Loan 1978), checked against
 * scipy.signal.cont2discrete(method='zoh') (Debian python3-scipy) and closed forms.
 */
import { describe, expect, it } from 'vitest';
import { discretePoles, discretizeZoh } from '@/reduction/discretize';
import { assembleModel } from '@/reduction/io';
import { eigenvalues } from '@/reduction/linalg';
import { type Matrix, fromRows, frobeniusNorm, sub } from '@/reduction/linalg/matrix';
import { ModelError } from '@/reduction/errors';
import { logRates, modelWithRates, rows, scipyReference } from './simulate-reference';

const rel = (x: Matrix, ref: number[][]) => frobeniusNorm(sub(x, fromRows(ref))) / frobeniusNorm(fromRows(ref));

describe('discretizeZoh against scipy.signal.cont2discrete(method="zoh")', () => {
  const cases = [
    { name: 'non-stiff MIMO 6 states, 2 inputs, 3 outputs', model: modelWithRates(logRates(6, 0.5, 5), 2, 3, 3, 2), ts: 0.1 },
    { name: 'stiff 8 states (rates 1 … 1e4), 3 inputs', model: modelWithRates(logRates(8, 1, 1e4), 3, 2, 5), ts: 0.05 },
    {
      name: 'double integrator (singular A)',
      model: assembleModel({ A: fromRows([[0, 1], [0, 0]]), B: fromRows([[0], [1]]), C: fromRows([[1, 0]]) }),
      ts: 0.3,
    },
  ];
  for (const c of cases) {
    it(`${c.name}: Φ and Γ to 1e-12 relative`, () => {
      const ref = scipyReference<{ Ad: number[][]; Bd: number[][]; Cd: number[][]; Dd: number[][] }>({
        op: 'c2d', A: rows(c.model.A), B: rows(c.model.B), C: rows(c.model.C), D: rows(c.model.D), ts: c.ts,
      });
      const d = discretizeZoh(c.model, c.ts);
      expect(rel(d.Ad, ref.Ad)).toBeLessThan(1e-12);
      expect(rel(d.Bd, ref.Bd)).toBeLessThan(1e-12);
      expect(rows(d.Cd)).toEqual(ref.Cd);
      expect(rows(d.Dd)).toEqual(ref.Dd);
    });
  }

  it('double integrator matches Φ = [[1, T], [0, 1]], Γ = [T²/2, T] (by hand: A² = 0, so e^{AT} = I + AT)', () => {
    const d = discretizeZoh(cases[2].model, 0.3);
    expect(d.Ad.data[0]).toBeCloseTo(1, 15);
    expect(d.Ad.data[1]).toBeCloseTo(0.3, 15);
    expect(d.Ad.data[3]).toBeCloseTo(1, 15);
    expect(d.Bd.data[0]).toBeCloseTo(0.045, 15);
    expect(d.Bd.data[1]).toBeCloseTo(0.3, 15);
  });
});

describe('discrete poles', () => {
  it('are e^{λ·ts} of the continuous poles (definition of Φ = e^{A ts})', () => {
    const model = modelWithRates(logRates(6, 0.2, 20), 1, 1, 9, 2);
    const ts = 0.05;
    const cont = eigenvalues(model.A);
    const expected = Array.from(cont.re, (re, k) => {
      const mag = Math.exp(re * ts);
      return [mag * Math.cos(cont.im[k] * ts), mag * Math.sin(cont.im[k] * ts)];
    }).sort((a, b) => a[0] - b[0] || a[1] - b[1]);
    const zp = discretePoles(discretizeZoh(model, ts));
    const got = Array.from(zp.re, (re, k) => [re, zp.im[k]]).sort((a, b) => a[0] - b[0] || a[1] - b[1]);
    got.forEach((z, k) => {
      expect(z[0]).toBeCloseTo(expected[k][0], 10);
      expect(z[1]).toBeCloseTo(expected[k][1], 10);
      expect(Math.hypot(z[0], z[1])).toBeLessThan(1);
    });
  });

  it('refuses a non-positive sample time, naming ts', () => {
    const model = modelWithRates([1, 2], 1, 1, 1);
    for (const ts of [0, -1, Number.NaN]) {
      expect(() => discretizeZoh(model, ts)).toThrow(ModelError);
      try {
        discretizeZoh(model, ts);
      } catch (e) {
        expect((e as ModelError).field).toBe('ts');
      }
    }
  });
});
