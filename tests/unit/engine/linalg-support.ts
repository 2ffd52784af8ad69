/**
 * Shared helpers for the linear-algebra tests: seeded matrices and the numpy/scipy reference.
 * The reference is Debian's python3-numpy/python3-scipy, run as /usr/bin/python3 on
 * tests/reference/linalg_reference.py (LAPACK underneath).
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { type Matrix, zeros, toRows } from '../../../reduction/linalg/matrix';

/** Mulberry32, a small seeded generator (common practice for reproducible test data). */
export function seeded(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Entries uniform in (−1, 1). */
export function randomMatrix(rows: number, cols: number, seed: number): Matrix {
  const r = seeded(seed);
  const m = zeros(rows, cols);
  for (let k = 0; k < m.data.length; k++) m.data[k] = 2 * r() - 1;
  return m;
}

/**
 * A stable random A: uniform entries scaled so the spectrum lies in a disc of radius ≈ 1 (circular law),
 * shifted left by `shift`, so every eigenvalue has real part below 1 − shift.
 */
export function stableMatrix(n: number, seed: number, shift = 1.5): Matrix {
  const a = randomMatrix(n, n, seed);
  const s = Math.sqrt(3 / n);
  for (let k = 0; k < a.data.length; k++) a.data[k] *= s;
  for (let i = 0; i < n; i++) a.data[i * n + i] -= shift;
  return a;
}

export interface ReferenceTask {
  op: 'eigvals' | 'svdvals' | 'eigh' | 'lyap' | 'gramians' | 'sylvester' | 'qr_rank' | 'product' | 'solve' | 'freqresp' | 'spsolve';
  [key: string]: unknown;
}

/** Runs the scipy reference on a list of tasks; matrices are passed as `Matrix` and sent as rows. */
export function reference(tasks: ReferenceTask[]): Record<string, unknown>[] {
  const dir = mkdtempSync(path.join(tmpdir(), 'linalg-ref-'));
  try {
    const input = path.join(dir, 'in.json');
    const output = path.join(dir, 'out.json');
    const wire = tasks.map((t) => {
      const o: Record<string, unknown> = {};
      for (const [k, v] of Object.entries(t)) o[k] = v && typeof v === 'object' && 'data' in (v as object) ? toRows(v as Matrix) : v;
      return o;
    });
    writeFileSync(input, JSON.stringify(wire));
    try {
      execFileSync('/usr/bin/python3', [path.resolve(__dirname, '../../reference/linalg_reference.py'), input, output], {
        stdio: ['ignore', 'pipe', 'pipe'],
      });
    } catch (e) {
      const err = e as { stderr?: Buffer };
      throw new Error(
        `the numpy/scipy reference failed (needs Debian python3-numpy and python3-scipy under /usr/bin/python3): ${err.stderr?.toString() ?? String(e)}`,
      );
    }
    return JSON.parse(readFileSync(output, 'utf8')) as Record<string, unknown>[];
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

export function maxAbsDiff(a: Matrix, b: Matrix | number[][]): number {
  let e = 0;
  const rows = Array.isArray(b) ? b : toRows(b);
  for (let i = 0; i < a.rows; i++) for (let j = 0; j < a.cols; j++) e = Math.max(e, Math.abs(a.data[i * a.cols + j] - rows[i][j]));
  return e;
}

export function maxAbs(a: Matrix): number {
  let m = 0;
  for (const v of a.data) m = Math.max(m, Math.abs(v));
  return m;
}

/**
 * Largest distance between two lists of complex numbers after pairing each reference value with the
 * nearest unused computed one (order-free and robust to ties in the real parts).
 */
export function eigenvalueDistance(
  ours: { re: ArrayLike<number>; im: ArrayLike<number> },
  ref: { re: ArrayLike<number>; im: ArrayLike<number> },
): number {
  const n = ref.re.length;
  if (ours.re.length !== n) return Infinity;
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
    used[best] = 1;
    worst = Math.max(worst, bestD);
  }
  return worst;
}
