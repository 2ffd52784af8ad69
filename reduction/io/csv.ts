/**
 * One matrix per CSV file: no header, comma-separated, one matrix row per line (RFC 4180 without
 * quoting, which numeric data never needs). A trailing newline, CRLF line ends and a UTF-8 byte-order
 * mark are tolerated because spreadsheet exports produce them.
 */
import { ModelError } from '../errors';
import { type Matrix, zeros } from '../linalg/matrix';
import { checkDenseSize, type ReadLimits } from './limits';
import { inFile, readNumericCell } from './numbers';

/** Split into lines, dropping a BOM and trailing blank lines (not interior ones: those are errors). */
export function csvLines(text: string): string[] {
  const lines = text.replace(/^\uFEFF/, '').split(/\r\n|\n|\r/);
  while (lines.length > 0 && lines[lines.length - 1].trim() === '') lines.pop();
  return lines;
}

/**
 * Parse a CSV matrix. `field` names the matrix (`A`, `B`, …) for the error's field; `fileName`, when
 * given, starts every message so the user knows which upload is wrong.
 * Throws ModelError: empty_matrix, jagged_rows, non_numeric, non_finite (row and column 1-based), too_large
 * (line count × the first line's column count past the dense limit, checked before allocating).
 */
export function parseCsvMatrix(text: string, field: string, fileName?: string, limits: ReadLimits = {}): Matrix {
  const where = inFile(fileName);
  const lines = csvLines(text);
  if (lines.length === 0) throw new ModelError('empty_matrix', field, `${where}${field} is empty (no rows)`);
  const cols = lines[0].split(',').length;
  checkDenseSize(lines.length, cols, field, where, limits);
  const out = zeros(lines.length, cols);
  for (let i = 0; i < lines.length; i++) {
    const row = lines[i].split(',');
    if (row.length === 1 && row[0].trim() === '') {
      throw new ModelError('jagged_rows', field, `${where}${field} row ${i + 1} is blank`);
    }
    if (row.length !== cols) {
      throw new ModelError(
        'jagged_rows',
        field,
        `${where}${field} row ${i + 1} has ${row.length} columns but row 1 has ${cols}`,
      );
    }
    for (let j = 0; j < cols; j++) {
      const cell = readNumericCell(row[j]);
      if (cell.kind === 'non_numeric') {
        const shown = row[j].trim() === '' ? 'an empty cell' : `"${row[j].trim().slice(0, 40)}"`;
        throw new ModelError(
          'non_numeric',
          field,
          `${where}${field} row ${i + 1}, column ${j + 1} is not a number: ${shown}`,
        );
      }
      if (cell.kind === 'non_finite') {
        throw new ModelError(
          'non_finite',
          field,
          `${where}${field} row ${i + 1}, column ${j + 1} is not finite (${row[j].trim()})`,
        );
      }
      out.data[i * cols + j] = cell.value;
    }
  }
  return out;
}
