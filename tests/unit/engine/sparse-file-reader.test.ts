/**
 * Matrix Market coordinate files streamed from disk in 1 MiB chunks (reduction/sparse/file-reader.ts), the
 * reader the upload check and the engine tasks use on large models. Sources: the specification's example
 * (Boisvert, Pozo & Remington, NISTIR 5935, 1996, §3); scipy.io.mmread (Debian python3-scipy,
 * tests/reference/sparse_reference.py task "dense") for the demo's symmetric hearth plate; the in-memory
 * reader (tested in sparse-io.test.ts) for files whose lines straddle chunk boundaries.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { ModelError } from '@/reduction/errors';
import { parseSparseMatrixMarket } from '@/reduction/sparse/matrix-market';
import { coordinateFileRows, readSparseMatrixMarketFile } from '@/reduction/sparse/file-reader';
import { cscToDense } from '@/reduction/sparse/model';
import { hearthPlate } from '@/db/seeds/demo/plate';
import { sparseReference } from './sparse-support';

const dir = mkdtempSync(path.join(tmpdir(), 'modeshelf-mm-stream-'));
function file(name: string, text: string): string {
  const p = path.join(dir, name);
  writeFileSync(p, text);
  return p;
}

function caught(fn: () => unknown): ModelError {
  try {
    fn();
  } catch (e) {
    if (e instanceof ModelError) return e;
    throw e;
  }
  throw new Error('expected a ModelError, nothing was thrown');
}

const SPEC_EXAMPLE = `%%MatrixMarket matrix coordinate real general
% NISTIR 5935 §3
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

describe('Matrix Market coordinate files streamed from disk', () => {
  it('reads the specification example, with a byte-order mark and CRLF line ends, as the in-memory reader does', () => {
    const a = readSparseMatrixMarketFile(file('spec.mtx', '\uFEFF' + SPEC_EXAMPLE.replace(/\n/g, '\r\n')), 'A', 'spec.mtx');
    expect(Array.from(a.colPtr)).toEqual([0, 1, 3, 4, 6, 8]);
    expect(Array.from(a.rowIndex)).toEqual([0, 1, 3, 2, 0, 3, 3, 4]);
    expect(Array.from(a.values)).toEqual([1, 10.5, 250.5, 0.015, 6, -280, 33.32, 12]);
    expect(coordinateFileRows(path.join(dir, 'spec.mtx'))).toBe(5);
  });

  it('a 1.5 MB symmetric file across chunk boundaries gives the same compressed columns as the text reader', () => {
    const plate = hearthPlate(170);
    expect(plate.A.length).toBeGreaterThan(1.5 * (1 << 20));
    const streamed = readSparseMatrixMarketFile(file('A.mtx', plate.A), 'A', 'A.mtx');
    const whole = parseSparseMatrixMarket(plate.A, 'A', 'A.mtx');
    expect(streamed.n).toBe(170 * 170);
    expect(Array.from(streamed.colPtr)).toEqual(Array.from(whole.colPtr));
    expect(Array.from(streamed.rowIndex)).toEqual(Array.from(whole.rowIndex));
    expect(Array.from(streamed.values)).toEqual(Array.from(whole.values));
    expect(coordinateFileRows(path.join(dir, 'A.mtx'))).toBe(170 * 170);
  });

  it('the demo hearth plate (symmetric A, diagonal E) reads as scipy.io.mmread reads it', () => {
    const plate = hearthPlate(9);
    const folder = mkdtempSync(path.join(tmpdir(), 'modeshelf-plate-'));
    for (const k of ['A', 'E'] as const) writeFileSync(path.join(folder, `${k}.mtx`), plate[k]);
    // The script reads B and C as dense arrays; the plate's own are coordinate files, not needed here.
    writeFileSync(path.join(folder, 'B.mtx'), `%%MatrixMarket matrix array real general\n81 1\n${'1\n'.repeat(81)}`);
    writeFileSync(path.join(folder, 'C.mtx'), `%%MatrixMarket matrix array real general\n1 81\n${'1\n'.repeat(81)}`);
    const ref = sparseReference(folder, ['dense']) as { A: number[][]; E: number[][] };
    for (const k of ['A', 'E'] as const) {
      const ours = cscToDense(readSparseMatrixMarketFile(path.join(folder, `${k}.mtx`), k, `${k}.mtx`));
      ref[k].forEach((row, i) => row.forEach((v, j) => expect(ours.data[i * 81 + j]).toBeCloseTo(v, 12)));
    }
  });

  it('refuses what the in-memory reader refuses, naming the file and the line', () => {
    const nonNumeric = caught(() => readSparseMatrixMarketFile(file('bad.mtx', SPEC_EXAMPLE.replace('-2.800e+02', 'hot')), 'A', 'bad.mtx'));
    expect(nonNumeric.code).toBe('non_numeric');
    expect(nonNumeric.field).toBe('A');
    expect(nonNumeric.message).toMatch(/^bad\.mtx: line 9: value "hot"/);
    const truncated = caught(() => readSparseMatrixMarketFile(file('short.mtx', SPEC_EXAMPLE.split('\n').slice(0, 7).join('\n')), 'E', 'short.mtx'));
    expect(truncated.code).toBe('truncated_file');
    expect(truncated.field).toBe('E');
    const array = caught(() => readSparseMatrixMarketFile(file('array.mtx', '%%MatrixMarket matrix array real general\n2 2\n1\n0\n0\n1\n'), 'A', 'array.mtx'));
    expect(array.code).toBe('unsupported_format');
    const missing = caught(() => readSparseMatrixMarketFile(path.join(dir, 'nowhere.mtx'), 'A', 'nowhere.mtx'));
    expect(missing.code).toBe('unreadable_file');
    expect(coordinateFileRows(path.join(dir, 'array.mtx'))).toBeNull();
  });
});
