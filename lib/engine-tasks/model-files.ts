// Reading a source version's stored files into the engine's model. The files are either one JSON document
// (first- or second-order form, reduction/io/json.ts) or the matrices A, B, C and optionally D as Matrix
// Market or CSV files (reduction/io/matrix-market.ts, csv.ts). Every path ends in the engine's one
// validation boundary, so a model that loads here is a valid model.
//
// Runs in worker threads and in the upload checker's child process: no database, no Next.js.
//
// The engine reads files from this machine's disk. A job names its files by storage key (StoredModelFile);
// the worker thread first fetches them from the store into its scratch folder (fetchModelFiles,
// lib/storage/scratch.ts), so a worker never needs the web server's disk.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { fetchToScratch } from '../storage/scratch';
import { StorageKeyNotFound } from '../storage/types';
import {
  ModelError,
  assembleModel,
  parseMatrixFile,
  parseModelJson,
  type Matrix,
  type StateSpaceModel,
} from '../../reduction/index';

export const MATRIX_ROLES = ['A', 'B', 'C', 'D'] as const;
export type MatrixRole = (typeof MATRIX_ROLES)[number];
export type FileRole = 'model' | MatrixRole;
export const FILE_ROLES: readonly FileRole[] = ['model', ...MATRIX_ROLES];

export type SourceFormat = 'json' | 'second-order' | 'matrix-market' | 'csv';

/** One file of a model: its role, the name it was uploaded under (its extension says its format), and where it is. */
export interface ModelFile {
  readonly role: FileRole;
  readonly name: string;
  readonly path: string;
}

/** One file of a model as a job names it: by its key in the store (lib/storage). */
export interface StoredModelFile {
  readonly role: FileRole;
  readonly name: string;
  readonly storageKey: string;
}

/** A file on this machine already (an upload being checked) or one to fetch from the store. */
export type ModelFileRef = ModelFile | StoredModelFile;

/** Any named file: on this machine (`path`) or in the store (`storageKey`). */
export type FileRef = { readonly name: string } & ({ readonly path: string } | { readonly storageKey: string });

/**
 * A path on this machine for a file: the file's own path, or its copy fetched from the store into the
 * scratch folder (MODESHELF_SCRATCH_DIR). A file the store does not hold is a ModelError naming `field`, as
 * an unreadable file always was: retrying would not bring it back. A store that cannot be reached is a
 * plain Error, which the job runner may retry.
 */
export async function fetchFile(file: FileRef, field: string, options: { scratchDir?: string } = {}): Promise<string> {
  if ('path' in file) return file.path;
  try {
    return await fetchToScratch(file.storageKey, { dir: options.scratchDir });
  } catch (e) {
    if (e instanceof StorageKeyNotFound) {
      throw new ModelError(
        'unreadable_file',
        field,
        `${file.name}: the stored file cannot be read (${e.message}; the web server and every worker must use the same store)`,
      );
    }
    throw e;
  }
}

/** The files of a model as paths on this machine, fetching the stored ones first (see fetchFile). */
export async function fetchModelFiles(files: readonly ModelFileRef[], options: { scratchDir?: string } = {}): Promise<ModelFile[]> {
  const out: ModelFile[] = [];
  for (const f of files) out.push({ role: f.role, name: f.name, path: await fetchFile(f, f.role, options) });
  return out;
}

export interface LoadedModel {
  readonly model: StateSpaceModel;
  readonly format: SourceFormat;
}

function readText(file: ModelFile): string {
  try {
    return readFileSync(file.path, 'utf8');
  } catch (e) {
    throw new ModelError('unreadable_file', file.role, `${file.name}: the stored file cannot be read (${(e as Error).message})`);
  }
}

// A second-order document says so in its "form" member; looking for it in the text saves parsing twice.
const SECOND_ORDER = /"form"\s*:\s*"second-order"/;

/**
 * Loads a model from its files. Throws ModelError whose `field` is the file's role ("model" for a JSON
 * document, whatever matrix inside it is wrong; "A"…"D" for matrix files).
 */
export function loadModel(files: readonly ModelFile[]): LoadedModel {
  const byRole = new Map(files.map((f) => [f.role, f]));
  const json = byRole.get('model');
  if (json) {
    if (files.length > 1) {
      throw new ModelError('invalid_option', 'model', 'give either one JSON model file or the A, B, C (and D) matrix files, not both');
    }
    if (path.extname(json.name).toLowerCase() !== '.json') {
      throw new ModelError('unsupported_format', 'model', `${json.name}: a model file must be JSON (.json); give matrices as A, B, C, D files`);
    }
    const text = readText(json);
    try {
      return { model: parseModelJson(text, json.name), format: SECOND_ORDER.test(text) ? 'second-order' : 'json' };
    } catch (e) {
      // Inside a JSON document the engine names the matrix (A, mass, …); the form knows one field, "model".
      if (e instanceof ModelError) throw new ModelError(e.code, 'model', e.message);
      throw e;
    }
  }
  for (const role of ['A', 'B', 'C'] as const) {
    if (!byRole.has(role)) {
      throw new ModelError('missing_field', role, `the ${role} matrix file is missing (give A, B, C and optionally D, or one JSON model file)`);
    }
  }
  const read = (role: MatrixRole): Matrix | undefined => {
    const f = byRole.get(role);
    return f ? parseMatrixFile(readText(f), role, f.name) : undefined;
  };
  const A = read('A')!;
  const B = read('B')!;
  const C = read('C')!;
  const D = read('D');
  const format: SourceFormat = path.extname(byRole.get('A')!.name).toLowerCase() === '.csv' ? 'csv' : 'matrix-market';
  return { model: assembleModel({ A, B, C, D }), format };
}

/** Nonzero entries of a dense matrix: the sparsity the version page shows. */
export function nonzeros(m: Matrix): number {
  let count = 0;
  for (let k = 0; k < m.data.length; k++) if (m.data[k] !== 0) count++;
  return count;
}
