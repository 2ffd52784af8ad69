// Reading a source version's stored files into the engine's model. The files are either one JSON document
// (first- or second-order form, reduction/io/json.ts), or the matrices A, B, C and optionally D and E as
// Matrix Market or CSV files (reduction/io/matrix-market.ts, csv.ts), or a second-order model's mass,
// damping (optional) and stiffness M, D, K with its force input B and output map C (C of q columns maps the
// displacements, of 2q columns [displacements, velocities]) and optionally the feedthrough D. Every path
// ends in the engine's one validation boundary, so a model that loads here is a valid model.
//
// Which engine path a model takes is decided once, by the engine's own rule (reduction/sparse/path.ts, the
// command line's crossover): a Matrix Market coordinate A (or K) above the crossover, or any model with E,
// goes to the sparse path and is read straight into compressed columns, streamed from disk
// (reduction/sparse/file-reader.ts) — never as a dense n×n array (loadSparseModel). The rest loads dense.
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
  secondOrderToFirstOrder,
  splitSecondOrderOutput,
  zeros,
  type Matrix,
  type StateSpaceModel,
} from '../../reduction/index';
import { autoPathIsSparse } from '../../reduction/sparse/path';
import { coordinateFileRows, readSparseMatrixMarketFile } from '../../reduction/sparse/file-reader';
import { createSparseModel, type SparseStateSpaceModel } from '../../reduction/sparse/model';
import { secondOrderToDescriptor } from '../../reduction/sparse/second-order';

export const MATRIX_ROLES = ['A', 'B', 'C', 'D', 'E'] as const;
export type MatrixRole = (typeof MATRIX_ROLES)[number];
/** A second-order model's own matrices (M, D, K); its force input is B and its output map C. */
export const SECOND_ORDER_ROLES = ['mass', 'damping', 'stiffness'] as const;
export type SecondOrderRole = (typeof SECOND_ORDER_ROLES)[number];
export type FileRole = 'model' | MatrixRole | SecondOrderRole;
export const FILE_ROLES: readonly FileRole[] = ['model', ...MATRIX_ROLES, ...SECOND_ORDER_ROLES];

export type SourceFormat = 'json' | 'second-order' | 'matrix-market' | 'csv';
export type EnginePath = 'dense' | 'sparse';

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

const isSecondOrder = (byRole: ReadonlyMap<FileRole, ModelFile>) => SECOND_ORDER_ROLES.some((r) => byRole.has(r));
const extension = (name: string) => path.extname(name).toLowerCase();

/**
 * Checks which files make the model (one JSON; A, B, C with D and E optional; or mass, stiffness, B, C with
 * damping and D optional) and says which engine path it takes (the file header). Throws ModelError naming
 * the file at fault.
 */
export function enginePathOf(files: readonly ModelFile[]): EnginePath {
  const byRole = new Map(files.map((f) => [f.role, f]));
  if (byRole.has('model')) {
    if (files.length > 1) {
      throw new ModelError('invalid_option', 'model', 'give either one JSON model file or the matrix files, not both');
    }
    return 'dense';
  }
  if (isSecondOrder(byRole)) {
    for (const role of ['mass', 'stiffness', 'B', 'C'] as const) {
      if (!byRole.has(role)) {
        throw new ModelError('missing_field', role, `the ${ROLE_WORDS[role]} file is missing (a second-order model needs M, K, B and C; its damping D and the feedthrough are optional)`);
      }
    }
    if (byRole.has('A')) throw new ModelError('invalid_option', 'A', 'give either A (first order) or M, D, K (second order), not both');
    if (byRole.has('E')) throw new ModelError('invalid_option', 'E', 'a second-order model needs no E: its descriptor form E = diag(I, M) is made from M');
    const k = byRole.get('stiffness')!;
    const rows = extension(k.name) === '.csv' ? null : coordinateFileRows(k.path);
    return autoPathIsSparse(rows === null ? null : 2 * rows, false) ? 'sparse' : 'dense';
  }
  for (const role of ['A', 'B', 'C'] as const) {
    if (!byRole.has(role)) {
      throw new ModelError('missing_field', role, `the ${role} matrix file is missing (give A, B, C and optionally D and E, or one JSON model file)`);
    }
  }
  const a = byRole.get('A')!;
  const rows = extension(a.name) === '.csv' ? null : coordinateFileRows(a.path);
  const e = byRole.get('E');
  if (e) {
    if (rows === null) throw new ModelError('unsupported_format', 'A', `${a.name}: with a descriptor matrix E, A must be a Matrix Market coordinate file (E is read on the sparse path only)`);
    if (extension(e.name) === '.csv' || coordinateFileRows(e.path) === null) {
      throw new ModelError('unsupported_format', 'E', `${e.name}: E must be a Matrix Market coordinate file`);
    }
  }
  return autoPathIsSparse(rows, e !== undefined) ? 'sparse' : 'dense';
}

const ROLE_WORDS: Record<FileRole, string> = {
  model: 'model',
  A: 'A matrix',
  B: 'B matrix',
  C: 'C matrix',
  D: 'D matrix',
  E: 'E matrix',
  mass: 'mass matrix M',
  damping: 'damping matrix D',
  stiffness: 'stiffness matrix K',
};

