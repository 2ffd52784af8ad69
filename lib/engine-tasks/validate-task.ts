// The check an upload passes before anything is registered: the files load into a valid model through
// the engine's one validation boundary (model-files.ts). What it reports is what the version row records.
// A model on the sparse path (enginePathOf: above the crossover, or with E) is read streamed into
// compressed columns and checked there (shapes, finite values, sizes of B, C, D, E against A): it is never
// made dense, so a 10⁵-state model is checked in the memory of its nonzeros.
import { readFileSync } from 'node:fs';
import { ModelError, parseSampledInput } from '../../reduction/index';
import { enginePathOf, loadModel, loadSparseModel, nonzeros, type EnginePath, type ModelFile, type SourceFormat } from './model-files';

export interface ValidatedModel {
  format: SourceFormat;
  states: number;
  inputs: number;
  outputs: number;
  nonzerosA: number;
  timeBase: string | null;
  /** the engine path the model takes (reduction/sparse/path.ts) */
  path: EnginePath;
}

export type ValidationOutcome =
  | { ok: true; model: ValidatedModel }
  | { ok: false; error: { code: string; field: string; message: string } };

export function validateModelFiles(files: readonly ModelFile[]): ValidationOutcome {
  try {
    if (enginePathOf(files) === 'sparse') {
      const { model, format } = loadSparseModel(files);
      const n = model.A.n;
      return { ok: true, model: { format, states: n, inputs: model.B.cols, outputs: model.C.rows, nonzerosA: model.A.colPtr[n], timeBase: null, path: 'sparse' } };
    }
    const { model, format } = loadModel(files);
    return {
      ok: true,
      model: {
        format,
        states: model.A.rows,
        inputs: model.B.cols,
        outputs: model.C.rows,
        nonzerosA: nonzeros(model.A),
        timeBase: model.timeBase ?? null,
        path: 'dense',
      },
    };
  } catch (e) {
    if (e instanceof ModelError) return { ok: false, error: { code: e.code, field: e.field, message: e.message } };
    // The readers refuse declared sizes past MODESHELF_MAX_DENSE_ENTRIES before allocating; if that limit is
    // set beyond this process's memory, the allocation itself fails. Answer that as a size refusal too.
    if (e instanceof RangeError && /typed array length|array buffer allocation|array length/i.test(e.message)) {
      return {
        ok: false,
        error: { code: 'too_large', field: files[0]?.role ?? 'model', message: `the model does not fit in the checker's memory (${e.message}); ask an admin to lower MODESHELF_MAX_DENSE_ENTRIES` },
      };
    }
    // A file that is not text the parsers can read at all (binary, wrong encoding) ends up here.
    const message = e instanceof Error ? e.message : String(e);
    return { ok: false, error: { code: 'parse_error', field: files[0]?.role ?? 'model', message: `the model files cannot be read: ${message}` } };
  }
}

export type SignalOutcome =
  | { ok: true; samples: number; description: string }
  | { ok: false; error: { code: string; field: string; message: string } };

/** An input signal for the comparison page: time, then one column per model input (reduction/simulate/inputs.ts). */
export function validateSignalFile(file: { path: string; name: string }, inputs: number): SignalOutcome {
  try {
    const signal = parseSampledInput(readFileSync(file.path, 'utf8'), inputs, file.name);
    return { ok: true, samples: signal.breakpoints.length, description: signal.description };
  } catch (e) {
    if (e instanceof ModelError) return { ok: false, error: { code: e.code, field: 'signal', message: e.message } };
    const message = e instanceof Error ? e.message : String(e);
    return { ok: false, error: { code: 'parse_error', field: 'signal', message: `the input signal cannot be read: ${message}` } };
  }
}
