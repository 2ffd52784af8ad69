/**
 * Reading one numeric cell of a text file (CSV, Matrix Market). `Number()` alone is too lenient for
 * model files: it reads an empty cell as 0 and accepts hex ("0x1f"), so a damaged file would load as a
 * wrong model instead of failing. Only decimal and exponent notation are accepted; the spellings of
 * NaN and infinity are recognised so that the error can say "not finite" rather than "not a number".
 */

const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eEdD][+-]?\d+)?$/;
const NON_FINITE = /^[+-]?(nan|inf|infinity)$/i;

export type CellValue = { kind: 'number'; value: number } | { kind: 'non_finite' } | { kind: 'non_numeric' };

export function readNumericCell(cell: string): CellValue {
  const t = cell.trim();
  if (DECIMAL.test(t)) {
    // Fortran-written exports sometimes use D as the exponent letter.
    const value = Number(t.replace(/[dD]/, 'e'));
    return Number.isFinite(value) ? { kind: 'number', value } : { kind: 'non_finite' };
  }
  if (NON_FINITE.test(t)) return { kind: 'non_finite' };
  return { kind: 'non_numeric' };
}

/** "file A.csv: " or "" — the prefix every file-level message starts with. */
export function inFile(fileName: string | undefined): string {
  return fileName ? `${fileName}: ` : '';
}
