/**
 * Second-order models M q̈ + D q̇ + K q = F u with sparse M, D, K in descriptor form (reduction/sparse/
 * second-order.ts: E = diag(I, M), A = [[0, I], [−K, −D]]). Sources beside each check:
 *  - the transfer function G(jω) = (Cd + jω Cv)(K − ω²M + jωD)⁻¹F computed by Debian's SciPy (SuperLU) from
 *    the second-order matrices themselves, tests/reference/second_order_reference.py;
 *  - the eigenvalues of the quadratic eigenvalue problem by scipy.linalg.eig on the *second* companion
 *    pencil (Tisseur & Meerbergen, SIAM Review 43(2), 2001, eq. 3.6), a different linearisation from ours;
 *  - the dense path's conversion (reduction/second-order.ts, M⁻¹K), itself tested against published examples.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { secondOrderToDescriptor } from '@/reduction/sparse/second-order';
import { sparseFrequencyResponse } from '@/reduction/sparse/frequency';
import { cscFromCoo, cscToDense, type CscMatrix } from '@/reduction/sparse/model';
import { writeSparseMatrixMarket } from '@/reduction/sparse/matrix-market';
import { writeMatrixMarket } from '@/reduction/io/matrix-market';
import { eigenvalues, solve } from '@/reduction/linalg/index';
import { fromRows, zeros, type Matrix } from '@/reduction/linalg/matrix';
import { secondOrderToFirstOrder } from '@/reduction/second-order';
import { frequencyResponse } from '@/reduction/frequency';
import { ModelError } from '@/reduction/errors';

/** A free–fixed chain of q masses: consistent (tridiagonal) mass, springs, Rayleigh damping D = αM + βK. */
function chain(q: number) {
  const tri = (d: (i: number) => number, o: (i: number) => number): CscMatrix => {
    const r: number[] = [], c: number[] = [], v: number[] = [];
    for (let i = 0; i < q; i++) {
      r.push(i), c.push(i), v.push(d(i));
      if (i + 1 < q) r.push(i, i + 1), c.push(i + 1, i), v.push(o(i), o(i));
    }
    return cscFromCoo(q, r, c, v);
  };
  const mDiag = (i: number) => (i === q - 1 ? 1.5 : 2) + 0.1 * i, mOff = () => 0.4;
  const kDiag = (i: number) => (i === q - 1 ? 300 : 600) + 10 * i, kOff = (i: number) => -(300 + 5 * i);
  const alpha = 0.05, beta = 2e-3;
  const M = tri(mDiag, mOff);
  const K = tri(kDiag, kOff);
  const D = tri((i) => alpha * mDiag(i) + beta * kDiag(i), (i) => alpha * mOff() + beta * kOff(i));
  const F = zeros(q, 2);
  F.data[(q - 1) * 2] = 1; // a force at the free end
  F.data[Math.floor(q / 2) * 2 + 1] = 0.5; // and one at mid-length
  const Cd = zeros(2, q);
  Cd.data[q - 1] = 1; // tip displacement
  Cd.data[q + 2] = 1; // displacement near the fixed end
  const Cv = zeros(2, q);
  Cv.data[q + Math.floor(q / 2)] = 0.1; // mid-length velocity into the second output
  return { M, D, K, F, Cd, Cv };
}

function reference(dir: string, frequencies: number[]) {
  writeFileSync(path.join(dir, 'request.json'), JSON.stringify({ dir, frequencies }));
  execFileSync('/usr/bin/python3', [path.resolve(__dirname, '../../reference/second_order_reference.py'), path.join(dir, 'request.json'), path.join(dir, 'response.json')], {
    stdio: ['ignore', 'ignore', 'inherit'],
  });
  return JSON.parse(readFileSync(path.join(dir, 'response.json'), 'utf8')) as { re: number[][][]; im: number[][][]; eigenvalues: { re: number[]; im: number[] } };
}

const toRows = (m: Matrix) => Array.from({ length: m.rows }, (_, i) => Array.from(m.data.subarray(i * m.cols, (i + 1) * m.cols)));

