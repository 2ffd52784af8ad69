/**
 * Low-rank ADI for the gramians of sparse models (issue 13). Sources beside each check:
 *  - the 2-D Dirichlet Laplacian's eigenvalues −(4/h²)(sin²(jπ/(2(N+1))) + sin²(kπ/(2(N+1)))) (R. J.
 *    LeVeque, "Finite Difference Methods for Ordinary and Partial Differential Equations", SIAM 2007, §3.4)
 *    for the Ritz values the shifts come from;
 *  - the Lyapunov equation itself: the residual A Z Zᵀ Eᵀ + E Z Zᵀ Aᵀ + B Bᵀ formed densely (n = 400);
 *  - scipy.linalg.solve_continuous_lyapunov (Bartels–Stewart, Debian python3-scipy) through
 *    tests/reference/sparse_reference.py task "hsv", exact for these small models, for Hankel singular values;
 *  - an independent scipy low-rank ADI (SuperLU, ARPACK Ritz values) in the same script, task "lradi".
 */
import { describe, expect, it } from 'vitest';
import { arnoldiRitzValues, heuristicShifts, lowRankGramians, projectionShifts } from '@/reduction/sparse/adi';
import { secondOrderToDescriptor } from '@/reduction/sparse/second-order';
import { cscFromCoo, createSparseModel } from '@/reduction/sparse/model';
import { zeros } from '@/reduction/linalg/matrix';
import { lowRankBalancedRealization } from '@/reduction/sparse/balanced';
import { cscTimesVector, cscToDense, type SparseStateSpaceModel } from '@/reduction/sparse/model';
import { SparseLu } from '@/reduction/linalg/sparse';
import { add, frobeniusNorm, multiply, multiplyTransposeA, multiplyTransposeB, transpose, type Matrix } from '@/reduction/linalg/index';
import { plateModel, relDiff, sparseReference, writeModel } from './sparse-support';

/** LeVeque (2007) eq. (3.14): eigenvalues of the 5-point Laplacian on N×N interior points. */
function laplacianEigenvalues(N: number): number[] {
  const h = 1 / (N + 1);
  const out: number[] = [];
  for (let j = 1; j <= N; j++) {
    for (let k = 1; k <= N; k++) {
      out.push((-4 / (h * h)) * (Math.sin((j * Math.PI) / (2 * (N + 1))) ** 2 + Math.sin((k * Math.PI) / (2 * (N + 1))) ** 2));
    }
  }
  return out.sort((a, b) => a - b);
}

function residualRatio(model: SparseStateSpaceModel, Z: Matrix, observability: boolean): number {
  const A = cscToDense(model.A);
  const E = model.E ? cscToDense(model.E) : null;
  const X = multiplyTransposeB(Z, Z);
  const rhs = observability ? multiplyTransposeA(model.C, model.C) : multiplyTransposeB(model.B, model.B);
  // controllability: A X Eᵀ + E X Aᵀ + BBᵀ; observability: Aᵀ X E + Eᵀ X A + CᵀC
  const left = observability ? transpose(A) : A;
  const right = E ? (observability ? E : transpose(E)) : null;
  const term = right ? multiply(multiply(left, X), right) : multiply(left, X);
  return frobeniusNorm(add(add(term, transpose(term)), rhs)) / frobeniusNorm(rhs);
}

describe('Ritz values and shifts on the 2-D Dirichlet Laplacian', () => {
  const N = 40;
  const model = plateModel(N);
  const exact = laplacianEigenvalues(N); // LeVeque 2007

  it('Arnoldi through solves finds the slowest and fastest eigenvalues of the closed form', () => {
    const lu = SparseLu.analyze(model.A, 'A');
    lu.factor();
    const start = new Float64Array(N * N).map((_, i) => 1 + Math.sin(i));
    const inv = arnoldiRitzValues((x) => lu.solve(x), start, 20);
    const fwd = arnoldiRitzValues((x) => cscTimesVector(model.A, x), start, 30);
    lu.dispose();
    const slowest = Math.max(...Array.from(inv.re, (mu) => 1 / mu));
    const fastest = Math.min(...Array.from(fwd.re));
    expect(relDiff(slowest, exact[exact.length - 1])).toBeLessThan(1e-10);
    // Symmetric A: Ritz values lie inside the spectrum (Cauchy interlacing); 30 plain Arnoldi steps get the
    // clustered top end to a few per cent, enough for shifts.
    expect(fastest).toBeGreaterThanOrEqual(exact[0] * (1 + 1e-12));
    expect(relDiff(fastest, exact[0])).toBeLessThan(2e-2);
    for (const im of [...inv.im, ...fwd.im]) expect(Math.abs(im)).toBeLessThan(1e-6 * Math.abs(exact[0]));
  });

  it("Penzl's shifts are real and lie inside the closed-form spectrum", () => {
    const { shifts } = heuristicShifts(model);
    expect(shifts.length).toBeGreaterThan(4);
    for (const p of shifts) {
      expect(p.im).toBe(0);
      expect(p.re).toBeGreaterThanOrEqual(exact[0] * (1 + 1e-3));
      expect(p.re).toBeLessThanOrEqual(exact[exact.length - 1] * (1 - 1e-9));
    }
  });
});

