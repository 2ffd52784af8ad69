/**
 * Matrix Market coordinate files read straight into compressed sparse columns, for the large-model path
 * (format: Boisvert, Pozo & Remington, "The Matrix Market Exchange Formats: Initial Design", NISTIR 5935,
 * 1996). The dense reader (`reduction/io/matrix-market.ts`) handles every small matrix; this one exists so
 * that a 10⁵-state A is never a dense n×n array:
 *
 *   %%MatrixMarket matrix coordinate real|integer|double general|symmetric|skew-symmetric
 *   % comments
 *   N N NNZ
 *   i j value       (1-based; symmetric and skew-symmetric: one triangle, mirrored here)
 *
 * Duplicates are summed. Refused with a ModelError naming the file and line, as the dense reader does:
 * `pattern` and `complex` fields and the `array` format (unsupported_format), a non-square size
 * (not_square), a bad header or size line, an index outside the size, a malformed entry (parse_error),
 * a non-numeric or non-finite value, fewer entries than declared or a declared count the file cannot hold
 * (truncated_file, checked before anything is allocated), more entries than declared. Memory: the
 * coordinates once (three arrays of the declared count, doubled for a symmetric file) and the result.
 */
import { ModelError } from '../errors';
import { checkDeclaredCount } from '../io/limits';
import { inFile, readNumericCell } from '../io/numbers';
import { cscFromCoo, type CscMatrix } from './model';

/** The lines of a coordinate file, one at a time: from a text in memory, or streamed from a file (file-reader.ts). */
export interface LineSource {
  /** 1-based number of the last line returned */
  readonly line: number;
  /** The next non-blank, non-comment line (trimmed) or null at the end. */
  next(): string | null;
}

/** Line-by-line reading of a text without splitting it all at once. */
class Lines implements LineSource {
  private pos = 0;
  line = 0; // 1-based number of the last line returned
  constructor(private readonly text: string) {}

  /** The next non-blank, non-comment line (trimmed) or null at the end. */
  next(): string | null {
    const t = this.text;
    while (this.pos < t.length) {
      let end = t.indexOf('\n', this.pos);
      if (end < 0) end = t.length;
      const raw = t.slice(this.pos, end).trim();
      this.pos = end + 1;
      this.line++;
      if (raw === '' || raw.startsWith('%')) continue;
      return raw;
    }
    return null;
  }
}

/**
 * Parse a Matrix Market coordinate file into CSC. `field` names the matrix (`A`, `E`) in errors;
 * `fileName` starts every message.
 */
export function parseSparseMatrixMarket(text: string, field: string, fileName?: string): CscMatrix {
  const body = text.replace(/^\uFEFF/, '').replace(/\r\n?/g, '\n');
  const firstEnd = body.indexOf('\n');
  return parseCoordinateLines((firstEnd < 0 ? body : body.slice(0, firstEnd)).trim(), new Lines(body), body.length, field, fileName);
}

/**
 * The reader behind both entries: `header` is the file's first line; `lines` starts at the first line (the
 * header, a comment to it, is passed over); `length` is the file's length in characters (or bytes), against
 * which a declared entry count is checked before anything is allocated.
 */
