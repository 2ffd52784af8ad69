/**
 * The explicit solver: the Dormand–Prince 5(4) pair with local extrapolation, error control and dense
 * output.
 *
 * Method: J. R. Dormand & P. J. Prince, "A family of embedded Runge–Kutta formulae", J. Comput. Appl.
 * Math. 6(1):19–26, 1980 (the coefficients below are those of Hairer, Nørsett & Wanner, "Solving
 * Ordinary Differential Equations I", 2nd ed., Springer 1993, Table II.5.2). Step-size selection and the
 * error norm: HNW93 §II.4, eqs. (4.11)–(4.13), with the PI stabilisation (β = 0.04) and the starting-step
 * algorithm of the same section; the continuous extension of order 4: HNW93 §II.6 (Shampine's dense
 * output for this pair, as in the authors' code DOPRI5). The coefficient values were transcribed from
 * those sources from memory; `tests/unit/engine/solvers.test.ts` verifies the orders (5, 4 for the
 * embedded error estimate, 4 for the dense output) by fixed-step convergence.
 *
 * On a stiff model the step is bounded by the stability region (|hλ| ≲ 3.3 along the real axis) rather
 * than by the accuracy asked for; that is the cost the simulation-cost report shows.
 */
import { ModelError } from '../errors';
import type { StateSpaceModel } from '../model';
import type { InputSignal } from './inputs';
import { LinearSystem, type TimeSystem } from './linear-system';
import { type CheckedOptions, OutputRecorder, constantInputIntervals, errorNorm } from './output-grid';
import type { SimulationResult, TimeStepReport } from './types';
import { throwIfStopped, type LoopHooks } from '../stop';

const C2 = 1 / 5, C3 = 3 / 10, C4 = 4 / 5, C5 = 8 / 9;
const A21 = 1 / 5;
const A31 = 3 / 40, A32 = 9 / 40;
const A41 = 44 / 45, A42 = -56 / 15, A43 = 32 / 9;
const A51 = 19372 / 6561, A52 = -25360 / 2187, A53 = 64448 / 6561, A54 = -212 / 729;
const A61 = 9017 / 3168, A62 = -355 / 33, A63 = 46732 / 5247, A64 = 49 / 176, A65 = -5103 / 18656;
// 5th-order weights (also the 7th stage: first same as last).
const B1 = 35 / 384, B3 = 500 / 1113, B4 = 125 / 192, B5 = -2187 / 6784, B6 = 11 / 84;
// b − b̂: the 5th minus the embedded 4th-order weights.
const E1 = 71 / 57600, E3 = -71 / 16695, E4 = 71 / 1920, E5 = -17253 / 339200, E6 = 22 / 525, E7 = -1 / 40;
// Dense output of order 4 (HNW93 §II.6, DOPRI5's continuous extension).
const D1 = -12715105075 / 11282082432, D3 = 87487479700 / 32700410799, D4 = -10690763975 / 1880347072;
const D5 = 701980252875 / 199316789632, D6 = -1453857185 / 822651844, D7 = 69997945 / 29380423;

/** The Butcher tableau in one piece, for the order-condition tests and for documentation. */
export const DOPRI5_TABLEAU = {
  c: [0, C2, C3, C4, C5, 1, 1],
  a: [
    [],
    [A21],
    [A31, A32],
    [A41, A42, A43],
    [A51, A52, A53, A54],
    [A61, A62, A63, A64, A65],
    [B1, 0, B3, B4, B5, B6],
  ],
  b: [B1, 0, B3, B4, B5, B6, 0],
  bHat: [B1 - E1, 0, B3 - E3, B4 - E4, B5 - E5, B6 - E6, -E7],
} as const;

const SAFETY = 0.9;
const FAC_MIN = 0.2;
const FAC_MAX = 10;
const BETA = 0.04;
const ALPHA = 0.2 - 0.75 * BETA;

export function simulateExplicit(model: StateSpaceModel, input: InputSignal, opts: CheckedOptions): SimulationResult {
  const system = new LinearSystem(model);
  try {
    return integrateExplicit(system, input, opts);
  } finally {
    system.dispose();
  }
}

/**
 * The Dormand–Prince integration on any `TimeSystem` (dense here, sparse in `reduction/sparse/simulate.ts`).
 * `hooks`: a stop flag looked at before each step, and a report after each accepted one. The caller owns
 * (and disposes) the system.
 */
