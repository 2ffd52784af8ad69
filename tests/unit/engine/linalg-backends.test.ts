/**
 * Both dense backends (native LAPACK/BLAS addon and the portable TypeScript/WebAssembly kernels) through
 * the one interface, against Debian's numpy/scipy (tests/reference/linalg_reference.py, LAPACK
 * underneath), plus the native backend's own guarantees: bad input comes back as an error with a code and
 * the matrix named while the process lives on, the addon loads in worker threads at once, and the
 * SuiteSparse solvers agree with scipy.sparse.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Worker } from 'node:worker_threads';
import path from 'node:path';
import {
  type Matrix,
  zeros,
  fromRows,
  transpose,
  multiply,
  multiplyTransposeA,
  multiplyTransposeB,
  gemm,
  luFactor,
  luSolve,
  luInverse,
  luLogDeterminant,
  luReciprocalCondition,
  eigenvalues,
  eig,
  schur,
  hessenberg,
  svd,
  singularValues,
  symmetricEig,
  cholesky,
  pivotedCholesky,
  pivotedQr,
  qr,
  norm1,
  useLinalgBackend,
  linalgBackendReport,
  kernels,
} from '../../../reduction/linalg/index';
import { schurLyapunov, schurGramianFactors, hammarlingLyapunovFactor } from '../../../reduction/linalg/lyapunov-schur';
import { lowRankGramianFactors } from '../../../reduction/linalg/lyapunov';
import { nativeAddon, nativeHammarlingFactor } from '../../../reduction/linalg/native';
import { SparseLu, SparseCholesky, amdOrdering, type CscMatrix } from '../../../reduction/linalg/sparse';
import { randomMatrix, stableMatrix, reference, maxAbsDiff, maxAbs, eigenvalueDistance } from './linalg-support';

const EPS = Number.EPSILON;
const initial = linalgBackendReport().backend;
afterAll(() => useLinalgBackend(initial));

function frob(m: Matrix): number {
  let s = 0;
  for (const v of m.data) s += v * v;
  return Math.sqrt(s);
}

function residualOf(a: Matrix, b: Matrix): number {
  let s = 0;
  for (let k = 0; k < a.data.length; k++) s += (a.data[k] - b.data[k]) ** 2;
  return Math.sqrt(s);
}

function orthogonalityError(q: Matrix): number {
  const g = multiplyTransposeA(q, q);
  for (let i = 0; i < g.rows; i++) g.data[i * g.cols + i] -= 1;
  return frob(g);
}

it('the native addon is built and is the default backend (npm test builds it)', () => {
  expect(nativeAddon().addon).not.toBeNull();
  expect(initial).toBe('native');
});

describe.each(['native', 'portable'] as const)('%s backend against numpy/scipy', (backend) => {
  beforeAll(() => useLinalgBackend(backend));

  it('serves the engine', () => {
    expect(kernels().name).toBe(backend);
  });

  it('multiplies op(A)·op(B) with every transpose, and C ← αAB + βC inside a larger array (numpy @)', () => {
    const a = randomMatrix(37, 53, 1);
    const b = randomMatrix(53, 29, 2);
    const at = transpose(a);
    const bt = transpose(b);
    const [r1, r2, r3] = reference([
      { op: 'product', A: a, B: b },
      { op: 'product', A: at, B: b, ta: true },
      { op: 'product', A: a, B: bt, tb: true },
    ]) as { C: number[][] }[];
    expect(maxAbsDiff(multiply(a, b), r1.C)).toBeLessThan(1e-13);
    expect(maxAbsDiff(multiplyTransposeA(at, b), r2.C)).toBeLessThan(1e-13);
    expect(maxAbsDiff(multiplyTransposeB(a, bt), r3.C)).toBeLessThan(1e-13);
    // A 10×6 block of C at offset (2, 3) of a 15×12 array, α = 2, β = −1 (BLAS dgemm's contract).
    const c = randomMatrix(15, 12, 3);
    const before = c.data.slice();
    const a2 = randomMatrix(10, 7, 4), b2 = randomMatrix(7, 6, 5);
    gemm(false, false, 10, 6, 7, 2, a2.data, 0, 7, b2.data, 0, 6, -1, c.data, 2 * 12 + 3, 12);
    const p = multiply(a2, b2);
    let worst = 0;
    for (let i = 0; i < 15; i++)
      for (let j = 0; j < 12; j++) {
        const inside = i >= 2 && i < 12 && j >= 3 && j < 9;
        const want = inside ? 2 * p.data[(i - 2) * 6 + (j - 3)] - before[i * 12 + j] : before[i * 12 + j];
        worst = Math.max(worst, Math.abs(c.data[i * 12 + j] - want));
      }
    expect(worst).toBeLessThan(1e-13);
  });

  it('solves, inverts and takes log|det| like numpy.linalg.solve, inv and slogdet; 1/κ₁ within a factor 3 of numpy.linalg.cond', () => {
    const a = randomMatrix(80, 80, 6);
    const b = randomMatrix(80, 5, 7);
    const [r] = reference([{ op: 'solve', A: a, B: b }]) as { X: number[][]; inv: number[][]; sign: number; logabs: number; cond1: number }[];
    const f = luFactor(a);
    expect(maxAbsDiff(luSolve(f, b), r.X) / maxAbs(fromRows(r.X))).toBeLessThan(1e-11);
    expect(maxAbsDiff(luInverse(f), r.inv) / maxAbs(fromRows(r.inv))).toBeLessThan(1e-11);
    const d = luLogDeterminant(f);
    expect(d.sign).toBe(r.sign);
    expect(Math.abs(d.logAbs - r.logabs)).toBeLessThan(1e-10 * Math.abs(r.logabs) + 1e-12);
    const rc = luReciprocalCondition(f, norm1(a));
    // dgecon estimates ‖A⁻¹‖₁ from below (Higham 1988); the portable backend computes it exactly.
    expect(rc * r.cond1).toBeGreaterThan(0.999);
    expect(rc * r.cond1).toBeLessThan(3);
  });

  it('finds eigenvalues like numpy.linalg.eigvals on random, stiff and badly scaled matrices', () => {
    const random = randomMatrix(70, 70, 8);
    const stiff = stableMatrix(60, 9);
    for (let i = 0; i < 60; i++) for (let j = 0; j < 60; j++) stiff.data[i * 60 + j] *= 10 ** (3 * (i / 59)) / 10 ** (3 * (j / 59));
    const scaled = zeros(40, 40);
    const base = randomMatrix(40, 40, 10);
    for (let i = 0; i < 40; i++) for (let j = 0; j < 40; j++) scaled.data[i * 40 + j] = base.data[i * 40 + j] * 10 ** (i / 4 - j / 4);
    const refs = reference([random, stiff, scaled].map((A) => ({ op: 'eigvals', A }))) as { re: number[]; im: number[] }[];
    [random, stiff, scaled].forEach((m, k) => {
      const ours = eigenvalues(m);
      const scale = Math.max(...refs[k].re.map((re, i) => Math.hypot(re, refs[k].im[i])));
      expect(eigenvalueDistance(ours, refs[k]) / scale).toBeLessThan(1e-10);
    });
  });

  it('gives eigenvectors A·v = λ·v in the real packed form, each of unit 2-norm', () => {
    const a = randomMatrix(50, 50, 11);
    const { values, vectors } = eig(a);
    const n = 50;
    const av = multiply(a, vectors);
    let worst = 0;
    for (let k = 0; k < n; k++) {
      const pair = values.im[k] > 0;
      let norm = 0;
      for (let r = 0; r < n; r++) {
        const x = vectors.data[r * n + k], y = pair ? vectors.data[r * n + k + 1] : 0;
        norm += x * x + y * y;
        // A(x + iy) = (a + ib)(x + iy)
        const re = values.re[k] * x - values.im[k] * y, im = values.im[k] * x + values.re[k] * y;
        worst = Math.max(worst, Math.abs(av.data[r * n + k] - re), pair ? Math.abs(av.data[r * n + k + 1] - im) : 0);
      }
      expect(Math.abs(Math.sqrt(norm) - 1)).toBeLessThan(1e-12);
      if (pair) k++;
    }
    expect(worst).toBeLessThan(1e-11 * maxAbs(a) * n);
  });

  it('reconstructs A = Z·T·Zᵀ (Schur, standardised 2×2 blocks) and A = Q·H·Qᵀ (Hessenberg)', () => {
    const a = randomMatrix(64, 64, 12);
    const { T, Z, values } = schur(a);
    expect(residualOf(multiplyTransposeB(multiply(Z, T), Z), a) / frob(a)).toBeLessThan(100 * EPS * 64);
    expect(orthogonalityError(Z)).toBeLessThan(100 * EPS * 64);
    for (let i = 0; i < 64; i++) {
      for (let j = 0; j < i - 1; j++) expect(T.data[i * 64 + j]).toBe(0);
      if (i + 1 < 64 && T.data[(i + 1) * 64 + i] !== 0) {
        expect(Math.abs(T.data[i * 64 + i] - T.data[(i + 1) * 64 + i + 1])).toBeLessThan(1e-12 * maxAbs(a));
        expect(values.im[i]).toBeGreaterThan(0);
      }
    }
    const { H, Q } = hessenberg(a);
    expect(residualOf(multiplyTransposeB(multiply(Q, H), Q), a) / frob(a)).toBeLessThan(100 * EPS * 64);
    expect(orthogonalityError(Q)).toBeLessThan(100 * EPS * 64);
    for (let i = 2; i < 64; i++) for (let j = 0; j < i - 1; j++) expect(H.data[i * 64 + j]).toBe(0);
  });

  it('matches scipy.linalg.svdvals and eigh; reconstructs A = U·Σ·Vᵀ', () => {
    const tall = randomMatrix(45, 20, 13);
    const wide = randomMatrix(12, 30, 14);
    const x = randomMatrix(25, 25, 15);
    const sym = multiplyTransposeA(x, x);
    const [s1, s2, e] = reference([
      { op: 'svdvals', A: tall },
      { op: 'svdvals', A: wide },
      { op: 'eigh', A: sym },
    ]) as [{ s: number[] }, { s: number[] }, { w: number[] }];
    for (const [m, ref] of [[tall, s1.s], [wide, s2.s]] as const) {
      const { U, s, V } = svd(m);
      s.forEach((v, i) => expect(Math.abs(v - ref[i])).toBeLessThan(1e-12 * ref[0]));
      singularValues(m).forEach((v, i) => expect(Math.abs(v - ref[i])).toBeLessThan(1e-12 * ref[0]));
      const us = zeros(U.rows, U.cols);
      for (let i = 0; i < U.rows; i++) for (let j = 0; j < U.cols; j++) us.data[i * U.cols + j] = U.data[i * U.cols + j] * s[j];
      expect(residualOf(multiplyTransposeB(us, V), m) / frob(m)).toBeLessThan(1e-13);
    }
    const { values, vectors } = symmetricEig(sym);
    values.forEach((v, i) => expect(Math.abs(v - e.w[i])).toBeLessThan(1e-12 * Math.abs(e.w[e.w.length - 1])));
    expect(orthogonalityError(vectors)).toBeLessThan(1e-12);
  });

  it('factors positive definite (Cholesky) and semidefinite (pivoted Cholesky at the numerical rank) matrices', () => {
    const x = randomMatrix(30, 30, 16);
    const spd = multiplyTransposeA(x, x);
    for (let i = 0; i < 30; i++) spd.data[i * 30 + i] += 1;
    const L = cholesky(spd);
    for (let i = 0; i < 30; i++) for (let j = i + 1; j < 30; j++) expect(L.data[i * 30 + j]).toBe(0);
    expect(residualOf(multiplyTransposeB(L, L), spd) / frob(spd)).toBeLessThan(1e-14);
    const thin = randomMatrix(30, 7, 17);
    const semi = multiplyTransposeB(thin, thin); // rank 7
    // A rank-revealing cut well above the rounding level (a √ε cut keeps directions of size ~n·ε·‖X‖).
    const F = pivotedCholesky(semi, 1e-6);
    expect(F.cols).toBe(7);
    expect(residualOf(multiplyTransposeB(F, F), semi) / frob(semi)).toBeLessThan(1e-12);
    expect(() => cholesky(semi)).toThrow(/positive definite/);
  });

  it('reveals the rank by pivoted QR as numpy.linalg.matrix_rank does, and gives an orthonormal thin QR', () => {
    const f = multiply(randomMatrix(40, 9, 18), randomMatrix(9, 25, 19));
    const [r] = reference([{ op: 'qr_rank', A: f }]) as { rank: number }[];
    const p = pivotedQr(f);
    expect(p.rank).toBe(r.rank);
    const perm = Array.from(p.perm).sort((a, b) => a - b);
    expect(perm).toEqual(Array.from({ length: 25 }, (_, i) => i));
    const { Q, R } = qr(randomMatrix(40, 25, 20));
    expect(orthogonalityError(Q)).toBeLessThan(1e-13);
    expect(residualOf(multiply(Q, R), randomMatrix(40, 25, 20))).toBeLessThan(1e-12);
  });

  it('solves both Lyapunov equations on one Schur form like scipy solve_continuous_lyapunov (Bartels & Stewart 1972)', () => {
    const a = stableMatrix(40, 21);
    const b = randomMatrix(40, 3, 22);
    const c = randomMatrix(2, 40, 23);
    const [g] = reference([{ op: 'gramians', A: a, B: b, C: c }]) as { P: number[][]; Q: number[][]; hsv: number[] }[];
    const form = schur(a);
    const P = schurLyapunov(form, b, false);
    const Q = schurLyapunov(form, transpose(c), true);
    expect(maxAbsDiff(P, g.P) / maxAbs(fromRows(g.P))).toBeLessThan(1e-11);
    expect(maxAbsDiff(Q, g.Q) / maxAbs(fromRows(g.Q))).toBeLessThan(1e-11);
    // Hankel singular values from the factors, by both routes, against scipy's.
    for (const f of [schurGramianFactors(a, b, c), lowRankGramianFactors(a, b, c)]) {
      const s = singularValues(multiplyTransposeA(f.observability, f.controllability));
      for (let i = 0; i < 6; i++) expect(Math.abs(s[i] - g.hsv[i]) / g.hsv[i]).toBeLessThan(1e-9);
    }
  });

  it('computes C(jωI − H)⁻¹B on a Hessenberg form like numpy.linalg.solve at each frequency (Laub 1981)', () => {
    const a = stableMatrix(90, 24);
    const b = randomMatrix(90, 2, 25);
    const c = randomMatrix(3, 90, 26);
    const w = [0, 0.3, 2, 40];
    const [r] = reference([{ op: 'freqresp', A: a, B: b, C: c, w }]) as { re: number[][][]; im: number[][][] }[];
    const { H, Q } = hessenberg(a);
    const g = kernels().hessenbergResponse(H, multiplyTransposeA(Q, b), multiply(c, Q), zeros(3, 2), Float64Array.from(w));
    let worst = 0, scale = 0;
    w.forEach((_, f) => {
      for (let i = 0; i < 3; i++)
        for (let j = 0; j < 2; j++) {
          scale = Math.max(scale, Math.hypot(r.re[f][i][j], r.im[f][i][j]));
          worst = Math.max(worst, Math.hypot(g.re[f * 6 + i * 2 + j] - r.re[f][i][j], g.im[f * 6 + i * 2 + j] - r.im[f][i][j]));
        }
    });
    expect(worst / scale).toBeLessThan(1e-11);
  });

  it('refuses singular, non-finite and non-square input with a message naming the problem, and goes on working', () => {
    expect(() => luSolve(luFactor(zeros(3, 3)), randomMatrix(3, 1, 1))).toThrow(/singular/);
    const nan = randomMatrix(4, 4, 2);
    nan.data[5] = Number.NaN;
    expect(() => eigenvalues(nan)).toThrow(/\(1, 1\) is not finite/);
    expect(() => luFactor(nan)).toThrow(/not finite/);
    expect(() => schur(randomMatrix(3, 4, 3))).toThrow(/square/);
    expect(() => multiply(randomMatrix(3, 4, 3), randomMatrix(3, 4, 3))).toThrow(/3×4/);
    expect(eigenvalues(zeros(0, 0)).re.length).toBe(0);
    expect(svd(zeros(0, 3)).s.length).toBe(0);
    // Still alive and correct after the refusals.
    expect(luSolve(luFactor(fromRows([[2, 0], [0, 4]])), fromRows([[2], [2]])).data).toEqual(Float64Array.from([1, 0.5]));
  });
});

describe('native backend', () => {
  beforeAll(() => useLinalgBackend('native'));

  it('gives every refusal a code: non_finite, singular, not_positive_definite', () => {
    const nan = randomMatrix(4, 4, 2);
    nan.data[0] = Number.POSITIVE_INFINITY;
    expect(() => eigenvalues(nan)).toThrow(expect.objectContaining({ code: 'non_finite' }));
    const lib = nativeAddon().addon!;
    expect(() => lib.luInverse(new Float64Array(4), 2, Int32Array.from([0, 1]), new Float64Array(4))).toThrow(expect.objectContaining({ code: 'singular' }));
    const indefinite = { n: 2, colPtr: Int32Array.from([0, 2, 4]), rowIndex: Int32Array.from([0, 1, 0, 1]), values: Float64Array.from([1, 2, 2, 1]) };
    expect(() => new SparseCholesky(indefinite, 'K')).toThrow(expect.objectContaining({ code: 'not_positive_definite', message: expect.stringMatching(/K is not positive definite/) }));
    expect(() => lib.gemm(false, false, 3, 3, 3, 1, new Float64Array(4), 0, 3, new Float64Array(9), 0, 3, 0, new Float64Array(9), 0, 3)).toThrow(
      expect.objectContaining({ code: 'dimension_mismatch' }),
    );
  });

  it('finds the Cholesky factors of both gramians directly by Hammarling (1982), as scipy solve_continuous_lyapunov solves them', () => {
    // Reference: scipy.linalg.solve_continuous_lyapunov (Bartels & Stewart 1972, LAPACK trsyl) on the same
    // A, B, C; the factor L must give L·Lᵀ = P (resp. Q). Cases: complex eigenvalue pairs (2×2 Schur blocks)
    // with one, two and three right-hand columns, and a symmetric A (real spectrum, no blocks).
    const cases = [
      { a: stableMatrix(60, 31), b: randomMatrix(60, 1, 32), c: randomMatrix(3, 60, 33) },
      { a: stableMatrix(45, 34), b: randomMatrix(45, 2, 35), c: randomMatrix(1, 45, 36) },
    ];
    const sym = stableMatrix(30, 37, 5);
    for (let i = 0; i < 30; i++) for (let j = 0; j < i; j++) sym.data[j * 30 + i] = sym.data[i * 30 + j];
    cases.push({ a: sym, b: randomMatrix(30, 2, 38), c: randomMatrix(2, 30, 39) });
    const refs = reference(cases.map(({ a, b, c }) => ({ op: 'gramians', A: a, B: b, C: c }))) as { P: number[][]; Q: number[][]; hsv: number[] }[];
    cases.forEach(({ a, b, c }, k) => {
      const form = schur(a);
      const lc = hammarlingLyapunovFactor(form, b, false);
      const lo = hammarlingLyapunovFactor(form, transpose(c), true);
      expect(maxAbsDiff(multiplyTransposeB(lc, lc), refs[k].P) / maxAbs(fromRows(refs[k].P))).toBeLessThan(1e-12);
      expect(maxAbsDiff(multiplyTransposeB(lo, lo), refs[k].Q) / maxAbs(fromRows(refs[k].Q))).toBeLessThan(1e-12);
      const f = schurGramianFactors(a, b, c, { form, method: 'hammarling' });
      const s = singularValues(multiplyTransposeA(f.observability, f.controllability));
      // Singular values move by at most the perturbation's norm (Weyl; Golub & Van Loan 2013, Cor. 8.6.2),
      // so the check is absolute, relative to σ₁: the reference's own small values carry its rounding.
      for (let i = 0; i < 6; i++) expect(Math.abs(s[i] - refs[k].hsv[i])).toBeLessThan(1e-10 * refs[k].hsv[0]);
    });
    // One state, closed form: a·x + x·a + b² = 0 gives x = −b²/(2a), factor |b|/√(−2a).
    const one = nativeHammarlingFactor(fromRows([[-4]]), fromRows([[3]]), false)!;
    expect(one.data[0]).toBeCloseTo(3 / Math.sqrt(8), 14);
  });

  it('refuses an unstable A or a non-finite right-hand side in Hammarling\'s kernel with a code', () => {
    const t = fromRows([[-1, 2], [0, 0.5]]);
    expect(() => nativeHammarlingFactor(t, fromRows([[1], [1]]), false)).toThrow(expect.objectContaining({ code: 'unstable', message: expect.stringMatching(/not stable/) }));
    expect(() => nativeHammarlingFactor(fromRows([[-1, 2], [0, -3]]), fromRows([[Number.NaN], [1]]), true)).toThrow(expect.objectContaining({ code: 'non_finite' }));
    expect(() => nativeHammarlingFactor(fromRows([[-1, 2], [0, -3]]), fromRows([[1]]), true)).toThrow(/W has 1 rows/);
  });

  it('loads in two worker threads at once and computes there (context-aware addon)', async () => {
    const file = nativeAddon().path;
    const code = `
      const { parentPort, workerData } = require('node:worker_threads');
      const m = { exports: {} };
      process.dlopen(m, workerData.file);
      const n = 200, a = new Float64Array(n * n), c = new Float64Array(n * n);
      for (let i = 0; i < n; i++) a[i * n + i] = workerData.scale;
      m.exports.gemm(false, false, n, n, n, 1, a, 0, n, a, 0, n, 0, c, 0, n);
      const re = new Float64Array(n), im = new Float64Array(n);
      m.exports.eigenvalues(a, n, re, im);
      parentPort.postMessage({ c: c[0], eig: re[0] });
    `;
    const run = (scale: number) =>
      new Promise<{ c: number; eig: number }>((resolve, reject) => {
        const w = new Worker(code, { eval: true, workerData: { file, scale } });
        w.once('message', resolve);
        w.once('error', reject);
      });
    const [x, y] = await Promise.all([run(2), run(3)]);
    expect(x).toEqual({ c: 4, eig: 2 });
    expect(y).toEqual({ c: 9, eig: 3 });
  });
});

/** The 5-point Laplacian on an N×N grid (Dirichlet), h = 1/(N+1), as CSC. */
function laplacian2d(N: number): CscMatrix {
  const n = N * N;
  const h2 = (N + 1) ** 2;
  const colPtr = new Int32Array(n + 1);
  const rows: number[] = [];
  const vals: number[] = [];
  for (let j = 0; j < n; j++) {
    const x = j % N, y = Math.floor(j / N);
    const entries: [number, number][] = [];
    if (y > 0) entries.push([j - N, h2]);
    if (x > 0) entries.push([j - 1, h2]);
    entries.push([j, -4 * h2]);
    if (x < N - 1) entries.push([j + 1, h2]);
    if (y < N - 1) entries.push([j + N, h2]);
    for (const [r, v] of entries) {
      rows.push(r);
      vals.push(v);
    }
    colPtr[j + 1] = rows.length;
  }
  return { n, colPtr, rowIndex: Int32Array.from(rows), values: Float64Array.from(vals) };
}

