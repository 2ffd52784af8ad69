/**
 * Benchmark cases for second-order models (issue "Large sparse models"): a plane lattice frame of 10,000
 * nodes given as M, D, K (20,000 degrees of freedom, 40,000 first-order states; built by
 * tests/reference/frame_bench_reference.py), reduced to order 20 by low-rank balanced truncation and by
 * IRKA on its descriptor form E = diag(I, M), A = [[0, I], [−K, −D]] (reduction/sparse/second-order.ts).
 * The reference times scipy's full-model sweep at 40 frequencies, which the checks need for the reduced
 * models' measured error: the times are recorded side by side, not compared (the ratio is left out).
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import type { BenchCase } from './types';
import { readNpy, readNpyMatrix } from './npy';
import { parseSparseMatrixMarket } from '../../reduction/sparse/matrix-market';
import { secondOrderToDescriptor } from '../../reduction/sparse/second-order';
import type { SparseStateSpaceModel } from '../../reduction/sparse/model';
import { sparseBalancedReduction } from '../../reduction/sparse/balanced';
import { sparseIrka } from '../../reduction/sparse/irka';
import { frequencyResponse, largestSingularValue, type ComplexMatrix } from '../../reduction/frequency';
import type { StateSpaceModel } from '../../reduction/model';
import { zeros } from '../../reduction/linalg/index';

function reference(id: string) {
  return (n: number, dir: string) => ({
    command: '/usr/bin/python3',
    args: [path.join(__dirname, '..', '..', 'tests', 'reference', 'frame_bench_reference.py'), id, String(n), dir],
  });
}

function readFrame(dir: string): SparseStateSpaceModel {
  const sparse = (name: string) => parseSparseMatrixMarket(readFileSync(path.join(dir, `${name}.mtx`), 'utf8'), name, `${name}.mtx`);
  return secondOrderToDescriptor({
    mass: sparse('M'),
    stiffness: sparse('K'),
    damping: sparse('D'),
    force: readNpyMatrix(path.join(dir, 'F.npy')),
    displacementOutput: readNpyMatrix(path.join(dir, 'C.npy')),
  });
}

/** max over the reference's 40 frequencies of σmax(G − Gr), and of σmax(G), from scipy's full-model sweep. */
function measuredError(dir: string, reduced: StateSpaceModel): { error: number; peak: number } {
  const w = readNpy(path.join(dir, 'w.npy')).data;
  const { data } = readNpy(path.join(dir, 'ref_sweep.npy')); // [40][2][2][re, im]
  const gr = frequencyResponse(reduced, w).response;
  let error = 0, peak = 0;
  for (let k = 0; k < w.length; k++) {
    const full: ComplexMatrix = { re: zeros(2, 2), im: zeros(2, 2) };
    const diff: ComplexMatrix = { re: zeros(2, 2), im: zeros(2, 2) };
    for (let e = 0; e < 4; e++) {
      full.re.data[e] = data[(k * 4 + e) * 2];
      full.im.data[e] = data[(k * 4 + e) * 2 + 1];
      diff.re.data[e] = full.re.data[e] - gr[k].re.data[e];
      diff.im.data[e] = full.im.data[e] - gr[k].im.data[e];
    }
    error = Math.max(error, largestSingularValue(diff));
    peak = Math.max(peak, largestSingularValue(full));
  }
  return { error, peak };
}

const balancedCase: BenchCase<SparseStateSpaceModel, ReturnType<typeof sparseBalancedReduction>> = {
  id: 'frame-balanced',
  title: 'second-order frame (M, D, K): low-rank ADI gramians + square-root balanced truncation to order 20 (reference: scipy full-model sweep, not like for like)',
  sizes: [40000],
  quickSizes: [1600],
  maxPortableSize: 0,
  warmupSize: 400,
  likeForLike: false,
  reference: reference('frame-balanced'),
  prepare: (dir) => readFrame(dir),
  run: (model) => sparseBalancedReduction(model, { method: 'balanced', order: 20, adi: { maxIterations: 1000 } }),
  check(dir, _m, r) {
    const { error, peak } = measuredError(dir, r.model);
    const steps = [r.gramians.controllability?.iterations, r.gramians.observability?.iterations].join('+');
    return `error ${(error / peak).toExponential(1)}·max σ(G) at 40 ω, bound ${(r.errorBound / peak).toExponential(1)}·; ADI steps ${steps}, ${r.gramians.factorizations} factorizations`;
  },
};

const irkaCase: BenchCase<SparseStateSpaceModel, ReturnType<typeof sparseIrka>> = {
  id: 'frame-irka',
  title: 'second-order frame (M, D, K): IRKA to order 20 (reference: scipy full-model sweep, not like for like)',
  sizes: [40000],
  quickSizes: [1600],
  maxPortableSize: 0,
  warmupSize: 400,
  likeForLike: false,
  reference: reference('frame-irka'),
  prepare: (dir) => readFrame(dir),
  run: (model) => sparseIrka(model, { order: 20 }),
  check(dir, _m, r) {
    const { error, peak } = measuredError(dir, r.model);
    return `error ${(error / peak).toExponential(1)}·max σ(G) at 40 ω; ${r.report.iterations} iterations${r.report.converged ? '' : ' (not converged)'}, ${r.factorizations} factorizations`;
  },
};

export const cases: BenchCase[] = [balancedCase, irkaCase] as BenchCase[];
