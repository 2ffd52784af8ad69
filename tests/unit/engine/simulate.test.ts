/**
 * The exact solver (zero-order-hold recursion; Van Loan 1978, Higham 2005) against Debian python3-scipy:
 * the closed form y(t) = C A⁻¹(e^{At} − I) B u of a step from rest, y(t) = C e^{At} B w of an impulse, and
 * an independent interval-by-interval scipy.linalg.expm recursion for sampled inputs
 * (tests/reference/time_reference.py). Also the input signals and their errors.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { ModelError } from '@/reduction/errors';
import { SharedExponentials, impulseInput, parseSampledInput, simulate, stepInput } from '@/reduction/simulate';
import type { Matrix } from '@/reduction/linalg/matrix';
import { logRates, modelWithRates, rows, scipyReference } from './simulate-reference';
import { blockFactor } from '@/reduction/simulate/exact-blocks';

const TIME = path.resolve(__dirname, '../../fixtures/engine/time');
const fixture = (f: string) => readFileSync(path.join(TIME, f), 'utf8');

/** max |y − ref| / max |ref| over all times and outputs. */
function relativeError(y: Matrix, ref: number[][]): number {
  let err = 0;
  let scale = 0;
  for (let k = 0; k < ref.length; k++) {
    for (let j = 0; j < ref[k].length; j++) {
      err = Math.max(err, Math.abs(y.data[k * y.cols + j] - ref[k][j]));
      scale = Math.max(scale, Math.abs(ref[k][j]));
    }
  }
  return err / scale;
}

function caught(fn: () => unknown): ModelError {
  try {
    fn();
  } catch (e) {
    if (e instanceof ModelError) return e;
    throw e;
  }
  throw new Error('expected a ModelError');
}

describe('exact solver against scipy closed forms', () => {
  const models = {
    'non-stiff MIMO (6 states, 2 in, 3 out, complex poles)': modelWithRates(logRates(6, 0.3, 3), 2, 3, 11, 2),
    'stiff MIMO (12 states, rates 1 … 1e4)': modelWithRates(logRates(12, 1, 1e4), 3, 2, 12, 4),
  };
  for (const [name, model] of Object.entries(models)) {
    it(`${name}: step from rest matches C A⁻¹(e^{At} − I)B to 1e-10`, () => {
      const r = simulate(model, stepInput(model), { tEnd: 8, points: 81, solver: 'exact' });
      const u = new Array(model.B.cols).fill(1);
      const ref = scipyReference<{ y: number[][] }>({
        op: 'step_closed_form', A: rows(model.A), B: rows(model.B), C: rows(model.C), t: Array.from(r.t), u,
      });
      // The closed form has no feedthrough; the step adds D·u for t ≥ 0.
      const withD = ref.y.map((yk) => yk.map((v, i) => v + model.D.data.slice(i * model.D.cols, (i + 1) * model.D.cols).reduce((s, d) => s + d, 0)));
      expect(relativeError(r.y, withD)).toBeLessThan(1e-10);
      expect(r.stats.factorizations).toBe(1);
      expect(r.stats.steps).toBe(80);
      expect(r.stats.pointsStored).toBe(81);
      expect(r.stats.rhsEvaluations).toBe(0);
    });

    it(`${name}: impulse on channel 2 matches C e^{At} B e₂ to 1e-10`, () => {
      const r = simulate(model, impulseInput(model, 2), { tEnd: 5, points: 51, solver: 'exact' });
      const w = Array.from({ length: model.B.cols }, (_, k) => (k === 1 ? 1 : 0));
      const ref = scipyReference<{ y: number[][] }>({ op: 'impulse', A: rows(model.A), B: rows(model.B), C: rows(model.C), t: Array.from(r.t), w });
      expect(relativeError(r.y, ref.y)).toBeLessThan(1e-10);
    });
  }

  it('given (non-uniform) output times: one exponential per distinct interval length', () => {
    const model = models['stiff MIMO (12 states, rates 1 … 1e4)'];
    const times = [0, 0.001, 0.002, 0.01, 0.5, 1, 1.5, 4];
    const r = simulate(model, stepInput(model, 1), { tEnd: 4, times, solver: 'exact' });
    const ref = scipyReference<{ y: number[][] }>({
      op: 'step_closed_form', A: rows(model.A), B: rows(model.B), C: rows(model.C), t: times, u: [1, 0, 0],
    });
    const withD = ref.y.map((yk, k) => yk.map((v, i) => v + (times[k] >= 0 ? model.D.data[i * 3] : 0)));
    expect(relativeError(r.y, withD)).toBeLessThan(1e-10);
    // lengths 0.001 (twice), 0.008, 0.49, 0.5 (twice), 2.5
    expect(r.stats.factorizations).toBe(5);
  });

  it('sampled CSV input held between samples, with an initial state, matches an interval-by-interval scipy recursion', () => {
    const model = modelWithRates(logRates(5, 0.5, 50), 2, 2, 21, 2);
    const input = parseSampledInput(fixture('sampled_two_inputs_crlf.csv'), 2, 'sampled_two_inputs_crlf.csv');
    const initialState = [0.1, -0.2, 0.3, 0, 0.5];
    const r = simulate(model, input, { tEnd: 1.2, points: 25, solver: 'exact', initialState });
    const ref = scipyReference<{ y: number[][] }>({
      op: 'sampled_zoh', A: rows(model.A), B: rows(model.B), C: rows(model.C), D: rows(model.D),
      // Grid times k·T/(N−1) land a rounding error before the jumps at 0.45 and 0.9; the solver takes them
      // as at the jump (right-continuous input), so the reference gets the decimal times.
      sample_t: [0, 0.2, 0.45, 0.9], sample_u: [[1, 0], [0.5, 1], [0, -1], [2, 0.25]],
      t: Array.from(r.t, (t) => Number(t.toPrecision(12))), initial_state: initialState,
    });
    expect(relativeError(r.y, ref.y)).toBeLessThan(1e-10);
  });
});

