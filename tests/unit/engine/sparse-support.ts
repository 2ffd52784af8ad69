/**
 * Shared helpers for the sparse-path tests: generated sparse models written as Matrix Market files, and
 * the SciPy reference (Debian's /usr/bin/python3 on tests/reference/sparse_reference.py).
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { type Matrix, zeros } from '../../../reduction/linalg/matrix';
import { writeMatrixMarket } from '../../../reduction/io/matrix-market';
import { cscFromCoo, createSparseModel, type CscMatrix, type SparseStateSpaceModel } from '../../../reduction/sparse/model';
import { writeSparseMatrixMarket } from '../../../reduction/sparse/matrix-market';

/**
 * The 2-D Dirichlet Laplacian on the unit square, N×N interior points, 5-point stencil, h = 1/(N+1),
 * plus an optional convection term c·∂/∂y by central differences (nonsymmetric, complex eigenvalues
 * when the cell Péclet number c·h/2 exceeds 1).
 */
export function plate(N: number, convection = 0): CscMatrix {
  const h = 1 / (N + 1), s = 1 / (h * h);
  const r: number[] = [], c: number[] = [], v: number[] = [];
  const id = (i: number, j: number) => i * N + j;
  for (let i = 0; i < N; i++) {
    for (let j = 0; j < N; j++) {
      r.push(id(i, j));
      c.push(id(i, j));
      v.push(-4 * s);
      for (const [di, dj] of [[1, 0], [-1, 0], [0, 1], [0, -1]]) {
        const a = i + di, b = j + dj;
        if (a < 0 || a >= N || b < 0 || b >= N) continue;
        r.push(id(i, j));
        c.push(id(a, b));
        v.push(s - (dj !== 0 ? (dj * convection) / (2 * h) : 0));
      }
    }
  }
  return cscFromCoo(N * N, r, c, v);
}

/** A lumped-plus-consistent mass-like SPD tridiagonal E = tridiag(1/6, 2/3, 1/6) (1-D linear elements). */
export function massMatrix(n: number): CscMatrix {
  const r: number[] = [], c: number[] = [], v: number[] = [];
  for (let i = 0; i < n; i++) {
    r.push(i);
    c.push(i);
    v.push(2 / 3);
    if (i + 1 < n) {
      r.push(i, i + 1);
      c.push(i + 1, i);
      v.push(1 / 6, 1 / 6);
    }
  }
  return cscFromCoo(n, r, c, v);
}

/** Heat input on the left quarter of the plate, measured as the mean temperature of the right quarter (and, with two outputs, of the top quarter). */
export function plateIo(N: number, inputs = 1, outputs = 1): { B: Matrix; C: Matrix } {
  const n = N * N;
  const B = zeros(n, inputs), C = zeros(outputs, n);
  for (let k = 0; k < n; k++) {
    const x = Math.floor(k / N), y = k % N;
    B.data[k * inputs] = x < N / 4 ? 1 / n : 0;
    if (inputs > 1) B.data[k * inputs + 1] = y < N / 3 ? 2 / n : 0;
    C.data[k] = y > (3 * N) / 4 ? 4 / n : 0;
    if (outputs > 1) C.data[n + k] = x > (2 * N) / 3 ? 3 / n : 0;
  }
  return { B, C };
}

export function plateModel(N: number, options: { convection?: number; descriptor?: boolean; inputs?: number; outputs?: number } = {}): SparseStateSpaceModel {
  const A = plate(N, options.convection ?? 0);
  const { B, C } = plateIo(N, options.inputs ?? 1, options.outputs ?? 1);
  return createSparseModel({ A, E: options.descriptor ? massMatrix(N * N) : undefined, B, C });
}

/** Writes the model as A.mtx (coordinate), E.mtx (coordinate, when present), B.mtx and C.mtx (array) into a new folder. */
export function writeModel(m: SparseStateSpaceModel): string {
  const dir = mkdtempSync(path.join(tmpdir(), 'modeshelf-sparse-'));
  writeFileSync(path.join(dir, 'A.mtx'), writeSparseMatrixMarket(m.A));
  if (m.E) writeFileSync(path.join(dir, 'E.mtx'), writeSparseMatrixMarket(m.E));
  writeFileSync(path.join(dir, 'B.mtx'), writeMatrixMarket(m.B));
  writeFileSync(path.join(dir, 'C.mtx'), writeMatrixMarket(m.C));
  return dir;
}

const SCRIPT = path.resolve(__dirname, '../../reference/sparse_reference.py');

/** Runs tests/reference/sparse_reference.py on a model folder (see the script for the tasks). */
export function sparseReference(dir: string, tasks: string[], extra: Record<string, unknown> = {}): any {
  const req = path.join(dir, 'request.json'), res = path.join(dir, 'response.json');
  writeFileSync(req, JSON.stringify({ dir, tasks, ...extra }));
  execFileSync('/usr/bin/python3', [SCRIPT, req, res], { stdio: ['ignore', 'ignore', 'inherit'], env: { ...process.env, OMP_NUM_THREADS: '1', OPENBLAS_NUM_THREADS: '1' } });
  return JSON.parse(readFileSync(res, 'utf8'));
}

export function relDiff(a: number, b: number): number {
  return Math.abs(a - b) / Math.max(Math.abs(a), Math.abs(b), Number.MIN_VALUE);
}