describe('sparse direct solvers (SuiteSparse) against scipy.sparse.linalg.spsolve', () => {
  const N = 30;
  const A = laplacian2d(N);
  const b = Float64Array.from({ length: A.n }, (_, i) => Math.sin(i));

  it('UMFPACK: real solve, transposed solve, and a complex shift A − jσI reusing the symbolic analysis', () => {
    const [real, shifted] = reference([
      { op: 'spsolve', n: A.n, colPtr: Array.from(A.colPtr), rowIndex: Array.from(A.rowIndex), values: Array.from(A.values), b: Array.from(b) },
      { op: 'spsolve', n: A.n, colPtr: Array.from(A.colPtr), rowIndex: Array.from(A.rowIndex), values: Array.from(A.values), b: Array.from(b), shift: 500 },
    ]) as { re: number[]; im: number[] }[];
    const lu = SparseLu.analyze(A, 'A');
    expect(lu.analysis.peakMemoryBytes).toBeGreaterThan(0);
    const info = lu.factor();
    expect(info.lnz).toBeGreaterThan(A.n);
    const x = lu.solve(b);
    const scale = Math.max(...real.re.map(Math.abs));
    expect(Math.max(...Array.from(x, (v, i) => Math.abs(v - real.re[i]))) / scale).toBeLessThan(1e-12);
    // The Laplacian is symmetric, so Aᵀx = b has the same solution.
    const xt = lu.solve(b, { transpose: true });
    expect(Math.max(...Array.from(xt, (v, i) => Math.abs(v - real.re[i]))) / scale).toBeLessThan(1e-12);
    lu.dispose();
    // A − 500j·I: the same pattern (the diagonal is present), complex values.
    const imag = new Float64Array(A.values.length);
    for (let j = 0; j < A.n; j++) for (let k = A.colPtr[j]; k < A.colPtr[j + 1]; k++) if (A.rowIndex[k] === j) imag[k] = -500;
    const clu = SparseLu.analyze({ ...A, imag }, 'A − jσI');
    clu.factor();
    const z = clu.solveComplex(b, null);
    const cs = Math.max(...shifted.re.map((r, i) => Math.hypot(r, shifted.im[i])));
    let worst = 0;
    for (let i = 0; i < A.n; i++) worst = Math.max(worst, Math.hypot(z.re[i] - shifted.re[i], z.im[i] - shifted.im[i]));
    expect(worst / cs).toBeLessThan(1e-12);
    // New values on the analysed pattern: 2A, solution halves.
    clu.factor(A.values.map((v) => 2 * v), imag.map((v) => 2 * v));
    const z2 = clu.solveComplex(b, null);
    expect(Math.abs(z2.re[7] - z.re[7] / 2)).toBeLessThan(1e-12 * cs);
    // The threaded sweep on the same analysis (umfpackSweep, its own factor per frequency): −C (A − jωI)⁻¹ b
    // with C = e₇ᵀ at ω = 500, three times over two threads, is minus scipy's solution's entry 7.
    const eValues = new Float64Array(A.values.length);
    for (let j = 0; j < A.n; j++) for (let k = A.colPtr[j]; k < A.colPtr[j + 1]; k++) if (A.rowIndex[k] === j) eValues[k] = 1;
    const pick = new Float64Array(A.n);
    pick[7] = 1;
    const out = { re: new Float64Array(3), im: new Float64Array(3) };
    clu.sweep(A.values, eValues, Float64Array.from([500, 500, 500]), { data: b, cols: 1 }, { data: pick, rows: 1 }, out, 2);
    for (let k = 0; k < 3; k++) expect(Math.hypot(out.re[k] + shifted.re[7], out.im[k] + shifted.im[7]) / cs).toBeLessThan(1e-12);
    // The threaded shifted solves (umfpackShiftedSolves, IRKA's): σ = 500j twice, x = (A − σI)⁻¹ b and, A being
    // symmetric, y = (A − σI)⁻ᵀ b the same: scipy's solution.
    const two = Float64Array.from({ length: 2 * A.n }, (_, i) => b[i % A.n]);
    const zero = new Float64Array(2 * A.n);
    const solved = clu.shiftedSolves(A.values, eValues, [{ re: 0, im: 500 }, { re: 0, im: 500 }], { re: two, im: zero }, { re: two, im: zero }, 2);
    for (const v of [solved.x, solved.y]) {
      let gap = 0;
      for (let i = 0; i < 2 * A.n; i++) gap = Math.max(gap, Math.hypot(v.re[i] - shifted.re[i % A.n], v.im![i] - shifted.im[i % A.n]));
      expect(gap / cs).toBeLessThan(1e-12);
    }
    clu.dispose();
    // And real shifts on a real analysis: σ = 0 twice gives A⁻¹b, as scipy's spsolve.
    const rlu = SparseLu.analyze(A, 'A');
    const realSolved = rlu.shiftedSolves(A.values, eValues, [{ re: 0, im: 0 }, { re: 0, im: 0 }], { re: two, im: null }, { re: two, im: null }, 2);
    expect(realSolved.x.im).toBeNull();
    expect(Math.max(...Array.from(realSolved.x.re, (v, i) => Math.abs(v - real.re[i % A.n]))) / scale).toBeLessThan(1e-12);
    rlu.dispose();
  });

  it('the threaded sweep refuses a frequency at a pole, naming it, with the code singular', () => {
    // A = [[0, 1], [−1, 0]] has poles ±j: A − jωI is singular at ω = 1. The pattern holds the diagonal (E = I).
    const pattern = { n: 2, colPtr: Int32Array.from([0, 2, 4]), rowIndex: Int32Array.from([0, 1, 0, 1]) };
    const values = Float64Array.from([0, -1, 1, 0]);
    const eValues = Float64Array.from([1, 0, 0, 1]);
    const lu = SparseLu.analyze({ ...pattern, values, imag: eValues.map((e) => -0.5 * e) }, 'A − jωI');
    const out = { re: new Float64Array(3), im: new Float64Array(3) };
    const sweep = () => lu.sweep(values, eValues, Float64Array.from([0.5, 1, 2]), { data: Float64Array.from([0, 1]), cols: 1 }, { data: Float64Array.from([1, 0]), rows: 1 }, out, 2);
    expect(sweep).toThrow(/A − jωI is singular \(numeric factorization at ω = 1\)/);
    expect(() => sweep()).toThrow(expect.objectContaining({ code: 'singular' }));
    // IRKA's shifted solves at σ = j: the same pole, named.
    const one = { re: Float64Array.from([0, 1]), im: new Float64Array(2) };
    expect(() => lu.shiftedSolves(values, eValues, [{ re: 0, im: 1 }], one, one, 1)).toThrow(/singular \(numeric factorization at σ = 0 \+ 1i\)/);
    lu.dispose();
  });

  it('CHOLMOD solves −A (positive definite) and AMD orders it; a singular matrix is refused with its name', () => {
    const neg = { ...A, values: A.values.map((v) => -v) };
    const [ref] = reference([
      { op: 'spsolve', n: A.n, colPtr: Array.from(A.colPtr), rowIndex: Array.from(A.rowIndex), values: Array.from(neg.values), b: Array.from(b) },
    ]) as { re: number[] }[];
    const ch = new SparseCholesky(neg, '−A');
    const x = ch.solve(b);
    const scale = Math.max(...ref.re.map(Math.abs));
    expect(Math.max(...Array.from(x, (v, i) => Math.abs(v - ref.re[i]))) / scale).toBeLessThan(1e-12);
    expect(ch.info.lnz).toBeGreaterThan(A.n);
    ch.dispose();
    const { perm, lnz } = amdOrdering(A);
    expect(Array.from(perm).sort((p, q) => p - q)).toEqual(Array.from({ length: A.n }, (_, i) => i));
    expect(lnz).toBeGreaterThan(A.n);
    const singular: CscMatrix = { n: 2, colPtr: Int32Array.from([0, 1, 1]), rowIndex: Int32Array.from([0]), values: Float64Array.from([1]) };
    const s = SparseLu.analyze(singular, 'E');
    expect(() => s.factor()).toThrow(/E is singular/);
  });
});
