/**
 * Matrix exponential by scaling and squaring (Higham 2005, Algorithm 2.3), checked against
 * scipy.linalg.expm (Debian python3-scipy; Al-Mohy & Higham 2009) and closed forms.
 */
import { describe, expect, it } from 'vitest';
import { expm, expmWithInfo } from '@/reduction/linalg/expm';
import { type Matrix, fromRows, frobeniusNorm, sub, scale } from '@/reduction/linalg/matrix';
import { randomMatrix, rows, scipyReference, seeded } from './simulate-reference';

function relativeError(x: Matrix, ref: number[][]): number {
  const r = fromRows(ref);
  return frobeniusNorm(sub(x, r)) / frobeniusNorm(r);
}

describe('expm against scipy.linalg.expm', () => {
  const rand = seeded(42);
  // Norms chosen to exercise every Padé degree (θ_3 … θ_13, Higham 2005 Table 2.3) and the squaring.
  const cases: { name: string; a: Matrix }[] = [
    0.01, 0.2, 0.9, 2, 5, 40, 900,
  ].map((target) => {
    const a = randomMatrix(12, 12, rand);
    let n1 = 0;
    for (let j = 0; j < 12; j++) {
      let s = 0;
      for (let i = 0; i < 12; i++) s += Math.abs(a.data[i * 12 + j]);
      n1 = Math.max(n1, s);
    }
    return { name: `random 12×12, ‖A‖₁ = ${target}`, a: scale(a, target / n1) };
  });
  // A stable, stiff, non-normal matrix: decay rates 1 … 1e4 with a large upper triangle.
  const stiff = randomMatrix(10, 10, rand);
  for (let i = 0; i < 10; i++) {
    for (let j = 0; j < i; j++) stiff.data[i * 10 + j] = 0;
    stiff.data[i * 10 + i] = -Math.pow(10, (4 * i) / 9);
    for (let j = i + 1; j < 10; j++) stiff.data[i * 10 + j] *= 50;
  }
  cases.push({ name: 'stiff non-normal upper-triangular 10×10', a: stiff });
  const ref = scipyReference<{ expm: number[][][] }>({ op: 'expm', matrices: cases.map((c) => rows(c.a)) });

  cases.forEach((c, k) => {
    it(`${c.name}: relative error ≤ 1e-12 with either scaling rule`, () => {
      expect(relativeError(expm(c.a), ref.expm[k])).toBeLessThan(1e-12);
      expect(relativeError(expm(c.a, { scaling: 'norm' }), ref.expm[k])).toBeLessThan(1e-12);
    });
  });

  it('picks the Padé degree and scaling of Higham (2005) Algorithm 2.3', () => {
    const degrees = cases.slice(0, 7).map((c) => expmWithInfo(c.a, { scaling: 'norm' }).padeDegree);
    expect(degrees).toEqual([3, 5, 7, 9, 13, 13, 13]);
    // ‖A‖₁ = 900: s = ⌈log2(900 / θ13)⌉ = ⌈log2(167.54)⌉ = 8.
    expect(expmWithInfo(cases[6].a, { scaling: 'norm' }).squarings).toBe(8);
    expect(expmWithInfo(cases[4].a, { scaling: 'norm' }).squarings).toBe(0);
  });
});

describe('scaling from power norms (Al-Mohy & Higham 2009)', () => {
  // exp([[a, b], [0, c]]) = [[e^a, b(e^a − e^c)/(a − c)], [0, e^c]] (closed form of a triangular 2×2);
  // with b ≫ |a|, |c| the matrix is far from normal: ‖A‖₁ ≈ b while ‖A^k‖^{1/k} → max(|a|, |c|).
  const a = -1, c = -2, b = 1e6;
  const A = fromRows([[a, b], [0, c]]);
  const exact = [[Math.exp(a), (b * (Math.exp(a) - Math.exp(c))) / (a - c)], [0, Math.exp(c)]];
  it('needs far fewer squarings than the ‖A‖₁ rule on a non-normal matrix', () => {
    const byPowers = expmWithInfo(A);
    const byNorm = expmWithInfo(A, { scaling: 'norm' });
    expect(byNorm.squarings).toBeGreaterThanOrEqual(18); // ⌈log2(1e6 / 5.37)⌉ = 18
    expect(byPowers.squarings).toBeLessThan(byNorm.squarings - 10);
  });
  it('and is accurate there to 1e-13 relative (closed form)', () => {
    expect(relativeError(expm(A), exact)).toBeLessThan(1e-13);
  });
});

describe('expm closed forms', () => {
  it('rotation generator: exp([[0, w], [−w, 0]]·t) = [[cos wt, sin wt], [−sin wt, cos wt]]', () => {
    for (const wt of [0.001, 1, 7.5, 100]) {
      const e = expm(fromRows([[0, wt], [-wt, 0]]));
      expect(e.data[0]).toBeCloseTo(Math.cos(wt), 12);
      expect(e.data[1]).toBeCloseTo(Math.sin(wt), 12);
      expect(e.data[2]).toBeCloseTo(-Math.sin(wt), 12);
    }
  });
  it('nilpotent Jordan block: exp(N) = I + N + N²/2', () => {
    const e = expm(fromRows([[0, 3, 0], [0, 0, 5], [0, 0, 0]]));
    expect(rows(e)).toEqual([
      [1, 3, 7.5],
      [0, 1, 5],
      [0, 0, 1],
    ]);
  });
  it('diagonal: exp(diag(d)) = diag(e^d), including strongly negative entries', () => {
    const d = [-1e3, -20, 0, 0.5];
    const e = expm(fromRows(d.map((v, i) => d.map((_, j) => (i === j ? v : 0)))));
    d.forEach((v, i) => {
      const exact = Math.exp(v);
      expect(Math.abs(e.data[i * 4 + i] - exact)).toBeLessThanOrEqual(1e-13 * Math.max(exact, 1e-300) + 1e-300);
    });
  });
});
