import { describe, expect, it } from 'vitest';
import { svd, singularValues } from '../../../reduction/linalg/svd';
import { symmetricEig, symmetricEigenvalues } from '../../../reduction/linalg/symmetric-eig';
import { cholesky, pivotedCholesky } from '../../../reduction/linalg/cholesky';
import { qr, pivotedQr, orthonormalBasis } from '../../../reduction/linalg/qr';
import { multiply, multiplyTransposeA, multiplyTransposeB } from '../../../reduction/linalg/gemm';
import { type Matrix, fromRows, identity, sub, frobeniusNorm, zeros } from '../../../reduction/linalg/matrix';
import { randomMatrix, reference } from './linalg-support';

const EPS = Number.EPSILON;

function diag(s: ArrayLike<number>): Matrix {
  const n = s.length;
  const d = zeros(n, n);
  for (let i = 0; i < n; i++) d.data[i * n + i] = s[i];
  return d;
}

function orthonormalityError(q: Matrix): number {
  return frobeniusNorm(sub(multiplyTransposeA(q, q), identity(q.cols)));
}

function spd(n: number, seed: number): Matrix {
  const b = randomMatrix(n, n, seed);
  const a = multiplyTransposeB(b, b);
  for (let i = 0; i < n; i++) a.data[i * n + i] += 0.5;
  return a;
}

describe('SVD by Golub–Kahan bidiagonalisation and implicit QR (Golub & Reinsch 1970)', () => {
  const shapes: [number, number][] = [[1, 1], [6, 4], [4, 6], [60, 60], [150, 40], [40, 150]];

  it('reconstructs A = U·diag(s)·Vᵀ with orthonormal U, V and s descending', () => {
    for (const [m, n] of shapes) {
      const a = randomMatrix(m, n, m * 31 + n);
      const { U, s, V } = svd(a);
      const k = Math.min(m, n);
      expect([U.rows, U.cols, V.rows, V.cols, s.length]).toEqual([m, k, n, k, k]);
      expect(frobeniusNorm(sub(a, multiplyTransposeB(multiply(U, diag(s)), V))) / frobeniusNorm(a)).toBeLessThan(20 * Math.max(m, n) * EPS);
      expect(orthonormalityError(U)).toBeLessThan(20 * Math.max(m, n) * EPS);
      expect(orthonormalityError(V)).toBeLessThan(20 * Math.max(m, n) * EPS);
      for (let i = 1; i < k; i++) expect(s[i]).toBeLessThanOrEqual(s[i - 1]);
      expect(s[k - 1]).toBeGreaterThanOrEqual(0);
    }
  });

  it('matches scipy.linalg.svdvals (LAPACK dgesdd), values only and with vectors', () => {
    const cases = [randomMatrix(80, 80, 1), randomMatrix(120, 30, 2), randomMatrix(30, 120, 3)];
    // A graded matrix: columns scaled over ten decades (tests small singular values).
    const graded = randomMatrix(50, 50, 4);
    for (let i = 0; i < 50; i++) for (let j = 0; j < 50; j++) graded.data[i * 50 + j] *= 10 ** (-(10 * j) / 49);
    cases.push(graded);
    const ref = reference(cases.map((A) => ({ op: 'svdvals', A }))) as { s: number[] }[];
    cases.forEach((a, k) => {
      const s1 = singularValues(a);
      const s2 = svd(a).s;
      const top = ref[k].s[0];
      for (let i = 0; i < s1.length; i++) {
        // Absolute accuracy ε·σ₁ for any backward-stable SVD (Golub & Van Loan 2013, §8.6).
        expect(Math.abs(s1[i] - ref[k].s[i])).toBeLessThan(100 * EPS * top);
        expect(Math.abs(s2[i] - ref[k].s[i])).toBeLessThan(100 * EPS * top);
      }
    });
  });

  it('gives the closed-form singular values of a rank-one matrix u·vᵀ: ‖u‖·‖v‖ and zeros', () => {
    const u = [1, 2, 2]; // ‖u‖ = 3
    const v = [3, 4]; // ‖v‖ = 5
    const a = fromRows(u.map((x) => v.map((y) => x * y)));
    const s = singularValues(a);
    expect(s[0]).toBeCloseTo(15, 13);
    expect(s[1]).toBeLessThan(1e-14);
  });
});

