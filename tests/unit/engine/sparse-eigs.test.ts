/**
 * Eigenvalues of large sparse pencils (reduction/sparse/eigs.ts: shift-invert Krylov–Schur, fastest pole) and
 * the Schur reordering under it (reduction/linalg/schur-reorder.ts). Sources beside each check:
 *  - the 2-D Dirichlet Laplacian's eigenvalues −(4/h²)(sin²(jπ/(2(N+1))) + sin²(kπ/(2(N+1)))) (R. J. LeVeque,
 *    "Finite Difference Methods for Ordinary and Partial Differential Equations", SIAM 2007, §3.4 — section
 *    from memory), with their multiplicities (λ(j,k) = λ(k,j));
 *  - a fixed–fixed chain of N equal masses m and N + 1 springs k: ωⱼ = 2√(k/m)·sin(jπ/(2(N+1))) (the common
 *    vibrations-textbook result; from memory), as a descriptor model E = diag(I, M);
 *  - scipy.sparse.linalg.eigs(A, k, M=E, sigma=σ) (ARPACK shift-invert with SuperLU, Debian python3-scipy)
 *    through tests/reference/sparse_eigs_reference.py on a generated nonsymmetric model with E;
 *  - the definition of a real Schur form (A = Z T Zᵀ, Z orthogonal, T quasi-triangular) for the reordering.
 */
import { describe, expect, it } from 'vitest';
import { fastestPole, krylovSchur, ShiftInvert, sparseEigs } from '@/reduction/sparse/eigs';
import { sortSchur, schurBlocks } from '@/reduction/linalg/schur-reorder';
import { schur, zeros, matmul, multiplyTransposeA, multiplyTransposeB, frobeniusNorm, sub, identity, eigenvalues } from '@/reduction/linalg/index';
import { plateModel, writeModel } from './sparse-support';
import { chainFrequencies, eigsReference, laplacianEigenvalues, matchComplex, springChain } from './sparse-modes-support';

function pairsOf(v: { re: ArrayLike<number>; im: ArrayLike<number> }): [number, number][] {
  return Array.from(v.re, (re, i) => [re, v.im[i]] as [number, number]);
}

describe('reordering a real Schur form (Bai & Demmel swaps)', () => {
  it('keeps A = Z T Zᵀ with Z orthogonal and T quasi-triangular, the chosen blocks first', () => {
    let seed = 11;
    const rnd = () => ((seed = (seed * 16807) % 2147483647) / 2147483647) - 0.5;
    for (let trial = 0; trial < 6; trial++) {
      const n = 14;
      const A = zeros(n, n);
      for (let i = 0; i < n * n; i++) A.data[i] = rnd();
      const { T, Z } = schur(A);
      const target = { re: 0.2, im: 0.3 };
      const order = sortSchur(T, Z, (re, im) => -Math.hypot(re - target.re, Math.abs(im) - target.im));
      expect(frobeniusNorm(sub(multiplyTransposeB(matmul(Z, T), Z), A)) / frobeniusNorm(A)).toBeLessThan(1e-13);
      expect(frobeniusNorm(sub(multiplyTransposeA(Z, Z), identity(n)))).toBeLessThan(1e-13);
      for (let i = 0; i < n; i++) for (let j = 0; j < i - 1; j++) expect(T.data[i * n + j]).toBe(0);
      // Blocks in priority order, and the same eigenvalues as before (LAPACK's, through eigenvalues()).
      const keys = schurBlocks(T).map((b) => -Math.hypot(order.re[b.start] - target.re, Math.abs(order.im[b.start]) - target.im));
      for (let b = 1; b < keys.length; b++) expect(keys[b]).toBeLessThanOrEqual(keys[b - 1] + 1e-12);
      expect(matchComplex(pairsOf(order), pairsOf(eigenvalues(A)))).toBeLessThan(1e-12);
    }
  });
});