export function integrateExplicit(
  system: TimeSystem,
  input: InputSignal,
  opts: CheckedOptions,
  hooks: LoopHooks<TimeStepReport> = {},
): SimulationResult {
  const wallStart = performance.now();
  const n = system.n;
  const recorder = new OutputRecorder(opts.times, system, input);
  const { relTol, absTol } = opts;

  const x = Float64Array.from(opts.initialState);
  if (input.impulseWeights) {
    const jump = system.impulseJump(input.impulseWeights);
    for (let i = 0; i < n; i++) x[i] += jump[i];
  }
  while (!recorder.done && recorder.nextTime <= 0) recorder.record(x);

  const k1 = new Float64Array(n), k2 = new Float64Array(n), k3 = new Float64Array(n), k4 = new Float64Array(n);
  const k5 = new Float64Array(n), k6 = new Float64Array(n), k7 = new Float64Array(n);
  const stage = new Float64Array(n);
  const xNew = new Float64Array(n);
  const err = new Float64Array(n);
  const dense = new Float64Array(n);
  const r2 = new Float64Array(n), r3 = new Float64Array(n), r4 = new Float64Array(n), r5 = new Float64Array(n);

  let steps = 0;
  let rejected = 0;
  let h = NaN;
  let errOld = 1e-4;
  let rejectedLast = false;

  for (const interval of constantInputIntervals(input, opts.tEnd)) {
    if (recorder.done) break;
    const b = system.inputTerm(input.values[interval.piece]);
    let t = interval.start;
    const tStop = interval.end;
    system.derivative(x, b, k1); // the input may have jumped: first-same-as-last does not carry over
    if (opts.fixedStep !== undefined) h = opts.fixedStep;
    else if (!(h > 0)) h = startingStep(system, x, b, k1, tStop - t, relTol, absTol);

    while (t < tStop && !recorder.done) {
      throwIfStopped(hooks.signal, 'the explicit solver');
      if (steps + rejected >= opts.maxSteps) {
        throw new ModelError(
          'invalid_option',
          'maxSteps',
          `the explicit solver reached ${opts.maxSteps} steps at t = ${t}; the model is probably stiff: use the stiff or exact solver`,
        );
      }
      let last = false;
      const hWanted = h;
      if (t + h >= tStop - 1e-12 * Math.max(1, Math.abs(tStop))) {
        h = tStop - t;
        last = true;
      }
      for (let i = 0; i < n; i++) stage[i] = x[i] + h * A21 * k1[i];
      system.derivative(stage, b, k2);
      for (let i = 0; i < n; i++) stage[i] = x[i] + h * (A31 * k1[i] + A32 * k2[i]);
      system.derivative(stage, b, k3);
      for (let i = 0; i < n; i++) stage[i] = x[i] + h * (A41 * k1[i] + A42 * k2[i] + A43 * k3[i]);
      system.derivative(stage, b, k4);
      for (let i = 0; i < n; i++) stage[i] = x[i] + h * (A51 * k1[i] + A52 * k2[i] + A53 * k3[i] + A54 * k4[i]);
      system.derivative(stage, b, k5);
      for (let i = 0; i < n; i++) {
        stage[i] = x[i] + h * (A61 * k1[i] + A62 * k2[i] + A63 * k3[i] + A64 * k4[i] + A65 * k5[i]);
      }
      system.derivative(stage, b, k6);
      for (let i = 0; i < n; i++) xNew[i] = x[i] + h * (B1 * k1[i] + B3 * k3[i] + B4 * k4[i] + B5 * k5[i] + B6 * k6[i]);
      system.derivative(xNew, b, k7);

      let accept = true;
      let errNorm = 0;
      if (opts.fixedStep === undefined) {
        for (let i = 0; i < n; i++) {
          err[i] = h * (E1 * k1[i] + E3 * k3[i] + E4 * k4[i] + E5 * k5[i] + E6 * k6[i] + E7 * k7[i]);
        }
        errNorm = errorNorm(err, x, xNew, relTol, absTol);
        accept = errNorm <= 1;
      }
      if (!accept) {
        rejected++;
        rejectedLast = true;
        h *= Math.max(FAC_MIN, SAFETY * Math.pow(errNorm, -0.2));
        continue;
      }

      steps++;
      const tNew = last ? tStop : t + h;
      if (recorder.nextTime <= tNew) {
        // Continuous extension: x(t + θh) = x + θ(r2 + (1−θ)(r3 + θ(r4 + (1−θ) r5))).
        for (let i = 0; i < n; i++) {
          const dx = xNew[i] - x[i];
          const bspl = h * k1[i] - dx;
          r2[i] = dx;
          r3[i] = bspl;
          r4[i] = dx - h * k7[i] - bspl;
          r5[i] = h * (D1 * k1[i] + D3 * k3[i] + D4 * k4[i] + D5 * k5[i] + D6 * k6[i] + D7 * k7[i]);
        }
        while (!recorder.done && recorder.nextTime <= tNew) {
          const theta = Math.min(1, (recorder.nextTime - t) / h);
          const theta1 = 1 - theta;
          for (let i = 0; i < n; i++) {
            dense[i] = x[i] + theta * (r2[i] + theta1 * (r3[i] + theta * (r4[i] + theta1 * r5[i])));
          }
          recorder.record(dense);
        }
      }
      x.set(xNew);
      k1.set(k7);
      t = tNew;
      hooks.onStep?.({ t, tEnd: opts.tEnd, steps, rejectedSteps: rejected, h, order: 5 });

      if (opts.fixedStep !== undefined) {
        h = opts.fixedStep;
      } else {
        // PI step-size control (HNW93 §II.4 with Gustafsson's stabilisation, β = 0.04).
        const e = Math.max(errNorm, 1e-10);
        let factor = SAFETY * Math.pow(e, -ALPHA) * Math.pow(errOld, BETA);
        factor = Math.min(rejectedLast ? 1 : FAC_MAX, Math.max(FAC_MIN, factor));
        errOld = Math.max(errNorm, 1e-4);
        rejectedLast = false;
        // A step shortened to land on the interval's end says little about the next one.
        h = last ? Math.max(h * factor, hWanted) : h * factor;
      }
    }
  }
  while (!recorder.done) recorder.record(x);
  return {
    t: opts.times,
    y: recorder.y,
    solver: 'explicit',
    stats: {
      steps,
      rejectedSteps: rejected,
      rhsEvaluations: system.rhsEvaluations,
      factorizations: system.factorizations,
      pointsStored: recorder.next,
      wallMs: performance.now() - wallStart,
    },
  };
}

