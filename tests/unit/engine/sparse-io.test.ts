/**
 * The sparse path's Matrix Market coordinate reader and CSC helpers (issue 13).
 * Sources: the example matrix of the format's specification (Boisvert, Pozo & Remington, NISTIR 5935,
 * 1996, §3); scipy.io.mmread (Debian python3-scipy, tests/reference/sparse_reference.py task "dense") for
 * a symmetric file with duplicates; the dense reader's refusal conventions (file and line named).
 */
import { describe, expect, it } from 'vitest';
import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { ModelError } from '@/reduction/errors';
import { parseSparseMatrixMarket, coordinateRowCount } from '@/reduction/sparse/matrix-market';
import { cscFromCoo, cscToDense, cscTranspose, cscTimesDense, cscTransposeTimesDense, shiftPattern, shiftedValues, cscFromDense } from '@/reduction/sparse/model';
import { zeros } from '@/reduction/linalg/matrix';
import { seeded } from './linalg-support';
import { sparseReference, writeModel, plateModel } from './sparse-support';

function caught(fn: () => unknown): ModelError {
  try {
    fn();
  } catch (e) {
    if (e instanceof ModelError) return e;
    throw new Error(`expected a ModelError, got ${String(e)}`);
  }
  throw new Error('expected a ModelError, nothing was thrown');
}

// NISTIR 5935 §3, the coordinate-format example (a 5×5 matrix with 8 entries).
const SPEC_EXAMPLE = `%%MatrixMarket matrix coordinate real general
%=================================================================================
%
% This ASCII file represents a sparse MxN matrix with L
% nonzeros in the following Matrix Market format:
%
%=================================================================================
  5  5  8
    1     1   1.000e+00
    2     2   1.050e+01
    3     3   1.500e-02
    1     4   6.000e+00
    4     2   2.505e+02
    4     4  -2.800e+02
    4     5   3.332e+01
    5     5   1.200e+01
`;

describe('Matrix Market coordinate files into CSC', () => {
  it('reads the specification example (NISTIR 5935) into sorted compressed columns', () => {
    const a = parseSparseMatrixMarket(SPEC_EXAMPLE, 'A', 'spec.mtx');
    expect(a.n).toBe(5);
    expect(Array.from(a.colPtr)).toEqual([0, 1, 3, 4, 6, 8]);
    expect(Array.from(a.rowIndex)).toEqual([0, 1, 3, 2, 0, 3, 3, 4]);
    expect(Array.from(a.values)).toEqual([1, 10.5, 250.5, 0.015, 6, -280, 33.32, 12]);
    expect(coordinateRowCount(SPEC_EXAMPLE)).toBe(5);
  });

  it('mirrors a symmetric file and sums duplicates as scipy.io.mmread does', () => {
    const rnd = seeded(7);
    const n = 40;
    const lines: string[] = [];
    for (let k = 0; k < 150; k++) {
      const i = 1 + Math.floor(rnd() * n), j = 1 + Math.floor(rnd() * n);
      lines.push(`${Math.max(i, j)} ${Math.min(i, j)} ${(rnd() * 2 - 1).toFixed(6)}`);
    }
    lines.push('3 3 1.5', '3 3 -0.25', '7 2 1e-3', '7 2 2D-3'); // duplicates, and a Fortran exponent
    const text = `%%MatrixMarket matrix coordinate real symmetric\n${n} ${n} ${lines.length}\n${lines.join('\n')}\n`;
    const dir = writeModel(plateModel(2));
    const file = path.join(dir, 'A.mtx');
    writeFileSync(file, text.replace('2D-3', '2e-3'));
    const ref = sparseReference(dir, ['dense']); // scipy.io.mmread(A.mtx).toarray()
    const dense = cscToDense(parseSparseMatrixMarket(text, 'A', 'A.mtx'));
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) expect(dense.data[i * n + j]).toBeCloseTo(ref.A[i][j], 14);
  });

  it('refuses a bad header, naming the file and line 1', () => {
    const e = caught(() => parseSparseMatrixMarket('%%MatrixMarkt matrix coordinate real general\n2 2 1\n1 1 1\n', 'A', 'plate/A.mtx'));
    expect(e.code).toBe('parse_error');
    expect(e.field).toBe('A');
    expect(e.message).toMatch(/^plate\/A\.mtx: line 1: /);
  });

  it('refuses pattern, complex and array files', () => {
    for (const [header, word] of [
      ['%%MatrixMarket matrix coordinate pattern general', 'pattern'],
      ['%%MatrixMarket matrix coordinate complex general', 'complex'],
      ['%%MatrixMarket matrix array real general', 'array'],
    ]) {
      const e = caught(() => parseSparseMatrixMarket(`${header}\n2 2 1\n1 1 1\n`, 'E', 'E.mtx'));
      expect(e.code).toBe('unsupported_format');
      expect(e.field).toBe('E');
      expect(e.message).toContain('E.mtx: line 1');
      expect(e.message).toContain(word);
    }
  });

  it('refuses an index outside the declared size, naming the line', () => {
    const text = '%%MatrixMarket matrix coordinate real general\n% a comment\n3 3 3\n1 1 1\n3 4 2\n2 2 1\n';
    const e = caught(() => parseSparseMatrixMarket(text, 'A', 'A.mtx'));
    expect(e.code).toBe('parse_error');
    expect(e.message).toBe('A.mtx: line 5: entry (3, 4) of A is outside the declared 3×3 size');
    const zero = caught(() => parseSparseMatrixMarket(text.replace('3 4 2', '0 1 2'), 'A', 'A.mtx'));
    expect(zero.message).toContain('line 5');
  });

  it('refuses a truncated file, naming where it ends and how many entries it held', () => {
    const text = '%%MatrixMarket matrix coordinate real general\n3 3 3\n1 1 1\n2 2 1\n';
    const e = caught(() => parseSparseMatrixMarket(text, 'A', 'A.mtx'));
    expect(e.code).toBe('truncated_file');
    expect(e.message).toBe('A.mtx: line 4: A is truncated: the file ends after 2 of the 3 declared entries');
    // A declared count the file cannot possibly hold is refused before anything is allocated.
    const huge = caught(() => parseSparseMatrixMarket('%%MatrixMarket matrix coordinate real general\n100000 100000 900000000\n1 1 1\n', 'A', 'A.mtx'));
    expect(huge.code).toBe('truncated_file');
    expect(huge.message).toContain('A.mtx');
  });

  it('refuses non-square, non-numeric, non-finite and extra entries, naming the line', () => {
    const base = '%%MatrixMarket matrix coordinate real general\n2 2 2\n1 1 1\n2 2 1\n';
    expect(caught(() => parseSparseMatrixMarket(base.replace('2 2 2', '2 3 2'), 'A', 'A.mtx')).code).toBe('not_square');
    const nn = caught(() => parseSparseMatrixMarket(base.replace('2 2 1', '2 2 x1'), 'A', 'A.mtx'));
    expect([nn.code, nn.message]).toEqual(['non_numeric', 'A.mtx: line 4: value "x1" of A is not a number']);
    const nf = caught(() => parseSparseMatrixMarket(base.replace('1 1 1', '1 1 NaN'), 'A', 'A.mtx'));
    expect([nf.code, nf.message]).toEqual(['non_finite', 'A.mtx: line 3: value "NaN" of A is not finite']);
    const extra = caught(() => parseSparseMatrixMarket(base + '1 2 5\n', 'A', 'A.mtx'));
    expect([extra.code, extra.message]).toEqual(['parse_error', 'A.mtx: line 5: more entries in A than the size line declares (2)']);
  });
});

