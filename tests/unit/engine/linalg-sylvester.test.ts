import { describe, expect, it } from 'vitest';
import { sylvester, lyapunovBartelsStewart } from '../../../reduction/linalg/sylvester';
import { lyapunov, lyapunovResidual } from '../../../reduction/linalg/lyapunov';
import { multiply, multiplyTransposeB } from '../../../reduction/linalg/gemm';
import { fromRows, add, sub, frobeniusNorm, zeros } from '../../../reduction/linalg/matrix';
import { randomMatrix, stableMatrix, reference, maxAbsDiff, maxAbs } from './linalg-support';

describe('Sylvester and Lyapunov equations by Bartels & Stewart (1972)', () => {
  it('matches scipy.linalg.solve_sylvester (LAPACK dtrsyl) on seeded random equations', () => {
    const cases = [
      { A: randomMatrix(30, 30, 1), B: randomMatrix(20, 20, 2), C: randomMatrix(30, 20, 3) },
      // A with complex pairs on a stable spectrum against a shifted B: 2×2 blocks on both sides.
      { A: stableMatrix(60, 4, 0.3), B: stableMatrix(45, 5, 0.2), C: randomMatrix(60, 45, 6) },
    ];
    const ref = reference(cases.map((c) => ({ op: 'sylvester', ...c }))) as { X: number[][] }[];
    cases.forEach(({ A, B, C }, k) => {
      const X = sylvester(A, B, C);
      const scale = Math.max(...ref[k].X.flat().map(Math.abs));
      expect(maxAbsDiff(X, ref[k].X) / scale).toBeLessThan(1e-10);
      const r = sub(add(multiply(A, X), multiply(X, B)), C);
      expect(frobeniusNorm(r) / frobeniusNorm(C)).toBeLessThan(1e-12);
    });
  });

  it('agrees with the sign-function solver on a stable Lyapunov equation', () => {
    const A = stableMatrix(70, 8, 1.3);
    const B = randomMatrix(70, 3, 9);
    const Q = multiplyTransposeB(B, B);
    const bs = lyapunovBartelsStewart(A, Q);
    const sign = lyapunov(A, Q);
    expect(maxAbsDiff(bs, sign) / maxAbs(sign)).toBeLessThan(1e-11);
    expect(lyapunovResidual(A, bs, Q)).toBeLessThan(1e-12);
  });

  it('solves the scalar case a·x + x·b = c exactly: x = c/(a + b)', () => {
    expect(sylvester(fromRows([[2]]), fromRows([[3]]), fromRows([[10]])).data[0]).toBeCloseTo(2, 14);
  });

  it('refuses an equation whose A and −B share an eigenvalue', () => {
    const a = fromRows([[1, 0], [0, 2]]);
    const b = fromRows([[-1]]);
    expect(() => sylvester(a, b, fromRows([[1], [1]]))).toThrow(/eigenvalue in common/);
  });

  it('names mismatched shapes', () => {
    expect(() => sylvester(zeros(2, 2), zeros(3, 3), zeros(2, 2))).toThrow(/C is 2×2, expected 2×3/);
  });
});
