import { describe, expect, it } from 'vitest';
import { gemm, multiply, multiplyTransposeA, multiplyTransposeB } from '../../../reduction/linalg/gemm';
import { setLinalgThreads, workerRunning } from '../../../reduction/linalg/parallel';
import { type Matrix, zeros, transpose } from '../../../reduction/linalg/matrix';
import { randomMatrix, maxAbs } from './linalg-support';

/** The definition C_ij = Σ_p A_ip B_pj, summed directly (the check needs no outside reference). */
function definition(a: Matrix, b: Matrix): Matrix {
  const c = zeros(a.rows, b.cols);
  for (let i = 0; i < a.rows; i++)
    for (let j = 0; j < b.cols; j++) {
      let s = 0;
      for (let p = 0; p < a.cols; p++) s += a.data[i * a.cols + p] * b.data[p * b.cols + j];
      c.data[i * b.cols + j] = s;
    }
  return c;
}

function relErr(x: Matrix, y: Matrix): number {
  let e = 0;
  for (let k = 0; k < x.data.length; k++) e = Math.max(e, Math.abs(x.data[k] - y.data[k]));
  return e / Math.max(1, maxAbs(y));
}

// Shapes straddling the 4×4 register tile and the 256-deep / 96-tall cache blocks.
const shapes: [number, number, number][] = [
  [1, 1, 1],
  [3, 5, 7],
  [17, 33, 9],
  [97, 257, 61],
  [130, 300, 5],
  [260, 70, 300],
];

describe('matrix product (Goto & van de Geijn blocking)', () => {
  for (const threads of [1, 2]) {
    describe(`${threads} thread(s)`, () => {
      it('agrees with the definition for A·B, Aᵀ·B and A·Bᵀ on odd shapes', () => {
        setLinalgThreads(threads);
        for (const [m, k, n] of shapes) {
          const a = randomMatrix(m, k, m + 10 * k);
          const b = randomMatrix(k, n, n + 7 * k);
          const ref = definition(a, b);
          expect(relErr(multiply(a, b), ref)).toBeLessThan(1e-14 * k);
          expect(relErr(multiplyTransposeA(transpose(a), b), ref)).toBeLessThan(1e-14 * k);
          expect(relErr(multiplyTransposeB(a, transpose(b)), ref)).toBeLessThan(1e-14 * k);
        }
      });
    });
  }

  it('gives the same bits on one and two threads (the split changes no sum)', () => {
    const a = randomMatrix(300, 280, 1);
    const b = randomMatrix(280, 310, 2);
    setLinalgThreads(1);
    const one = multiply(a, b);
    setLinalgThreads(2);
    const two = multiply(a, b);
    expect(workerRunning()).toBe(true);
    expect(Array.from(two.data)).toEqual(Array.from(one.data));
  });

  it('follows BLAS α/β semantics on sub-blocks, and β = 0 overwrites NaN in C', () => {
    setLinalgThreads(1);
    const a = randomMatrix(40, 30, 3);
    const b = randomMatrix(30, 50, 4);
    const c = randomMatrix(60, 70, 5);
    const before = new Float64Array(c.data);
    // C[10:50, 5:55] ← 2·A·B − 0.5·C[10:50, 5:55]
    gemm(false, false, 40, 50, 30, 2, a.data, 0, 30, b.data, 0, 50, -0.5, c.data, 10 * 70 + 5, 70);
    const ab = definition(a, b);
    let worst = 0;
    for (let i = 0; i < 60; i++)
      for (let j = 0; j < 70; j++) {
        const inside = i >= 10 && i < 50 && j >= 5 && j < 55;
        const want = inside ? 2 * ab.data[(i - 10) * 50 + (j - 5)] - 0.5 * before[i * 70 + j] : before[i * 70 + j];
        worst = Math.max(worst, Math.abs(c.data[i * 70 + j] - want));
      }
    expect(worst).toBeLessThan(1e-12);
    const d = zeros(40, 50);
    d.data.fill(NaN);
    gemm(false, false, 40, 50, 30, 1, a.data, 0, 30, b.data, 0, 50, 0, d.data, 0, 50);
    expect(relErr(d, ab)).toBeLessThan(1e-13);
  });

  it('names both shapes when the inner dimensions differ', () => {
    expect(() => multiply(zeros(2, 3), zeros(4, 2))).toThrow(/2×3 and 4×2/);
  });
});
