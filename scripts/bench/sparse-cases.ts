/**
 * Benchmark cases for the sparse path (issue "Large sparse models"): a heat-conduction plate of 22,500
 * and 90,000 states (`--large`: 250,000), balanced truncation to order 20 end to end and a 60-frequency
 * full-model sweep, each against scipy.sparse on the same matrices (tests/reference/sparse_bench_reference.py:
 * SuperLU, ARPACK, the reference low-rank ADI of tests/reference/sparse_reference.py).
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import type { BenchCase } from './types';
import { readNpy, readNpyMatrix } from './npy';
import { parseSparseMatrixMarket } from '../../reduction/sparse/matrix-market';
import { createSparseModel, type SparseStateSpaceModel } from '../../reduction/sparse/model';
import { sparseBalancedReduction, type SparseBalancedResult } from '../../reduction/sparse/balanced';
import { sparseFrequencyResponse, type SparseFrequencyResponse } from '../../reduction/sparse/frequency';

function reference(id: string) {
  return (n: number, dir: string) => ({
    command: '/usr/bin/python3',
    args: [path.join(__dirname, '..', '..', 'tests', 'reference', 'sparse_bench_reference.py'), id, String(n), dir],
  });
}

function readPlate(dir: string): SparseStateSpaceModel {
  const A = parseSparseMatrixMarket(readFileSync(path.join(dir, 'A.mtx'), 'utf8'), 'A', 'A.mtx');
  return createSparseModel({ A, B: readNpyMatrix(path.join(dir, 'B.npy')), C: readNpyMatrix(path.join(dir, 'C.npy')) });
}

const balancedCase: BenchCase<SparseStateSpaceModel, SparseBalancedResult> = {
  id: 'sparse-balanced',
  title: 'sparse plate: low-rank ADI gramians + square-root balanced truncation to order 20',
  sizes: [22500, 90000],
  largeSizes: [250000],
  quickSizes: [2500],
  maxPortableSize: 0,
  warmupSize: 400,
  reference: reference('sparse-balanced'),
  prepare: (dir) => readPlate(dir),
  run: (model) => sparseBalancedReduction(model, { method: 'balanced', order: 20 }),
  check(dir, _m, r) {
    const ref = readNpy(path.join(dir, 'ref_hsv.npy')).data;
    let worst = 0;
    let count = 0;
    for (let i = 0; i < Math.min(ref.length, r.hankelSingularValues.length) && ref[i] > 1e-6 * ref[0]; i++, count++) {
      worst = Math.max(worst, Math.abs(r.hankelSingularValues[i] - ref[i]) / ref[i]);
    }
    const steps = [r.gramians.controllability?.iterations, r.gramians.observability?.iterations].join('+');
    return `HSV σ>1e-6σ₁ (${count}): max rel diff ${worst.toExponential(1)}; ADI steps ${steps}; bound ${r.errorBound.toExponential(2)}`;
  },
};

const sweepCase: BenchCase<{ model: SparseStateSpaceModel; w: Float64Array }, SparseFrequencyResponse> = {
  id: 'sparse-sweep',
  title: 'sparse plate: full-model response at 60 frequencies by sparse LU solves',
  sizes: [22500],
  quickSizes: [2500],
  maxPortableSize: 0,
  warmupSize: 400,
  reference: reference('sparse-sweep'),
  prepare: (dir) => ({ model: readPlate(dir), w: readNpy(path.join(dir, 'w.npy')).data }),
  run: ({ model, w }) => sparseFrequencyResponse(model, w),
  check(dir, _input, resp) {
    const { data } = readNpy(path.join(dir, 'ref_sweep.npy'));
    let worst = 0, scale = 0;
    resp.response.forEach((g, k) => {
      const rr = data[2 * k], ri = data[2 * k + 1];
      scale = Math.max(scale, Math.hypot(rr, ri));
      worst = Math.max(worst, Math.hypot(g.re.data[0] - rr, g.im.data[0] - ri));
    });
    return `max |ΔG|/max|G| ${(worst / scale).toExponential(1)} (${resp.response.length} ω)`;
  },
};

export const cases: BenchCase[] = [balancedCase, sweepCase] as BenchCase[];