describe('symmetric eigenproblem by tridiagonalisation and implicit QL (Bowdler et al. 1968)', () => {
  it('reconstructs A = V·diag(λ)·Vᵀ with orthonormal V, λ ascending, and matches scipy.linalg.eigh (dsyevr)', () => {
    const cases = [spd(1, 1), spd(2, 2), spd(40, 3), spd(160, 4)];
    // Indefinite, with a repeated eigenvalue: diag(−2, 1, 1, 5) rotated by a Householder reflector.
    const v = [1, -2, 0.5, 3];
    const vv = v.reduce((s, x) => s + x * x, 0);
    const h = zeros(4, 4);
    for (let i = 0; i < 4; i++) for (let j = 0; j < 4; j++) h.data[i * 4 + j] = (i === j ? 1 : 0) - (2 * v[i] * v[j]) / vv;
    cases.push(multiply(multiply(h, diag([-2, 1, 1, 5])), h));
    const ref = reference(cases.map((A) => ({ op: 'eigh', A }))) as { w: number[] }[];
    cases.forEach((a, k) => {
      const n = a.rows;
      const { values, vectors } = symmetricEig(a);
      expect(frobeniusNorm(sub(a, multiplyTransposeB(multiply(vectors, diag(values)), vectors))) / frobeniusNorm(a)).toBeLessThan(20 * n * EPS + 1e-15);
      expect(orthonormalityError(vectors)).toBeLessThan(20 * n * EPS + 1e-15);
      const only = symmetricEigenvalues(a);
      const scale = Math.max(...ref[k].w.map(Math.abs));
      for (let i = 0; i < n; i++) {
        if (i > 0) expect(values[i]).toBeGreaterThanOrEqual(values[i - 1]);
        expect(Math.abs(values[i] - ref[k].w[i])).toBeLessThan(100 * EPS * scale);
        expect(Math.abs(only[i] - ref[k].w[i])).toBeLessThan(100 * EPS * scale);
      }
    });
  });

  it('reproduces the path-graph Laplacian eigenvalues 2 − 2cos(kπ/(N+1)) (closed form for a tridiagonal Toeplitz matrix, from memory; the identity behind the heat-equation check in linalg-schur)', () => {
    const N = 30;
    const a = zeros(N, N);
    for (let i = 0; i < N; i++) {
      a.data[i * N + i] = 2;
      if (i > 0) a.data[i * N + i - 1] = -1;
      if (i < N - 1) a.data[i * N + i + 1] = -1;
    }
    const w = symmetricEigenvalues(a);
    for (let k = 1; k <= N; k++) expect(Math.abs(w[k - 1] - (2 - 2 * Math.cos((k * Math.PI) / (N + 1))))).toBeLessThan(1e-14);
  });
});