describe('shift-invert Krylov–Schur on the 2-D Dirichlet Laplacian (LeVeque 2007, §3.4), N = 50', () => {
  const N = 50;
  const model = plateModel(N);
  const exact = laplacianEigenvalues(N); // slowest first

  it('finds the 12 eigenvalues nearest 0 with their multiplicities, each to 1e-12 with a small residual', () => {
    const r = sparseEigs(model, { count: 12 });
    expect(r.converged).toBe(true);
    const got = Array.from(r.values.re);
    expect(got.length).toBe(12);
    for (const im of r.values.im) expect(im).toBe(0);
    got.sort((a, b) => b - a);
    for (let i = 0; i < 12; i++) expect(Math.abs(got[i] - exact[i]) / Math.abs(exact[i])).toBeLessThan(1e-12);
    for (const res of r.residuals) expect(res).toBeLessThan(1e-10);
    // The Schur basis is orthonormal.
    const Q = r.schurBasis;
    expect(frobeniusNorm(sub(multiplyTransposeA(Q, Q), identity(Q.cols)))).toBeLessThan(1e-10);
  });

  it('the fastest pole by Krylov–Schur on A is the closed form λ(N, N) from inside the spectrum', () => {
    const f = fastestPole(model);
    const lmax = exact[exact.length - 1];
    expect(f.solver).toBe('identity');
    expect(f.im).toBe(0);
    // Symmetric A: the Ritz value lies inside the spectrum (Cauchy interlacing), here to 1e-9.
    expect(f.re).toBeGreaterThanOrEqual(lmax * (1 + 1e-13));
    expect(Math.abs(f.re - lmax) / Math.abs(lmax)).toBeLessThan(1e-9);
    expect(f.residual).toBeLessThan(1e-6);
  });
});

describe('the fixed–fixed spring chain as a descriptor model (ωⱼ = 2√(k/m) sin(jπ/(2(N+1))))', () => {
  const N = 1000, k = 1e4, m = 2.5;
  const model = springChain(N, { k, m });
  const w = chainFrequencies(N, k, m);

  it('the slowest poles are ±iω₁ … ±iω₅ (shift-invert at 0, E = diag(I, M))', () => {
    const r = sparseEigs(model, { count: 10 });
    const want: [number, number][] = w.slice(0, 5).flatMap((x) => [[0, x], [0, -x]] as [number, number][]);
    expect(r.values.re.length).toBe(10);
    for (let i = 0; i < 10; i++) expect(Math.abs(r.values.re[i])).toBeLessThan(1e-9 * w[4]);
    expect(matchComplex(pairsOf(r.values).map(([, im]) => [0, im]), want)).toBeLessThan(1e-11);
    for (const res of r.residuals) expect(res).toBeLessThan(1e-12);
    // Pairs consecutive, Im > 0 first (the packed form of reduction/linalg's eig).
    for (let i = 0; i < 10; i += 2) {
      expect(r.values.im[i]).toBeGreaterThan(0);
      expect(r.values.im[i + 1]).toBe(-r.values.im[i]);
    }
  });

  it('a complex shift iω* (Parlett & Saad real operator, one complex LU) finds the modes nearest it, left and right', () => {
    const target = 0.5 * (w[399] + w[400]);
    const si = new ShiftInvert(model, { re: 0, im: target });
    try {
      const right = sparseEigs(model, { count: 6, factorization: si });
      const left = sparseEigs(model, { count: 6, factorization: si, side: 'left' });
      // The three natural frequencies nearest the target, by the closed form.
      const nearest = [...w].sort((a, b) => Math.abs(a - target) - Math.abs(b - target)).slice(0, 3);
      const want: [number, number][] = nearest.flatMap((x) => [[0, x], [0, -x]] as [number, number][]);
      for (const r of [right, left]) {
        expect(r.converged).toBe(true);
        expect(matchComplex(pairsOf(r.values).map(([, im]) => [0, im]), want)).toBeLessThan(1e-10);
        for (const re of r.values.re) expect(Math.abs(re)).toBeLessThan(1e-8 * target);
        for (const res of r.residuals) expect(res).toBeLessThan(1e-10);
      }
    } finally {
      si.dispose();
    }
  });

  it('the fastest pole through CHOLMOD solves with E is ±iω_N to the few digits step limits need', () => {
    // The top of this spectrum is tightly clustered (ω_N − ω_{N−1} ≈ 4e-6·ω_N), so the Ritz value is a
    // blend of neighbours; the default tolerance (1e-6 relative Ritz residual) still pins ω_N to 1e-5.
    const f = fastestPole(model);
    expect(f.solver).toBe('cholesky');
    expect(Math.abs(f.re)).toBeLessThan(1e-6 * w[N - 1]);
    expect(Math.abs(f.im - w[N - 1]) / w[N - 1]).toBeLessThan(1e-5);
    expect(f.residual).toBeLessThan(1e-5);
  });
});