describe('low-rank ADI', () => {
  it('reports the exact normalised residual, below the tolerance (Laplacian, real shifts, n = 400)', () => {
    const model = plateModel(20, { inputs: 2, outputs: 2 });
    const g = lowRankGramians(model);
    for (const side of ['controllability', 'observability'] as const) {
      const f = g[side]!;
      expect(f.converged).toBe(true);
      expect(f.residual).toBeLessThanOrEqual(1e-10);
      expect(f.residualHistory.length).toBeGreaterThan(3);
      expect(f.Z.cols).toBe(2 * f.iterations);
      // The residual is W Wᵀ, so ‖R‖_F/‖BBᵀ‖_F lies between the 2-norm ratio/rank and the ratio·rank.
      const r = residualRatio(model, f.Z, side === 'observability');
      expect(r).toBeLessThan(2 * f.residual * 4);
      expect(r).toBeGreaterThan(f.residual / 8);
    }
    expect(g.factorizations).toBeLessThanOrEqual(g.shifts.length);
  });

  it('handles complex shift pairs in real arithmetic and a mass matrix E (convection–diffusion, n = 400)', () => {
    const model = plateModel(20, { convection: 300, descriptor: true });
    const g = lowRankGramians(model);
    expect(g.shifts.some((p) => p.im > 0)).toBe(true);
    for (const side of ['controllability', 'observability'] as const) {
      const f = g[side]!;
      expect(f.converged).toBe(true);
      const r = residualRatio(model, f.Z, side === 'observability');
      expect(r).toBeLessThan(4 * f.residual);
      expect(r).toBeGreaterThan(f.residual / 4);
      // the factor is real
      expect(f.Z.data.every(Number.isFinite)).toBe(true);
    }
  });

  it('refuses a singular E and a singular A with a ModelError naming the matrix', () => {
    const model = plateModel(6, { descriptor: true });
    const eValues = model.E!.values.slice();
    for (let j = 0; j < 36; j++) for (let p = model.E!.colPtr[j]; p < model.E!.colPtr[j + 1]; p++) if (j === 5 || model.E!.rowIndex[p] === 5) eValues[p] = 0;
    expect(() => lowRankGramians({ ...model, E: { ...model.E!, values: eValues } })).toThrow(expect.objectContaining({ code: 'singular_mass', field: 'E' }));
    const aValues = model.A.values.slice();
    for (let j = 0; j < 36; j++) for (let p = model.A.colPtr[j]; p < model.A.colPtr[j + 1]; p++) if (j === 7) aValues[p] = 0;
    expect(() => lowRankGramians({ ...model, A: { ...model.A, values: aValues } })).toThrow(expect.objectContaining({ code: 'unstable', field: 'A' }));
  });

  it('with no memory to keep factorizations, refactors on one symbolic analysis and gets the same factor', () => {
    // Penzl's shifts only, used cyclically (projection shifts are used once each and never kept).
    const model = plateModel(20, { convection: 300, descriptor: true, inputs: 2, outputs: 2 });
    const cached = lowRankGramians(model, { projectionShifts: false });
    const shared = lowRankGramians(model, { cacheBudgetBytes: 0, projectionShifts: false });
    expect(cached.factorizations).toBe(cached.shifts.length); // one per distinct shift
    expect(shared.analyses).toBe(1);
    expect(shared.factorizations).toBeGreaterThan(cached.factorizations);
    expect(Array.from(shared.controllability!.Z.data)).toEqual(Array.from(cached.controllability!.Z.data));
  });

  it('stops at maxIterations with converged: false and says so', () => {
    const g = lowRankGramians(plateModel(20), { maxIterations: 3, tolerance: 1e-14 });
    expect(g.controllability!.converged).toBe(false);
    expect(g.controllability!.iterations).toBeLessThanOrEqual(4);
    expect(g.notes.join(' ')).toContain('stopped at 3 steps');
  });
});

