/**
 * Models for the sparse modal tests: a fixed–fixed chain of equal masses and springs as a first-order
 * descriptor model (E = diag(I, M), A = [[0, I], [−K, −D]], no M⁻¹), and the SciPy reference for eigenvalues
 * and dominant poles (Debian's /usr/bin/python3 on tests/reference/sparse_eigs_reference.py).
 */
import { execFileSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { zeros } from '../../../reduction/linalg/matrix';
import { cscFromCoo, createSparseModel, type SparseStateSpaceModel } from '../../../reduction/sparse/model';

/**
 * N equal masses m joined by N + 1 equal springs k between two walls (or, `free`, N − 1 springs and no
 * walls: a rigid-body mode, a double pole at 0); Rayleigh damping D = α M + β K (none by default). q ∈ ℝᴺ, M q̈ + D q̇ + K q = F u with K = k·tridiag(−1, 2, −1), states x = [q; q̇].
 * Inputs: forces on the masses at N/3 (and N − 2); outputs: displacements of the masses at 2N/3 (and 5).
 */
export function springChain(N: number, options: { k?: number; m?: number; alpha?: number; beta?: number; io?: number; free?: boolean } = {}): SparseStateSpaceModel {
  const k = options.k ?? 1e4, m = options.m ?? 1, alpha = options.alpha ?? 0, beta = options.beta ?? 0, io = options.io ?? 1;
  const n = 2 * N;
  const r: number[] = [], c: number[] = [], v: number[] = [];
  const er: number[] = [], ec: number[] = [], ev: number[] = [];
  for (let i = 0; i < N; i++) {
    r.push(i);
    c.push(N + i);
    v.push(1);
    er.push(i, N + i);
    ec.push(i, N + i);
    ev.push(1, m);
    const springs = options.free ? (i === 0 ? 0 : 1) + (i === N - 1 ? 0 : 1) : 2;
    r.push(N + i, N + i);
    c.push(i, N + i);
    v.push(-springs * k, -(alpha * m + springs * beta * k));
    for (const j of [i - 1, i + 1]) {
      if (j < 0 || j >= N) continue;
      r.push(N + i, N + i);
      c.push(j, N + j);
      v.push(k, beta * k);
    }
  }
  const A = cscFromCoo(n, r, c, v), E = cscFromCoo(n, er, ec, ev);
  const B = zeros(n, io), C = zeros(io, n);
  B.data[(N + Math.floor(N / 3)) * io] = 1;
  C.data[Math.floor((2 * N) / 3)] = 1;
  if (io > 1) {
    B.data[(N + N - 2) * io + 1] = 1;
    C.data[n + 5] = 1;
  }
  return createSparseModel({ A, E, B, C });
}

/** Natural frequencies of the undamped chain, ωⱼ = 2√(k/m)·sin(jπ/(2(N+1))), j = 1..N (common vibrations-textbook result). */
export function chainFrequencies(N: number, k = 1e4, m = 1): number[] {
  return Array.from({ length: N }, (_, j) => 2 * Math.sqrt(k / m) * Math.sin(((j + 1) * Math.PI) / (2 * (N + 1))));
}

/** Eigenvalues of the 5-point Dirichlet Laplacian on N×N interior points, h = 1/(N+1), descending (slowest first). */
export function laplacianEigenvalues(N: number): number[] {
  const h = 1 / (N + 1);
  const out: number[] = [];
  for (let j = 1; j <= N; j++) {
    for (let q = 1; q <= N; q++) {
      out.push((-4 / (h * h)) * (Math.sin((j * Math.PI) / (2 * (N + 1))) ** 2 + Math.sin((q * Math.PI) / (2 * (N + 1))) ** 2));
    }
  }
  return out.sort((a, b) => b - a);
}

const SCRIPT = path.resolve(__dirname, '../../reference/sparse_eigs_reference.py');

/** Runs tests/reference/sparse_eigs_reference.py on a model folder (see the script for the tasks). */
export function eigsReference(dir: string, tasks: string[], extra: Record<string, unknown> = {}): any {
  const req = path.join(dir, 'eigs-request.json'), res = path.join(dir, 'eigs-response.json');
  writeFileSync(req, JSON.stringify({ dir, tasks, ...extra }));
  execFileSync('/usr/bin/python3', [SCRIPT, req, res], { stdio: ['ignore', 'ignore', 'inherit'], env: { ...process.env, OMP_NUM_THREADS: '1', OPENBLAS_NUM_THREADS: '1' } });
  return JSON.parse(readFileSync(res, 'utf8'));
}

/** Greedy match of two lists of complex numbers; returns the largest relative distance of matched pairs (Infinity when one is unmatched). */
export function matchComplex(a: readonly [number, number][], b: readonly [number, number][]): number {
  if (a.length !== b.length) return Infinity;
  const used = new Array(b.length).fill(false);
  let worst = 0;
  for (const [ar, ai] of a) {
    let best = -1, bd = Infinity;
    for (let j = 0; j < b.length; j++) {
      if (used[j]) continue;
      const d = Math.hypot(ar - b[j][0], ai - b[j][1]);
      if (d < bd) [bd, best] = [d, j];
    }
    if (best < 0) return Infinity;
    used[best] = true;
    worst = Math.max(worst, bd / Math.max(Math.hypot(ar, ai), Number.MIN_VALUE));
  }
  return worst;
}