describe('against scipy.sparse.linalg.eigs(sigma=…) on a nonsymmetric model with E (ARPACK, Debian python3-scipy)', () => {
  // Convection–diffusion on the plate (cell Péclet number 1.46: complex eigenvalues) with a mass matrix E.
  const model = plateModel(40, { convection: 120, descriptor: true });
  const dir = writeModel(model);

  it('a real shift: the 10 eigenvalues nearest σ = −300', () => {
    const ours = sparseEigs(model, { count: 10, shift: { re: -300, im: 0 } });
    const ref: [number, number][] = eigsReference(dir, ['eigs'], { sigma: [-300, 0], k: ours.values.re.length }).eigs;
    expect(ours.values.im.some((x) => x !== 0)).toBe(true);
    expect(matchComplex(pairsOf(ours.values), ref)).toBeLessThan(1e-9);
    for (const res of ours.residuals) expect(res).toBeLessThan(1e-10);
  });

  it('a complex shift: the 8 eigenvalues nearest σ = −600 + 900i', () => {
    const ours = sparseEigs(model, { count: 8, shift: { re: -600, im: 900 } });
    // The complex reference returns the 8 nearest σ; ours are closed under conjugation, so compare those of
    // ours nearest σ, as many as the reference has in the upper half-plane plus their conjugates where listed.
    const ref: [number, number][] = eigsReference(dir, ['eigs'], { sigma: [-600, 900], k: 8 }).eigs;
    const d = (p: [number, number]) => Math.hypot(p[0] + 600, p[1] - 900);
    const oursNear = pairsOf(ours.values).sort((a, b) => d(a) - d(b)).slice(0, 4);
    const refNear = [...ref].sort((a, b) => d(a) - d(b)).slice(0, 4);
    expect(matchComplex(oursNear, refNear)).toBeLessThan(1e-9);
    for (const res of ours.residuals) expect(res).toBeLessThan(1e-9);
  });
});

describe('Krylov–Schur on an operator given as a function', () => {
  it('finds the largest eigenvalues of a diagonal operator exactly, with locking past a cluster', () => {
    const n = 3000;
    const d = Float64Array.from({ length: n }, (_, i) => (i < 3 ? 100 : 1 + i / n)); // a triple eigenvalue at 100
    const r = krylovSchur((x) => x.map((v, i) => v * d[i]), n, { wanted: 4 });
    expect(r.converged).toBe(true);
    const vals = Array.from(r.values.re).sort((a, b) => b - a);
    // Krylov methods see one direction of a multiple eigenvalue per start vector, then more by rounding:
    // at least the top value and the next distinct one (the largest of 1 + i/n) are found.
    expect(vals[0]).toBeCloseTo(100, 12);
    expect(vals.some((v) => Math.abs(v - (1 + (n - 1) / n)) < 1e-10)).toBe(true);
  });
});
