/**
 * Calls tests/reference/time_reference.py (Debian python3-numpy/python3-scipy through /usr/bin/python3)
 * for the time-response tests, and small model builders those tests share.
 */
import { execFileSync } from 'node:child_process';
import path from 'node:path';
import { type Matrix, toRows, zeros } from '@/reduction/linalg/matrix';
import { matmul, inverse } from '@/reduction/linalg';
import { assembleModel } from '@/reduction/io';
import type { StateSpaceModel } from '@/reduction/model';

const SCRIPT = path.resolve(__dirname, '../../reference/time_reference.py');

export function scipyReference<T>(request: Record<string, unknown>): T {
  const out = execFileSync('/usr/bin/python3', [SCRIPT], {
    input: JSON.stringify(request),
    maxBuffer: 1 << 28,
  });
  return JSON.parse(out.toString()) as T;
}

export const rows = toRows;

/** Seeded uniform numbers in [0, 1) (mulberry32), so every run builds the same models. */
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

export function randomMatrix(rows: number, cols: number, rand: () => number): Matrix {
  const m = zeros(rows, cols);
  for (let k = 0; k < m.data.length; k++) m.data[k] = 2 * rand() - 1;
  return m;
}

/**
 * A stable model with prescribed decay rates: A = T·Λ·T⁻¹ with Λ block-diagonal (real poles −rate, and
 * complex pairs −rate ± i·rate·ω where `complexEvery` says how often), T a well-conditioned random
 * similarity (I + 0.3·R). Poles are therefore known exactly in exact arithmetic.
 */
export function modelWithRates(
  rates: readonly number[],
  inputs: number,
  outputs: number,
  seed: number,
  complexEvery = 0,
): StateSpaceModel {
  const n = rates.length;
  const rand = seeded(seed);
  const L = zeros(n, n);
  for (let i = 0; i < n; i++) {
    L.data[i * n + i] = -rates[i];
    if (complexEvery > 0 && i + 1 < n && i % complexEvery === 0 && i % 2 === 0) {
      // [[-a, w], [-w, -a]] with the pair's decay rate a = rates[i]
      const w = rates[i] * (0.5 + rand());
      L.data[(i + 1) * n + i + 1] = -rates[i];
      L.data[i * n + i + 1] = w;
      L.data[(i + 1) * n + i] = -w;
      i++;
    }
  }
  const T = randomMatrix(n, n, rand);
  for (let k = 0; k < T.data.length; k++) T.data[k] *= 0.3 / Math.sqrt(n);
  for (let i = 0; i < n; i++) T.data[i * n + i] += 1;
  const A = matmul(matmul(T, L), inverse(T));
  return assembleModel({
    A,
    B: randomMatrix(n, inputs, rand),
    C: randomMatrix(outputs, n, rand),
    D: randomMatrix(outputs, inputs, rand),
  });
}

/** Logarithmically spaced rates from lo to hi. */
export function logRates(n: number, lo: number, hi: number): number[] {
  return Array.from({ length: n }, (_, k) => lo * Math.pow(hi / lo, n === 1 ? 0 : k / (n - 1)));
}
