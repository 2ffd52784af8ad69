/**
 * Benchmark cases for the dense engine: eigenvalues, balanced truncation end to end, and frequency
 * response, each against numpy/scipy on the same seeded model (see tests/reference/bench_reference.py).
 */
import path from 'node:path';
import type { BenchCase } from './types';
import { readNpy, readNpyMatrix } from './npy';
import {
  type Matrix, type ComplexVector, zeros, eigenvalues, multiply, forgetDecompositions, kernels, lowRankGramianFactors,
} from '../../reduction/linalg/index';
import { schurGramianFactors } from '../../reduction/linalg/lyapunov-schur';
import type { StateSpaceModel } from '../../reduction/model';
import { balancedRealization, type BalancedRealization } from '../../reduction/balanced';
import { frequencyResponse, type FrequencyResponse } from '../../reduction/frequency';
import { analyzeModel, type ModelAnalysis } from '../../reduction/analysis';

function readModel(dir: string): StateSpaceModel {
  const A = readNpyMatrix(path.join(dir, 'A.npy'));
  const B = readNpyMatrix(path.join(dir, 'B.npy'));
  const C = readNpyMatrix(path.join(dir, 'C.npy'));
  return { A, B, C, D: zeros(C.rows, B.cols) };
}

/** Largest distance after pairing each reference eigenvalue with the nearest unused one of ours. */
function eigenvalueDistance(ours: ComplexVector, ref: { re: Float64Array; im: Float64Array }): number {
  const n = ref.re.length;
  const used = new Uint8Array(n);
  let worst = 0;
  for (let i = 0; i < n; i++) {
    let best = -1;
    let bestD = Infinity;
    for (let j = 0; j < n; j++) {
      if (used[j]) continue;
      const d = Math.hypot(ours.re[j] - ref.re[i], ours.im[j] - ref.im[i]);
      if (d < bestD) {
        bestD = d;
        best = j;
      }
    }
    if (best >= 0) used[best] = 1;
    worst = Math.max(worst, bestD);
  }
  return worst;
}

const productCase: BenchCase<Matrix, Matrix> = {
  id: 'product',
  title: 'matrix product A·A (dgemm; portable: packed WebAssembly kernel)',
  sizes: [1000],
  quickSizes: [400],
  prepare: (dir) => readModel(dir).A,
  run: (a) => multiply(a, a),
  check(dir, a, c) {
    const ref = readNpy(path.join(dir, 'ref_prod.npy')).data;
    let worst = 0, scale = 0;
    for (let k = 0; k < ref.length; k++) {
      worst = Math.max(worst, Math.abs(c.data[k] - ref[k]));
      scale = Math.max(scale, Math.abs(ref[k]));
    }
    return `max |ΔC|/max|C| ${(worst / scale).toExponential(1)}; ${a.rows}³ product`;
  },
};

const eigenvalueCase: BenchCase<Matrix, ComplexVector> = {
  id: 'eigenvalues',
  title: 'eigenvalues (dgeev; portable: Hessenberg + Francis QR)',
  sizes: [500, 2000],
  quickSizes: [200],
  maxPortableSize: 500,
  prepare: (dir) => readModel(dir).A,
  // The engine keeps the eigenvalues of each matrix object: each run starts without them.
  run: (a) => {
    forgetDecompositions(a);
    return eigenvalues(a);
  },
  check(dir, _a, lam) {
    const { data, shape } = readNpy(path.join(dir, 'ref_eig.npy'));
    const n = shape[0];
    const re = new Float64Array(n), im = new Float64Array(n);
    let scale = 0;
    for (let i = 0; i < n; i++) {
      re[i] = data[2 * i];
      im[i] = data[2 * i + 1];
      scale = Math.max(scale, Math.hypot(re[i], im[i]));
    }
    return `max |Δλ|/|λ|max ${(eigenvalueDistance(lam, { re, im }) / scale).toExponential(1)}`;
  },
};

const balancedCase: BenchCase<StateSpaceModel, BalancedRealization> = {
  id: 'balanced',
  title: 'balanced truncation: both gramians, factors, SVD, realization',
  sizes: [500, 1000, 2000],
  largeSizes: [4000],
  quickSizes: [200, 400],
  maxPortableSize: 1000,
  prepare: (dir) => readModel(dir),
  run: (model) => balancedRealization(model),
  check(dir, _m, real) {
    const ref = readNpy(path.join(dir, 'ref_hsv.npy')).data;
    const ours = real.hankelSingularValues;
    // Relative agreement of the HSVs above 1e-6·σ₁ (below that both sides are at their rounding level).
    let worst = 0;
    let count = 0;
    for (let i = 0; i < ref.length && ref[i] > 1e-6 * ref[0]; i++, count++) worst = Math.max(worst, Math.abs(ours[i] - ref[i]) / ref[i]);
    return `HSV σ>1e-6σ₁ (${count}): max rel diff ${worst.toExponential(1)}; order ${real.minimalOrder}`;
  },
};