describe('exact solver: block recursion (m steps per product with Φ^m, exact-blocks.ts)', () => {
  // 48 states and 2 outputs on 400 intervals: the cost model takes blocks (checked first), so these
  // responses come from Φ^m, CΦ^i and the summed input terms rather than step by step.
  const model = modelWithRates(logRates(48, 1, 1e3), 2, 2, 31, 6);
  it('the cost model blocks long runs of large models and leaves short runs, small or many-output models alone', () => {
    for (const simd of [false, true]) {
      expect(blockFactor(48, 2, 400, simd)).toBeGreaterThan(1);
      expect(blockFactor(1000, 1, 3, simd)).toBe(1);
      expect(blockFactor(48, 20, 400, simd)).toBe(1);
    }
    // Cheaper matrix–vector products make the up-front squarings worth less: a shorter block.
    expect(blockFactor(1000, 1, 1999, false)).toBeGreaterThanOrEqual(4);
    expect(blockFactor(1000, 1, 1999, true)).toBeLessThan(blockFactor(1000, 1, 1999, false));
  });
  it('step from rest matches the closed form C A⁻¹(e^{At} − I)B (scipy) to 1e-10', () => {
    const r = simulate(model, stepInput(model), { tEnd: 4, points: 401, solver: 'exact' });
    const ref = scipyReference<{ y: number[][] }>({
      op: 'step_closed_form', A: rows(model.A), B: rows(model.B), C: rows(model.C), t: Array.from(r.t), u: [1, 1],
    });
    const withD = ref.y.map((yk) => yk.map((v, i) => v + model.D.data[i * 2] + model.D.data[i * 2 + 1]));
    expect(relativeError(r.y, withD)).toBeLessThan(1e-10);
    expect(r.stats.steps).toBe(400);
    expect(r.stats.pointsStored).toBe(401);
  });
  it('impulse matches C e^{At} B e₁ (scipy) to 1e-10', () => {
    const r = simulate(model, impulseInput(model, 1), { tEnd: 4, points: 401, solver: 'exact' });
    const ref = scipyReference<{ y: number[][] }>({
      op: 'impulse', A: rows(model.A), B: rows(model.B), C: rows(model.C), t: Array.from(r.t), w: [1, 0],
    });
    expect(relativeError(r.y, ref.y)).toBeLessThan(1e-10);
  });
  it('a sampled input held over long stretches, with an initial state, matches the interval-by-interval scipy recursion', () => {
    const csv = 'time,a,b\n0,1,0\n1,0.5,-1\n2.5,-2,0.25\n';
    const input = parseSampledInput(csv, 2, 'held.csv');
    const initialState = Array.from({ length: 48 }, (_, i) => Math.sin(i + 1) / 4);
    const r = simulate(model, input, { tEnd: 4, points: 401, solver: 'exact', initialState });
    const ref = scipyReference<{ y: number[][] }>({
      op: 'sampled_zoh', A: rows(model.A), B: rows(model.B), C: rows(model.C), D: rows(model.D),
      sample_t: [0, 1, 2.5], sample_u: [[1, 0], [0.5, -1], [-2, 0.25]],
      t: Array.from(r.t, (t) => Number(t.toPrecision(12))), initial_state: initialState,
    });
    expect(relativeError(r.y, ref.y)).toBeLessThan(1e-10);
  });
});

