/**
 * Model files in JSON: the first-order form {"A","B","C","D"?} with matrices as lists of rows, and the
 * second-order form {"form":"second-order","mass","damping","stiffness","force","displacementOutput",
 * "velocityOutput"}. Both may carry "labels": {"inputs": […], "outputs": […], "states": […]} (each list
 * optional; a second-order model's "states" name its degrees of freedom) and "timeBase" (e.g. "s"). Any other
 * key is refused, naming the key and the shape above, so a label in a misspelt or retired place is never
 * dropped without a word.
 *
 * JSON has no NaN or infinity; some writers emit them as bare tokens anyway (Python's json module does by
 * default). Rather than fail with a syntax error at a character offset, those tokens are read as strings
 * so the error can name the matrix, row and column.
 */
import { ModelError } from '../errors';
import { type Matrix, zeros, toRows } from '../linalg/matrix';
import type { StateSpaceModel } from '../model';
import { secondOrderToFirstOrder } from '../second-order';
import type { ModelLabels } from '../model';
import { assembleModel, type ModelDescription } from './assemble';
import { checkDenseSize, type ReadLimits } from './limits';
import { inFile } from './numbers';

const BARE_NON_FINITE = /(?<=[[,:]\s*)(-?Infinity|NaN)(?=\s*[,\]}])/g;

function parseJsonText(text: string, where: string, field: string): unknown {
  try {
    return JSON.parse(text);
  } catch (first) {
    try {
      return JSON.parse(text.replace(BARE_NON_FINITE, '"$1"'));
    } catch {
      throw new ModelError('parse_error', field, `${where}not valid JSON (${(first as Error).message})`);
    }
  }
}

/**
 * A matrix from a JSON list of rows. Throws ModelError naming `field`: parse_error (not a list of lists),
 * empty_matrix, jagged_rows, non_numeric and non_finite (row and column, 1-based), too_large (row count ×
 * row 1's length past the dense limit, checked before allocating).
 */
export function matrixFromJsonRows(value: unknown, field: string, fileName?: string, limits: ReadLimits = {}): Matrix {
  const where = inFile(fileName);
  if (!Array.isArray(value)) {
    throw new ModelError('parse_error', field, `${where}${field} must be a list of rows, e.g. [[1, 0], [0, 1]]`);
  }
  if (value.length === 0) throw new ModelError('empty_matrix', field, `${where}${field} is empty (no rows)`);
  const first = value[0];
  if (!Array.isArray(first)) {
    throw new ModelError('parse_error', field, `${where}${field} row 1 is not a list of numbers`);
  }
  const cols = first.length;
  if (cols === 0) throw new ModelError('empty_matrix', field, `${where}${field} is empty (row 1 has no entries)`);
  checkDenseSize(value.length, cols, field, where, limits);
  const out = zeros(value.length, cols);
  for (let i = 0; i < value.length; i++) {
    const row = value[i];
    if (!Array.isArray(row)) throw new ModelError('parse_error', field, `${where}${field} row ${i + 1} is not a list of numbers`);
    if (row.length !== cols) {
      throw new ModelError(
        'jagged_rows',
        field,
        `${where}${field} row ${i + 1} has ${row.length} entries but row 1 has ${cols}`,
      );
    }
    for (let j = 0; j < cols; j++) {
      const cell: unknown = row[j];
      if (typeof cell === 'number') {
        if (!Number.isFinite(cell)) {
          throw new ModelError('non_finite', field, `${where}${field} row ${i + 1}, column ${j + 1} is not finite`);
        }
        out.data[i * cols + j] = cell;
      } else if (typeof cell === 'string' && /^[+-]?(nan|inf|infinity)$/i.test(cell.trim())) {
        throw new ModelError(
          'non_finite',
          field,
          `${where}${field} row ${i + 1}, column ${j + 1} is not finite (${cell})`,
        );
      } else {
        throw new ModelError(
          'non_numeric',
          field,
          `${where}${field} row ${i + 1}, column ${j + 1} is not a number: ${JSON.stringify(cell) ?? String(cell)}`,
        );
      }
    }
  }
  return out;
}

const LABEL_KEYS = ['inputs', 'outputs', 'states'] as const;
const DESCRIPTION_KEYS = ['labels', 'timeBase'];
const FIRST_ORDER_KEYS = ['form', 'A', 'B', 'C', 'D', ...DESCRIPTION_KEYS];
const SECOND_ORDER_KEYS = ['form', 'mass', 'damping', 'stiffness', 'force', 'displacementOutput', 'velocityOutput', ...DESCRIPTION_KEYS];
const LABELS_SHAPE = '"labels": {"inputs": [...], "outputs": [...], "states": [...]}';

/** Refuses a key the form does not define, naming it and the keys the form holds. */
function refuseUnknownKeys(doc: Record<string, unknown>, known: readonly string[], where: string, form: string): void {
  for (const key of Object.keys(doc)) {
    if (known.includes(key)) continue;
    throw new ModelError(
      'unknown_field',
      key,
      `${where}"${key}" is not a field of a ${form} model file, which holds ${known.filter((k) => !DESCRIPTION_KEYS.includes(k)).map((k) => `"${k}"`).join(', ')}, ` +
        `and optionally ${LABELS_SHAPE} (names of the inputs, outputs and states) and "timeBase" (the unit of time, e.g. "s")`,
    );
  }
}

