/**
 * IRKA on the sparse path (reduction/sparse/irka.ts) and `reduce --method irka` on the command line
 * (reduction/cli/irka.ts). Sources beside each check:
 *  - the dense path (reduction/irka.ts, itself checked against numpy/scipy in irka.test.ts) on a model small
 *    enough for both, from the same initial shifts;
 *  - the first-order H2-optimality conditions at the mirror images of the reduced poles, tangential for
 *    p×m models (Gugercin, Antoulas & Beattie, SIAM J. Matrix Anal. Appl. 30(2), 2008, Theorem 3.4 for one
 *    input and output, theorem number as recalled; Van Dooren, Gallivan & Absil, Appl. Math. Lett. 21(12),
 *    2008, for p×m), with a descriptor matrix E, evaluated by NumPy/SciPy (tests/reference/irka_reference.py:
 *    H(s) = C (sE − A)⁻¹ B by scipy.linalg.solve on the dense copies);
 *  - the tangential interpolation at the points the projection used (Gallivan, Vandendorpe & Van Dooren,
 *    SIAM J. Matrix Anal. Appl. 26(2), 2004), by the same script;
 *  - closed forms for the refusals: the free–free 1-D Laplacian tridiag(1, −2, 1) with −1 at both ends has
 *    row sums 0, so it is singular (a pole at 0); the 2-D Dirichlet Laplacian's slowest eigenvalue
 *    −(8/h²)·sin²(π/(2(N+1))) ≈ −2π² (LeVeque, "Finite Difference Methods for Ordinary and Partial
 *    Differential Equations", SIAM 2007), so A + 50·I has a slowest pole near +30.
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { irka, shiftChange } from '@/reduction/irka';
import { sparseIrka } from '@/reduction/sparse/irka';
import { cscFromCoo, cscToDense, createSparseModel, type SparseStateSpaceModel } from '@/reduction/sparse/model';
import { logFrequencyGrid } from '@/reduction/frequency';
import { zeros } from '@/reduction/linalg/matrix';
import { linalgThreads, setLinalgThreads } from '@/reduction/linalg/index';
import { ModelError } from '@/reduction/errors';
import { StoppedError } from '@/reduction/stop';
import { plate, plateModel, writeModel } from './sparse-support';
import { irkaReference, responseGap } from './irka-support';

const ROOT = path.resolve(__dirname, '../../..');

function cli(...args: string[]): { status: number | null; stdout: string; stderr: string } {
  const r = spawnSync(path.join(ROOT, 'node_modules/.bin/tsx'), ['reduction/cli.ts', ...args], { cwd: ROOT, encoding: 'utf8' });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

const denseOf = (m: SparseStateSpaceModel) => ({ A: cscToDense(m.A), B: m.B, C: m.C, D: m.D, ...(m.E ? { E: cscToDense(m.E) } : {}) });
const maxOf = (xs: number[]) => Math.max(...xs);

describe('sparse IRKA against the dense path (convection–diffusion plate, n = 144, two inputs and outputs)', () => {
  const model = plateModel(12, { convection: 30, inputs: 2, outputs: 2 });
  const sparse = sparseIrka(model, { order: 6, tolerance: 1e-10 });
  const dense = irka(denseOf(model), 6, { tolerance: 1e-10, initialShifts: sparse.report.initialShifts });

  it('both converge from the same initial shifts to the same shifts', () => {
    expect(sparse.report.converged).toBe(true);
    expect(dense.report.converged).toBe(true);
    expect(shiftChange(dense.report.interpolationPoints, sparse.report.interpolationPoints)).toBeLessThan(1e-8);
  });

  it('and to the same reduced transfer function', () => {
    expect(responseGap(dense.model, sparse.model, logFrequencyGrid(1, 1e5, 30))).toBeLessThan(1e-8);
  });

  it('one symbolic analysis per kind of shift (real, complex) serves the whole run', () => {
    expect(sparse.analyses).toBeLessThanOrEqual(2);
    // One numeric factorization per shift (a pair counts once) per projection: iterations + 1 projections.
    expect(sparse.factorizations).toBeGreaterThanOrEqual((sparse.report.iterations + 1) * 3);
    expect(sparse.factorizations).toBeLessThanOrEqual((sparse.report.iterations + 1) * 6);
  });
});

describe('sparse IRKA on one core and on two', () => {
  it('gives the same run and reduced model whether the shifts are solved one by one or together on two threads', () => {
    // The same projections, once in sequence (one thread) and once with each kind's shifts solved together
    // by umfpackShiftedSolves on two threads: the shifts and the reduced model must agree to rounding.
    const model = plateModel(15, { convection: 40, descriptor: true, inputs: 2, outputs: 2 });
    const initial = linalgThreads();
    try {
      setLinalgThreads(1);
      const one = sparseIrka(model, { order: 6, tolerance: 1e-10 });
      setLinalgThreads(2);
      const two = sparseIrka(model, { order: 6, tolerance: 1e-10 });
      expect(two.report.iterations).toBe(one.report.iterations);
      expect(two.factorizations).toBe(one.factorizations);
      expect(shiftChange(one.report.interpolationPoints, two.report.interpolationPoints)).toBeLessThan(1e-10);
      expect(responseGap(one.model, two.model, logFrequencyGrid(1, 1e5, 30))).toBeLessThan(1e-10);
    } finally {
      setLinalgThreads(initial);
    }
  });
});

describe('sparse IRKA with a descriptor matrix E (plate with a mass matrix, n = 225)', () => {
  const model = plateModel(15, { descriptor: true, inputs: 2, outputs: 2 });
  const r = sparseIrka(model, { order: 6, tolerance: 1e-10 });
  const [ref] = irkaReference([{ name: 'descriptor', model: denseOf(model), reduced: r.model, conditions: true, points: r.report.interpolationPoints }]);

  it('converges to a stable reduced model, with a spectral range estimate', () => {
    expect(r.report.converged).toBe(true);
    expect(r.report.reducedStable).toBe(true);
    expect(r.model.A.rows).toBe(6);
    expect(r.spectralRange.lo).toBeGreaterThan(0);
    expect(r.spectralRange.hi).toBeGreaterThan(10 * r.spectralRange.lo);
  });

  it('the tangential H2-optimality conditions hold at every reduced pole (numpy/scipy with E)', () => {
    const c = ref.conditions!;
    expect(c).toHaveLength(6);
    expect(maxOf(c.map((x) => Math.max(x.right, x.left, x.hermite)))).toBeLessThan(1e-8);
  });

  it('the reduced model interpolates tangentially at the points it was projected on (numpy/scipy with E)', () => {
    expect(maxOf(ref.pointConditions!.map((x) => Math.max(x.right, x.left, x.hermite)))).toBeLessThan(1e-9);
  });
});

describe('sparse IRKA refusals and hooks', () => {
  it('refuses a singular A (free–free chain: a pole at 0), pointing to the dense path', () => {
    const n = 50;
    const r: number[] = [], c: number[] = [], v: number[] = [];
    for (let i = 0; i < n; i++) {
      r.push(i);
      c.push(i);
      v.push(i === 0 || i === n - 1 ? -1 : -2);
      if (i + 1 < n) {
        r.push(i, i + 1);
        c.push(i + 1, i);
        v.push(1, 1);
      }
    }
    const B = zeros(n, 1), C = zeros(1, n);
    B.data[0] = 1;
    C.data[n - 1] = 1;
    const model = createSparseModel({ A: cscFromCoo(n, r, c, v), B, C });
    expect(() => sparseIrka(model, { order: 4 })).toThrow(/pole at 0.*--path dense/);
  });

  it('refuses a model whose slowest pole is unstable (A + 50·I of the plate)', () => {
    const base = plateModel(10);
    const A = base.A;
    const values = Float64Array.from(A.values);
    for (let j = 0; j < A.n; j++) for (let p = A.colPtr[j]; p < A.colPtr[j + 1]; p++) if (A.rowIndex[p] === j) values[p] += 50;
    const model = createSparseModel({ A: { ...A, values }, B: base.B, C: base.C });
    try {
      sparseIrka(model, { order: 4 });
      expect.unreachable('an unstable model must be refused');
    } catch (e) {
      expect(e).toBeInstanceOf(ModelError);
      expect((e as ModelError).code).toBe('unstable');
      expect((e as ModelError).message).toMatch(/right of the imaginary axis/);
    }
  });

  it('checks the order and the memory budget before factorizing, and stops on the stop flag', () => {
    const model = plateModel(10);
    expect(() => sparseIrka(model, { order: 100 })).toThrow(/not below/);
    expect(() => sparseIrka(model, { order: 0 })).toThrow(ModelError);
    expect(() => sparseIrka(model, { order: 4, memoryBudgetBytes: 1024 })).toThrow(/memory budget/);
    expect(() => sparseIrka(model, { order: 4, signal: { aborted: true } })).toThrow(StoppedError);
    const steps: number[] = [];
    const r = sparseIrka(model, { order: 4, onStep: (s) => steps.push(s.iteration) });
    expect(steps).toEqual(Array.from({ length: r.report.iterations }, (_, k) => k + 1));
  });
});

describe('command line: reduce --method irka', () => {
  const model = plateModel(12, { descriptor: true, inputs: 2, outputs: 1 });
  const dir = writeModel(model);
  const files = ['A.mtx', 'B.mtx', 'C.mtx'].map((f) => path.join(dir, f));
  const withoutE = plateModel(8);
  const denseDir = writeModel(withoutE);
  const denseFiles = ['A.mtx', 'B.mtx', 'C.mtx'].map((f) => path.join(denseDir, f));

  it('sparse path with E: the reduced model, no bound (null with a note), the sampled H∞ error and the irka block', () => {
    const r = cli('reduce', ...files, '--E', path.join(dir, 'E.mtx'), '--method', 'irka', '--order', '4', '--error-points', '20');
    expect(r.status, r.stderr).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.engine.path).toBe('sparse');
    expect(out.method).toBe('irka');
    expect(out.A).toHaveLength(4);
    expect(out.B[0]).toHaveLength(2);
    expect(out.errorBound).toBeNull();
    expect(out.errorBoundNote).toMatch(/no a-priori error bound/);
    expect(out.hInfinityError).toBeGreaterThan(0);
    expect(out.estimated).toEqual(['spectralRange', 'hInfinityError']);
    expect(out.irka.converged).toBe(true);
    expect(out.irka.iterations).toBe(out.irka.shiftChangeHistory.length);
    expect(out.irka.shiftChange).toBeLessThanOrEqual(1e-6);
    expect(out.irka.interpolationPoints).toHaveLength(4);
    expect(out.irka.symbolicAnalyses).toBeLessThanOrEqual(2);
    expect(out.irka.reducedStable).toBe(true);
    // The same reduction through the library gives the same reduced model's response.
    const lib = sparseIrka(model, { order: 4 });
    const cliModel = { A: { rows: 4, cols: 4, data: Float64Array.from(out.A.flat()) }, B: { rows: 4, cols: 2, data: Float64Array.from(out.B.flat()) }, C: { rows: 1, cols: 4, data: Float64Array.from(out.C.flat()) }, D: zeros(1, 2) };
    expect(responseGap(lib.model, cliModel, logFrequencyGrid(1, 1e4, 20))).toBeLessThan(1e-9);
  });

  it('dense path: the same keys as the other methods, measured H∞ and H2 errors, the irka block', () => {
    const r = cli('reduce', ...denseFiles, '--method', 'irka', '--order', '3', '--irka-tolerance', '1e-8');
    expect(r.status, r.stderr).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.engine.path).toBe('dense');
    for (const key of ['method', 'order', 'A', 'B', 'C', 'D', 'errorBound', 'hInfinityError', 'h2Error', 'zeroFrequencyGainError', 'stableOrder', 'unstableStatesKept', 'poles', 'notes', 'irka']) {
      expect(out).toHaveProperty(key);
    }
    expect(out.errorBound).toBeNull();
    expect(out.hInfinityError).toBeGreaterThan(0);
    expect(out.h2Error).toBeGreaterThan(0);
    expect(out.irka.tolerance).toBe(1e-8);
    expect(out.irka.converged).toBe(true);
  });

  it('refuses a tolerance rule (no bound to meet), naming the option', () => {
    const t = cli('reduce', ...denseFiles, '--method', 'irka', '--tolerance', '0.01');
    expect(t.status).toBe(2);
    expect(t.stderr).toMatch(/no a-priori error bound.*field: tolerance/);
  });

  it('refuses a bad --irka-tolerance, naming the option', () => {
    const s = cli('reduce', ...denseFiles, '--method', 'irka', '--order', '3', '--irka-tolerance', '2');
    expect(s.status).toBe(2);
    expect(s.stderr).toMatch(/field: irka-tolerance/);
  });
});
