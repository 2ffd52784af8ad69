/**
 * Time responses on the sparse path (reduction/sparse/simulate.ts; issues 13 and 15): the variable-order
 * NDF/BDF solver on sparse LU factors of E − c·A and Dormand–Prince on sparse products, checked against
 *  - scipy.integrate.solve_ivp from Debian's python3-scipy (tests/reference/sparse_time_reference.py):
 *    method 'BDF' with the sparse Jacobian A (SuperLU Newton matrices), or E⁻¹A for the descriptor model, and
 *    method 'RK45' (the same Dormand–Prince pair): accepted steps (ours ≤ 1.3× BDF's; within 5 % of RK45's)
 *    and outputs at the grid points;
 *  - the dense path's solvers on the same model (reduction/simulate/bdf.ts, dormand-prince.ts): the same
 *    steps, orders and factorizations where the arithmetic is the same (E = I), the same counts within a few
 *    per cent in descriptor form (the dense run on E⁻¹A, E⁻¹B formed for this small model);
 *  - the exact zero-order-hold response (the dense exact solver, itself checked against scipy.linalg.expm in
 *    simulate.test.ts) for a step, an impulse (x(0⁺) = E⁻¹B w) and a sampled input with jumps.
 * Models: the 2-D heat plate of sparse-support.ts (5-point Laplacian, LeVeque 2007 §3.2; with convection
 * 10·∂/∂y) and the same plate with the consistent 1-D mass matrix tridiag(1/6, 2/3, 1/6) as E (invented data).
 */
import { describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { simulateSparse, sparseSimulationCostReport } from '@/reduction/sparse/simulate';
import { sparseBalancedReduction } from '@/reduction/sparse/balanced';
import { cscFromCoo, cscToDense, createSparseModel, type SparseStateSpaceModel } from '@/reduction/sparse/model';
import { simulate, stepInput, impulseInput, parseSampledInput, type SimulationResult, type TimeStepReport } from '@/reduction/simulate';
import { simulateBdf } from '@/reduction/simulate/bdf';
import { checkOptions } from '@/reduction/simulate/output-grid';
import { solve } from '@/reduction/linalg';
import type { StateSpaceModel } from '@/reduction/model';
import { ModelError } from '@/reduction/errors';
import { StoppedError } from '@/reduction/stop';
import { plateModel, writeModel } from './sparse-support';

interface ScipyRun {
  method: 'BDF' | 'RK45';
  rel_tol: number;
  abs_tol: number;
  status: number;
  steps: number;
  nlu: number;
  y: number[][];
}

const SCRIPT = path.resolve(__dirname, '../../reference/sparse_time_reference.py');

/** Runs tests/reference/sparse_time_reference.py: a step response from rest under the constant input u. */
function scipyRuns(model: SparseStateSpaceModel, u: number[], tEnd: number, times: number[], runs: { method: 'BDF' | 'RK45'; rel_tol: number; abs_tol: number }[]): ScipyRun[] {
  const dir = writeModel(model);
  const req = path.join(dir, 'time-request.json'), res = path.join(dir, 'time-response.json');
  writeFileSync(req, JSON.stringify({ dir, u, t_end: tEnd, times, runs }));
  execFileSync('/usr/bin/python3', [SCRIPT, req, res], { stdio: ['ignore', 'ignore', 'inherit'], env: { ...process.env, OMP_NUM_THREADS: '1', OPENBLAS_NUM_THREADS: '1' } });
  return JSON.parse(readFileSync(res, 'utf8')).runs;
}

const grid = (tEnd: number, points: number) => Array.from({ length: points }, (_, k) => (tEnd * k) / (points - 1));

/** max |y − ref| over all points and outputs, relative to max |ref|. */
function relGap(y: Float64Array, ref: ArrayLike<number>): number {
  let d = 0, s = 0;
  for (let k = 0; k < ref.length; k++) {
    d = Math.max(d, Math.abs(y[k] - ref[k]));
    s = Math.max(s, Math.abs(ref[k]));
  }
  return d / s;
}

/** The dense model of a small sparse one; in descriptor form (E⁻¹A, E⁻¹B, C, D), formed densely (test sizes only). */
function denseOf(m: SparseStateSpaceModel): StateSpaceModel {
  const A = cscToDense(m.A);
  if (!m.E) return { A, B: m.B, C: m.C, D: m.D };
  const E = cscToDense(m.E);
  return { A: solve(E, A), B: solve(E, m.B), C: m.C, D: m.D };
}

// Tolerances: absolute tolerance relTol·1e-6, since the plate's states are of order 1e-5 (B = 1/n on a quarter).
const ABS = 1e-6;

/**
 * The step response of the plate without convection in closed form: the 2-D Dirichlet Laplacian's
 * eigenvalues λ_pq = −(4/h²)(sin²(pπ/(2(N+1))) + sin²(qπ/(2(N+1)))) with the orthonormal eigenvectors
 * φ_pq(i, j) = (2/(N+1)) sin(ipπ/(N+1)) sin(jqπ/(N+1)) (LeVeque, "Finite Difference Methods for Ordinary and
 * Partial Differential Equations", SIAM 2007, §3.2, from memory), so y(t) = Σ (Cφ)(φᵀB)(e^{λt} − 1)/λ.
 */
function plateStepClosedForm(model: SparseStateSpaceModel, N: number, times: readonly number[]): Float64Array {
  const h = 1 / (N + 1);
  const S = Array.from({ length: N }, (_, p) => Array.from({ length: N }, (_, i) => Math.sin(((i + 1) * (p + 1) * Math.PI) / (N + 1))));
  // φ_pqᵀ v for v reshaped N×N (state i·N + j): (2/(N+1)) · (S V Sᵀ)[p][q].
  const project = (v: (k: number) => number) => {
    const out = new Float64Array(N * N);
    for (let p = 0; p < N; p++) {
      const row = new Float64Array(N); // (S V)[p][j]
      for (let i = 0; i < N; i++) for (let j = 0; j < N; j++) row[j] += S[p][i] * v(i * N + j);
      for (let q = 0; q < N; q++) {
        let s = 0;
        for (let j = 0; j < N; j++) s += row[j] * S[q][j];
        out[p * N + q] = (2 / (N + 1)) * s;
      }
    }
    return out;
  };
  const b = project((k) => model.B.data[k]);
  const c = project((k) => model.C.data[k]);
  const y = new Float64Array(times.length);
  for (let p = 0; p < N; p++) {
    for (let q = 0; q < N; q++) {
      const lam = -(4 / (h * h)) * (Math.sin(((p + 1) * Math.PI) / (2 * (N + 1))) ** 2 + Math.sin(((q + 1) * Math.PI) / (2 * (N + 1))) ** 2);
      const w = c[p * N + q] * b[p * N + q];
      times.forEach((t, k) => (y[k] += (w * Math.expm1(lam * t)) / lam));
    }
  }
  return y;
}

describe('against scipy solve_ivp (Debian python3-scipy): a stiff 2500-state plate', () => {
  // N = 50: fastest pole ≈ −8·51² ≈ −2.1e4, slowest ≈ −2π² ≈ −20: stiffness ratio ≈ 1e3.
  const model = plateModel(50);
  const tEnd = 0.3, times = grid(tEnd, 31);
  const relTols = [1e-3, 1e-5, 1e-7];
  const ref = scipyRuns(model, [1], tEnd, times, [
    ...relTols.map((r) => ({ method: 'BDF' as const, rel_tol: r, abs_tol: r * ABS })),
    { method: 'RK45', rel_tol: 1e-6, abs_tol: 1e-6 * ABS },
  ]);
  const exact = { y: { data: plateStepClosedForm(model, 50, times) } };

  it('the closed form agrees with scipy BDF at its tightest tolerance (a check of the reference itself)', () => {
    expect(relGap(exact.y.data, ref[2].y.flat())).toBeLessThan(5e-7);
  });

  relTols.forEach((relTol, k) => {
    it(`stiff at relTol ${relTol}: accepted steps ≤ 1.3 × scipy BDF's (sparse jac), outputs within a few relTol of BDF's and of the exact response`, () => {
      const r = simulateSparse(model, stepInput(model), { tEnd, times, solver: 'stiff', relTol, absTol: relTol * ABS });
      expect(ref[k].status).toBe(0);
      // Measured: 41/44, 91/99, 177/188.
      expect(r.stats.steps / ref[k].steps).toBeLessThanOrEqual(1.3);
      expect(relGap(r.y.data, ref[k].y.flat())).toBeLessThan(5 * relTol);
      expect(relGap(r.y.data, exact.y.data)).toBeLessThan(5 * relTol);
      expect(r.stats.factorizations).toBeGreaterThan(0);
      expect(r.stats.factorizations).toBeLessThan(r.stats.steps);
      expect(r.stats.pointsStored).toBe(times.length);
    });
  });

  it('explicit at relTol 1e-6: steps within 5 % of RK45 (the same Dormand–Prince pair), outputs agree; the step count is set by stability', () => {
    const r = simulateSparse(model, stepInput(model), { tEnd, times, solver: 'explicit', relTol: 1e-6, absTol: 1e-6 * ABS });
    const rk = ref[relTols.length];
    expect(rk.status).toBe(0);
    expect(Math.abs(r.stats.steps - rk.steps) / rk.steps).toBeLessThan(0.05);
    expect(relGap(r.y.data, rk.y.flat())).toBeLessThan(1e-6);
    expect(relGap(r.y.data, exact.y.data)).toBeLessThan(1e-6);
    // |λ_max| ≈ 8/h² = 8·51²; stability alone needs |λ_max|·tEnd/3.3 steps (Hairer & Wanner 1996, §IV.2).
    expect(r.stats.steps).toBeGreaterThan(0.9 * ((8 * 51 * 51 * tEnd) / 3.3));
    expect(r.stats.factorizations).toBe(0);
  });
});

describe('against scipy solve_ivp: a 400-state plate in descriptor form (E a consistent mass matrix)', () => {
  const model = plateModel(20, { descriptor: true });
  const tEnd = 0.3, times = grid(tEnd, 31);
  const relTols = [1e-3, 1e-5, 1e-7];
  const ref = scipyRuns(model, [1], tEnd, times, [
    ...relTols.map((r) => ({ method: 'BDF' as const, rel_tol: r, abs_tol: r * ABS })),
    { method: 'RK45', rel_tol: 1e-6, abs_tol: 1e-6 * ABS },
  ]);
  const exact = simulate(denseOf(model), stepInput(model), { tEnd, times, solver: 'exact' });

  relTols.forEach((relTol, k) => {
    it(`stiff at relTol ${relTol}: (E − c·A) d = c f − Eψ takes ≤ 1.3 × the steps of scipy BDF on E⁻¹(Ax + Bu), same outputs`, () => {
      const r = simulateSparse(model, stepInput(model), { tEnd, times, solver: 'stiff', relTol, absTol: relTol * ABS });
      expect(ref[k].status).toBe(0);
      // Measured: 47/50, 99/107, 188/201.
      expect(r.stats.steps / ref[k].steps).toBeLessThanOrEqual(1.3);
      expect(relGap(r.y.data, ref[k].y.flat())).toBeLessThan(5 * relTol);
      expect(relGap(r.y.data, exact.y.data)).toBeLessThan(5 * relTol);
    });
  });

  it('explicit at relTol 1e-6 with one Cholesky factor of E: steps within 5 % of RK45, outputs agree', () => {
    const r = simulateSparse(model, stepInput(model), { tEnd, times, solver: 'explicit', relTol: 1e-6, absTol: 1e-6 * ABS });
    const rk = ref[relTols.length];
    expect(rk.status).toBe(0);
    expect(Math.abs(r.stats.steps - rk.steps) / rk.steps).toBeLessThan(0.05);
    expect(relGap(r.y.data, rk.y.flat())).toBeLessThan(1e-6);
    expect(relGap(r.y.data, exact.y.data)).toBeLessThan(1e-6);
    expect(r.stats.factorizations).toBe(1);
  });
});

describe('the sparse and dense solvers agree on a model small enough for both', () => {
  const opts = { tEnd: 0.3, points: 41, relTol: 1e-6, absTol: 1e-12 };

  it('E = I (400-state plate with convection): the same steps, orders, rejections, factorizations and outputs', () => {
    const model = plateModel(20, { convection: 10, inputs: 2, outputs: 2 });
    const dense = denseOf(model);
    const sparseSteps: TimeStepReport[] = [], denseSteps: TimeStepReport[] = [];
    const s = simulateSparse(model, stepInput(model), { ...opts, solver: 'stiff' }, { onStep: (r) => sparseSteps.push(r) });
    const d = simulateBdf(dense, stepInput(dense), checkOptions(opts, 400), {}, { onStep: (r) => denseSteps.push(r) });
    expect(s.stats.steps).toBe(d.stats.steps);
    expect(s.stats.rejectedSteps).toBe(d.stats.rejectedSteps);
    expect(s.stats.factorizations).toBe(d.stats.factorizations);
    expect(s.stats.rhsEvaluations).toBe(d.stats.rhsEvaluations);
    expect(sparseSteps.map((r) => r.order)).toEqual(denseSteps.map((r) => r.order));
    sparseSteps.forEach((r, k) => expect(Math.abs(r.h - denseSteps[k].h)).toBeLessThanOrEqual(1e-9 * denseSteps[k].h));
    expect(new Set(sparseSteps.map((r) => r.order)).size).toBeGreaterThanOrEqual(3); // the order did vary
    expect(relGap(s.y.data, d.y.data)).toBeLessThan(1e-9);

    const se = simulateSparse(model, stepInput(model), { ...opts, solver: 'explicit' });
    const de = simulate(dense, stepInput(dense), { ...opts, solver: 'explicit' });
    expect(se.stats.steps).toBe(de.stats.steps);
    expect(se.stats.rejectedSteps).toBe(de.stats.rejectedSteps);
    expect(relGap(se.y.data, de.y.data)).toBeLessThan(1e-9);
  });

  it('descriptor form against the dense run on E⁻¹A, E⁻¹B: steps and factorizations within 5 %, orders mostly the same, outputs within relTol', () => {
    const model = plateModel(20, { descriptor: true });
    const dense = denseOf(model);
    const sparseSteps: TimeStepReport[] = [], denseSteps: TimeStepReport[] = [];
    const s = simulateSparse(model, stepInput(model), { ...opts, solver: 'stiff' }, { onStep: (r) => sparseSteps.push(r) });
    const d = simulateBdf(dense, stepInput(dense), checkOptions(opts, 400), {}, { onStep: (r) => denseSteps.push(r) });
    expect(Math.abs(s.stats.steps - d.stats.steps)).toBeLessThanOrEqual(Math.ceil(0.05 * d.stats.steps));
    // The sparse run makes one more factor: E itself, for ẋ at the start.
    expect(Math.abs(s.stats.factorizations - 1 - d.stats.factorizations)).toBeLessThanOrEqual(Math.ceil(0.05 * d.stats.factorizations));
    const common = Math.min(sparseSteps.length, denseSteps.length);
    let same = 0;
    for (let k = 0; k < common; k++) if (sparseSteps[k].order === denseSteps[k].order) same++;
    expect(same / common).toBeGreaterThan(0.9);
    expect(relGap(s.y.data, d.y.data)).toBeLessThan(opts.relTol);
  });
});

describe('against the exact zero-order-hold response (dense exact solver on E⁻¹A, E⁻¹B)', () => {
  const model = plateModel(16, { descriptor: true, convection: 20, inputs: 2, outputs: 2 });
  const dense = denseOf(model);
  const relTol = 1e-6;
  const opts = { tEnd: 0.25, points: 51, relTol, absTol: relTol * ABS };

  it('an impulse: the state jumps by E⁻¹B w, and both solvers follow the exact response', () => {
    const exact = simulate(dense, impulseInput(dense), { ...opts, solver: 'exact' });
    for (const solver of ['stiff', 'explicit'] as const) {
      const r = simulateSparse(model, impulseInput(model), { ...opts, solver });
      expect(relGap(r.y.data, exact.y.data)).toBeLessThan(10 * relTol);
      // At t = 0 the output is C·E⁻¹B·w exactly (no integration yet).
      for (let j = 0; j < 2; j++) expect(Math.abs(r.y.data[j] - exact.y.data[j])).toBeLessThanOrEqual(1e-12 * Math.abs(exact.y.data[j]));
    }
  });

  it('a sampled input with jumps (a restart at each): both solvers follow the exact response', () => {
    const csv = 't,u1,u2\n0,1,0\n0.03,-0.5,2\n0.11,0,1\n0.19,2,-1\n';
    const input = parseSampledInput(csv, 2);
    const exact = simulate(dense, input, { ...opts, solver: 'exact' });
    for (const solver of ['stiff', 'explicit'] as const) {
      const r = simulateSparse(model, input, { ...opts, solver });
      expect(relGap(r.y.data, exact.y.data)).toBeLessThan(10 * relTol);
    }
  });

  it('a nonzero initial state', () => {
    const x0 = Array.from({ length: 256 }, (_, i) => 1e-5 * Math.sin(i));
    const exact = simulate(dense, stepInput(dense, 2), { ...opts, initialState: x0, solver: 'exact' });
    const r = simulateSparse(model, stepInput(model, 2), { ...opts, initialState: x0, solver: 'stiff' });
    expect(relGap(r.y.data, exact.y.data)).toBeLessThan(10 * relTol);
  });
});

describe('stop flag, progress, memory budget and refusals', () => {
  const model = plateModel(20, { convection: 10 });
  const opts = { tEnd: 0.3, points: 11, relTol: 1e-6, absTol: 1e-12 };

  it('reports progress after every accepted step: time reached rises to tEnd, the count is the steps', () => {
    for (const solver of ['stiff', 'explicit'] as const) {
      const reports: TimeStepReport[] = [];
      const r = simulateSparse(model, stepInput(model), { ...opts, solver }, { onStep: (s) => reports.push(s) });
      expect(reports).toHaveLength(r.stats.steps);
      for (let k = 1; k < reports.length; k++) expect(reports[k].t).toBeGreaterThan(reports[k - 1].t);
      expect(reports[reports.length - 1].t).toBeGreaterThanOrEqual(opts.tEnd * (1 - 1e-12));
      expect(reports.every((s) => s.tEnd === opts.tEnd)).toBe(true);
    }
  });

  it('stops on the flag between steps, with StoppedError and no result', () => {
    for (const solver of ['stiff', 'explicit'] as const) {
      let steps = 0;
      const signal = { get aborted() { return steps >= 5; } };
      expect(() => simulateSparse(model, stepInput(model), { ...opts, solver }, { signal, onStep: () => steps++ })).toThrow(StoppedError);
      expect(steps).toBe(5);
    }
  });

  it('refuses a factorization over the memory budget before making it, naming the estimate and the budget', () => {
    for (const [solver, m] of [['stiff', model], ['explicit', plateModel(20, { descriptor: true })]] as const) {
      let err: unknown;
      try {
        simulateSparse(m, stepInput(m), { ...opts, solver, memoryBudgetBytes: 1024 });
      } catch (e) {
        err = e;
      }
      expect(err).toBeInstanceOf(ModelError);
      expect((err as ModelError).code).toBe('too_large');
      expect((err as ModelError).message).toMatch(/needs an estimated [\d.]+ MiB .*over the memory budget of 0\.000977 MiB/);
    }
  });

  it('keeps fewer factors under a tight budget: the same response, at least as many factorizations', () => {
    const free = simulateSparse(model, stepInput(model), { ...opts, solver: 'stiff' });
    // Room for one factor only (UMFPACK's symbolic estimate of one numeric factorization's peak, plus a little).
    let tight: SimulationResult | null = null;
    for (const mib of [1, 2, 4, 8, 16, 32, 64]) {
      try {
        tight = simulateSparse(model, stepInput(model), { ...opts, solver: 'stiff', memoryBudgetBytes: mib * 2 ** 20 });
        break;
      } catch (e) {
        if (!(e instanceof ModelError && e.code === 'too_large')) throw e;
      }
    }
    expect(tight).not.toBeNull();
    expect(tight!.stats.steps).toBe(free.stats.steps);
    expect(tight!.stats.factorizations).toBeGreaterThanOrEqual(free.stats.factorizations);
    expect(relGap(tight!.y.data, free.y.data)).toBe(0);
  });

  it('refuses the exact solver, a fixed step with the stiff solver, a wrong input and a singular E, naming the field', () => {
    const cases: [() => unknown, string, string][] = [
      [() => simulateSparse(model, stepInput(model), { ...opts, solver: 'exact' as never }), 'solver', 'invalid_option'],
      [() => simulateSparse(model, stepInput(model), { ...opts, solver: 'stiff', fixedStep: 1e-3 }), 'fixedStep', 'invalid_option'],
      [() => simulateSparse(model, stepInput(plateModel(20, { inputs: 2 })), { ...opts, solver: 'stiff' }), 'input', 'dimension_mismatch'],
    ];
    // E with a zero row and column: singular.
    const n = 400;
    const rows: number[] = [], cols: number[] = [], vals: number[] = [];
    for (let i = 1; i < n; i++) {
      rows.push(i);
      cols.push(i);
      vals.push(1);
    }
    const singular = createSparseModel({ ...model, E: cscFromCoo(n, rows, cols, vals) });
    cases.push([() => simulateSparse(singular, stepInput(singular), { ...opts, solver: 'stiff' }), 'E', 'singular_mass']);
    cases.push([() => simulateSparse(singular, stepInput(singular), { ...opts, solver: 'explicit' }), 'E', 'singular_mass']);
    for (const [run, field, code] of cases) {
      let err: unknown;
      try {
        run();
      } catch (e) {
        err = e;
      }
      expect(err, field).toBeInstanceOf(ModelError);
      expect((err as ModelError).field).toBe(field);
      expect((err as ModelError).code).toBe(code);
    }
  });

  it('auto takes the explicit solver on this mildly stiff plate and the stiff one on a stiffer plate, saying why', () => {
    const mild = simulateSparse(model, stepInput(model), { ...opts, solver: 'auto' });
    // N = 20 with convection 10·∂/∂y: |λ_max| ≈ 8·21² ≈ 3.5e3; |λ_min| ≈ 2π² + 10²/4 ≈ 44.7 (the substitution
    // u = e^{−cy/2}v turns u_t = Δu + c·u_y into v_t = Δv − (c²/4)v; from memory): ratio ≈ 78, and
    // 3.5e3·0.3/3.3 ≈ 320 explicit steps.
    expect(mild.solver).toBe('explicit');
    expect(mild.reason).toMatch(/^explicit: not stiff \(stiffness ratio ≈ 7\d(\.\d)? /);
    // N = 60: 8·61² ≈ 3.0e4 over 2π² ≈ 19.7: ratio ≈ 1500, past the stiff threshold 10³ (auto.ts, common practice).
    const stiff = plateModel(60);
    const r = simulateSparse(stiff, stepInput(stiff), { ...opts, points: 3, solver: 'auto' });
    expect(r.solver).toBe('stiff');
    expect(r.reason).toMatch(/^stiff: stiffness ratio ≈ 1[45]\d\d /);
  });
});

describe('the simulation-cost report with a sparse full model and a dense reduced one', () => {
  it('runs both solvers on both models: the reduced model needs fewer explicit steps, and its response stays close', () => {
    const full = plateModel(30, { convection: 10 });
    const reduced = sparseBalancedReduction(full, { method: 'balanced', order: 8 }).model;
    const options = { tEnd: 0.3, points: 31, relTol: 1e-6, absTol: 1e-12 };
    const report = sparseSimulationCostReport(full, reduced, stepInput(full), options);
    expect(report.fullStates).toBe(900);
    expect(report.reducedStates).toBe(8);
    expect(report.rows.map((r) => r.solver)).toEqual(['stiff', 'explicit']);
    const direct = simulateSparse(full, stepInput(full), { ...options, solver: 'explicit' });
    const explicit = report.rows[1];
    expect(explicit.full.steps).toBe(direct.stats.steps);
    // The full model's explicit steps are held by its fastest pole (≈ 8·31²·0.3/3.3 ≈ 790 steps); balanced
    // truncation drops it (measured: 2.8 times fewer steps for the order-8 model).
    expect(explicit.full.steps).toBeGreaterThan(0.9 * ((8 * 31 * 31 * 0.3) / 3.3));
    expect(explicit.ratios.steps!).toBeGreaterThan(2);
    // Balanced truncation to order 8: the error bound 2Σσ is far below the response (sparse-balanced.test.ts).
    expect(report.relativeOutputDifference).toBeLessThan(1e-3);
    expect(report.rows[0].full.factorizations).toBeGreaterThan(0);
  });

  it('refuses a reduced model with other inputs or outputs, and an initial state', () => {
    const full = plateModel(10);
    const reduced = sparseBalancedReduction(plateModel(10, { outputs: 2 }), { method: 'balanced', order: 3 }).model;
    expect(() => sparseSimulationCostReport(full, reduced, stepInput(full), { tEnd: 0.1 })).toThrow(/reduced model has 1 inputs and 2 outputs/);
    const same = sparseBalancedReduction(full, { method: 'balanced', order: 3 }).model;
    expect(() => sparseSimulationCostReport(full, same, stepInput(full), { tEnd: 0.1, initialState: new Array(100).fill(0) })).toThrow(ModelError);
  });
});
