// The response of a reduced model and its source model to an uploaded input signal (a CSV of time and one
// column per input, held between samples; reduction/simulate/inputs.ts), for the comparison page. Both
// models run with the automatic solver choice (reduction/simulate/auto.ts) on the same output grid; a source
// model on the large-model path runs through the engine's sparse time integration (reduction/sparse/
// simulate.ts, its own automatic choice between the stiff and the explicit solver), with the stop flag.
import { readFileSync } from 'node:fs';
import { fromRows, parseSampledInput, simulate, type SimulationResult, type StateSpaceModel, type StopSignal } from '../../reduction/index';
import { simulateSparse } from '../../reduction/sparse/simulate';
import { enginePathOf, loadModel, loadSparseModel, type ModelFile } from './model-files';
import type { ProgressReporter } from './progress';
import type { InputResponseRecord, ReducedMatricesRecord } from './records';

const POINTS = 401;

export function reducedModelOf(m: ReducedMatricesRecord): StateSpaceModel {
  return { A: fromRows(m.A), B: fromRows(m.B), C: fromRows(m.C), D: fromRows(m.D) };
}

export function runInputResponse(
  files: readonly ModelFile[],
  reducedMatrices: ReducedMatricesRecord,
  signal: { path: string; name: string },
  report: ProgressReporter,
  options: { signal?: StopSignal; memoryBudgetBytes?: number } = {},
): InputResponseRecord {
  report('Reading the models and the input signal', 0);
  const sparseModel = enginePathOf(files) === 'sparse' ? loadSparseModel(files).model : null;
  const denseModel = sparseModel ? null : loadModel(files).model;
  const model = sparseModel ?? denseModel!;
  const reduced = reducedModelOf(reducedMatrices);
  const input = parseSampledInput(readFileSync(signal.path, 'utf8'), model.B.cols, signal.name);
  const times = input.breakpoints;
  const first = times[0];
  const last = times[times.length - 1];
  // Past the last sample the input is held; a tenth of the record more shows the settling that follows.
  const tEnd = last > 0 ? last + 0.1 * (last - Math.min(0, first)) : 1;
  report('Simulating the full model', 0.1);
  const f: SimulationResult = sparseModel
    ? simulateSparse(sparseModel, input, { tEnd, points: POINTS, solver: 'auto', memoryBudgetBytes: options.memoryBudgetBytes }, {
          signal: options.signal,
          onStep: (s) => report('Simulating the full model', 0.1 + 0.7 * Math.min(1, s.t / s.tEnd), { done: s.steps, unit: 'step', note: `t = ${s.t.toPrecision(3)} of ${s.tEnd.toPrecision(3)}` }),
        })
    : simulate(denseModel!, input, { tEnd, points: POINTS, solver: 'auto' });
  report('Simulating the reduced model', 0.8);
  const r = simulate(reduced, input, { tEnd, points: POINTS, solver: 'auto' });
  const p = model.C.rows;
  const columns = (y: { rows: number; data: Float64Array }) =>
    Array.from({ length: p }, (_, i) => Array.from({ length: y.rows }, (_, k) => y.data[k * p + i]));
  return {
    description: input.description,
    t: Array.from(f.t),
    full: columns(f.y),
    reduced: columns(r.y),
    solverFull: f.solver,
    solverReduced: r.solver,
    wallMsFull: f.stats.wallMs,
    wallMsReduced: r.stats.wallMs,
  };
}
