/**
 * The `simulate` verb of the engine's command line (issue 4 contract): JSON, Matrix Market and CSV models;
 * step, impulse and sampled CSV inputs; every solver; errors on stderr with a non-zero exit.
 * Expected numbers come from the library call (itself checked against scipy in simulate.test.ts) and from
 * the closed-form steady state −C A⁻¹ B u of a step.
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { loadModelFiles } from '@/reduction/io';
import { impulseInput, simulate } from '@/reduction/simulate';
import { solve } from '@/reduction/linalg';

const ROOT = path.resolve(__dirname, '../../..');
const TSX = path.join(ROOT, 'node_modules/.bin/tsx');
const TIME = path.join(ROOT, 'tests/fixtures/engine/time');
const IO = path.join(ROOT, 'tests/fixtures/engine/io/good');
const MTX_MODEL = [path.join(TIME, 'thermal3_A.mtx'), path.join(TIME, 'thermal3_B.mtx'), path.join(TIME, 'thermal3_C.csv')];

function cli(args: string[]): { code: number; out: Record<string, unknown>; err: string } {
  const r = spawnSync(TSX, [path.join(ROOT, 'reduction/cli.ts'), 'simulate', ...args], { cwd: ROOT, encoding: 'utf8' });
  let out: Record<string, unknown> = {};
  if (r.status === 0) out = JSON.parse(r.stdout);
  return { code: r.status ?? -1, out, err: r.stderr };
}

describe('simulate verb', () => {
  it('step on a Matrix Market + CSV model with each solver, reaching the steady state −C A⁻¹ B u', () => {
    const model = loadModelFiles(MTX_MODEL);
    const steady = solve(model.A, { rows: 3, cols: 1, data: Float64Array.of(1, 1, 2) }); // B·[1, 1]
    const yInf = -(steady.data[0] + steady.data[1]); // C = [1, 1, 0]
    for (const solver of ['exact', 'explicit', 'stiff']) {
      const r = cli([...MTX_MODEL, '--input', 'step', '--t-end', '12', '--points', '7', '--solver', solver, '--rel-tol', '1e-8', '--abs-tol', '1e-11']);
      expect(r.code).toBe(0);
      expect(r.out.solver).toBe(solver);
      const t = r.out.t as number[];
      const y = r.out.y as number[][];
      expect(t).toEqual([0, 2, 4, 6, 8, 10, 12]);
      expect(y).toHaveLength(7);
      expect(y[0]).toHaveLength(1);
      expect(y[6][0]).toBeCloseTo(yInf, 4); // e^{−12} of the slow mode is left
      const stats = r.out.stats as Record<string, number>;
      expect(Object.keys(stats).sort()).toEqual(['factorizations', 'pointsStored', 'rejectedSteps', 'rhsEvaluations', 'steps', 'wallMs'].sort());
      expect(stats.pointsStored).toBe(7);
      expect(r.out.reason).toBeUndefined();
    }
  });

  it('auto says which solver it picked and why', () => {
    const r = cli([path.join(IO, 'first_order.json'), '--input', 'step', '--t-end', '5']);
    expect(r.code).toBe(0);
    expect(r.out.solver).toBe('exact');
    expect(r.out.reason).toMatch(/^exact: the input is piecewise constant/);
    expect((r.out.t as number[]).length).toBe(201);
  });

  it('impulse on a chosen channel equals the library result', () => {
    const r = cli([...MTX_MODEL, '--input', 'impulse', '--channel', '2', '--t-end', '3', '--points', '4', '--solver', 'exact']);
    expect(r.code).toBe(0);
    const model = loadModelFiles(MTX_MODEL);
    const lib = simulate(model, impulseInput(model, 2), { tEnd: 3, points: 4, solver: 'exact' });
    expect((r.out.y as number[][]).map((row) => row[0])).toEqual(Array.from(lib.y.data));
  });

  it('a sampled CSV input on a second-order JSON model', () => {
    const r = cli([path.join(IO, 'msd_1dof.json'), '--input', path.join(TIME, 'sampled_one_input.csv'), '--t-end', '2', '--times', '0,0.5,1.25,2', '--solver', 'stiff']);
    expect(r.code).toBe(0);
    expect(r.out.t).toEqual([0, 0.5, 1.25, 2]);
    // y = q + 0.5 q̇ starts at rest: y(0) = 0.
    expect((r.out.y as number[][])[0][0]).toBe(0);
  });

  const errors: [string[], RegExp][] = [
    [['--input', path.join(TIME, 'unsorted_decreasing.csv'), '--t-end', '1'], /unsorted_decreasing\.csv: row 3: time 0\.4 is not after/],
    [['--input', path.join(TIME, 'wrong_column_count.csv'), '--t-end', '1'], /row 2 has 2 columns; expected 3/],
    [['--input', path.join(TIME, 'non_numeric_cell.csv'), '--t-end', '1'], /row 2, column 3 \(input 2\) is not a number/],
    [['--input', 'step', '--t-end', '1', '--solver', 'euler'], /--solver must be one of exact, explicit, stiff, auto/],
    [['--input', 'step'], /--t-end is required/],
    [['--input', 'step', '--t-end', '1', '--channel', '3'], /channel must be between 1 and 2/],
    [['--input', 'ramp', '--t-end', '1'], /cannot read the input file ramp/],
  ];
  for (const [args, message] of errors) {
    it(`fails with exit 2 and a named error: ${message.source.slice(0, 50)}`, () => {
      const r = cli([...MTX_MODEL, ...args]);
      expect(r.code).toBe(2);
      expect(r.err).toMatch(message);
    });
  }
});