/**
 * Starting step of HNW93 §II.4 ("Starting step size", p. 169) for a method of order 5: a first guess from
 * ‖x‖/‖f‖, refined by one explicit Euler step's estimate of the second derivative.
 */
export function startingStep(
  system: Pick<TimeSystem, 'n' | 'derivative'>,
  x: Float64Array,
  b: Float64Array,
  f0: Float64Array,
  span: number,
  relTol: number,
  absTol: number,
  order = 5,
): number {
  const n = system.n;
  let d0 = 0, d1 = 0;
  for (let i = 0; i < n; i++) {
    const sc = absTol + relTol * Math.abs(x[i]);
    d0 += (x[i] / sc) ** 2;
    d1 += (f0[i] / sc) ** 2;
  }
  d0 = Math.sqrt(d0 / n);
  d1 = Math.sqrt(d1 / n);
  let h0 = d0 < 1e-5 || d1 < 1e-5 ? 1e-6 : 0.01 * (d0 / d1);
  h0 = Math.min(h0, span);
  const x1 = new Float64Array(n);
  for (let i = 0; i < n; i++) x1[i] = x[i] + h0 * f0[i];
  const f1 = new Float64Array(n);
  system.derivative(x1, b, f1);
  let d2 = 0;
  for (let i = 0; i < n; i++) {
    const sc = absTol + relTol * Math.abs(x[i]);
    d2 += ((f1[i] - f0[i]) / sc) ** 2;
  }
  d2 = Math.sqrt(d2 / n) / h0;
  const dm = Math.max(d1, d2);
  const h1 = dm <= 1e-15 ? Math.max(1e-6, h0 * 1e-3) : Math.pow(0.01 / dm, 1 / (order + 1));
  return Math.min(100 * h0, h1, span);
}
