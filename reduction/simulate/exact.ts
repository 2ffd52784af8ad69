/**
 * The exact solver: zero-order-hold discretisation, then the recursion x[k+1] = Φ x[k] + Γ u[k] from one
 * output time (or input jump) to the next. For piecewise-constant inputs — steps, impulses, sampled
 * signals held between samples — this is the exact solution at those times, whatever the stiffness,
 * up to the rounding of the exponential.
 *
 * Φ and Γ come from the augmented exponential of Van Loan (1978), Theorem 1 (`discretize.ts`), the
 * exponential from Higham (2005), Algorithm 2.3 (`linalg/expm.ts`). One exponential is computed per
 * distinct interval length: on a uniform output grid with a step or impulse input that is exactly one;
 * sampled inputs whose sample times are not on the output grid cost one per distinct interval length.
 * When the input direction is fixed (a step), Γ is needed only for B·u, so the exponential is of size
 * n+1, not n+m; an impulse needs Φ alone.
 */
import { type Matrix, zeros } from '../linalg/matrix';
import { zohMatrices } from '../discretize';
import type { StateSpaceModel } from '../model';
import type { InputSignal } from './inputs';
import { pieceAfter } from './inputs';
import { LinearSystem, matVec } from './linear-system';
import { type CheckedOptions, OutputRecorder } from './output-grid';
import type { SimulationResult } from './types';

/** Interval lengths equal to 12 significant digits share one exponential (grid points k·T/(N−1) round). */
function lengthKey(L: number): string {
  return L.toPrecision(12);
}

export function simulateExact(model: StateSpaceModel, input: InputSignal, opts: CheckedOptions): SimulationResult {
  const start = performance.now();
  const system = new LinearSystem(model);
  const n = system.n;
  const recorder = new OutputRecorder(opts.times, system, input);

  // The input matrix the exponential needs: none for an impulse, B·w for a step, B for a sampled input.
  let G: Matrix;
  let inputVector: (piece: number) => Float64Array;
  if (input.kind === 'impulse') {
    G = zeros(n, 0);
    inputVector = () => new Float64Array(0);
  } else if (input.kind === 'step') {
    G = zeros(n, 1);
    system.inputTerm(input.values[1], G.data);
    const on = Float64Array.of(1);
    const off = Float64Array.of(0);
    inputVector = (piece) => (piece >= 1 ? on : off);
  } else {
    G = model.B;
    inputVector = (piece) => input.values[piece];
  }

  const x = Float64Array.from(opts.x0);
  if (input.impulseWeights) {
    const jump = system.inputTerm(input.impulseWeights);
    for (let i = 0; i < n; i++) x[i] += jump[i];
  }

  // Events: output times and input jumps inside (0, tEnd], merged in order.
  const events: number[] = [];
  {
    const tol = 1e-12 * opts.tEnd;
    const bp = input.breakpoints.filter((b) => b > 0 && b < opts.tEnd);
    let i = 0;
    let j = 0;
    const out = opts.times;
    while (i < out.length || j < bp.length) {
      const next = j >= bp.length || (i < out.length && out[i] <= bp[j]) ? out[i++] : bp[j++];
      if (next <= 0) continue;
      if (events.length === 0 || next - events[events.length - 1] > tol) events.push(next);
    }
  }

  const cache = new Map<string, { Phi: Matrix; Gamma: Matrix }>();
  let exponentials = 0;
  let steps = 0;
  const next = new Float64Array(n);
  const gu = new Float64Array(n);
  let t = 0;
  while (!recorder.done && recorder.nextTime <= 0) recorder.record(x);
  for (const e of events) {
    const L = e - t;
    const key = lengthKey(L);
    let zoh = cache.get(key);
    if (!zoh) {
      const z = zohMatrices(model.A, G, L);
      zoh = { Phi: z.Phi, Gamma: z.Gamma };
      cache.set(key, zoh);
      exponentials++;
    }
    matVec(zoh.Phi, x, next);
    const u = inputVector(pieceAfter(input, t, 1e-12 * opts.tEnd));
    if (u.length > 0) {
      matVec(zoh.Gamma, u, gu);
      for (let i = 0; i < n; i++) x[i] = next[i] + gu[i];
    } else {
      x.set(next);
    }
    steps++;
    t = e;
    while (!recorder.done && recorder.nextTime <= t + 1e-12 * opts.tEnd) recorder.record(x);
  }
  return {
    t: opts.times,
    y: recorder.y,
    solver: 'exact',
    stats: {
      steps,
      rejectedSteps: 0,
      rhsEvaluations: system.rhsEvaluations,
      factorizations: exponentials,
      pointsStored: recorder.next,
      wallMs: performance.now() - start,
    },
  };
}
