/**
 * Loading a model from files on disk, for the command line and the worker. Parsing lives in the format
 * modules, which take text (`model-files.ts` routes by extension), so the web upload reuses them on
 * uploaded buffers; this module only reads the files.
 */
import { readFileSync } from 'node:fs';
import { ModelError } from '../errors';
import type { StateSpaceModel } from '../model';
import type { ReadLimits } from './limits';
import { checkModelFileCount, matrixFieldAt, parseModelFiles } from './model-files';

function readText(path: string, field: string): string {
  try {
    return readFileSync(path, 'utf8');
  } catch (e) {
    throw new ModelError('unreadable_file', field, `cannot read ${path}: ${(e as Error).message}`);
  }
}

/**
 * One `.json` model file, or the files of A, B, C and optionally D in that order (`.mtx` or `.csv`,
 * mixed freely). `limits` caps declared sizes (limits.ts). Throws ModelError.
 */
export function loadModelFiles(paths: readonly string[], limits: ReadLimits = {}): StateSpaceModel {
  checkModelFileCount(paths);
  const files = paths.map((path, k) => ({
    name: path,
    text: readText(path, paths.length === 1 ? 'model' : matrixFieldAt(k)),
  }));
  return parseModelFiles(files, limits);
}
