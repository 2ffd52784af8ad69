/**
 * The matrix–vector product behind the solvers' long product chains (two threads, the WebAssembly SIMD
 * kernel, or the scalar loop) gives bit-for-bit the single-thread scalar result (same per-row summation
 * order), so a response depends neither on the thread count nor on the kernel.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { ParallelMatVec } from '@/reduction/simulate/parallel-matvec';
import { matVec } from '@/reduction/simulate/linear-system';
import { matVecRows } from '@/reduction/linalg/matvec';
import { IterationMatrix, luSolveVector } from '@/reduction/simulate/iteration-matrix';
import { pooledKernelBytes } from '@/reduction/simulate/kernel-memory';
import { linalgThreads, setLinalgThreads, useLinalgBackend, linalgBackendReport } from '@/reduction/linalg';
import { simulate, stepInput } from '@/reduction/simulate';
import { logRates, modelWithRates, randomMatrix, seeded } from './simulate-reference';

const threadsBefore = linalgThreads();
afterAll(() => setLinalgThreads(threadsBefore));

describe('ParallelMatVec', () => {
  it('uses a worker above the size threshold and matches matVec exactly, over many products', () => {
    setLinalgThreads(2);
    const rand = seeded(77);
    const M = randomMatrix(403, 403, rand); // odd size: the split and the 4-row remainder both matter
    const p = new ParallelMatVec(M);
    try {
      expect(p.parallel).toBe(true);
      const y = new Float64Array(403);
      for (let rep = 0; rep < 50; rep++) {
        for (let j = 0; j < 403; j++) p.x[j] = rand() - 0.5;
        p.apply();
        matVec(M, p.x, y);
        expect(Array.from(p.y)).toEqual(Array.from(y));
      }
    } finally {
      p.dispose();
    }
  });

  it('runs through the SIMD kernel on one thread too, with the scalar loop\'s bits (odd sizes)', () => {
    setLinalgThreads(1);
    const rand = seeded(78);
    for (const [r, c] of [[37, 41], [401, 399], [64, 64]]) {
      const M = randomMatrix(r, c, rand);
      const p = new ParallelMatVec(M);
      expect(p.simd).toBe(true);
      expect(p.parallel).toBe(false);
      const y = new Float64Array(r);
      for (let rep = 0; rep < 5; rep++) {
        for (let j = 0; j < c; j++) p.x[j] = rand() - 0.5;
        p.apply();
        matVec(M, p.x, y);
        expect(Array.from(p.y)).toEqual(Array.from(y));
      }
    }
  });

  it('the scalar loop (even and odd columns summed apart) agrees with a plain dot product to rounding', () => {
    const rand = seeded(79);
    const M = randomMatrix(9, 13, rand);
    const x = Float64Array.from({ length: 13 }, () => rand() - 0.5);
    const y = new Float64Array(9);
    matVecRows(M.data, 13, x, y, 0, 9);
    for (let i = 0; i < 9; i++) {
      let s = 0;
      for (let j = 0; j < 13; j++) s += M.data[i * 13 + j] * x[j];
      expect(Math.abs(y[i] - s)).toBeLessThan(1e-14 * 13);
    }
  });

  it('the stiff solver\'s triangular solves: SIMD dot products give the scalar solve\'s bits, and solve W·x = b', () => {
    const rand = seeded(80);
    const n = 201;
    const A = randomMatrix(n, n, rand);
    const W = new IterationMatrix(A, 0.3);
    const lu = W.factorFor(0.01);
    expect(W.usesSimd(lu)).toBe(true);
    const b = Float64Array.from({ length: n }, () => rand() - 0.5);
    const simd = Float64Array.from(b);
    W.solve(lu, simd);
    const scalar = Float64Array.from(b);
    luSolveVector(lu, scalar, new Float64Array(n));
    expect(Array.from(simd)).toEqual(Array.from(scalar));
    // Residual of (I − 0.3·0.01·A)·x = b.
    let worst = 0;
    for (let i = 0; i < n; i++) {
      let s = simd[i];
      for (let j = 0; j < n; j++) s -= 0.003 * A.data[i * n + j] * simd[j];
      worst = Math.max(worst, Math.abs(s - b[i]));
    }
    expect(worst).toBeLessThan(1e-12);
  });

  it('hands its kernel memory back on dispose, and the next product of that size reuses it', () => {
    setLinalgThreads(1);
    const M = randomMatrix(300, 300, seeded(81));
    const first = new ParallelMatVec(M);
    expect(first.simd).toBe(true);
    const before = pooledKernelBytes();
    first.dispose();
    const released = pooledKernelBytes();
    expect(released).toBeGreaterThanOrEqual(before + 300 * 300 * 8);
    const second = new ParallelMatVec(M);
    expect(pooledKernelBytes()).toBeLessThan(released);
    second.dispose();
    const W = new IterationMatrix(M, 0.5);
    W.factorFor(0.001);
    const held = pooledKernelBytes();
    W.dispose();
    expect(pooledKernelBytes()).toBeGreaterThan(held);
  });

  it('stays on one thread for small matrices and when limited to one thread', () => {
    setLinalgThreads(2);
    const small = new ParallelMatVec(randomMatrix(50, 50, seeded(1)));
    expect(small.parallel).toBe(false);
    setLinalgThreads(1);
    const big = new ParallelMatVec(randomMatrix(400, 400, seeded(2)));
    expect(big.parallel).toBe(false);
  });

  it('every solver gives the same response on one and two threads (n = 320, portable kernels)', () => {
    // The portable kernels split each product between the two threads in a fixed order; OpenBLAS may sum
    // in another order on another thread count, so this bit-for-bit check is the portable backend's.
    const backend = linalgBackendReport().backend;
    useLinalgBackend('portable');
    const model = modelWithRates(logRates(320, 1, 100), 1, 2, 5, 8);
    const input = stepInput(model);
    for (const solver of ['exact', 'explicit', 'stiff'] as const) {
      setLinalgThreads(1);
      const one = simulate(model, input, { tEnd: 0.5, points: 11, solver, relTol: 1e-4, absTol: 1e-7 });
      setLinalgThreads(2);
      const two = simulate(model, input, { tEnd: 0.5, points: 11, solver, relTol: 1e-4, absTol: 1e-7 });
      expect(Array.from(two.y.data)).toEqual(Array.from(one.y.data));
      expect(two.stats.steps).toBe(one.stats.steps);
    }
    useLinalgBackend(backend);
  });
});