describe('Hankel singular values from the low-rank factors', () => {
  it("at 10,000 states agree with scipy's independent low-rank ADI (heat plate)", () => {
    const model = plateModel(100);
    const g = lowRankGramians(model);
    expect(g.controllability!.converged && g.observability!.converged).toBe(true);
    expect(g.controllability!.Z.cols).toBeLessThan(60);
    const ref = sparseReference(writeModel(model), ['lradi'], { order: 4 }).lradi;
    const hsv = lowRankBalancedRealization(model, g).realization.hankelSingularValues;
    for (let i = 0; i < 5; i++) expect(relDiff(hsv[i], ref.hsv[i])).toBeLessThan(1e-6);
  });

  for (const [label, opts] of [
    ['heat plate, n = 400', {}],
    ['convection–diffusion with a mass matrix, n = 400, two inputs and outputs', { convection: 300, descriptor: true, inputs: 2, outputs: 2 }],
  ] as const) {
    it(`match scipy's dense Bartels–Stewart gramians and scipy's own low-rank ADI (${label})`, () => {
      const model = plateModel(20, opts);
      const dir = writeModel(model);
      const ref = sparseReference(dir, ['hsv', 'lradi'], { order: 4 });
      const { realization } = lowRankBalancedRealization(model, lowRankGramians(model));
      const hsv = realization.hankelSingularValues;
      // The leading values to about the ADI residual (1e-10) relative to σ₁; scipy dense is exact.
      for (let i = 0; i < 6; i++) {
        expect(Math.abs(hsv[i] - ref.hsv[i]) / ref.hsv[0]).toBeLessThan(1e-8);
        expect(relDiff(hsv[i], ref.lradi.hsv[i])).toBeLessThan(1e-4);
      }
      expect(relDiff(hsv[0], ref.hsv[0])).toBeLessThan(1e-9);
    });
  }
});

describe('projection shifts (Benner, Kürschner & Saak 2014)', () => {
  const unit = (n: number, ...at: number[]) => {
    const v = new Float64Array(n);
    for (const i of at) v[i] = 1;
    return v;
  };

  it('are the eigenvalues of A on an invariant subspace, mirrored into the left half-plane, one per pair', () => {
    // A = diag(−1, [[−2, 5], [−5, −2]], 3, −7): span{e0, e1, e2} is invariant, with eigenvalues −1 and −2 ± 5i.
    const r = [0, 1, 1, 2, 2, 3, 4], c = [0, 1, 2, 1, 2, 3, 4], v = [-1, -2, 5, -5, -2, 3, -7];
    const model = createSparseModel({ A: cscFromCoo(5, r, c, v), B: zeros(5, 1), C: zeros(1, 5) });
    const got = projectionShifts(model, [unit(5, 0), unit(5, 1, 2), unit(5, 2)]).sort((a, b) => b.re - a.re);
    expect(got).toHaveLength(2);
    expect(got[0].re).toBeCloseTo(-1, 12);
    expect(got[0].im).toBe(0);
    expect(got[1].re).toBeCloseTo(-2, 12);
    expect(got[1].im).toBeCloseTo(5, 12);
    // The unstable eigenvalue 3 on span{e3} comes back as −3; a repeated column adds nothing.
    expect(projectionShifts(model, [unit(5, 3), unit(5, 3)])).toEqual([{ re: -3, im: 0 }]);
  });

  it('take over when Penzl’s shifts stall on a lightly damped structure, and the factor still solves the Lyapunov equation', () => {
    // A fixed–fixed chain of 60 unit masses and springs k = 1000 with Rayleigh damping 0.5·M + 4e-3·K:
    // poles from about −0.26 ± 1.6i to −8 ± 62i, spread along the imaginary axis, where Penzl's few shifts
    // (from Ritz values) do poorly.
    const q = 60;
    const tri = (d: number, o: number) => {
      const r: number[] = [], c: number[] = [], v: number[] = [];
      for (let i = 0; i < q; i++) {
        r.push(i), c.push(i), v.push(d);
        if (i + 1 < q && o !== 0) r.push(i, i + 1), c.push(i + 1, i), v.push(o, o);
      }
      return cscFromCoo(q, r, c, v);
    };
    const force = zeros(q, 1);
    force.data[9] = 1;
    const out = zeros(1, q);
    out.data[9] = 1;
    const model = secondOrderToDescriptor({ mass: tri(1, 0), stiffness: tri(2000, -1000), damping: tri(0.5 + 8, -4), force, displacementOutput: out });
    const options = { maxIterations: 300, tolerance: 1e-10, equations: ['controllability' as const] };
    const penzl = lowRankGramians(model, { ...options, projectionShifts: false });
    const projected = lowRankGramians(model, options);
    expect(projected.notes.join(' ')).toContain('went on with projection shifts');
    expect(penzl.controllability!.converged).toBe(false);
    expect(projected.controllability!.converged).toBe(true);
    expect(projected.controllability!.iterations).toBeLessThan(200);
    // The normalised residual the iteration reports is the true one, formed densely.
    const r = residualRatio(model, projected.controllability!.Z, false);
    expect(r).toBeLessThan(4 * projected.controllability!.residual);
    expect(r).toBeGreaterThan(projected.controllability!.residual / 4);
  });
});
