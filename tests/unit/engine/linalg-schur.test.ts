import { describe, expect, it } from 'vitest';
import { schur, eigenvalues, eig } from '../../../reduction/linalg/schur';
import { standardise2x2 } from '../../../reduction/linalg/schur-2x2';
import { hessenberg } from '../../../reduction/linalg/hessenberg';
import { multiply, multiplyTransposeA, multiplyTransposeB } from '../../../reduction/linalg/gemm';
import { type Matrix, fromRows, identity, sub, frobeniusNorm, zeros } from '../../../reduction/linalg/matrix';
import { randomMatrix, reference, eigenvalueDistance } from './linalg-support';
import { inverse as inverseOf } from '../../../reduction/linalg/lu';
import { singularValues } from '../../../reduction/linalg/svd';

const EPS = Number.EPSILON;

function reconstructionError(a: Matrix, q: Matrix, t: Matrix): number {
  return frobeniusNorm(sub(a, multiplyTransposeB(multiply(q, t), q))) / frobeniusNorm(a);
}

function orthogonalityError(q: Matrix): number {
  return frobeniusNorm(sub(multiplyTransposeA(q, q), identity(q.rows)));
}

/** Second-difference matrix of the 1-D heat equation u_t = u_xx on N interior points, h = 1/(N+1). */
function heat1d(N: number): Matrix {
  const h = 1 / (N + 1);
  const a = zeros(N, N);
  for (let i = 0; i < N; i++) {
    a.data[i * N + i] = -2 / (h * h);
    if (i > 0) a.data[i * N + i - 1] = 1 / (h * h);
    if (i < N - 1) a.data[i * N + i + 1] = 1 / (h * h);
  }
  return a;
}

/** Largest |A·v − λ·v| over all eigenpairs of eig(a), relative to ‖A‖_F; asserts unit-norm vectors. */
function eigenvectorResidual(a: Matrix): number {
  const n = a.rows;
  const { values, vectors } = eig(a);
  const av = multiply(a, vectors);
  const v = vectors.data;
  let worst = 0;
  for (let k = 0; k < n; k++) {
    let s = 0;
    if (values.im[k] === 0) {
      for (let r = 0; r < n; r++) {
        worst = Math.max(worst, Math.abs(av.data[r * n + k] - values.re[k] * v[r * n + k]));
        s += v[r * n + k] ** 2;
      }
    } else {
      const lr = values.re[k], li = values.im[k];
      expect(li).toBeGreaterThan(0);
      for (let r = 0; r < n; r++) {
        const xr = v[r * n + k], xi = v[r * n + k + 1];
        worst = Math.max(worst, Math.abs(av.data[r * n + k] - (lr * xr - li * xi)), Math.abs(av.data[r * n + k + 1] - (lr * xi + li * xr)));
        s += xr * xr + xi * xi;
      }
      k++;
    }
    expect(Math.sqrt(s)).toBeCloseTo(1, 12);
  }
  return worst / frobeniusNorm(a);
}

describe('Hessenberg reduction (Golub & Van Loan §7.4)', () => {
  it('gives A = Q·H·Qᵀ with orthogonal Q and H zero below the subdiagonal', () => {
    // 200 and 260 run through the blocked panels (order ≥ 128), the others unblocked only.
    for (const n of [1, 2, 3, 40, 120, 200, 260]) {
      const a = randomMatrix(n, n, 100 + n);
      const { H, Q } = hessenberg(a);
      expect(reconstructionError(a, Q, H)).toBeLessThan(10 * n * EPS);
      expect(orthogonalityError(Q)).toBeLessThan(10 * n * EPS);
      for (let i = 2; i < n; i++) for (let j = 0; j < i - 1; j++) expect(H.data[i * n + j]).toBe(0);
    }
  });
});