export function parseCoordinateLines(headerLine: string, lines: LineSource, length: number, field: string, fileName?: string): CscMatrix {
  const where = inFile(fileName);
  const header = headerLine.trim().split(/\s+/);
  if (header[0]?.toLowerCase() !== '%%matrixmarket' || header.length < 5) {
    throw new ModelError(
      'parse_error',
      field,
      `${where}line 1: ${field} is not a Matrix Market file: the first line must be "%%MatrixMarket matrix coordinate <field> <symmetry>"`,
    );
  }
  const [object, format, valueField, symmetry] = header.slice(1, 5).map((h) => h.toLowerCase());
  if (object !== 'matrix') {
    throw new ModelError('unsupported_format', field, `${where}line 1: ${field}: Matrix Market object "${object}" is not "matrix"`);
  }
  if (format !== 'coordinate') {
    throw new ModelError(
      'unsupported_format',
      field,
      `${where}line 1: ${field}: the sparse path reads Matrix Market coordinate files, not "${format}" (a large matrix stored dense cannot be read sparsely)`,
    );
  }
  if (valueField !== 'real' && valueField !== 'integer' && valueField !== 'double') {
    throw new ModelError(
      'unsupported_format',
      field,
      `${where}line 1: ${field}: Matrix Market field "${valueField}" is not supported (real or integer values are needed)`,
    );
  }
  if (symmetry !== 'general' && symmetry !== 'symmetric' && symmetry !== 'skew-symmetric') {
    throw new ModelError('unsupported_format', field, `${where}line 1: ${field}: Matrix Market symmetry "${symmetry}" is not supported`);
  }
  // The header starts with '%', so the scanner passes over it as a comment (and counts its line).
  const size = lines.next();
  if (size === null) throw new ModelError('truncated_file', field, `${where}${field}: the file ends before its size line`);
  const sizeTokens = size.split(/\s+/);
  if (sizeTokens.length !== 3) {
    throw new ModelError('parse_error', field, `${where}line ${lines.line}: the size line of a coordinate file needs 3 numbers, found "${size}"`);
  }
  const count = (token: string, what: string): number => {
    if (!/^\d+$/.test(token)) throw new ModelError('parse_error', field, `${where}line ${lines.line}: ${what} "${token}" is not a whole number`);
    return Number(token);
  };
  const rows = count(sizeTokens[0], 'row count');
  const cols = count(sizeTokens[1], 'column count');
  const nnz = count(sizeTokens[2], 'entry count');
  if (rows === 0 || cols === 0) throw new ModelError('empty_matrix', field, `${where}line ${lines.line}: ${field} is empty (${rows}×${cols})`);
  if (rows !== cols) throw new ModelError('not_square', field, `${where}line ${lines.line}: ${field} must be square, the file declares ${rows}×${cols}`);
  if (rows > 2 ** 31 - 2) throw new ModelError('too_large', field, `${where}line ${lines.line}: ${field} declares ${rows} rows, past 32-bit indices`);
  // Shortest entry: "1 1 0\n".
  checkDeclaredCount(nnz, length, 6, field, where, 'entries');

  const mirrored = symmetry !== 'general';
  const cap = mirrored ? 2 * nnz : nnz;
  const ri = new Int32Array(cap), ci = new Int32Array(cap), vv = new Float64Array(cap);
  const sign = symmetry === 'skew-symmetric' ? -1 : 1;
  let stored = 0;
  for (let k = 0; k < nnz; k++) {
    const entry = lines.next();
    if (entry === null) {
      throw new ModelError('truncated_file', field, `${where}line ${lines.line}: ${field} is truncated: the file ends after ${k} of the ${nnz} declared entries`);
    }
    const tokens = entry.split(/\s+/);
    if (tokens.length !== 3) {
      throw new ModelError('parse_error', field, `${where}line ${lines.line}: a coordinate entry needs "row column value", found "${entry}"`);
    }
    const i = /^\d+$/.test(tokens[0]) ? Number(tokens[0]) : NaN;
    const j = /^\d+$/.test(tokens[1]) ? Number(tokens[1]) : NaN;
    if (!(i >= 1 && i <= rows && j >= 1 && j <= cols)) {
      throw new ModelError(
        'parse_error',
        field,
        `${where}line ${lines.line}: entry (${tokens[0]}, ${tokens[1]}) of ${field} is outside the declared ${rows}×${cols} size`,
      );
    }
    const cell = readNumericCell(tokens[2]);
    if (cell.kind === 'non_numeric') throw new ModelError('non_numeric', field, `${where}line ${lines.line}: value "${tokens[2]}" of ${field} is not a number`);
    if (cell.kind === 'non_finite') throw new ModelError('non_finite', field, `${where}line ${lines.line}: value "${tokens[2]}" of ${field} is not finite`);
    if (symmetry === 'skew-symmetric' && i === j) {
      throw new ModelError('parse_error', field, `${where}line ${lines.line}: a skew-symmetric file stores no diagonal entries, found (${i}, ${j})`);
    }
    ri[stored] = i - 1;
    ci[stored] = j - 1;
    vv[stored++] = cell.value;
    if (mirrored && i !== j) {
      ri[stored] = j - 1;
      ci[stored] = i - 1;
      vv[stored++] = sign * cell.value;
    }
  }
  const extra = lines.next();
  if (extra !== null) {
    throw new ModelError('parse_error', field, `${where}line ${lines.line}: more entries in ${field} than the size line declares (${nnz})`);
  }
  return cscFromCoo(rows, ri.subarray(0, stored), ci.subarray(0, stored), vv.subarray(0, stored));
}

/** Whether a text is a Matrix Market coordinate file (its header line), without reading further. */
export function isMatrixMarketCoordinate(text: string): boolean {
  const end = text.indexOf('\n');
  const h = (end < 0 ? text : text.slice(0, end)).trim().toLowerCase().split(/\s+/);
  return h[0] === '%%matrixmarket' && h[1] === 'matrix' && h[2] === 'coordinate';
}

/** Write a sparse matrix as a Matrix Market coordinate file (general), for exports and test fixtures. */
export function writeSparseMatrixMarket(a: CscMatrix, comment?: string): string {
  const parts = ['%%MatrixMarket matrix coordinate real general'];
  if (comment) for (const line of comment.split('\n')) parts.push(`% ${line}`);
  parts.push(`${a.n} ${a.n} ${a.colPtr[a.n]}`);
  for (let j = 0; j < a.n; j++) for (let p = a.colPtr[j]; p < a.colPtr[j + 1]; p++) parts.push(`${a.rowIndex[p] + 1} ${j + 1} ${a.values[p]}`);
  return parts.join('\n') + '\n';
}

/**
 * The declared row count of a Matrix Market coordinate file from its header and size line only, or null
 * when the text is not a coordinate file or its size line is unreadable (the full reader then says why).
 */
export function coordinateRowCount(text: string): number | null {
  if (!isMatrixMarketCoordinate(text.replace(/^\uFEFF/, ''))) return null;
  const lines = new Lines(text.replace(/^\uFEFF/, '').slice(0, 1 << 16).replace(/\r\n?/g, '\n'));
  const size = lines.next();
  if (size === null) return null;
  const t = size.split(/\s+/);
  return t.length === 3 && /^\d+$/.test(t[0]) ? Number(t[0]) : null;
}