/** The engine's names of a second-order model's parts, as the form's fields. */
const SECOND_ORDER_FIELD: Record<string, FileRole> = {
  mass: 'mass',
  damping: 'damping',
  stiffness: 'stiffness',
  force: 'B',
  displacementOutput: 'C',
  velocityOutput: 'C',
  feedthrough: 'D',
};

function asFormField(e: unknown): never {
  if (e instanceof ModelError && SECOND_ORDER_FIELD[e.field]) throw new ModelError(e.code, SECOND_ORDER_FIELD[e.field], e.message);
  throw e;
}

/**
 * Loads a model from its files on the dense path. Throws ModelError whose `field` is the file's role
 * ("model" for a JSON document, whatever matrix inside it is wrong; "A"…"E", "mass"… for matrix files).
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
  const read = (role: FileRole): Matrix | undefined => {
    const f = byRole.get(role);
    return f ? parseMatrixFile(readText(f), role, f.name) : undefined;
  };
  if (isSecondOrder(byRole)) {
    enginePathOf(files); // the same refusals of missing or extra files
    const mass = read('mass')!;
    const C = read('C')!;
    try {
      const model = secondOrderToFirstOrder({
        mass,
        damping: read('damping'),
        stiffness: read('stiffness')!,
        force: read('B')!,
        ...splitSecondOrderOutput(C, mass.rows, byRole.get('C')!.name),
      });
      const D = read('D');
      if (D) {
        if (D.rows !== model.D.rows || D.cols !== model.D.cols) {
          throw new ModelError('dimension_mismatch', 'D', `D is ${D.rows}×${D.cols} but C and B need ${model.D.rows}×${model.D.cols}`);
        }
        return { model: { ...model, D }, format: 'second-order' };
      }
      return { model, format: 'second-order' };
    } catch (e) {
      return asFormField(e);
    }
  }
  for (const role of ['A', 'B', 'C'] as const) {
    if (!byRole.has(role)) {
      throw new ModelError('missing_field', role, `the ${role} matrix file is missing (give A, B, C and optionally D, or one JSON model file)`);
    }
  }
  if (byRole.has('E')) throw new ModelError('invalid_option', 'E', 'a descriptor matrix E is read on the sparse path only');
  const A = read('A')!;
  const B = read('B')!;
  const C = read('C')!;
  const D = read('D');
  const format: SourceFormat = path.extname(byRole.get('A')!.name).toLowerCase() === '.csv' ? 'csv' : 'matrix-market';
  return { model: assembleModel({ A, B, C, D }), format };
}

export interface LoadedSparseModel {
  readonly model: SparseStateSpaceModel;
  readonly format: SourceFormat;
}

/**
 * Loads a model on the sparse path (enginePathOf said 'sparse'): A and E, or M, D, K, streamed from their
 * coordinate files into compressed columns; B, C and D by the dense readers (they are thin: n×m, p×n).
 * A second-order model goes into descriptor form E = diag(I, M), A = [[0, I], [−K, −D]]
 * (reduction/sparse/second-order.ts). Throws ModelError naming the file's role.
 */
export function loadSparseModel(files: readonly ModelFile[]): LoadedSparseModel {
  const byRole = new Map(files.map((f) => [f.role, f]));
  const dense = (role: FileRole): Matrix | undefined => {
    const f = byRole.get(role);
    return f ? parseMatrixFile(readText(f), role, f.name) : undefined;
  };
  // The thin matrices first: their readers refuse impossible sizes from the size line alone, and the
  // square ones' declared sizes are then checked against them before their coordinates are allocated.
  const B = dense('B')!;
  const C = dense('C')!;
  const D = dense('D');
  const secondOrder = isSecondOrder(byRole);
  const states = secondOrder ? B.rows : C.cols;
  const sparse = (role: FileRole) => {
    const f = byRole.get(role);
    if (!f) return undefined;
    const declared = coordinateFileRows(f.path);
    if (declared !== null && declared !== states) {
      throw new ModelError(
        'dimension_mismatch',
        role,
        secondOrder
          ? `${f.name}: ${ROLE_WORDS[role]} is ${declared}×${declared} but B has ${states} rows (one per degree of freedom)`
          : `${f.name}: ${role} is ${declared}×${declared} but C has ${states} columns (one per state)`,
      );
    }
    return readSparseMatrixMarketFile(f.path, role, f.name);
  };
  if (secondOrder) {
    const mass = sparse('mass')!;
    try {
      const model = secondOrderToDescriptor({
        mass,
        damping: sparse('damping'),
        stiffness: sparse('stiffness')!,
        force: B,
        ...splitSecondOrderOutput(C, mass.n, byRole.get('C')!.name),
        feedthrough: D,
      });
      return { model, format: 'second-order' };
    } catch (e) {
      return asFormField(e);
    }
  }
  const model = createSparseModel({ A: sparse('A')!, E: sparse('E'), B, C, D });
  return { model, format: 'matrix-market' };
}

/** Nonzero entries of a dense matrix: the sparsity the version page shows. */
export function nonzeros(m: Matrix): number {
  let count = 0;
  for (let k = 0; k < m.data.length; k++) if (m.data[k] !== 0) count++;
  return count;
}