describe('real Schur form by the Francis double-shift QR (Golub & Van Loan §7.5)', () => {
  it('reconstructs A = Z·T·Zᵀ with orthogonal Z and standardised quasi-triangular T', () => {
    for (const n of [1, 2, 5, 60, 150]) {
      const a = randomMatrix(n, n, 200 + n);
      const { T, Z, values } = schur(a);
      expect(reconstructionError(a, Z, T)).toBeLessThan(20 * n * EPS);
      expect(orthogonalityError(Z)).toBeLessThan(20 * n * EPS);
      const t = T.data;
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < i - 1; j++) expect(t[i * n + j]).toBe(0);
        if (i > 0 && t[i * n + i - 1] !== 0) {
          // A 2×2 block (dlanv2 standard form): equal diagonal, off-diagonals of opposite sign,
          // and no two blocks overlap.
          expect(t[i * n + i]).toBe(t[(i - 1) * n + i - 1]);
          expect(Math.sign(t[i * n + i - 1])).toBe(-Math.sign(t[(i - 1) * n + i]));
          if (i > 1) expect(t[(i - 1) * n + i - 2]).toBe(0);
          expect(values.im[i - 1]).toBeGreaterThan(0);
          expect(values.im[i]).toBe(-values.im[i - 1]);
        }
      }
    }
  });

  it('matches numpy.linalg.eigvals (LAPACK dgeev) on seeded random and structured matrices', () => {
    const cases: Matrix[] = [
      randomMatrix(50, 50, 1),
      randomMatrix(200, 200, 2),
      // Upper triangular plus a rank-one coupling: clustered and real eigenvalues.
      (() => {
        const a = randomMatrix(80, 80, 3);
        for (let i = 0; i < 80; i++) for (let j = 0; j < i; j++) a.data[i * 80 + j] = 1e-3 * a.data[i * 80 + j];
        return a;
      })(),
      // Stiff: eigenvalues spread over six decades.
      (() => {
        const n = 60;
        const a = randomMatrix(n, n, 4);
        for (let i = 0; i < n; i++) {
          for (let j = 0; j < n; j++) a.data[i * n + j] *= 0.1;
          a.data[i * n + i] = -Math.pow(10, (6 * i) / (n - 1));
        }
        return a;
      })(),
    ];
    const ref = reference(cases.map((A) => ({ op: 'eigvals', A })));
    cases.forEach((a, k) => {
      const ours = eigenvalues(a);
      const r = ref[k] as { re: number[]; im: number[] };
      let scale = 0;
      for (let i = 0; i < r.re.length; i++) scale = Math.max(scale, Math.hypot(r.re[i], r.im[i]));
      // Both are backward stable; for these well-separated spectra the eigenvalues agree to ~1e-10·‖A‖.
      expect(eigenvalueDistance(ours, r) / scale).toBeLessThan(1e-9);
    });
  });

  it('reproduces the 1-D heat equation eigenvalues −(4/h²)·sin²(kπ/(2(N+1))) (LeVeque, Finite Difference Methods for ODEs and PDEs, SIAM 2007, §2.10)', () => {
    const N = 100;
    const h = 1 / (N + 1);
    const ours = eigenvalues(heat1d(N));
    const exact = { re: new Float64Array(N), im: new Float64Array(N) };
    for (let k = 1; k <= N; k++) exact.re[k - 1] = -(4 / (h * h)) * Math.sin((k * Math.PI) / (2 * (N + 1))) ** 2;
    const scale = 4 / (h * h);
    expect(eigenvalueDistance(ours, exact) / scale).toBeLessThan(1e-12);
  });

  it('finds the roots of a companion matrix: (s+1)(s+2)(s²+2s+5) has −1, −2, −1 ± 2i', () => {
    // s⁴ + 5s³ + 13s² + 19s + 10, in companion form (Golub & Van Loan §7.4).
    const a = fromRows([
      [-5, -13, -19, -10],
      [1, 0, 0, 0],
      [0, 1, 0, 0],
      [0, 0, 1, 0],
    ]);
    const ours = eigenvalues(a);
    const exact = { re: [-1, -2, -1, -1], im: [0, 0, 2, -2] };
    expect(eigenvalueDistance(ours, exact)).toBeLessThan(1e-12);
  });

  it('keeps the eigenvalues of a badly scaled similarity D·M·D⁻¹ (balancing, Parlett & Reinsch 1969)', () => {
    // D spans twelve decades; the eigenvalues are those of M (similarity invariance), which numpy
    // computes on the well-scaled M. Without balancing the error would scale with ‖D·M·D⁻¹‖ ≈ 1e12.
    const n = 40;
    const m = randomMatrix(n, n, 9);
    for (let i = 0; i < n; i++) m.data[i * n + i] -= 3;
    const graded = zeros(n, n);
    const d = (i: number) => 10 ** (-6 + (12 * i) / (n - 1));
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) graded.data[i * n + j] = (d(i) * m.data[i * n + j]) / d(j);
    const [ref] = reference([{ op: 'eigvals', A: m }]) as { re: number[]; im: number[] }[];
    let scale = 0;
    for (let i = 0; i < n; i++) scale = Math.max(scale, Math.hypot(ref.re[i], ref.im[i]));
    expect(eigenvalueDistance(eigenvalues(graded), ref) / scale).toBeLessThan(1e-12);
    // The eigenvectors, mapped back through the balancing, still satisfy A·v = λ·v.
    const { values, vectors } = eig(graded);
    const av = multiply(graded, vectors);
    for (let k = 0; k < n; k++) {
      if (values.im[k] !== 0) continue;
      let res = 0, size = 0;
      for (let r = 0; r < n; r++) {
        res = Math.max(res, Math.abs(av.data[r * n + k] - values.re[k] * vectors.data[r * n + k]));
        size = Math.max(size, Math.abs(vectors.data[r * n + k]));
      }
      expect(res / (size * scale)).toBeLessThan(1e-10);
    }
  });

  it('standardises 2×2 blocks as dlanv2 does (rotation reproduces the block)', () => {
    for (const [a, b, c, d] of [
      [1, 2, -3, 4],
      [4, 1, 2, 3],
      [0, 1, 0, 0],
      [1, 0, 5, 2],
      [2, -1, 1, 2],
    ]) {
      const r = standardise2x2(a, b, c, d);
      // [a b; c d] = G·[A B; C D]·Gᵀ with G = [cs −sn; sn cs]
      const g = fromRows([[r.cs, -r.sn], [r.sn, r.cs]]);
      const back = multiplyTransposeB(multiply(g, fromRows([[r.a, r.b], [r.c, r.d]])), g);
      expect(frobeniusNorm(sub(back, fromRows([[a, b], [c, d]])))).toBeLessThan(1e-14 * (Math.abs(a) + Math.abs(b) + Math.abs(c) + Math.abs(d)));
      if (r.c !== 0) {
        expect(r.a).toBe(r.d);
        expect(r.b * r.c).toBeLessThan(0);
      }
    }
  });

  it('gives eigenvectors with A·v = λ·v in the real packed form, unit norm', () => {
    for (const n of [3, 30, 120]) {
      const a = randomMatrix(n, n, 300 + n);
      expect(eigenvectorResidual(a)).toBeLessThan(1e-12);
    }
  });

  it('gives independent eigenvectors of a repeated semisimple pair (two identical resonators, disguised)', () => {
    // A = S·diag(R, R, −1, −2)·S⁻¹ with R = [0 1; −ω² −2ζω], ω = 3, ζ = 0.05: the pair −0.15 ± 2.996i
    // appears twice with two independent eigenvectors (geometric multiplicity 2). The back substitution
    // meets a singular but consistent 2×2 system there; Cramer's rule returned a residual of 0.3.
    const n = 6;
    const d = zeros(n, n);
    for (const o of [0, 2]) {
      d.data[o * n + o + 1] = 1;
      d.data[(o + 1) * n + o] = -9;
      d.data[(o + 1) * n + o + 1] = -0.3;
    }
    d.data[4 * n + 4] = -1;
    d.data[5 * n + 5] = -2;
    const s = randomMatrix(n, n, 611);
    for (let i = 0; i < n; i++) s.data[i * n + i] += 3; // well-conditioned similarity
    const a = multiply(s, multiply(d, inverseOf(s)));
    expect(eigenvectorResidual(a)).toBeLessThan(1e-12);
    const { vectors } = eig(a);
    const sv = singularValues(vectors);
    expect(sv[0] / sv[sv.length - 1]).toBeLessThan(1e3);
  });

  it('names the problem for non-square or non-finite input', () => {
    expect(() => eigenvalues(zeros(2, 3))).toThrow(/square.*2×3/);
    expect(() => schur(fromRows([[1, Infinity], [0, 1]]))).toThrow(/\(0, 1\) is not finite/);
  });
});