describe('input signals', () => {
  it('a step on a named channel drives only that input', () => {
    const base = modelWithRates([1, 2], 2, 1, 3);
    const model = { ...base, labels: { inputs: ['valve', 'pump'] } };
    const s = stepInput(model, 'pump');
    expect(Array.from(s.values[1])).toEqual([0, 1]);
    expect(s.description).toBe('unit step on input 2 (pump)');
  });
  it('refuses an unknown channel, naming it', () => {
    const model = modelWithRates([1, 2], 2, 1, 3);
    expect(caught(() => stepInput(model, 3)).message).toContain('between 1 and 2');
    expect(caught(() => impulseInput(model, 'valve')).field).toBe('channel');
  });
  it('reads a header row and holds the last sample', () => {
    const s = parseSampledInput(fixture('sampled_one_input.csv'), 1);
    expect(Array.from(s.breakpoints)).toEqual([0, 0.5, 1.25]);
    expect(s.values.map((v) => v[0])).toEqual([0, 1, -0.5, 2]);
  });

  const badCases: [string, string, RegExp][] = [
    ['unsorted_duplicate_time.csv', 'unsorted_times', /row 3: time 0.3 is not after the previous sample's 0.3/],
    ['unsorted_decreasing.csv', 'unsorted_times', /row 3: time 0.4 is not after the previous sample's 0.5/],
    ['wrong_column_count.csv', 'dimension_mismatch', /row 2 has 2 columns; expected 3 \(time, then one column for each of the model's 2 inputs\)/],
    ['non_numeric_cell.csv', 'non_numeric', /row 2, column 3 \(input 2\) is not a number: "high"/],
    ['non_finite_cell.csv', 'non_finite', /row 2, column 3 \(input 2\) is not finite/],
    ['header_only.csv', 'empty_matrix', /no samples/],
  ];
  for (const [file, code, message] of badCases) {
    it(`${file}: ${code}, naming the file`, () => {
      const e = caught(() => parseSampledInput(fixture(file), 2, file));
      expect(e.code).toBe(code);
      expect(e.field).toBe('input');
      expect(e.message).toMatch(message);
      expect(e.message.startsWith(`${file}: `)).toBe(true);
    });
  }
  it('a one-input file read for a two-input model is a column-count error', () => {
    expect(caught(() => parseSampledInput(fixture('sampled_one_input.csv'), 2)).code).toBe('dimension_mismatch');
  });
});

describe('simulation options', () => {
  const model = modelWithRates([1, 2, 3], 1, 1, 5);
  const cases: [Record<string, unknown>, string][] = [
    [{ tEnd: 0 }, 'tEnd'],
    [{ tEnd: 1, relTol: 0 }, 'relTol'],
    [{ tEnd: 1, absTol: -1 }, 'absTol'],
    [{ tEnd: 1, points: 1 }, 'points'],
    [{ tEnd: 1, times: [0, 2] }, 'times'],
    [{ tEnd: 1, times: [0.5, 0.5] }, 'times'],
    [{ tEnd: 1, initialState: [1, 2] }, 'initialState'],
  ];
  for (const [opts, field] of cases) {
    it(`refuses ${JSON.stringify(opts)}, naming ${field}`, () => {
      expect(caught(() => simulate(model, stepInput(model), { ...(opts as { tEnd: number }), solver: 'exact' })).field).toBe(field);
    });
  }
});

describe('exact solver: exponentials shared between runs (SharedExponentials)', () => {
  it('gives the step and impulse responses of every input as separate runs do, with one exponential in all', () => {
    // Φ and Γ_B from one augmented exponential serve a step (Γ_B·w) and an impulse (Φ only): Van Loan
    // (1978), Theorem 1. The separate runs are checked against scipy's closed forms above.
    const model = modelWithRates(logRates(40, 0.5, 500), 3, 2, 5, 41);
    const shared = new SharedExponentials(model.A, model.B);
    const opts = { tEnd: 4, points: 101, solver: 'exact' as const };
    let computed = 0;
    for (const make of [stepInput, impulseInput]) {
      for (let j = 1; j <= 3; j++) {
        const alone = simulate(model, make(model, j), opts);
        const withShared = simulate(model, make(model, j), { ...opts, sharedExponentials: shared });
        computed += withShared.stats.factorizations;
        let worst = 0, scale = 0;
        alone.y.data.forEach((v, k) => {
          worst = Math.max(worst, Math.abs(v - withShared.y.data[k]));
          scale = Math.max(scale, Math.abs(v));
        });
        expect(worst).toBeLessThanOrEqual(1e-12 * scale);
      }
    }
    expect(computed).toBe(1);
  });
});
