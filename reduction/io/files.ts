/**
 * Loading a model from files on disk, for the command line and the worker. Parsing lives in the
 * format modules (which take text, so the web upload can call them on buffers); this module only
 * reads files and routes each to its parser by extension.
 */
import { readFileSync } from 'node:fs';
import { basename, extname } from 'node:path';
import { ModelError } from '../errors';
import type { Matrix } from '../linalg/matrix';
import type { StateSpaceModel } from '../model';
import { assembleModel } from './assemble';
import { parseCsvMatrix } from './csv';
import { parseModelJson } from './json';
import { parseMatrixMarket } from './matrix-market';

const MATRIX_ORDER = ['A', 'B', 'C', 'D'] as const;

function readText(path: string, field: string): string {
  try {
    return readFileSync(path, 'utf8');
  } catch (e) {
    throw new ModelError('unreadable_file', field, `cannot read ${path}: ${(e as Error).message}`);
  }
}

/** Parse one matrix file by extension: `.mtx`/`.mm` Matrix Market, `.csv` CSV. */
export function parseMatrixFile(text: string, field: string, fileName: string): Matrix {
  const ext = extname(fileName).toLowerCase();
  if (ext === '.mtx' || ext === '.mm') return parseMatrixMarket(text, field, fileName);
  if (ext === '.csv') return parseCsvMatrix(text, field, fileName);
  throw new ModelError(
    'unsupported_format',
    field,
    `${fileName}: matrix files must be Matrix Market (.mtx) or CSV (.csv), not "${ext || 'no extension'}"`,
  );
}

/**
 * One `.json` model file, or the files of A, B, C and optionally D in that order (`.mtx` or `.csv`,
 * mixed freely). Throws ModelError.
 */
export function loadModelFiles(paths: readonly string[]): StateSpaceModel {
  if (paths.length === 1) {
    const ext = extname(paths[0]).toLowerCase();
    if (ext !== '.json') {
      throw new ModelError(
        'invalid_option',
        'model',
        `a single model file must be .json; give A, B, C (and D) as separate .mtx or .csv files`,
      );
    }
    return parseModelJson(readText(paths[0], 'model'), basename(paths[0]));
  }
  if (paths.length < 3 || paths.length > 4) {
    throw new ModelError(
      'invalid_option',
      'model',
      `expected one .json file or the files of A, B, C and optionally D, got ${paths.length} files`,
    );
  }
  const m: Partial<Record<(typeof MATRIX_ORDER)[number], Matrix>> = {};
  paths.forEach((path, k) => {
    const field = MATRIX_ORDER[k];
    m[field] = parseMatrixFile(readText(path, field), field, basename(path));
  });
  return assembleModel({ A: m.A!, B: m.B!, C: m.C!, D: m.D });
}
