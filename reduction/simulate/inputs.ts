/**
 * Input signals for time responses, all piecewise constant (a zero-order hold): a step or an impulse on
 * one input channel or on all of them, and a sampled signal from CSV (first column time, one column per
 * input). A unit impulse u = w·δ(t) is applied as the jump x(0⁺) = x(0) + B·w with u = 0 afterwards;
 * the D·δ(t) term of the output is a distribution and is not part of the sampled response (the usual
 * convention for impulse responses of proper systems, y(t) = C e^{At} B w for t > 0).
 */
import { ModelError } from '../errors';
import type { StateSpaceModel } from '../model';
import { csvLines } from '../io/csv';
import { inFile, readNumericCell } from '../io/numbers';

export interface InputSignal {
  readonly kind: 'step' | 'impulse' | 'sampled';
  /** Human-readable summary, e.g. "unit step on input 2 (valve)". */
  readonly description: string;
  /** Number of input channels m. */
  readonly inputs: number;
  /** Increasing times where u jumps; u is constant between them. */
  readonly breakpoints: Float64Array;
  /**
   * values[i] holds u on [breakpoints[i−1], breakpoints[i]) with breakpoints[−1] = −∞; the last one holds
   * after the last breakpoint. Length breakpoints.length + 1, each of length m.
   */
  readonly values: readonly Float64Array[];
  /** For an impulse: the weights w of the state jump x(0⁺) = x(0) + B·w. */
  readonly impulseWeights?: Float64Array;
}

/** Index of the piece in effect at time t (right-continuous: a jump at t belongs to the new piece). */
export function pieceAt(signal: InputSignal, t: number): number {
  const b = signal.breakpoints;
  let lo = 0;
  let hi = b.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (b[mid] <= t) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/**
 * The piece in effect just after t: output times and interval starts computed as k·T/(N−1) may fall a
 * rounding error before a jump that is meant to coincide with them; a jump within `tol` after t counts
 * as at t (right-continuous input).
 */
export function pieceAfter(signal: InputSignal, t: number, tol: number): number {
  return pieceAt(signal, t + tol);
}

/** What the input builders read of a model: B's column count and the input labels (a sparse model has B too). */
type InputSide = Pick<StateSpaceModel, 'B' | 'labels'>;

/**
 * Which channels a step or impulse acts on: "all", a 1-based index, or an input name.
 * Throws invalid_option naming `channel`.
 */
export function channelWeights(model: InputSide, channel: number | string | undefined): {
  weights: Float64Array;
  label: string;
} {
  const m = model.B.cols;
  const w = new Float64Array(m);
  if (channel === undefined || channel === 'all') {
    w.fill(1);
    return { weights: w, label: m === 1 ? 'the input' : `all ${m} inputs` };
  }
  let k: number;
  if (typeof channel === 'number' || /^\d+$/.test(channel)) {
    k = Number(channel);
    if (!Number.isInteger(k) || k < 1 || k > m) {
      throw new ModelError('invalid_option', 'channel', `channel must be between 1 and ${m} (the model has ${m} input${m === 1 ? "" : "s"}), got ${channel}`);
    }
    k -= 1;
  } else {
    const inputs = model.labels?.inputs;
    k = inputs ? inputs.indexOf(channel) : -1;
    if (k < 0) {
      const known = inputs ? `: ${inputs.join(', ')}` : ' (the model has no input labels)';
      throw new ModelError('invalid_option', 'channel', `channel "${channel}" is not an input of the model${known}`);
    }
  }
  w[k] = 1;
  const name = model.labels?.inputs?.[k];
  return { weights: w, label: `input ${k + 1}${name ? ` (${name})` : ''}` };
}

/** Unit step at t = 0 on the chosen channel(s). */
export function stepInput(model: InputSide, channel?: number | string): InputSignal {
  const { weights, label } = channelWeights(model, channel);
  return {
    kind: 'step',
    description: `unit step on ${label}`,
    inputs: model.B.cols,
    breakpoints: Float64Array.of(0),
    values: [new Float64Array(model.B.cols), weights],
  };
}

/** Unit impulse at t = 0 on the chosen channel(s). */
export function impulseInput(model: InputSide, channel?: number | string): InputSignal {
  const { weights, label } = channelWeights(model, channel);
  return {
    kind: 'impulse',
    description: `unit impulse on ${label}`,
    inputs: model.B.cols,
    breakpoints: new Float64Array(0),
    values: [new Float64Array(model.B.cols)],
    impulseWeights: weights,
  };
}

/**
 * A sampled input from CSV text: first column time, then one column per input; held constant from each
 * sample to the next (zero before the first sample, the last value after the last). A first row whose
 * cells are all non-numeric is taken as a header.
 * Throws ModelError on field `input`: empty_matrix, dimension_mismatch (column count), non_numeric,
 * non_finite (file, row, column, 1-based), unsorted_times (times must increase strictly).
 */
export function parseSampledInput(text: string, inputs: number, fileName?: string): InputSignal {
  const where = inFile(fileName);
  const field = 'input';
  const lines = csvLines(text);
  let first = 0;
  if (lines.length > 0 && lines[0].split(',').every((c) => readNumericCell(c).kind === 'non_numeric')) first = 1;
  if (lines.length <= first) throw new ModelError('empty_matrix', field, `${where}the input file has no samples`);
  const expected = inputs + 1;
  const times: number[] = [];
  const values: Float64Array[] = [new Float64Array(inputs)];
  for (let r = first; r < lines.length; r++) {
    const cells = lines[r].split(',');
    if (cells.length !== expected) {
      throw new ModelError(
        'dimension_mismatch',
        field,
        `${where}row ${r + 1} has ${cells.length} columns; expected ${expected} (time, then one column for each of the model's ${inputs} inputs)`,
      );
    }
    const row = new Float64Array(inputs);
    let time = 0;
    for (let c = 0; c < expected; c++) {
      const cell = readNumericCell(cells[c]);
      const what = c === 0 ? 'time' : `input ${c}`;
      if (cell.kind === 'non_numeric') {
        const shown = cells[c].trim() === '' ? 'an empty cell' : `"${cells[c].trim().slice(0, 40)}"`;
        throw new ModelError('non_numeric', field, `${where}row ${r + 1}, column ${c + 1} (${what}) is not a number: ${shown}`);
      }
      if (cell.kind === 'non_finite') {
        throw new ModelError('non_finite', field, `${where}row ${r + 1}, column ${c + 1} (${what}) is not finite`);
      }
      if (c === 0) time = cell.value;
      else row[c - 1] = cell.value;
    }
    if (times.length > 0 && !(time > times[times.length - 1])) {
      throw new ModelError(
        'unsorted_times',
        field,
        `${where}row ${r + 1}: time ${time} is not after the previous sample's ${times[times.length - 1]} (times must increase strictly)`,
      );
    }
    times.push(time);
    values.push(row);
  }
  return {
    kind: 'sampled',
    description: `sampled input (${times.length} samples from t = ${times[0]} to ${times[times.length - 1]}, held between samples)`,
    inputs,
    breakpoints: Float64Array.from(times),
    values,
  };
}
