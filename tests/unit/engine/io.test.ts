/**
 * Model input: JSON, Matrix Market and CSV parsers and the validation boundary (issue 3, "Models in").
 * Matrix Market reading is checked against scipy.io.mmread (Debian python3-scipy) on fixtures written by
 * scipy.io.mmwrite (tests/reference/io_matrix_market.py). Every validation error has a malformed file in
 * tests/fixtures/engine/io/bad/.
 */
import { describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import { readFileSync, readdirSync } from 'node:fs';
import path from 'node:path';
import { ModelError } from '@/reduction/errors';
import {
  assembleModel,
  loadModelFiles,
  modelToJson,
  parseCsvMatrix,
  parseMatrixMarket,
  parseModelFiles,
  parseModelJson,
  writeMatrixMarket,
} from '@/reduction/io';
import { fromRows, toRows, zeros } from '@/reduction/linalg/matrix';

const IO = path.resolve(__dirname, '../../fixtures/engine/io');
const bad = (f: string) => path.join(IO, 'bad', f);
const good = (f: string) => path.join(IO, 'good', f);
const text = (p: string) => readFileSync(p, 'utf8');

function caught(fn: () => unknown): ModelError {
  try {
    fn();
  } catch (e) {
    if (e instanceof ModelError) return e;
    throw new Error(`expected a ModelError, got ${String(e)}`);
  }
  throw new Error('expected a ModelError, nothing was thrown');
}

describe('Matrix Market against scipy.io.mmread', () => {
  const files = readdirSync(IO).filter((f) => f.endsWith('.mtx'));
  // Reference: scipy.io.mmread of the same files, densified (Debian python3-scipy).
  const reference = JSON.parse(
    execFileSync('/usr/bin/python3', [
      path.resolve(__dirname, '../../reference/io_matrix_market.py'),
      'read',
      ...files.map((f) => path.join(IO, f)),
    ]).toString(),
  ) as Record<string, number[][]>;

  it('has the five mmwrite fixtures (coordinate/array, general/symmetric, integer)', () => {
    expect(files.sort()).toEqual([
      'array_general.mtx',
      'array_symmetric.mtx',
      'coordinate_general.mtx',
      'coordinate_integer.mtx',
      'coordinate_symmetric.mtx',
    ]);
  });

  for (const f of ['array_general.mtx', 'array_symmetric.mtx', 'coordinate_general.mtx', 'coordinate_integer.mtx', 'coordinate_symmetric.mtx']) {
    it(`reads ${f} exactly as scipy.io.mmread does`, () => {
      const m = parseMatrixMarket(text(path.join(IO, f)), 'A', f);
      expect(toRows(m)).toEqual(reference[f]);
    });
  }

  it('fills both triangles of a symmetric file (NISTIR 5935 §3)', () => {
    const m = parseMatrixMarket(text(path.join(IO, 'coordinate_symmetric.mtx')), 'A');
    for (let i = 0; i < m.rows; i++) for (let j = 0; j < i; j++) expect(m.data[i * 6 + j]).toBe(m.data[j * 6 + i]);
    expect(m.data.some((v, k) => v !== 0 && Math.floor(k / 6) < k % 6)).toBe(true);
  });

  it('writes array files that read back bit-for-bit', () => {
    const a = fromRows([
      [1 / 3, -2e-17],
      [Math.PI, 5],
      [0, -1e300],
    ]);
    expect(parseMatrixMarket(writeMatrixMarket(a, 'round trip'), 'A').data).toEqual(a.data);
  });
});

describe('Matrix Market errors', () => {
  it('reports a truncated coordinate file with declared and found counts', () => {
    const e = caught(() => parseMatrixMarket(text(bad('truncated_coordinate.mtx')), 'A', 'truncated_coordinate.mtx'));
    expect(e.code).toBe('truncated_file');
    expect(e.field).toBe('A');
    expect(e.message).toContain('4 entries declared, 3 found');
    expect(e.message).toContain('truncated_coordinate.mtx');
  });
  it('reports a truncated array file', () => {
    const e = caught(() => parseMatrixMarket(text(bad('truncated_array.mtx')), 'B'));
    expect(e.code).toBe('truncated_file');
    expect(e.message).toContain('4 values declared, 3 found');
  });
  it('refuses a file without the %%MatrixMarket header', () => {
    expect(caught(() => parseMatrixMarket(text(bad('bad_header.mtx')), 'A')).code).toBe('parse_error');
  });
  it('names the line of an index outside the declared size', () => {
    const e = caught(() => parseMatrixMarket(text(bad('index_out_of_range.mtx')), 'A'));
    expect(e.code).toBe('parse_error');
    expect(e.message).toMatch(/line 3: entry \(3, 1\) is outside the declared 2×2/);
  });
  it('names the line of a non-numeric value', () => {
    const e = caught(() => parseMatrixMarket(text(bad('non_numeric_value.mtx')), 'C', 'c.mtx'));
    expect(e.code).toBe('non_numeric');
    expect(e.message).toMatch(/c\.mtx: C line 4: value "abc"/);
  });
  it('refuses complex values', () => {
    expect(caught(() => parseMatrixMarket(text(bad('complex_field.mtx')), 'A')).code).toBe('unsupported_format');
  });
  it('refuses a 0×0 matrix as empty', () => {
    expect(caught(() => parseMatrixMarket(text(bad('empty.mtx')), 'A')).code).toBe('empty_matrix');
  });
  it('refuses NaN values as not finite', () => {
    const e = caught(() => parseMatrixMarket(text(bad('nan_value.mtx')), 'B'));
    expect(e.code).toBe('non_finite');
    expect(e.message).toContain('line 4');
  });
  it('refuses more entries than declared', () => {
    expect(caught(() => parseMatrixMarket(text(bad('extra_entries.mtx')), 'A')).message).toContain('more entries');
  });
});

describe('CSV matrices', () => {
  it('tolerates CRLF line ends, a trailing blank line and a byte-order mark', () => {
    expect(toRows(parseCsvMatrix(text(good('A_crlf.csv')), 'A'))).toEqual([
      [-1, 0.5],
      [0, -2],
    ]);
    expect(toRows(parseCsvMatrix(text(good('D_bom.csv')), 'D'))).toEqual([[0.25]]);
  });
  it('names file, row and column of a non-numeric cell', () => {
    const e = caught(() => parseCsvMatrix(text(bad('A_non_numeric.csv')), 'A', 'A_non_numeric.csv'));
    expect(e.code).toBe('non_numeric');
    expect(e.field).toBe('A');
    expect(e.message).toBe('A_non_numeric.csv: A row 3, column 3 is not a number: "x3"');
  });
  it('names an empty cell rather than reading it as zero', () => {
    const e = caught(() => parseCsvMatrix(text(bad('empty_cell.csv')), 'B', 'empty_cell.csv'));
    expect(e.code).toBe('non_numeric');
    expect(e.message).toContain('row 1, column 2 is not a number: an empty cell');
  });
  it('reports jagged rows', () => {
    const e = caught(() => parseCsvMatrix(text(bad('jagged.csv')), 'A'));
    expect(e.code).toBe('jagged_rows');
    expect(e.message).toContain('row 2 has 1 columns but row 1 has 2');
  });
  it('reports a blank interior row', () => {
    expect(caught(() => parseCsvMatrix(text(bad('blank_interior_row.csv')), 'A')).code).toBe('jagged_rows');
  });
  it('reports infinite cells with their position', () => {
    const e = caught(() => parseCsvMatrix(text(bad('infinite.csv')), 'C'));
    expect(e.code).toBe('non_finite');
    expect(e.message).toContain('row 2, column 2');
  });
  it('reports an empty file', () => {
    expect(caught(() => parseCsvMatrix(text(bad('empty.csv')), 'A')).code).toBe('empty_matrix');
  });
});

describe('JSON models', () => {
  it('reads matrices, labels and time base; D defaults to zeros', () => {
    const m = parseModelJson(text(good('first_order.json')));
    expect(toRows(m.A)).toEqual([
      [-1, 0.5],
      [0, -2],
    ]);
    expect(toRows(m.D)).toEqual([[0]]);
    expect(m.labels).toEqual({ inputs: ['heater'], outputs: ['T1'], states: ['x1', 'x2'] });
    expect(m.timeBase).toBe('s');
  });

  it('round-trips through modelToJson exactly', () => {
    const m = assembleModel({ A: fromRows([[-1 / 3]]), B: fromRows([[Math.E]]), C: fromRows([[1e-300]]) });
    const back = parseModelJson(modelToJson(m));
    expect(back.A.data).toEqual(m.A.data);
    expect(back.B.data).toEqual(m.B.data);
    expect(back.C.data).toEqual(m.C.data);
    const labelled = parseModelJson(text(good('first_order.json')));
    const again = parseModelJson(modelToJson(labelled));
    expect(again.labels).toEqual(labelled.labels);
    expect(again.timeBase).toBe('s');
  });

  const cases: [string, string, string, RegExp][] = [
    ['A_not_square.json', 'not_square', 'A', /A must be square but is 2×3/],
    ['B_rows_mismatch.json', 'dimension_mismatch', 'B', /B has 3 rows but A is 4×4/],
    ['C_cols_mismatch.json', 'dimension_mismatch', 'C', /C has 3 columns but A is 2×2/],
    ['D_rows_mismatch.json', 'dimension_mismatch', 'D', /D has 2 rows but C has 1 row/],
    ['D_cols_mismatch.json', 'dimension_mismatch', 'D', /D has 2 columns but B has 1 column/],
    ['A_nan_bare_token.json', 'non_finite', 'A', /A row 2, column 2 is not finite \(NaN\)/],
    ['C_overflow_infinity.json', 'non_finite', 'C', /C row 1, column 2 is not finite/],
    ['B_string_cell.json', 'non_numeric', 'B', /B row 2, column 1 is not a number: "x1"/],
    ['A_jagged.json', 'jagged_rows', 'A', /A row 2 has 2 entries but row 1 has 3/],
    ['A_empty.json', 'empty_matrix', 'A', /A is empty/],
    ['C_missing.json', 'missing_field', 'C', /no "C" matrix/],
    ['labels_inputs_length.json', 'dimension_mismatch', 'labels.inputs', /labels\.inputs has 2 names but the model has 1 input/],
    // A key the format does not define (labels outside "labels", a misspelt or retired key) is refused, naming
    // the key and the shape that holds labels and the time base, instead of dropping the labels silently.
    ['labels_at_top_level.json', 'unknown_field', 'inputs', /"inputs" is not a field of a first-order model file.*"labels": \{"inputs": \[\.\.\.\], "outputs": \[\.\.\.\], "states": \[\.\.\.\]\}.*"timeBase"/],
    ['labels_unknown_list.json', 'unknown_field', 'labels.input', /labels\.input is not a label list/],
    ['syntax_error.json', 'parse_error', 'syntax_error.json', /not valid JSON/],
    ['unknown_form.json', 'unsupported_format', 'form', /third-order/],
  ];
  for (const [file, code, field, message] of cases) {
    it(`${file}: ${code} on ${field}`, () => {
      const e = caught(() => parseModelJson(text(bad(file)), file));
      expect(e.code).toBe(code);
      expect(e.field).toBe(field);
      expect(e.message).toMatch(message);
      expect(e.message.startsWith(`${file}: `) || !e.message.includes('.json')).toBe(true);
    });
  }
});

describe('assembleModel on matrices built in code', () => {
  it('names a NaN entry made by arithmetic', () => {
    const A = fromRows([[-1, 0], [0, 0 / 0]]);
    const e = caught(() => assembleModel({ A, B: fromRows([[1], [1]]), C: fromRows([[1, 1]]) }));
    expect(e.message).toBe('A row 2, column 2 is not finite (NaN)');
  });
  it('refuses a model with no inputs as an empty B', () => {
    expect(caught(() => assembleModel({ A: fromRows([[-1]]), B: zeros(1, 0), C: fromRows([[1]]) })).code).toBe('empty_matrix');
  });
});

describe('loadModelFiles', () => {
  it('loads A, B, C, D from mixed .csv and .mtx files in order', () => {
    const m = loadModelFiles([good('A_crlf.csv'), good('B.csv'), good('C.csv'), good('D_bom.csv')]);
    expect(m.A.rows).toBe(2);
    expect(toRows(m.D)).toEqual([[0.25]]);
  });
  it('names B and its file-level cause when a Matrix Market B does not fit A', () => {
    // coordinate_general is 6×6, array_symmetric is 5×5: B has 5 rows but A is 6×6.
    const e = caught(() =>
      loadModelFiles([path.join(IO, 'coordinate_general.mtx'), path.join(IO, 'array_symmetric.mtx'), good('C.csv')]),
    );
    expect(e.code).toBe('dimension_mismatch');
    expect(e.message).toBe('B has 5 rows but A is 6×6');
  });
  it('names the file of a bad CSV cell', () => {
    const e = caught(() => loadModelFiles([bad('A_non_numeric.csv'), good('B.csv'), good('C.csv')]));
    expect(e.message).toContain('A_non_numeric.csv: A row 3, column 3');
  });
  it('refuses a single non-JSON file and a wrong file count', () => {
    expect(caught(() => loadModelFiles([good('B.csv')])).code).toBe('invalid_option');
    expect(caught(() => loadModelFiles([good('B.csv'), good('C.csv')])).code).toBe('invalid_option');
  });
  it('reports a missing file as unreadable, naming the matrix', () => {
    const e = caught(() => loadModelFiles([good('A_crlf.csv'), good('nope.csv'), good('C.csv')]));
    expect(e.code).toBe('unreadable_file');
    expect(e.field).toBe('B');
  });
});

describe('parseModelFiles (uploaded texts, no file system)', () => {
  it('parses A, B, C texts by their names, as the web upload will', () => {
    const m = parseModelFiles([
      { name: 'A.mtx', text: text(path.join(IO, 'coordinate_general.mtx')) },
      { name: 'uploads/B.csv', text: '1\n0\n0\n0\n0\n1\n' },
      { name: 'C.csv', text: '1,0,0,0,0,0\r\n' },
    ]);
    expect(m.A.rows).toBe(6);
    expect(m.B.cols).toBe(1);
  });
  it('names the uploaded file in a cell error', () => {
    const e = caught(() =>
      parseModelFiles([
        { name: 'plant_A.csv', text: '-1,0\n0,oops\n' },
        { name: 'B.csv', text: '1\n1\n' },
        { name: 'C.csv', text: '1,1\n' },
      ]),
    );
    expect(e.message).toBe('plant_A.csv: A row 2, column 2 is not a number: "oops"');
  });
  it('refuses an unknown extension, naming the matrix', () => {
    const e = caught(() => parseModelFiles([{ name: 'A.txt', text: '1' }, { name: 'B.csv', text: '1' }, { name: 'C.csv', text: '1' }]));
    expect(e.code).toBe('unsupported_format');
    expect(e.field).toBe('A');
  });
});
