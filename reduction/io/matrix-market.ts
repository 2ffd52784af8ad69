/**
 * Matrix Market exchange format, as specified by NIST: Boisvert, Pozo & Remington, "The Matrix Market
 * Exchange Formats: Initial Design", NISTIR 5935 (1996). The subset FE tools export for real models:
 *
 *   %%MatrixMarket matrix coordinate|array real|integer general|symmetric|skew-symmetric
 *   % comments
 *   M N NNZ          (coordinate)   or   M N   (array)
 *   i j value        (coordinate, 1-based; symmetric: one triangle, mirrored here)
 *   value            (array, column-major; symmetric: lower triangle only, column by column)
 *
 * Duplicate coordinate entries are summed, as a sparse-to-dense conversion does. `pattern` and `complex`
 * fields are refused: a state-space model needs real values.
 */
import { ModelError } from '../errors';
import { type Matrix, zeros } from '../linalg/matrix';
import { checkDeclaredCount, checkDenseSize, type ReadLimits } from './limits';
import { inFile, readNumericCell } from './numbers';

type Symmetry = 'general' | 'symmetric' | 'skew-symmetric';

interface Cursor {
  lines: string[];
  next: number; // index of the next unread line
}

/** Next non-blank, non-comment line split into tokens, with its 1-based line number; null at the end. */
function nextTokens(c: Cursor): { tokens: string[]; line: number } | null {
  while (c.next < c.lines.length) {
    const raw = c.lines[c.next++].trim();
    if (raw === '' || raw.startsWith('%')) continue;
    return { tokens: raw.split(/\s+/), line: c.next };
  }
  return null;
}

function readCount(token: string, what: string, field: string, where: string, line: number): number {
  if (!/^\d+$/.test(token)) {
    throw new ModelError('parse_error', field, `${where}line ${line}: ${what} "${token}" is not a whole number`);
  }
  return Number(token);
}

/**
 * Parse a Matrix Market file into a dense matrix. `field` names the matrix for the error; `fileName`
 * starts every message. Throws ModelError: parse_error (header, size line, index out of range),
 * unsupported_format, empty_matrix, truncated_file (fewer entries than declared, or more than the file's
 * length can hold), too_large (rows × cols past the dense limit, see limits.ts), non_numeric, non_finite.
 * Sizes are checked before the matrix is allocated.
 */
