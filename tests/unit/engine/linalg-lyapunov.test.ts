import { describe, expect, it } from 'vitest';
import { lyapunov, lyapunovFactor, lowRankGramianFactors, lyapunovResidual } from '../../../reduction/linalg/lyapunov';
import { multiply, multiplyTransposeA, multiplyTransposeB } from '../../../reduction/linalg/gemm';
import { svd, useLinalgBackend, linalgBackendReport } from '../../../reduction/linalg/index';
import { setLinalgThreads, workerRunning } from '../../../reduction/linalg/parallel';
import { type Matrix, fromRows, zeros, transpose, sub, frobeniusNorm } from '../../../reduction/linalg/matrix';
import { randomMatrix, stableMatrix, reference, maxAbsDiff, maxAbs } from './linalg-support';

function gram(s: Matrix): Matrix {
  return multiplyTransposeB(s, s);
}

/** Hankel singular values as the singular values of Rᵀ·S (Laub, Heath, Paige & Ward 1987). */
function hsvFromFactors(s: Matrix, r: Matrix): Float64Array {
  return svd(multiplyTransposeA(r, s)).s;
}

describe('Lyapunov equations by the scaled sign function (Roberts 1971; Byers 1987)', () => {
  it('matches scipy.linalg.solve_continuous_lyapunov (Bartels–Stewart) on seeded random stable models', () => {
    // A stiff model with one input and one output (fast HSV decay: the factors stay thin, so the
    // factored iteration runs to the end) and random dense ones (high numerical rank: the iteration
    // switches to dense gramian updates and pivoted Cholesky factors).
    const stiff = (() => {
      const n = 150;
      const a = randomMatrix(n, n, 31);
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) a.data[i * n + j] *= 0.02;
        a.data[i * n + i] = -Math.pow(10, (4 * i) / (n - 1));
      }
      return { A: a, B: randomMatrix(n, 1, 32), C: randomMatrix(1, n, 33), dense: false };
    })();
    const cases = [
      stiff,
      { A: stableMatrix(40, 1), B: randomMatrix(40, 2, 2), C: randomMatrix(3, 40, 3), dense: true },
      { A: stableMatrix(120, 4, 1.2), B: randomMatrix(120, 4, 5), C: randomMatrix(2, 120, 6), dense: true },
    ];
    const ref = reference(cases.map(({ A, B, C }) => ({ op: 'gramians', A, B, C }))) as { P: number[][]; Q: number[][]; hsv: number[] }[];
    cases.forEach(({ A, B, C, dense }, k) => {
      const bb = multiplyTransposeB(B, B);
      const P = lyapunov(A, bb);
      const Q = lyapunov(transpose(A), multiplyTransposeA(C, C));
      const scaleP = Math.max(...ref[k].P.flat().map(Math.abs));
      const scaleQ = Math.max(...ref[k].Q.flat().map(Math.abs));
      expect(maxAbsDiff(P, ref[k].P) / scaleP).toBeLessThan(1e-11);
      expect(maxAbsDiff(Q, ref[k].Q) / scaleQ).toBeLessThan(1e-11);
      expect(lyapunovResidual(A, P, bb)).toBeLessThan(1e-12);

      // Factored form from one shared iteration: same gramians, same Hankel singular values.
      const { controllability: S, observability: R, denseFrom } = lowRankGramianFactors(A, B, C);
      expect(denseFrom !== null).toBe(dense);
      expect(maxAbsDiff(gram(S), ref[k].P) / scaleP).toBeLessThan(1e-11);
      expect(maxAbsDiff(gram(R), ref[k].Q) / scaleQ).toBeLessThan(1e-11);
      const hsv = hsvFromFactors(S, R);
      // HSVs to 1e-8 relative, with an absolute floor of 1e-11·σ₁: both sides compute the gramians to
      // about ε·‖P‖, which bounds the error of σᵢ near ε·κ·σ₁ rather than relative to σᵢ; below
      // 1e-4·σ₁ the reference (Cholesky of a nearly singular P) is no longer a sharp yardstick.
      for (let i = 0; i < hsv.length; i++) {
        if (ref[k].hsv[i] < 1e-4 * ref[k].hsv[0]) break;
        expect(Math.abs(hsv[i] - ref[k].hsv[i])).toBeLessThan(1e-8 * ref[k].hsv[i] + 1e-11 * ref[k].hsv[0]);
      }
    });
  });

  it('gives the Cauchy-matrix gramian P_ij = −1/(λ_i + λ_j) for diagonal A and B = ones (A·P + P·A + 1·1ᵀ = 0)', () => {
    // Entry-wise (λ_i + λ_j)·P_ij + 1 = 0 for diagonal A (the Cauchy-matrix gramian; from the definition).
    const lambdas = [-0.5, -1, -3, -10, -40, -200];
    const n = lambdas.length;
    const a = zeros(n, n);
    lambdas.forEach((l, i) => (a.data[i * n + i] = l));
    const ones = zeros(n, 1);
    ones.data.fill(1);
    const s = lyapunovFactor(a, ones);
    const p = gram(s);
    const full = lyapunov(a, gram(ones));
    for (let i = 0; i < n; i++)
      for (let j = 0; j < n; j++) {
        const exact = -1 / (lambdas[i] + lambdas[j]);
        expect(Math.abs(p.data[i * n + j] - exact) / exact).toBeLessThan(1e-12);
        expect(Math.abs(full.data[i * n + j] - exact) / exact).toBeLessThan(1e-12);
      }
  });

  it('gives the single Hankel singular value k/(2a) of a first-order lag k/(s+a) (closed form)', () => {
    // P = 1/(2a), Q = k²/(2a), σ = √(PQ) = k/(2a); here k = 3, a = 0.25 → σ = 6.
    const { controllability: S, observability: R } = lowRankGramianFactors(fromRows([[-0.25]]), fromRows([[1]]), fromRows([[3]]));
    expect(hsvFromFactors(S, R)[0]).toBeCloseTo(6, 12);
  });

  it('stays finite on a non-minimal model: factor ranks drop, nothing is divided by a negligible value', () => {
    // Two copies of the same stable subsystem driven by the same input and read by the same output:
    // x₂ − x₁ is uncontrollable and unobservable, so both gramians are singular (rank n/2).
    const h = 30;
    const a1 = stableMatrix(h, 7);
    const b1 = randomMatrix(h, 1, 8);
    const c1 = randomMatrix(1, h, 9);
    const n = 2 * h;
    const A = zeros(n, n), B = zeros(n, 1), C = zeros(1, n);
    for (let i = 0; i < h; i++) {
      for (let j = 0; j < h; j++) {
        A.data[i * n + j] = a1.data[i * h + j];
        A.data[(i + h) * n + j + h] = a1.data[i * h + j];
      }
      B.data[i] = B.data[i + h] = b1.data[i];
      C.data[i] = C.data[i + h] = c1.data[i];
    }
    const { controllability: S, observability: R } = lowRankGramianFactors(A, B, C);
    expect(S.cols).toBeLessThanOrEqual(h);
    expect(R.cols).toBeLessThanOrEqual(h);
    for (const v of [...S.data, ...R.data]) expect(Number.isFinite(v)).toBe(true);
    const bb = multiplyTransposeB(B, B);
    expect(lyapunovResidual(A, gram(S), bb)).toBeLessThan(1e-10);
    // The HSVs of the doubled system are those of one copy with B, C scaled by √2 each: 2·σ(copy).
    const one = lowRankGramianFactors(a1, b1, c1);
    const hsvOne = hsvFromFactors(one.controllability, one.observability);
    const hsvTwo = hsvFromFactors(S, R);
    for (let i = 0; i < 5; i++) expect(Math.abs(hsvTwo[i] - 2 * hsvOne[i]) / (2 * hsvOne[i])).toBeLessThan(1e-8);
  });

  it('reports a small residual for the full and factored solutions of a stiff model', () => {
    const n = 80;
    const A = randomMatrix(n, n, 11);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) A.data[i * n + j] *= 0.05;
      A.data[i * n + i] = -Math.pow(10, (5 * i) / (n - 1));
    }
    const B = randomMatrix(n, 3, 12);
    const bb = multiplyTransposeB(B, B);
    expect(lyapunovResidual(A, lyapunov(A, bb), bb)).toBeLessThan(1e-12);
    expect(lyapunovResidual(A, gram(lyapunovFactor(A, B)), bb)).toBeLessThan(1e-12);
  });

  it('gives the same factors whether the two compressions share a core or run on two (portable backend)', () => {
    // The portable kernels' second core (parallel.ts); the native backend threads inside OpenBLAS instead.
    const before = linalgBackendReport().backend;
    useLinalgBackend('portable');
    const n = 200;
    const A = stableMatrix(n, 21, 1.1);
    const B = randomMatrix(n, 8, 22);
    const C = randomMatrix(8, n, 23);
    setLinalgThreads(1);
    const one = lowRankGramianFactors(A, B, C);
    setLinalgThreads(2);
    const two = lowRankGramianFactors(A, B, C);
    expect(workerRunning()).toBe(true);
    expect(two.controllability.cols).toBe(one.controllability.cols);
    expect(Array.from(two.controllability.data)).toEqual(Array.from(one.controllability.data));
    expect(Array.from(two.observability.data)).toEqual(Array.from(one.observability.data));
    useLinalgBackend(before);
  });

  it('refuses an unstable A, naming the condition', () => {
    const a = fromRows([[1, 0], [0, -1]]);
    expect(() => lyapunov(a, fromRows([[1, 0], [0, 1]]))).toThrow(/not stable/);
    expect(() => lyapunovFactor(fromRows([[0, 1], [0, 0]]), fromRows([[1], [1]]))).toThrow(/zero|not stable/);
  });

  it('names mismatched shapes and non-finite entries', () => {
    const a = stableMatrix(3, 1);
    expect(() => lyapunov(a, zeros(2, 2))).toThrow(/Q is 2×2, A is 3×3/);
    expect(() => lyapunovFactor(a, zeros(2, 1))).toThrow(/B has 2 rows/);
    expect(() => lowRankGramianFactors(a, zeros(3, 1), zeros(1, 2))).toThrow(/C has 2 columns/);
    const bad = zeros(3, 1);
    bad.data[1] = NaN;
    expect(() => lyapunovFactor(a, bad)).toThrow(/B\(1, 0\) is not finite/);
  });
});
