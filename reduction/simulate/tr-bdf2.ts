/**
 * The stiff solver: TR-BDF2, a trapezoidal stage to t + γh followed by a BDF2 stage to t + h, with
 * γ = 2 − √2 so that both stages share one iteration matrix W = I − (γ/2)·h·A.
 *
 * Method: M. E. Hosea & L. F. Shampine, "Analysis and implementation of TR-BDF2", Appl. Numer. Math.
 * 20(1–2):21–37, 1996 (the method of Bank, Coughran, Fichtner, Grosse, Rose & Smith, IEEE Trans. Electron
 * Devices 32, 1985). Written as a three-stage singly diagonally implicit Runge–Kutta method (explicit
 * first stage) its tableau is
 *
 *     0 |  0   0   0
 *     γ |  d   d   0          d = γ/2,  w = (1 − d)/2 = √2/4
 *     1 |  w   w   d
 *   ----+------------
 *       |  w   w   d          (order 2, L-stable)
 *       | (1−w)/3  (3w+1)/3  d/3    (embedded, order 3)
 *
 * The tableau follows from the two stage equations of the paper; the embedded weights are those of the
 * paper's error estimate as recalled here, and the tests check the four order-3 conditions they must
 * satisfy (Butcher trees up to order 3) rather than trust the recollection. The raw estimate
 * h·Σ(bᵢ − b̂ᵢ)fᵢ grows like hλ on stiff components; it is filtered through W⁻¹ as Shampine proposed
 * and as RADAU5 does (Hairer & Wanner, "Solving ODE II", 2nd ed., Springer 1996, §IV.8, eq. (8.20)),
 * which keeps it bounded as hλ → −∞ at the price of one more solve with the factorisation in hand.
 *
 * Linear constant-coefficient systems make each stage one solve with W: no Newton iteration. The
 * factorisation of W is reused while h is unchanged, so the step is changed only when it pays: it is cut
 * at once on a rejection, and raised only when the controller asks for at least twice the current step
 * (common practice in codes that reuse an iteration matrix). Dense output is the cubic Hermite
 * interpolant of the step's end values and slopes (HNW93 §II.6), of order 3 ≥ the method's order.
 */
import { ModelError } from '../errors';
import type { StateSpaceModel } from '../model';
import { startingStep } from './dormand-prince';
import type { InputSignal } from './inputs';
import { IterationMatrix } from './iteration-matrix';
import { LinearSystem } from './linear-system';
import { type CheckedOptions, OutputRecorder, constantInputIntervals, errorNorm } from './output-grid';
import type { SimulationResult } from './types';

export const TRBDF2_GAMMA = 2 - Math.SQRT2;
export const TRBDF2_D = TRBDF2_GAMMA / 2;
export const TRBDF2_W = Math.SQRT2 / 4;
/** The tableau above, for the order-condition tests. */
export const TRBDF2_TABLEAU = {
  c: [0, TRBDF2_GAMMA, 1],
  a: [
    [],
    [TRBDF2_D, TRBDF2_D],
    [TRBDF2_W, TRBDF2_W, TRBDF2_D],
  ],
  b: [TRBDF2_W, TRBDF2_W, TRBDF2_D],
  bHat: [(1 - TRBDF2_W) / 3, (3 * TRBDF2_W + 1) / 3, TRBDF2_D / 3],
} as const;
/** b − b̂ for the error estimate. */
const E1 = (4 * TRBDF2_W - 1) / 3;
const E2 = -1 / 3;
const E3 = (2 * TRBDF2_D) / 3;

const SAFETY = 0.9;
const FAC_MIN = 0.2;
const FAC_MAX = 5;
/** Raise h only when the controller allows at least this factor (each change costs a factorisation). */
const GROWTH_WORTH_REFACTORING = 2;