describe('Cholesky factorisation (Golub & Van Loan §4.2)', () => {
  it('gives lower-triangular L with A = L·Lᵀ', () => {
    for (const n of [1, 3, 50, 120]) {
      const a = spd(n, n);
      const l = cholesky(a);
      for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) expect(l.data[i * n + j]).toBe(0);
      expect(frobeniusNorm(sub(a, multiplyTransposeB(l, l))) / frobeniusNorm(a)).toBeLessThan(10 * n * EPS);
    }
  });

  it('factors the Pascal matrix into the binomial lower-triangular factor (L_ij = C(i, j): Edelman & Strang, "Pascal matrices", Amer. Math. Monthly 111(3), 2004)', () => {
    const n = 8;
    const binom = (i: number, j: number) => {
      let r = 1;
      for (let k = 1; k <= j; k++) r = (r * (i - j + k)) / k;
      return r;
    };
    const p = zeros(n, n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) p.data[i * n + j] = binom(i + j, i);
    const l = cholesky(p);
    for (let i = 0; i < n; i++) for (let j = 0; j <= i; j++) expect(l.data[i * n + j]).toBeCloseTo(binom(i, j), 8);
  });

  it('factors a positive semidefinite matrix of rank 3 with diagonal pivoting (Higham 1990): X = F·Fᵀ, F n×3', () => {
    const g = randomMatrix(40, 3, 77);
    const x = multiplyTransposeB(g, g);
    const f = pivotedCholesky(x, Math.sqrt(EPS));
    expect(f.cols).toBe(3);
    expect(frobeniusNorm(sub(multiplyTransposeB(f, f), x)) / frobeniusNorm(x)).toBeLessThan(1e-14);
    // Plain Cholesky cannot factor it (rounding leaves a zero or negative pivot).
    expect(() => cholesky(x)).toThrow(/not positive definite/);
  });

  it('refuses an indefinite or non-square matrix, naming the pivot', () => {
    expect(() => cholesky(fromRows([[1, 2], [2, 1]]))).toThrow(/not positive definite \(pivot 1/);
    expect(() => cholesky(zeros(2, 3))).toThrow(/square/);
  });
});

describe('Householder QR and QR with column pivoting (Businger & Golub 1965)', () => {
  it('gives A = Q·R with orthonormal Q and upper-triangular R', () => {
    for (const [m, n] of [[5, 3], [3, 5], [90, 60], [60, 90]] as [number, number][]) {
      const a = randomMatrix(m, n, m + 100 * n);
      const { Q, R } = qr(a);
      expect(frobeniusNorm(sub(a, multiply(Q, R))) / frobeniusNorm(a)).toBeLessThan(20 * m * EPS);
      expect(orthonormalityError(Q)).toBeLessThan(20 * m * EPS);
      for (let i = 0; i < R.rows; i++) for (let j = 0; j < Math.min(i, R.cols); j++) expect(R.data[i * R.cols + j]).toBe(0);
    }
  });

  it('reveals the rank of a product of thin factors (numpy.linalg.matrix_rank as reference)', () => {
    const a = multiplyTransposeB(randomMatrix(70, 6, 1), randomMatrix(50, 6, 2));
    const [ref] = reference([{ op: 'qr_rank', A: a }]) as { rank: number }[];
    const { Q, R, perm, rank } = pivotedQr(a);
    expect(rank).toBe(ref.rank);
    expect(rank).toBe(6);
    // A·Π ≈ Q·R, and the diagonal of R is non-increasing in magnitude.
    const ap = zeros(70, 50);
    for (let i = 0; i < 70; i++) for (let j = 0; j < 50; j++) ap.data[i * 50 + j] = a.data[i * 50 + perm[j]];
    expect(frobeniusNorm(sub(ap, multiply(Q, R))) / frobeniusNorm(a)).toBeLessThan(1e-13);
    for (let i = 1; i < rank; i++) expect(Math.abs(R.data[i * 50 + i])).toBeLessThanOrEqual(Math.abs(R.data[(i - 1) * 50 + i - 1]) * (1 + 1e-12));
    const basis = orthonormalBasis(a);
    expect(basis.cols).toBe(6);
    expect(orthonormalityError(basis)).toBeLessThan(1e-13);
    // The basis spans the columns of A: ‖(I − QQᵀ)A‖ ≈ 0.
    const residual = sub(a, multiply(basis, multiplyTransposeA(basis, a)));
    expect(frobeniusNorm(residual) / frobeniusNorm(a)).toBeLessThan(1e-13);
  });

  it('names a non-finite entry', () => {
    expect(() => qr(fromRows([[1, 2], [NaN, 3]]))).toThrow(/\(1, 0\) is not finite/);
  });
});
