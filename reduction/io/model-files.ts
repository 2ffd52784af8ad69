/**
 * A model from the contents of its files, without touching the file system: one `.json` document, or the
 * A, B, C and optionally D matrices in that order as Matrix Market (`.mtx`, `.mm`) or CSV (`.csv`). The
 * command line reads files and calls this; the web upload calls it with the uploaded texts.
 */
import { ModelError } from '../errors';
import type { Matrix } from '../linalg/matrix';
import type { StateSpaceModel } from '../model';
import { assembleModel } from './assemble';
import { parseCsvMatrix } from './csv';
import { parseModelJson } from './json';
import type { ReadLimits } from './limits';
import { parseMatrixMarket } from './matrix-market';

const MATRIX_ORDER = ['A', 'B', 'C', 'D'] as const;

export interface ModelFileText {
  /** File name as the user gave it (its extension picks the parser; it starts error messages). */
  name: string;
  text: string;
}

function extensionOf(name: string): string {
  const base = name.slice(Math.max(name.lastIndexOf('/'), name.lastIndexOf('\\')) + 1);
  const dot = base.lastIndexOf('.');
  return dot > 0 ? base.slice(dot).toLowerCase() : '';
}

function baseName(name: string): string {
  return name.slice(Math.max(name.lastIndexOf('/'), name.lastIndexOf('\\')) + 1);
}

/** Parse one matrix file by extension: `.mtx`/`.mm` Matrix Market, `.csv` CSV. */
export function parseMatrixFile(text: string, field: string, fileName: string, limits: ReadLimits = {}): Matrix {
  const ext = extensionOf(fileName);
  if (ext === '.mtx' || ext === '.mm') return parseMatrixMarket(text, field, fileName, limits);
  if (ext === '.csv') return parseCsvMatrix(text, field, fileName, limits);
  throw new ModelError(
    'unsupported_format',
    field,
    `${fileName}: matrix files must be Matrix Market (.mtx) or CSV (.csv), not "${ext || 'no extension'}"`,
  );
}

/** Validate the number and kinds of model files; `field` of errors is `model`. */
export function checkModelFileCount(names: readonly string[]): void {
  if (names.length === 1) {
    if (extensionOf(names[0]) !== '.json') {
      throw new ModelError(
        'invalid_option',
        'model',
        'a single model file must be .json; give A, B, C (and D) as separate .mtx or .csv files',
      );
    }
    return;
  }
  if (names.length < 3 || names.length > 4) {
    throw new ModelError(
      'invalid_option',
      'model',
      `expected one .json file or the files of A, B, C and optionally D, got ${names.length} files`,
    );
  }
}

/** The field (matrix name) a file at position k stands for. */
export function matrixFieldAt(k: number): (typeof MATRIX_ORDER)[number] {
  return MATRIX_ORDER[k];
}

/** Parse a model from file contents (see the module comment). Throws ModelError. */
export function parseModelFiles(files: readonly ModelFileText[], limits: ReadLimits = {}): StateSpaceModel {
  checkModelFileCount(files.map((f) => f.name));
  if (files.length === 1) return parseModelJson(files[0].text, baseName(files[0].name), limits);
  const m: Partial<Record<(typeof MATRIX_ORDER)[number], Matrix>> = {};
  files.forEach((f, k) => {
    const field = MATRIX_ORDER[k];
    m[field] = parseMatrixFile(f.text, field, baseName(f.name), limits);
  });
  return assembleModel({ A: m.A!, B: m.B!, C: m.C!, D: m.D });
}