export function simulateStiff(model: StateSpaceModel, input: InputSignal, opts: CheckedOptions): SimulationResult {
  const wallStart = performance.now();
  const system = new LinearSystem(model);
  const W = new IterationMatrix(model.A, TRBDF2_D);
  try {
    const n = system.n;
    const recorder = new OutputRecorder(opts.times, system, input);
    const { relTol, absTol } = opts;
    const d = TRBDF2_D, w = TRBDF2_W;

    const x = Float64Array.from(opts.initialState);
    if (input.impulseWeights) {
      const jump = system.inputTerm(input.impulseWeights);
      for (let i = 0; i < n; i++) x[i] += jump[i];
    }
    while (!recorder.done && recorder.nextTime <= 0) recorder.record(x);

    const f1 = new Float64Array(n), f2 = new Float64Array(n), f3 = new Float64Array(n);
    const y2 = new Float64Array(n), y3 = new Float64Array(n), err = new Float64Array(n), dense = new Float64Array(n);

    let steps = 0;
    let rejected = 0;
    let h = NaN;
    const intervals = constantInputIntervals(input, opts.tEnd);

    intervals.forEach((interval, index) => {
      if (recorder.done) return;
      const b = system.inputTerm(input.values[interval.piece]);
      // After the final input jump the input is held, so the solution is defined past tEnd and the last
      // step may overshoot (outputs come from dense output); an interior jump must be landed on.
      const mayOvershoot = index === intervals.length - 1;
      let t = interval.start;
      const tStop = interval.end;
      system.rhs(x, b, f1);
      if (opts.fixedStep !== undefined) h = opts.fixedStep;
      else if (!(h > 0)) h = startingStep(system, x, b, f1, tStop - t, relTol, absTol, 2);

      // Equal steps up to an interior jump, planned once per step size so the factorisation is reused.
      let plan: { h: number; step: number; left: number } | null = null;
      while (t < tStop && !recorder.done) {
        if (steps + rejected >= opts.maxSteps) {
          throw new ModelError('invalid_option', 'maxSteps', `the stiff solver reached ${opts.maxSteps} steps at t = ${t}`);
        }
        let hStep = h;
        let landing = false;
        const remaining = tStop - t;
        if (opts.fixedStep !== undefined || mayOvershoot) {
          if (opts.fixedStep !== undefined && hStep >= remaining - 1e-12 * Math.max(1, Math.abs(tStop))) {
            hStep = remaining;
            landing = true;
          }
        } else {
          if (plan === null || plan.h !== h) {
            const count = Math.max(1, Math.ceil(remaining / h - 1e-9));
            plan = { h, step: remaining / count, left: count };
          }
          hStep = plan.step;
          landing = plan.left === 1;
        }
        const lu = W.factorFor(hStep);

        // Trapezoidal stage: W·y2 = x + d·h·(f1 + b).
        for (let i = 0; i < n; i++) y2[i] = x[i] + d * hStep * (f1[i] + b[i]);
        W.solve(lu, y2);
        system.rhs(y2, b, f2);
        // BDF2 stage: W·y3 = x + w·h·(f1 + f2) + d·h·b.
        for (let i = 0; i < n; i++) y3[i] = x[i] + w * hStep * (f1[i] + f2[i]) + d * hStep * b[i];
        W.solve(lu, y3);
        system.rhs(y3, b, f3);

        let errNorm = 0;
        if (opts.fixedStep === undefined) {
          for (let i = 0; i < n; i++) err[i] = hStep * (E1 * f1[i] + E2 * f2[i] + E3 * f3[i]);
          W.solve(lu, err);
          errNorm = errorNorm(err, x, y3, relTol, absTol);
          if (errNorm > 1) {
            rejected++;
            h = hStep * Math.max(FAC_MIN, Math.min(SAFETY, SAFETY * Math.pow(errNorm, -1 / 3)));
            continue;
          }
        }

        steps++;
        if (plan) plan.left--;
        const tNew = landing ? tStop : t + hStep;
        while (!recorder.done && recorder.nextTime <= tNew) {
          // Cubic Hermite on [t, t + h] through x, f1 (slope at t) and y3, f3 (slope at t + h).
          const theta = (recorder.nextTime - t) / hStep;
          const h00 = (1 + 2 * theta) * (1 - theta) * (1 - theta);
          const h10 = theta * (1 - theta) * (1 - theta);
          const h01 = theta * theta * (3 - 2 * theta);
          const h11 = theta * theta * (theta - 1);
          for (let i = 0; i < n; i++) {
            dense[i] = h00 * x[i] + hStep * h10 * f1[i] + h01 * y3[i] + hStep * h11 * f3[i];
          }
          recorder.record(dense);
        }
        x.set(y3);
        f1.set(f3);
        t = tNew;

        if (opts.fixedStep === undefined) {
          const factor = Math.min(FAC_MAX, SAFETY * Math.pow(Math.max(errNorm, 1e-10), -1 / 3));
          // Keep h (and its factorisation) unless a change pays for a new one; a shortened landing step
          // does not lower the step wanted afterwards.
          if (factor >= GROWTH_WORTH_REFACTORING) h = Math.max(h, hStep * Math.min(factor, FAC_MAX));
        } else {
          h = opts.fixedStep;
        }
      }
    });
    while (!recorder.done) recorder.record(x);
    return {
      t: opts.times,
      y: recorder.y,
      solver: 'stiff',
      stats: {
        steps,
        rejectedSteps: rejected,
        rhsEvaluations: system.rhsEvaluations,
        factorizations: W.factorizations,
        pointsStored: recorder.next,
        wallMs: performance.now() - wallStart,
      },
    };
  } finally {
    W.dispose();
    system.dispose();
  }
}
