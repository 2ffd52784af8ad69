/**
 * Benchmark case for time responses on the sparse path (issues 13 and 15): the step response of the
 * heat-conduction plate (22,500 states, 112 k nonzeros; `--quick`: 2,500) by our variable-order NDF/BDF
 * solver on UMFPACK factors of E − c·A (`reduction/sparse/simulate.ts`), against scipy.integrate.solve_ivp
 * method 'BDF' with the sparse Jacobian (SuperLU) on the same matrices (tests/reference/
 * sparse_time_bench_reference.py). Both: unit step on both inputs from rest over [0, 0.3], relTol 1e-6,
 * absTol 1e-12, 201 outputs from the solvers' dense output. `check` prints the largest output difference
 * relative to max |y| and both sides' steps, right-hand sides and factorizations.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import type { BenchCase } from './types';
import { readNpy, readNpyMatrix } from './npy';
import { parseSparseMatrixMarket } from '../../reduction/sparse/matrix-market';
import { createSparseModel, type SparseStateSpaceModel } from '../../reduction/sparse/model';
import { simulateSparse } from '../../reduction/sparse/simulate';
import { stepInput, type SimulationResult } from '../../reduction/simulate/index';

const T_END = 0.3;
const POINTS = 201;

function readPlate(dir: string): SparseStateSpaceModel {
  const A = parseSparseMatrixMarket(readFileSync(path.join(dir, 'A.mtx'), 'utf8'), 'A', 'A.mtx');
  return createSparseModel({ A, B: readNpyMatrix(path.join(dir, 'B.npy')), C: readNpyMatrix(path.join(dir, 'C.npy')) });
}

const stiffStepCase: BenchCase<SparseStateSpaceModel, SimulationResult> = {
  id: 'sparse-stiff-step',
  title: 'sparse plate: step response by the NDF/BDF solver (sparse LU of E − c·A), relTol 1e-6, 201 points',
  sizes: [22500],
  quickSizes: [2500],
  maxPortableSize: 0,
  warmupSize: 400,
  reference: (n, dir) => ({
    command: '/usr/bin/python3',
    args: [path.join(__dirname, '..', '..', 'tests', 'reference', 'sparse_time_bench_reference.py'), 'sparse-stiff-step', String(n), dir],
  }),
  prepare: (dir) => readPlate(dir),
  run: (model) => simulateSparse(model, stepInput(model), { tEnd: T_END, points: POINTS, solver: 'stiff', relTol: 1e-6, absTol: 1e-12 }),
  check(dir, _model, r) {
    const ref = readNpy(path.join(dir, 'ref_y.npy')).data;
    let diff = 0, scale = 0;
    for (let k = 0; k < ref.length; k++) {
      diff = Math.max(diff, Math.abs(r.y.data[k] - ref[k]));
      scale = Math.max(scale, Math.abs(ref[k]));
    }
    const s = JSON.parse(readFileSync(path.join(dir, 'ref_stats.json'), 'utf8')) as { steps: number; nfev: number; nlu: number };
    const o = r.stats;
    return (
      `max |Δy|/max|y| ${(diff / scale).toExponential(1)}; ours: ${o.steps} steps (${(o.steps / s.steps).toFixed(2)}× BDF's), ` +
      `${o.rejectedSteps} rejected, ${o.rhsEvaluations} rhs, ${o.factorizations} LU; scipy: ${s.steps} steps, ${s.nfev} rhs, ${s.nlu} LU`
    );
  },
};

export const cases: BenchCase[] = [stiffStepCase] as BenchCase[];
