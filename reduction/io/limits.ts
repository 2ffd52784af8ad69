/**
 * Size checks a reader makes before it allocates anything (issue 15, "impossible sizes").
 *
 * A model file states its own size: a Matrix Market size line declares rows, columns and entries; a CSV
 * file's first line and its line count give the shape; a JSON document's first row and its row count do.
 * The dense path holds every matrix as rows × cols doubles, so a declared size is refused when
 *
 *   - rows × cols exceeds the dense-entry limit (`maxDenseEntries` option, else the environment variable
 *     MODESHELF_MAX_DENSE_ENTRIES, else DEFAULT_MAX_DENSE_ENTRIES): code `too_large`, naming the file, the
 *     declared size and the limit; or
 *   - the file is too short to hold the entries it declares (each value needs at least one character and
 *     one separator): code `truncated_file`, naming the file, the declared count and the file's length.
 *
 * A sparse coordinate file that declares huge dimensions but few entries is a legitimate model for the
 * sparse path; until that path exists the dense readers refuse it here, with the limit named, instead of
 * failing inside the typed-array allocation.
 */
import { ModelError } from '../errors';

/**
 * 25 million doubles (200 MB) per matrix: a 5000-state A. The dense path is meant for a few thousand
 * states (DESIGN §5); the 2000-state analysis measured in the README peaks near 1.4 GiB.
 */
export const DEFAULT_MAX_DENSE_ENTRIES = 25_000_000;

export const MAX_DENSE_ENTRIES_ENV = 'MODESHELF_MAX_DENSE_ENTRIES';

/** Options every reader takes. */
export interface ReadLimits {
  /** Largest rows × cols a dense matrix may declare; overrides MODESHELF_MAX_DENSE_ENTRIES. */
  maxDenseEntries?: number;
}

/**
 * The limit in force: the option, else the environment variable, else the default. A malformed value of
 * either is a ModelError (invalid_option), not a silent fallback.
 */
export function maxDenseEntries(limits: ReadLimits = {}): number {
  if (limits.maxDenseEntries !== undefined) {
    const v = limits.maxDenseEntries;
    if (!Number.isSafeInteger(v) || v < 1) {
      throw new ModelError('invalid_option', 'maxDenseEntries', `the dense-entry limit must be a positive whole number, got ${v}`);
    }
    return v;
  }
  const raw = typeof process !== 'undefined' ? process.env?.[MAX_DENSE_ENTRIES_ENV] : undefined;
  if (raw === undefined || raw.trim() === '') return DEFAULT_MAX_DENSE_ENTRIES;
  const v = /^\d+$/.test(raw.trim()) ? Number(raw.trim()) : NaN;
  if (!Number.isSafeInteger(v) || v < 1) {
    throw new ModelError('invalid_option', MAX_DENSE_ENTRIES_ENV, `${MAX_DENSE_ENTRIES_ENV} must be a positive whole number, got "${raw}"`);
  }
  return v;
}

/** 100000000 → "100,000,000"; numbers past 2⁵³ (a size line may declare them) in exponent form. */
export function groupDigits(n: number): string {
  if (!Number.isSafeInteger(n)) return n.toPrecision(4);
  return String(n).replace(/\B(?=(\d{3})+(?!\d))/g, ',');
}

/** rows × cols, exact when both are safe integers. */
function product(rows: number, cols: number): string {
  if (Number.isSafeInteger(rows) && Number.isSafeInteger(cols)) {
    return (BigInt(rows) * BigInt(cols)).toString().replace(/\B(?=(\d{3})+(?!\d))/g, ',');
  }
  return (rows * cols).toPrecision(4);
}

/**
 * Refuse a dense rows × cols matrix above the limit, before it is allocated. `where` is the file prefix
 * ("A.mtx: " or ""); `what` may add context ("the first-order form of …").
 */
export function checkDenseSize(rows: number, cols: number, field: string, where: string, limits: ReadLimits = {}, what?: string): void {
  const limit = maxDenseEntries(limits);
  if (rows * cols <= limit) return;
  throw new ModelError(
    'too_large',
    field,
    `${where}${what ?? field} declares ${groupDigits(rows)}×${groupDigits(cols)} ` +
      `(${product(rows, cols)} entries), more than the limit of ${groupDigits(limit)} entries for a dense matrix ` +
      `(set by ${MAX_DENSE_ENTRIES_ENV}); models this large need the sparse path, which does not read files yet`,
  );
}

/**
 * Refuse a file that declares more values than its length can hold, before anything is allocated: each
 * value takes at least `minChars` characters (digit plus separator) of the file's `length` characters.
 */
export function checkDeclaredCount(count: number, length: number, minChars: number, field: string, where: string, what: string): void {
  if (count * minChars <= length + 1) return;
  throw new ModelError(
    'truncated_file',
    field,
    `${where}${field} declares ${groupDigits(count)} ${what}, but the file is only ${groupDigits(length)} characters long ` +
      `and can hold at most ${groupDigits(Math.floor((length + 1) / minChars))}`,
  );
}