describe('second-order models in descriptor form (sparse path)', () => {
  const q = 12;
  const so = chain(q);
  const model = secondOrderToDescriptor({ mass: so.M, damping: so.D, stiffness: so.K, force: so.F, displacementOutput: so.Cd, velocityOutput: so.Cv });

  it('E = diag(I, M), A = [[0, I], [−K, −D]], B = [0; F], C = [Cd, Cv]: 2q states, blocks as given', () => {
    expect(model.A.n).toBe(2 * q);
    const A = cscToDense(model.A), E = cscToDense(model.E!);
    const Md = cscToDense(so.M), Kd = cscToDense(so.K), Dd = cscToDense(so.D);
    for (let i = 0; i < q; i++) {
      for (let j = 0; j < q; j++) {
        expect(A.data[i * 2 * q + j]).toBe(0);
        expect(A.data[i * 2 * q + q + j]).toBe(i === j ? 1 : 0);
        expect(A.data[(q + i) * 2 * q + j]).toEqual(-Kd.data[i * q + j] + 0);
        expect(A.data[(q + i) * 2 * q + q + j]).toEqual(-Dd.data[i * q + j] + 0);
        expect(E.data[i * 2 * q + j]).toBe(i === j ? 1 : 0);
        expect(E.data[(q + i) * 2 * q + q + j]).toBe(Md.data[i * q + j]);
      }
    }
    expect(model.A.colPtr[2 * q]).toBe(q + so.K.colPtr[q] + so.D.colPtr[q]);
    expect(Array.from(model.B.data.subarray(0, q * 2)).every((x) => x === 0)).toBe(true);
    expect(Array.from(model.B.data.subarray(q * 2))).toEqual(Array.from(so.F.data));
  });

  it('its frequency response is the second-order G(jω) = (Cd + jωCv)(K − ω²M + jωD)⁻¹F of SciPy', () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'modeshelf-second-order-'));
    for (const [name, m] of [['M', so.M], ['D', so.D], ['K', so.K]] as const) writeFileSync(path.join(dir, `${name}.mtx`), writeSparseMatrixMarket(m));
    for (const [name, m] of [['F', so.F], ['Cd', so.Cd], ['Cv', so.Cv]] as const) writeFileSync(path.join(dir, `${name}.mtx`), writeMatrixMarket(m));
    const w = [0, 0.3, 3, 11, 17.5, 30, 90];
    const ref = reference(dir, w);
    const ours = sparseFrequencyResponse(model, w);
    w.forEach((_, k) => {
      const g = ours.response[k];
      let scale = 0;
      ref.re[k].forEach((row, i) => row.forEach((x, j) => (scale = Math.max(scale, Math.hypot(x, ref.im[k][i][j])))));
      ref.re[k].forEach((row, i) =>
        row.forEach((x, j) => {
          expect(Math.abs(g.re.data[i * 2 + j] - x)).toBeLessThan(1e-10 * scale);
          expect(Math.abs(g.im.data[i * 2 + j] - ref.im[k][i][j])).toBeLessThan(1e-10 * scale);
        }),
      );
    });
    // Its poles (eigenvalues of E⁻¹A, small enough here to form) are those of the quadratic problem.
    const poles = eigenvalues(solve(cscToDense(model.E!), cscToDense(model.A)));
    const theirs = ref.eigenvalues.re.map((re, i) => ({ re, im: ref.eigenvalues.im[i] }));
    expect(poles.re.length).toBe(theirs.length);
    for (let i = 0; i < poles.re.length; i++) {
      const mag = Math.hypot(poles.re[i], poles.im[i]);
      const nearest = Math.min(...theirs.map((t) => Math.hypot(t.re - poles.re[i], t.im - poles.im[i])));
      expect(nearest).toBeLessThan(1e-8 * mag);
    }
  });

  it('agrees with the dense path’s conversion (M⁻¹K form) at every frequency', () => {
    const dense = secondOrderToFirstOrder({
      mass: fromRows(toRows(cscToDense(so.M))),
      damping: fromRows(toRows(cscToDense(so.D))),
      stiffness: fromRows(toRows(cscToDense(so.K))),
      force: so.F,
      displacementOutput: so.Cd,
      velocityOutput: so.Cv,
    });
    const w = Float64Array.of(0.1, 5, 20, 60);
    const a = frequencyResponse(dense, w).response, b = sparseFrequencyResponse(model, w).response;
    for (let k = 0; k < w.length; k++) {
      for (let i = 0; i < a[k].re.data.length; i++) {
        const s = Math.hypot(a[k].re.data[i], a[k].im.data[i]) + 1e-300;
        expect(Math.hypot(a[k].re.data[i] - b[k].re.data[i], a[k].im.data[i] - b[k].im.data[i]) / s).toBeLessThan(1e-9);
      }
    }
  });

  it('refuses mismatched sizes and a missing output map, naming the matrix', () => {
    const small = cscFromCoo(q - 1, [0], [0], [1]);
    const refuse = (f: () => unknown, field: string, code: string) => {
      try {
        f();
        expect.unreachable(`expected a ModelError naming ${field}`);
      } catch (e) {
        expect(e).toBeInstanceOf(ModelError);
        expect((e as ModelError).field).toBe(field);
        expect((e as ModelError).code).toBe(code);
      }
    };
    refuse(() => secondOrderToDescriptor({ mass: so.M, stiffness: small, force: so.F, displacementOutput: so.Cd }), 'stiffness', 'dimension_mismatch');
    refuse(() => secondOrderToDescriptor({ mass: so.M, damping: small, stiffness: so.K, force: so.F, displacementOutput: so.Cd }), 'damping', 'dimension_mismatch');
    refuse(() => secondOrderToDescriptor({ mass: so.M, stiffness: so.K, force: zeros(q + 1, 1), displacementOutput: so.Cd }), 'force', 'dimension_mismatch');
    refuse(() => secondOrderToDescriptor({ mass: so.M, stiffness: so.K, force: so.F, velocityOutput: zeros(1, q - 2) }), 'velocityOutput', 'dimension_mismatch');
    refuse(() => secondOrderToDescriptor({ mass: so.M, stiffness: so.K, force: so.F }), 'displacementOutput', 'missing_field');
  });
});