describe('CSC helpers', () => {
  const rnd = seeded(11);
  const n = 30;
  const rows: number[] = [], cols: number[] = [], vals: number[] = [];
  for (let k = 0; k < 200; k++) {
    rows.push(Math.floor(rnd() * n));
    cols.push(Math.floor(rnd() * n));
    vals.push(rnd() - 0.5);
  }
  const a = cscFromCoo(n, rows, cols, vals);
  const dense = zeros(n, n);
  for (let k = 0; k < vals.length; k++) dense.data[rows[k] * n + cols[k]] += vals[k];

  it('sums duplicates and keeps rows sorted', () => {
    for (let k = 0; k < n * n; k++) expect(cscToDense(a).data[k]).toBeCloseTo(dense.data[k], 14);
    for (let j = 0; j < n; j++) for (let p = a.colPtr[j] + 1; p < a.colPtr[j + 1]; p++) expect(a.rowIndex[p]).toBeGreaterThan(a.rowIndex[p - 1]);
  });

  it('products with a dense block and the transpose agree with the dense definitions', () => {
    const x = zeros(n, 3);
    for (let k = 0; k < x.data.length; k++) x.data[k] = rnd() - 0.5;
    const y = cscTimesDense(a, x), yt = cscTransposeTimesDense(a, x), at = cscToDense(cscTranspose(a));
    for (let i = 0; i < n; i++) {
      for (let c = 0; c < 3; c++) {
        let s = 0, st = 0;
        for (let j = 0; j < n; j++) {
          s += dense.data[i * n + j] * x.data[j * 3 + c];
          st += dense.data[j * n + i] * x.data[j * 3 + c];
        }
        expect(y.data[i * 3 + c]).toBeCloseTo(s, 13);
        expect(yt.data[i * 3 + c]).toBeCloseTo(st, 13);
      }
      for (let j = 0; j < n; j++) expect(at.data[i * n + j]).toBeCloseTo(dense.data[j * n + i], 14);
    }
  });

  it('writes A − σE on the union pattern for any σ', () => {
    const e = cscFromDense({ rows: n, cols: n, data: dense.data.map((_, k) => (k % (n + 1) === 0 ? 2 : k % 7 === 0 ? 0.5 : 0)) });
    const sp = shiftPattern(a, e);
    const { values, imag } = shiftedValues(sp, -3, 2);
    const re = cscToDense({ ...sp.pattern, values }), im = cscToDense({ ...sp.pattern, values: imag! });
    const ed = cscToDense(e);
    for (let k = 0; k < n * n; k++) {
      expect(re.data[k]).toBeCloseTo(dense.data[k] + 3 * ed.data[k], 13);
      expect(im.data[k]).toBeCloseTo(-2 * ed.data[k], 13);
    }
  });
});