function readLabels(doc: Record<string, unknown>, where: string): ModelLabels | undefined {
  const v = doc.labels;
  if (v === undefined || v === null) return undefined;
  if (typeof v !== 'object' || Array.isArray(v)) {
    throw new ModelError('parse_error', 'labels', `${where}labels must be an object: ${LABELS_SHAPE}, each list optional`);
  }
  const labels: { inputs?: string[]; outputs?: string[]; states?: string[] } = {};
  for (const [key, list] of Object.entries(v as Record<string, unknown>)) {
    if (!(LABEL_KEYS as readonly string[]).includes(key)) {
      throw new ModelError('unknown_field', `labels.${key}`, `${where}labels.${key} is not a label list: ${LABELS_SHAPE}`);
    }
    if (list === undefined || list === null) continue;
    if (!Array.isArray(list) || list.some((s) => typeof s !== 'string')) {
      throw new ModelError('parse_error', `labels.${key}`, `${where}labels.${key} must be a list of strings`);
    }
    labels[key as (typeof LABEL_KEYS)[number]] = list as string[];
  }
  return labels;
}

function readDescription(doc: Record<string, unknown>, where: string): ModelDescription {
  const description: ModelDescription = {};
  const labels = readLabels(doc, where);
  if (labels) description.labels = labels;
  if (doc.timeBase !== undefined && doc.timeBase !== null) {
    if (typeof doc.timeBase !== 'string') throw new ModelError('parse_error', 'timeBase', `${where}timeBase must be a string such as "s"`);
    description.timeBase = doc.timeBase;
  }
  return description;
}

function required(doc: Record<string, unknown>, key: string, where: string, form: string): unknown {
  if (doc[key] === undefined || doc[key] === null) {
    throw new ModelError('missing_field', key, `${where}${form} model has no "${key}" matrix`);
  }
  return doc[key];
}

/**
 * Parse a model JSON document (first- or second-order) into a validated model. `fileName` starts every
 * message. Throws ModelError (see `assembleModel`, `secondOrderToFirstOrder`, `matrixFromJsonRows`); a
 * second-order model whose first-order form (2n × 2n) passes the dense limit is refused as too_large.
 */
export function parseModelJson(text: string, fileName?: string, limits: ReadLimits = {}): StateSpaceModel {
  const where = inFile(fileName);
  const doc = parseJsonText(text, where, fileName ?? 'model');
  if (typeof doc !== 'object' || doc === null || Array.isArray(doc)) {
    throw new ModelError('parse_error', fileName ?? 'model', `${where}a model file must be a JSON object with matrices A, B, C (and D)`);
  }
  const d = doc as Record<string, unknown>;
  const form = d.form ?? 'first-order';
  if (form === 'second-order') {
    refuseUnknownKeys(d, SECOND_ORDER_KEYS, where, 'second-order');
    const description = readDescription(d, where);
    const read = (key: string) => matrixFromJsonRows(required(d, key, where, 'a second-order'), key, fileName, limits);
    const optional = (key: string) =>
      d[key] === undefined || d[key] === null ? undefined : matrixFromJsonRows(d[key], key, fileName, limits);
    const mass = read('mass');
    const dof = mass.rows;
    checkDenseSize(2 * dof, 2 * dof, 'mass', where, limits, `the first-order form of this ${dof}-degree-of-freedom model`);
    // Degree-of-freedom labels (one per q) are expanded to the first-order state [q; q̇].
    const states = description.labels?.states;
    if (states && states.length === mass.rows) {
      description.labels = { ...description.labels, states: [...states, ...states.map((s) => `d(${s})/dt`)] };
    }
    return secondOrderToFirstOrder(
      {
        mass,
        damping: optional('damping'),
        stiffness: read('stiffness'),
        force: read('force'),
        displacementOutput: optional('displacementOutput'),
        velocityOutput: optional('velocityOutput'),
      },
      description,
    );
  }
  if (form !== 'first-order') {
    throw new ModelError('unsupported_format', 'form', `${where}form "${String(form)}" is not "first-order" or "second-order"`);
  }
  refuseUnknownKeys(d, FIRST_ORDER_KEYS, where, 'first-order');
  const description = readDescription(d, where);
  const read = (key: string) => matrixFromJsonRows(required(d, key, where, 'a'), key, fileName, limits);
  return assembleModel(
    {
      A: read('A'),
      B: read('B'),
      C: read('C'),
      D: d.D === undefined || d.D === null ? undefined : matrixFromJsonRows(d.D, 'D', fileName, limits),
    },
    description,
  );
}

/** The first-order JSON document of a model (exact doubles: JSON numbers round-trip). */
export function modelToJson(model: StateSpaceModel, indent?: number): string {
  const doc: Record<string, unknown> = {
    A: toRows(model.A),
    B: toRows(model.B),
    C: toRows(model.C),
    D: toRows(model.D),
  };
  if (model.labels) doc.labels = model.labels;
  if (model.timeBase) doc.timeBase = model.timeBase;
  return JSON.stringify(doc, null, indent);
}
