/**
 * `simulate` on the command line's sparse path (issue 13): routing by --path and --E, the document's keys,
 * the refusals. Expected numbers come from the library call (reduction/sparse/simulate.ts, itself checked
 * against scipy's solve_ivp in sparse-simulate.test.ts) and from the dense path on the same 400-state model.
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { simulateSparse } from '@/reduction/sparse/simulate';
import { stepInput } from '@/reduction/simulate';
import { plateModel, writeModel } from './sparse-support';

const ROOT = path.resolve(__dirname, '../../..');

function cli(args: string[], env: Record<string, string> = {}): { code: number; out: Record<string, any>; err: string } {
  const r = spawnSync(path.join(ROOT, 'node_modules/.bin/tsx'), [path.join(ROOT, 'reduction/cli.ts'), 'simulate', ...args], {
    cwd: ROOT,
    encoding: 'utf8',
    env: { ...process.env, ...env },
  });
  return { code: r.status ?? -1, out: r.status === 0 ? JSON.parse(r.stdout) : {}, err: r.stderr };
}

describe('simulate on the sparse path', () => {
  const model = plateModel(20, { convection: 10, descriptor: true });
  const dir = writeModel(model);
  const files = ['A.mtx', 'B.mtx', 'C.mtx'].map((f) => path.join(dir, f));
  const E = path.join(dir, 'E.mtx');
  const common = ['--input', 'step', '--t-end', '0.3', '--points', '11', '--rel-tol', '1e-6', '--abs-tol', '1e-12'];

  it('--E routes to the sparse path: the library result, engine.path sparse, states and descriptor reported', () => {
    const r = cli([...files, '--E', E, ...common, '--solver', 'stiff']);
    expect(r.code, r.err).toBe(0);
    expect(r.out.engine.path).toBe('sparse');
    expect(r.out.states).toBe(400);
    expect(r.out.descriptor).toBe(true);
    expect(r.out.solver).toBe('stiff');
    const lib = simulateSparse(model, stepInput(model), { tEnd: 0.3, points: 11, relTol: 1e-6, absTol: 1e-12, solver: 'stiff' });
    expect(r.out.stats.steps).toBe(lib.stats.steps);
    expect(r.out.stats.factorizations).toBe(lib.stats.factorizations);
    (r.out.y as number[][]).forEach((row, k) => expect(row[0]).toBe(lib.y.data[k]));
  });

  it('--path sparse and --path dense give the same steps and outputs on a model without E', () => {
    const runs = ['sparse', 'dense'].map((p) => cli([...files, ...common, '--solver', 'stiff', '--path', p]));
    for (const r of runs) expect(r.code, r.err).toBe(0);
    const [sparse, dense] = runs;
    expect(sparse.out.engine.path).toBe('sparse');
    expect(dense.out.engine.path).toBe('dense');
    expect(sparse.out.stats.steps).toBe(dense.out.stats.steps);
    expect(sparse.out.stats.factorizations).toBe(dense.out.stats.factorizations);
    const ys = sparse.out.y as number[][], yd = dense.out.y as number[][];
    const scale = Math.max(...yd.map((row) => Math.abs(row[0])));
    ys.forEach((row, k) => expect(Math.abs(row[0] - yd[k][0])).toBeLessThan(1e-9 * scale));
  });

  it('auto on the sparse path says which solver it took and why', () => {
    const r = cli([...files, '--E', E, ...common]);
    expect(r.code, r.err).toBe(0);
    expect(['stiff', 'explicit']).toContain(r.out.solver);
    expect(r.out.reason).toMatch(/stiffness ratio ≈ .*sparse path/);
  });

  it('refuses --solver exact on the sparse path, a memory budget below the factorization, and --memory-budget on the dense path', () => {
    const exact = cli([...files, '--E', E, ...common, '--solver', 'exact']);
    expect(exact.code).toBe(2);
    expect(exact.err).toMatch(/--solver exact needs dense matrix exponentials.*\(field: solver, code: invalid_option\)/);
    const budget = cli([...files, '--E', E, ...common, '--solver', 'stiff', '--memory-budget', '0.01']);
    expect(budget.code).toBe(2);
    expect(budget.err).toMatch(/needs an estimated [\d.]+ MiB.*over the memory budget of 0\.01 MiB.*code: too_large/);
    const dense = cli([...files, ...common, '--path', 'dense', '--memory-budget', '100']);
    expect(dense.code).toBe(2);
    expect(dense.err).toMatch(/--memory-budget applies to the sparse path only/);
  });
});
