import { describe, expect, it } from 'vitest';
import { solve, inverse, luFactor, luLogDeterminant } from '../../../reduction/linalg/lu';
import { multiply } from '../../../reduction/linalg/gemm';
import { fromRows, identity, sub, frobeniusNorm, zeros } from '../../../reduction/linalg/matrix';
import { randomMatrix } from './linalg-support';

const EPS = Number.EPSILON;

/** Inverse Hilbert matrix in closed form: (H⁻¹)_ij = (−1)^(i+j)(i+j−1)·C(n+i−1, n−j)·C(n+j−1, n−i)·C(i+j−2, i−1)² (1-based; M.-D. Choi, "Tricks or treats with the Hilbert matrix", Amer. Math. Monthly 90(5), 1983). */
function binom(n: number, k: number): number {
  let r = 1;
  for (let i = 1; i <= k; i++) r = (r * (n - k + i)) / i;
  return r;
}

describe('LU with partial pivoting (blocked, LAPACK dgetrf scheme)', () => {
  it('solves random systems to a backward-stable residual, across block boundaries', () => {
    for (const n of [1, 7, 63, 64, 65, 150]) {
      const a = randomMatrix(n, n, n);
      const b = randomMatrix(n, 3, n + 1);
      const x = solve(a, b);
      const r = frobeniusNorm(sub(multiply(a, x), b)) / (frobeniusNorm(a) * frobeniusNorm(x) + frobeniusNorm(b));
      // Backward stability of GEPP: residual of order n·ε (Golub & Van Loan 2013, §3.4).
      expect(r).toBeLessThan(n * EPS * 10);
    }
  });

  it('inverts random matrices: ‖A·A⁻¹ − I‖ of order κ·ε', () => {
    for (const n of [5, 64, 130]) {
      const a = randomMatrix(n, n, 3 * n);
      const e = frobeniusNorm(sub(multiply(a, inverse(a)), identity(n)));
      expect(e).toBeLessThan(1e-10);
    }
  });

  it('reproduces the closed-form inverse of the 6×6 Hilbert matrix (Choi 1983)', () => {
    const n = 6;
    const h = zeros(n, n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) h.data[i * n + j] = 1 / (i + j + 1);
    const inv = inverse(h);
    let worst = 0;
    for (let i = 1; i <= n; i++)
      for (let j = 1; j <= n; j++) {
        const exact = (-1) ** (i + j) * (i + j - 1) * binom(n + i - 1, n - j) * binom(n + j - 1, n - i) * binom(i + j - 2, i - 1) ** 2;
        worst = Math.max(worst, Math.abs(inv.data[(i - 1) * n + j - 1] - exact) / Math.abs(exact));
      }
    // κ₂(H₆) ≈ 1.5e7, so about 1e-9 relative is what any backward-stable solver achieves.
    expect(worst).toBeLessThan(1e-8);
  });

  it('gives det of a permuted diagonal matrix exactly, with its sign (definition of det)', () => {
    const f = luFactor(fromRows([[0, 0, 2], [0, -3, 0], [5, 0, 0]]));
    const d = luLogDeterminant(f);
    // det = −(2·(−3)·5) = 30 for the anti-diagonal permutation (one transposition).
    expect(d.sign * Math.exp(d.logAbs)).toBeCloseTo(30, 12);
  });

  it('refuses a singular matrix with a message naming the zero pivot', () => {
    expect(() => solve(fromRows([[1, 2], [2, 4]]), fromRows([[1], [1]]))).toThrow(/singular.*column 1/);
    expect(() => inverse(zeros(3, 3))).toThrow(/singular/);
    expect(luLogDeterminant(luFactor(fromRows([[1, 2], [2, 4]]))).sign).toBe(0);
  });

  it('names the problem for non-square, mismatched or non-finite input', () => {
    expect(() => solve(zeros(2, 3), zeros(2, 1))).toThrow(/square.*2×3/);
    expect(() => solve(identity(3), zeros(2, 1))).toThrow(/2 rows.*3×3/);
    expect(() => inverse(fromRows([[1, NaN], [0, 1]]))).toThrow(/\(0, 1\) is not finite/);
  });
});
