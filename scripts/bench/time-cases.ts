/**
 * Benchmark cases for time responses (issue 4), in the registry of `npm run bench` (protocol:
 * scripts/bench/types.ts). The reference side is `tests/reference/time_reference.py bench CASE N DIR`
 * (Debian python3-scipy): it generates the seeded stiff model (decay rates 0.5…500 rad/s, stiffness ratio
 * 1000; see `bench_model` there), times scipy and saves its outputs, which `check` compares with ours.
 *
 *   exact-step      exact step response at 2000 points: our ZOH recursion (expm, Al-Mohy & Higham 2009 /
 *                   Higham 2005; Van Loan 1978) vs scipy.linalg.expm of the augmented matrix plus the
 *                   recursion in numpy. Requirement (issue 4): within 5× of the reference at n = 1000.
 *   explicit-stiff  Dormand–Prince 5(4) vs solve_ivp(method='RK45'), relTol 1e-6, absTol 1e-9, 201 points
 *   stiff-stiff     the stiff solver (variable-order NDF/BDF 1–5, reduction/simulate/bdf.ts) vs
 *                   solve_ivp(method='BDF', jac=A), same tolerances
 *   stiff-steps     the stiff solver at relTol 1e-3 … 1e-8 (absTol = relTol·1e-3), all six runs timed together,
 *                   against solve_ivp BDF over the same tolerances; the check prints our accepted steps
 *                   beside scipy's BDF and Radau (jac=A) at each tolerance (issue 15: ours ≤ 1.3× BDF's)
 *
 * `check` reports the largest output difference relative to max |y| and both sides' cost counters.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import type { BenchCase } from './types';
import { readNpy, readNpyMatrix } from './npy';
import { zeros } from '../../reduction/linalg/matrix';
import type { StateSpaceModel } from '../../reduction/model';
import { simulate, stepInput, type SimulationResult, type SolverName } from '../../reduction/simulate/index';

const PYTHON = '/usr/bin/python3';
const REFERENCE = path.resolve(__dirname, '../../tests/reference/time_reference.py');

interface TimeInput {
  model: StateSpaceModel;
  times: number[];
}

function readInput(dir: string): TimeInput {
  const A = readNpyMatrix(path.join(dir, 'A.npy'));
  const B = readNpyMatrix(path.join(dir, 'B.npy'));
  const C = readNpyMatrix(path.join(dir, 'C.npy'));
  const times = Array.from(readNpy(path.join(dir, 't.npy')).data);
  return { model: { A, B, C, D: zeros(C.rows, B.cols) }, times };
}

function agreement(dir: string, r: SimulationResult): string {
  const ref = readNpy(path.join(dir, 'ref_y.npy')).data;
  let diff = 0;
  let scale = 0;
  for (let k = 0; k < ref.length; k++) {
    diff = Math.max(diff, Math.abs(r.y.data[k] - ref[k]));
    scale = Math.max(scale, Math.abs(ref[k]));
  }
  const refStats = JSON.parse(readFileSync(path.join(dir, 'ref_stats.json'), 'utf8')) as Record<string, number>;
  const s = r.stats;
  const ours = `ours: ${s.steps} steps, ${s.rejectedSteps} rejected, ${s.rhsEvaluations} rhs, ${s.factorizations} LU`;
  const theirs = refStats.rhsEvaluations !== undefined ? `; scipy: ${refStats.rhsEvaluations} rhs, ${refStats.factorizations} LU` : '';
  return `max |Δy|/max|y| ${(diff / scale).toExponential(1)}; ${ours}${theirs}`;
}

const STEP_REL_TOLS = [1e-3, 1e-4, 1e-5, 1e-6, 1e-7, 1e-8];

/** Our steps beside scipy's BDF and Radau at each tolerance, from ref_stats.json of the reference run. */
function stepCounts(dir: string, results: SimulationResult[]): string {
  const ref = JSON.parse(readFileSync(path.join(dir, 'ref_stats.json'), 'utf8')) as { BDF: number[]; Radau: number[] };
  const worst = Math.max(...results.map((r, k) => r.stats.steps / ref.BDF[k]));
  const rows = STEP_REL_TOLS.map((relTol, k) => `${relTol.toExponential(0)}: ${results[k].stats.steps}/${ref.BDF[k]}/${ref.Radau[k]}`);
  return `steps ours/BDF/Radau ${rows.join(', ')}; worst ours÷BDF ${worst.toFixed(2)}`;
}

function timeCase(
  id: 'exact-step' | 'explicit-stiff' | 'stiff-stiff',
  solver: SolverName,
  title: string,
  tolerances: { relTol?: number; absTol?: number },
): BenchCase<TimeInput, SimulationResult> {
  return {
    id,
    title,
    sizes: [1000],
    quickSizes: [300],
    warmupSize: 60,
    // The solvers' own kernels (matrix–vector products, triangular solves) are shared by both backends.
    maxPortableSize: 0,
    reference: (n, dir) => ({ command: PYTHON, args: [REFERENCE, 'bench', id, String(n), dir] }),
    prepare: (dir) => readInput(dir),
    run: ({ model, times }) =>
      simulate(model, stepInput(model), { tEnd: times[times.length - 1], times, solver, ...tolerances }),
    check: (dir, _input, r) => agreement(dir, r),
  };
}

export const cases: BenchCase[] = [
  timeCase('exact-step', 'exact', 'exact step response, 2000 points (required ≤ 5× at n = 1000)', {}),
  timeCase('explicit-stiff', 'explicit', 'Dormand–Prince 5(4) on a stiff model vs solve_ivp RK45', { relTol: 1e-6, absTol: 1e-9 }),
  timeCase('stiff-stiff', 'stiff', 'variable-order stiff solver on a stiff model vs solve_ivp BDF', { relTol: 1e-6, absTol: 1e-9 }),
  {
    id: 'stiff-steps',
    title: 'stiff solver at relTol 1e-3…1e-8 vs solve_ivp BDF; steps beside BDF and Radau',
    sizes: [1000],
    quickSizes: [100],
    warmupSize: 30,
    maxPortableSize: 0,
    reference: (n, dir) => ({ command: PYTHON, args: [REFERENCE, 'bench', 'stiff-steps', String(n), dir] }),
    prepare: (dir) => readInput(dir),
    run: ({ model, times }) =>
      STEP_REL_TOLS.map((relTol) =>
        simulate(model, stepInput(model), { tEnd: times[times.length - 1], times, solver: 'stiff', relTol, absTol: relTol * 1e-3 }),
      ),
    check: (dir, _input, results) => stepCounts(dir, results),
  } satisfies BenchCase<TimeInput, SimulationResult[]>,
] as BenchCase[];
