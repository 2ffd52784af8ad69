/**
 * Impossible sizes (issue 15): every reader checks the size a file declares against the file's length and
 * the dense-entry limit (option, or MODESHELF_MAX_DENSE_ENTRIES) before allocating, and refuses with a
 * ModelError naming the file, the declared size and the limit. The expected figures below are the
 * declared sizes written into each test file, multiplied out by hand.
 */
import { afterEach, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { ModelError } from '@/reduction/errors';
import {
  DEFAULT_MAX_DENSE_ENTRIES,
  loadModelFiles,
  matrixFromJsonRows,
  parseCsvMatrix,
  parseMatrixMarket,
  parseModelFiles,
  parseModelJson,
} from '@/reduction/io';
import { validateModelFiles } from '@/lib/engine-tasks/validate-task';

const ROOT = path.resolve(__dirname, '../../..');

function caught(fn: () => unknown): ModelError {
  try {
    fn();
  } catch (e) {
    if (e instanceof ModelError) return e;
    throw new Error(`expected a ModelError, got ${String(e)}`);
  }
  throw new Error('expected a ModelError, nothing was thrown');
}

const ENV = 'MODESHELF_MAX_DENSE_ENTRIES';
const savedEnv = process.env[ENV];
afterEach(() => {
  if (savedEnv === undefined) delete process.env[ENV];
  else process.env[ENV] = savedEnv;
});

const hugeArray = '%%MatrixMarket matrix array real general\n100000000 100000000\n1\n2\n3\n';
// Huge dimensions, three entries: a legitimate sparse file, refused by today's dense readers with the limit named.
const hugeSparse = '%%MatrixMarket matrix coordinate real general\n100000000 100000000 3\n1 1 -1\n2 2 -2\n100000000 100000000 -3\n';

describe('Matrix Market: declared sizes', () => {
  it('refuses a 10⁸ × 10⁸ dense array as too_large, naming file, size and the default limit', () => {
    const e = caught(() => parseMatrixMarket(hugeArray, 'A', 'A.mtx'));
    expect(e.code).toBe('too_large');
    expect(e.field).toBe('A');
    // 10⁸ × 10⁸ = 10¹⁶ entries; the default limit is 25,000,000 (reduction/io/limits.ts).
    expect(e.message).toMatch(/^A\.mtx: A declares 100,000,000×100,000,000 \(10,000,000,000,000,000 entries\), more than the limit of 25,000,000 entries/);
    expect(e.message).toMatch(/MODESHELF_MAX_DENSE_ENTRIES/);
    expect(DEFAULT_MAX_DENSE_ENTRIES).toBe(25_000_000);
  });

  it('refuses a coordinate file with huge dimensions and few entries (future sparse case) with the limit named', () => {
    const e = caught(() => parseMatrixMarket(hugeSparse, 'A', 'big-sparse.mtx'));
    expect(e.code).toBe('too_large');
    expect(e.message).toMatch(/^big-sparse\.mtx: A declares 100,000,000×100,000,000 .*limit of 25,000,000 entries.*sparse path/);
  });

  it('refuses dimensions past 2⁵³ without losing the message', () => {
    const e = caught(() => parseMatrixMarket('%%MatrixMarket matrix array real general\n99999999999999999999 2\n1\n', 'B', 'B.mtx'));
    expect(e.code).toBe('too_large');
    expect(e.message).toMatch(/^B\.mtx: B declares 1\.000e\+20×2/);
  });

  it('refuses an array file below the limit that is too short for its declared values (truncated_file, before allocating)', () => {
    // 4000 × 4000 = 16,000,000 values (under the limit) need ≥ 2 characters each; the file has ~60.
    const text = '%%MatrixMarket matrix array real general\n4000 4000\n1\n2\n';
    const e = caught(() => parseMatrixMarket(text, 'A', 'A.mtx'));
    expect(e.code).toBe('truncated_file');
    expect(e.message).toBe(`A.mtx: A declares 16,000,000 values, but the file is only ${text.length} characters long and can hold at most ${Math.floor((text.length + 1) / 2)}`);
  });

  it('refuses a coordinate file declaring 10¹² entries in a few bytes (truncated_file)', () => {
    const e = caught(() => parseMatrixMarket('%%MatrixMarket matrix coordinate real general\n3 3 1000000000000\n1 1 1\n', 'A', 'A.mtx'));
    expect(e.code).toBe('truncated_file');
    expect(e.message).toMatch(/^A\.mtx: A declares 1,000,000,000,000 entries, but the file is only \d+ characters long/);
  });

  it('takes the limit from the option, then from MODESHELF_MAX_DENSE_ENTRIES', () => {
    const text = '%%MatrixMarket matrix array real general\n3 3\n' + '1\n'.repeat(9);
    expect(parseMatrixMarket(text, 'A', 'A.mtx', { maxDenseEntries: 9 }).rows).toBe(3);
    expect(caught(() => parseMatrixMarket(text, 'A', 'A.mtx', { maxDenseEntries: 8 })).message).toMatch(/A declares 3×3 \(9 entries\), more than the limit of 8 entries/);
    process.env[ENV] = '4';
    expect(caught(() => parseMatrixMarket(text, 'A', 'A.mtx')).message).toMatch(/limit of 4 entries/);
    // The option wins over the environment.
    expect(parseMatrixMarket(text, 'A', 'A.mtx', { maxDenseEntries: 100 }).rows).toBe(3);
    process.env[ENV] = 'lots';
    const e = caught(() => parseMatrixMarket(text, 'A', 'A.mtx'));
    expect(e.code).toBe('invalid_option');
    expect(e.message).toMatch(/MODESHELF_MAX_DENSE_ENTRIES must be a positive whole number, got "lots"/);
  });

  it('still reads symmetric and skew-symmetric array files position by position', () => {
    // Lower triangles column by column (NISTIR 5935 §3): symmetric [[1,2],[2,3]], skew [[0,-5],[5,0]].
    expect(Array.from(parseMatrixMarket('%%MatrixMarket matrix array real symmetric\n2 2\n1\n2\n3\n', 'A').data)).toEqual([1, 2, 2, 3]);
    expect(Array.from(parseMatrixMarket('%%MatrixMarket matrix array real skew-symmetric\n2 2\n5\n', 'A').data)).toEqual([0, -5, 5, 0]);
    expect(Array.from(parseMatrixMarket('%%MatrixMarket matrix array real skew-symmetric\n1 1\n', 'A').data)).toEqual([0]);
  });
});

describe('CSV and JSON: sizes past the limit', () => {
  it('refuses a CSV whose line count × first-line columns passes the limit', () => {
    const text = Array.from({ length: 11 }, () => Array(10).fill('0').join(',')).join('\n') + '\n';
    const e = caught(() => parseCsvMatrix(text, 'A', 'A.csv', { maxDenseEntries: 100 }));
    expect(e.code).toBe('too_large');
    expect(e.message).toMatch(/^A\.csv: A declares 11×10 \(110 entries\), more than the limit of 100 entries/);
    expect(parseCsvMatrix(text, 'A', 'A.csv', { maxDenseEntries: 110 }).rows).toBe(11);
  });

  it('refuses a JSON matrix past the limit, and a second-order model whose 2n × 2n first-order form passes it', () => {
    const rows = Array.from({ length: 11 }, () => Array(10).fill(0));
    expect(caught(() => matrixFromJsonRows(rows, 'A', 'm.json', { maxDenseEntries: 100 })).message).toMatch(/^m\.json: A declares 11×10/);
    const eye = (n: number) => Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? 1 : 0)));
    const doc = JSON.stringify({ form: 'second-order', mass: eye(6), stiffness: eye(6), force: eye(6).map((r) => [r[0]]), displacementOutput: [eye(6)[0]] });
    // 6 DOF → 12 × 12 = 144 entries > 100, although every file matrix is 6 × 6 = 36.
    const e = caught(() => parseModelJson(doc, 'masses.json', { maxDenseEntries: 100 }));
    expect(e.code).toBe('too_large');
    expect(e.field).toBe('mass');
    expect(e.message).toMatch(/^masses\.json: the first-order form of this 6-degree-of-freedom model declares 12×12 \(144 entries\), more than the limit of 100/);
    expect(parseModelJson(doc, 'masses.json', { maxDenseEntries: 144 }).A.rows).toBe(12);
  });

  it('passes the option through parseModelFiles and loadModelFiles', () => {
    const a = '%%MatrixMarket matrix array real general\n2 2\n-1\n0\n0\n-2\n';
    const files = [
      { name: 'A.mtx', text: a },
      { name: 'B.csv', text: '1\n1\n' },
      { name: 'C.csv', text: '1,1\n' },
    ];
    expect(caught(() => parseModelFiles(files, { maxDenseEntries: 3 })).message).toMatch(/^A\.mtx: A declares 2×2 \(4 entries\), more than the limit of 3/);
    const dir = mkdtempSync(path.join(tmpdir(), 'modeshelf-limits-'));
    try {
      for (const f of files) writeFileSync(path.join(dir, f.name), f.text);
      const paths = files.map((f) => path.join(dir, f.name));
      expect(loadModelFiles(paths).A.rows).toBe(2);
      expect(caught(() => loadModelFiles(paths, { maxDenseEntries: 3 })).code).toBe('too_large');
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

describe('the command line and the upload check refuse cleanly', () => {
  it('cli.ts prints one error line (no RangeError, no stack) and exits 2 for a 10⁸ × 10⁸ file', () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'modeshelf-limits-cli-'));
    try {
      writeFileSync(path.join(dir, 'A.mtx'), hugeArray);
      writeFileSync(path.join(dir, 'B.csv'), '1\n');
      writeFileSync(path.join(dir, 'C.csv'), '1\n');
      const r = spawnSync('npx', ['tsx', 'reduction/cli.ts', 'analyze', ...['A.mtx', 'B.csv', 'C.csv'].map((f) => path.join(dir, f))], { cwd: ROOT, encoding: 'utf8' });
      expect(r.status).toBe(2);
      expect(r.stdout).toBe('');
      expect(r.stderr).toMatch(/^error: .*A\.mtx: A declares 100,000,000×100,000,000 .*limit of 25,000,000 entries.*\(field: A, code: too_large\)\n$/);
      expect(r.stderr).not.toMatch(/RangeError|\n\s+at /);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('the upload check refuses each reader\'s impossible size before allocating it, and this process carries on', () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'modeshelf-limits-check-'));
    try {
      const write = (name: string, text: string) => {
        writeFileSync(path.join(dir, name), text);
        return path.join(dir, name);
      };
      const b = { role: 'B' as const, name: 'B.csv', path: write('B.csv', '1\n') };
      const c = { role: 'C' as const, name: 'C.csv', path: write('C.csv', '1\n') };
      // A coordinate file takes the sparse check, which compares A's declared size with B and C before it
      // reads A's entries, and a declared entry count with what the file's bytes can hold.
      const mm = validateModelFiles([{ role: 'A', name: 'A.mtx', path: write('A.mtx', hugeSparse) }, b, c]);
      expect(mm).toMatchObject({ ok: false, error: { code: 'dimension_mismatch', field: 'A', message: expect.stringMatching(/^A\.mtx: A is 100000000×100000000 but C has 1 columns/) } });
      const n = 3000;
      const bTall = { role: 'B' as const, name: 'B.csv', path: write('B-tall.csv', '1\n'.repeat(n)) };
      const cWide = { role: 'C' as const, name: 'C.csv', path: write('C-wide.csv', `${Array(n).fill('1').join(',')}\n`) };
      const overdeclared = `%%MatrixMarket matrix coordinate real general\n${n} ${n} 900000000000\n1 1 -1\n`;
      const sparseOutcome = validateModelFiles([{ role: 'A', name: 'A.mtx', path: write('A-over.mtx', overdeclared) }, bTall, cWide]);
      expect(sparseOutcome).toMatchObject({ ok: false, error: { code: 'truncated_file', field: 'A', message: expect.stringMatching(/^A\.mtx: A declares 900,000,000,000 entries, but the file is only \d+ characters long/) } });
      process.env[ENV] = '100';
      const wide = Array.from({ length: 11 }, () => Array(10).fill('0').join(',')).join('\n');
      const csvOutcome = validateModelFiles([{ role: 'A', name: 'A.csv', path: write('A.csv', wide) }, b, c]);
      expect(csvOutcome).toMatchObject({ ok: false, error: { code: 'too_large', field: 'A', message: expect.stringMatching(/A\.csv: A declares 11×10 .*limit of 100 entries/) } });
      const json = JSON.stringify({ A: Array.from({ length: 11 }, () => Array(11).fill(0)), B: [[1]], C: [[1]] });
      const jsonOutcome = validateModelFiles([{ role: 'model', name: 'm.json', path: write('m.json', json) }]);
      expect(jsonOutcome).toMatchObject({ ok: false, error: { code: 'too_large', field: 'model', message: expect.stringMatching(/m\.json: A declares 11×11 \(121 entries\)/) } });
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