export function parseMatrixMarket(text: string, field: string, fileName?: string, limits: ReadLimits = {}): Matrix {
  const where = inFile(fileName);
  const lines = text.replace(/^\uFEFF/, '').split(/\r\n|\n|\r/);
  const header = (lines[0] ?? '').trim().split(/\s+/);
  if (header[0]?.toLowerCase() !== '%%matrixmarket' || header.length < 5) {
    throw new ModelError(
      'parse_error',
      field,
      `${where}${field} is not a Matrix Market file: the first line must be "%%MatrixMarket matrix <format> <field> <symmetry>"`,
    );
  }
  const [object, format, valueField, symmetryRaw] = header.slice(1, 5).map((h) => h.toLowerCase());
  if (object !== 'matrix') {
    throw new ModelError('unsupported_format', field, `${where}${field}: Matrix Market object "${object}" is not "matrix"`);
  }
  if (format !== 'coordinate' && format !== 'array') {
    throw new ModelError('unsupported_format', field, `${where}${field}: Matrix Market format "${format}" is not coordinate or array`);
  }
  if (valueField !== 'real' && valueField !== 'integer' && valueField !== 'double') {
    throw new ModelError(
      'unsupported_format',
      field,
      `${where}${field}: Matrix Market field "${valueField}" is not supported (real or integer values are needed)`,
    );
  }
  if (symmetryRaw !== 'general' && symmetryRaw !== 'symmetric' && symmetryRaw !== 'skew-symmetric') {
    throw new ModelError('unsupported_format', field, `${where}${field}: Matrix Market symmetry "${symmetryRaw}" is not supported`);
  }
  const symmetry = symmetryRaw as Symmetry;
  const cursor: Cursor = { lines, next: 1 };

  const size = nextTokens(cursor);
  if (!size) throw new ModelError('truncated_file', field, `${where}${field}: the file ends before its size line`);
  const expectedTokens = format === 'coordinate' ? 3 : 2;
  if (size.tokens.length !== expectedTokens) {
    throw new ModelError(
      'parse_error',
      field,
      `${where}line ${size.line}: the size line of a ${format} file needs ${expectedTokens} numbers, found "${size.tokens.join(' ')}"`,
    );
  }
  const rows = readCount(size.tokens[0], 'row count', field, where, size.line);
  const cols = readCount(size.tokens[1], 'column count', field, where, size.line);
  if (rows === 0 || cols === 0) throw new ModelError('empty_matrix', field, `${where}${field} is empty (${rows}×${cols})`);
  if (symmetry !== 'general' && rows !== cols) {
    throw new ModelError('not_square', field, `${where}${field} is declared ${symmetry} but is ${rows}×${cols}`);
  }
  // Before any allocation: the dense limit, then whether the file can hold what it declares
  // ("1 1 0\n" is the shortest coordinate entry, "0\n" the shortest array value).
  checkDenseSize(rows, cols, field, where, limits);
  let nnz = 0;
  const declaredValues = symmetry === 'general' ? rows * cols : symmetry === 'symmetric' ? (rows * (rows + 1)) / 2 : (rows * (rows - 1)) / 2;
  if (format === 'coordinate') {
    nnz = readCount(size.tokens[2], 'entry count', field, where, size.line);
    checkDeclaredCount(nnz, text.length, 6, field, where, 'entries');
  } else {
    checkDeclaredCount(declaredValues, text.length, 2, field, where, 'values');
  }
  const out = zeros(rows, cols);
  const sign = symmetry === 'skew-symmetric' ? -1 : 1;

  const readValue = (token: string, line: number): number => {
    const cell = readNumericCell(token);
    if (cell.kind === 'non_numeric') {
      throw new ModelError('non_numeric', field, `${where}${field} line ${line}: value "${token}" is not a number`);
    }
    if (cell.kind === 'non_finite') {
      throw new ModelError('non_finite', field, `${where}${field} line ${line}: value "${token}" is not finite`);
    }
    return cell.value;
  };

  if (format === 'coordinate') {
    for (let k = 0; k < nnz; k++) {
      const entry = nextTokens(cursor);
      if (!entry) {
        throw new ModelError(
          'truncated_file',
          field,
          `${where}${field} is truncated: ${nnz} entries declared, ${k} found`,
        );
      }
      if (entry.tokens.length !== 3) {
        throw new ModelError(
          'parse_error',
          field,
          `${where}${field} line ${entry.line}: a coordinate entry needs "row column value", found "${entry.tokens.join(' ')}"`,
        );
      }
      const i = readCount(entry.tokens[0], 'row index', field, where, entry.line);
      const j = readCount(entry.tokens[1], 'column index', field, where, entry.line);
      if (i < 1 || i > rows || j < 1 || j > cols) {
        throw new ModelError(
          'parse_error',
          field,
          `${where}${field} line ${entry.line}: entry (${i}, ${j}) is outside the declared ${rows}×${cols} size`,
        );
      }
      const v = readValue(entry.tokens[2], entry.line);
      out.data[(i - 1) * cols + (j - 1)] += v;
      if (symmetry !== 'general' && i !== j) out.data[(j - 1) * cols + (i - 1)] += sign * v;
    }
  } else {
    // Array format: values column by column; a symmetric file lists only the lower triangle (i ≥ j),
    // a skew-symmetric one only the strict lower triangle (i > j).
    // The position (i, j) advances as values are read, so no list of positions is ever built.
    const firstRow = (j: number) => (symmetry === 'general' ? 0 : symmetry === 'symmetric' ? j : j + 1);
    let k = 0;
    let i = firstRow(0);
    let j = 0;
    while (i >= rows && j < cols) i = firstRow(++j); // a 1×1 skew-symmetric file declares no values
    while (k < declaredValues) {
      const entry = nextTokens(cursor);
      if (!entry) {
        throw new ModelError(
          'truncated_file',
          field,
          `${where}${field} is truncated: ${declaredValues} values declared, ${k} found`,
        );
      }
      for (const token of entry.tokens) {
        if (k >= declaredValues) {
          throw new ModelError('parse_error', field, `${where}${field} line ${entry.line}: more values than the declared ${rows}×${cols}`);
        }
        const v = readValue(token, entry.line);
        out.data[i * cols + j] = v;
        if (symmetry !== 'general' && i !== j) out.data[j * cols + i] = sign * v;
        k++;
        i++;
        while (i >= rows && j < cols) i = firstRow(++j);
      }
    }
  }
  const extra = nextTokens(cursor);
  if (extra) {
    throw new ModelError('parse_error', field, `${where}${field} line ${extra.line}: more entries than the size line declares`);
  }
  return out;
}

/** Write a dense matrix as a Matrix Market array file (general), for exports and test fixtures. */
export function writeMatrixMarket(m: Matrix, comment?: string): string {
  const parts = ['%%MatrixMarket matrix array real general'];
  if (comment) for (const line of comment.split('\n')) parts.push(`% ${line}`);
  parts.push(`${m.rows} ${m.cols}`);
  for (let j = 0; j < m.cols; j++) for (let i = 0; i < m.rows; i++) parts.push(String(m.data[i * m.cols + j]));
  return parts.join('\n') + '\n';
}