const frequencyCase: BenchCase<{ model: StateSpaceModel; w: Float64Array }, FrequencyResponse> = {
  id: 'frequency',
  title: 'frequency response, 1000 frequencies (modal form where κ(V) allows, else Hessenberg)',
  sizes: [1000],
  quickSizes: [200],
  prepare: (dir) => ({ model: readModel(dir), w: readNpy(path.join(dir, 'w.npy')).data }),
  // The engine keeps one eigendecomposition per matrix object: each run starts without it.
  run: ({ model, w }) => {
    forgetDecompositions(model.A);
    return frequencyResponse(model, w);
  },
  check(dir, _input, resp) {
    // ref_freq: (samples, 2, p, m) — every 50th frequency, real and imaginary parts.
    const { data, shape } = readNpy(path.join(dir, 'ref_freq.npy'));
    const [samples, , p, m] = shape;
    let worst = 0;
    let scale = 0;
    for (let s = 0; s < samples; s++) {
      const g = resp.response[s * 50];
      for (let i = 0; i < p; i++)
        for (let j = 0; j < m; j++) {
          const rr = data[((s * 2 + 0) * p + i) * m + j];
          const ri = data[((s * 2 + 1) * p + i) * m + j];
          scale = Math.max(scale, Math.hypot(rr, ri));
          worst = Math.max(worst, Math.hypot(g.re.data[i * m + j] - rr, g.im.data[i * m + j] - ri));
        }
    }
    return `max |ΔG|/max|G| ${(worst / scale).toExponential(1)} (${samples} sampled ω)`;
  },
};

const analysisCase: BenchCase<StateSpaceModel, ModelAnalysis> = {
  id: 'analysis',
  title: 'model analysis end to end (poles, modes, DC gain, H2, H∞, Hankel singular values); reference: the parts scipy has',
  sizes: [1000, 2000],
  quickSizes: [200],
  maxPortableSize: 1000,
  prepare: (dir) => readModel(dir),
  run: (model) => {
    forgetDecompositions(model.A);
    return analyzeModel(model);
  },
  check(dir, _m, a) {
    const ref = readNpy(path.join(dir, 'ref_hsv.npy')).data;
    let worst = 0;
    for (let i = 0; i < ref.length && ref[i] > 1e-6 * ref[0]; i++) worst = Math.max(worst, Math.abs(a.hankelSingularValues[i] - ref[i]) / ref[i]);
    const h = a.hInfinityNorm;
    const how = h.finite ? `H∞ by ${h.hamiltonianSolves} Hamiltonian solve(s) of order ${h.hamiltonianOrder}` : 'H∞ not finite';
    return `HSV max rel diff ${worst.toExponential(1)}; ${how}`;
  },
};

/**
 * The three dense Lyapunov routes the issue asked to measure, each from A to both square-root factors and
 * the Hankel singular values σ(Loᵀ·Lc): Bartels & Stewart (1972) on one Schur form (level 3, dtrsyl3) then
 * pivoted Cholesky; Hammarling (1982) for the factors directly (level 2); the factored sign iteration
 * (Roberts 1971). The reference solves both equations with scipy's solve_continuous_lyapunov and factors.
 */
const gramianCase: BenchCase<StateSpaceModel, Float64Array> = {
  id: 'gramians',
  title: 'both gramians as square-root factors + Hankel singular values, by three Lyapunov solvers',
  sizes: [1000, 2000],
  largeSizes: [4000],
  quickSizes: [200],
  maxPortableSize: 1000,
  variants: ['bartels-stewart', 'hammarling', 'sign'],
  // Hammarling's kernel is native only; the portable backend's Schur form is its slow kernel, so it keeps the sign iteration.
  supports: (backend, variant) => backend === 'native' || variant === 'sign',
  prepare: (dir) => readModel(dir),
  run: (model, variant) => {
    const { controllability: lc, observability: lo } =
      variant === 'sign'
        ? lowRankGramianFactors(model.A, model.B, model.C)
        : schurGramianFactors(model.A, model.B, model.C, { method: variant === 'hammarling' ? 'hammarling' : 'bartels-stewart' });
    return kernels().singularValues(multiply({ rows: lo.cols, cols: lo.rows, data: transposed(lo) }, lc));
  },
  check(dir, _m, hsv) {
    const ref = readNpy(path.join(dir, 'ref_hsv.npy')).data;
    let worst = 0;
    let count = 0;
    for (let i = 0; i < ref.length && ref[i] > 1e-6 * ref[0]; i++, count++) worst = Math.max(worst, Math.abs(hsv[i] - ref[i]) / ref[i]);
    return `HSV σ>1e-6σ₁ (${count}): max rel diff ${worst.toExponential(1)}`;
  },
};

function transposed(m: Matrix): Float64Array {
  const out = new Float64Array(m.rows * m.cols);
  for (let i = 0; i < m.rows; i++) for (let j = 0; j < m.cols; j++) out[j * m.rows + i] = m.data[i * m.cols + j];
  return out;
}

export const cases: BenchCase[] = [productCase, eigenvalueCase, balancedCase, gramianCase, frequencyCase, analysisCase] as BenchCase[];
