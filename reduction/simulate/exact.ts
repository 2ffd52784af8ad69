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
import { zohMatrices, type ZohMatrices } from '../discretize';
import type { StateSpaceModel } from '../model';
import type { InputSignal } from './inputs';
import { pieceAfter } from './inputs';
import { LinearSystem, matVec } from './linear-system';
import { ParallelMatVec } from './parallel-matvec';
import { type CheckedOptions, OutputRecorder } from './output-grid';
import { blockFactor, blockTerms, PowerOfPhi, type BlockTerms } from './exact-blocks';
import type { SimulationResult } from './types';

/**
 * Interval lengths within 1e-11 relative of each other share one exponential: grid points k·T/(N−1)
 * are rounded, so the intervals of a uniform grid differ in their last bits. Kept sorted for lookup.
 */
export class IntervalLengths<T> {
  private readonly lengths: number[] = [];
  private readonly values: T[] = [];

  get size(): number {
    return this.lengths.length;
  }

  get(L: number): T | undefined {
    const k = this.nearest(L);
    return k >= 0 ? this.values[k] : undefined;
  }

  set(L: number, value: T): void {
    let lo = 0;
    let hi = this.lengths.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (this.lengths[mid] < L) lo = mid + 1;
      else hi = mid;
    }
    this.lengths.splice(lo, 0, L);
    this.values.splice(lo, 0, value);
  }

  forEachValue(f: (value: T) => void): void {
    this.values.forEach(f);
  }

  private nearest(L: number): number {
    let lo = 0;
    let hi = this.lengths.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (this.lengths[mid] < L) lo = mid + 1;
      else hi = mid;
    }
    for (const k of [lo - 1, lo]) {
      if (k >= 0 && k < this.lengths.length && Math.abs(this.lengths[k] - L) <= 1e-11 * Math.max(L, this.lengths[k])) return k;
    }
    return -1;
  }
}

interface ZohEntry {
  Phi: Matrix;
  Gamma: Matrix;
  product: ParallelMatVec | null;
  /** Φ^m for the block recursion, by m. */
  powers: Map<number, PowerOfPhi>;
  /** Block terms by input piece and m. */
  terms: Map<string, BlockTerms>;
}

/**
 * Exponentials shared by several exact runs of one model on one output grid (the step and impulse
 * responses of every input): one augmented exponential with the whole B per interval length serves them
 * all, since a step's Γ·w is Γ_B·w and an impulse needs only Φ (Van Loan 1978, Theorem 1). Opt-in
 * (`SimulationOptions.sharedExponentials`): a run that is itself being timed, like the simulation-cost
 * report's, computes its own.
 */
export class SharedExponentials {
  private readonly byLength = new IntervalLengths<ZohMatrices>();

  constructor(
    readonly A: Matrix,
    readonly B: Matrix,
  ) {}

  /** Φ and Γ_B for interval length L, and whether they were computed now. */
  get(L: number): { zoh: ZohMatrices; computed: boolean } {
    const hit = this.byLength.get(L);
    if (hit) return { zoh: hit, computed: false };
    const zoh = zohMatrices(this.A, this.B, L);
    this.byLength.set(L, zoh);
    return { zoh, computed: true };
  }
}

export function simulateExact(model: StateSpaceModel, input: InputSignal, opts: CheckedOptions): SimulationResult {
  const start = performance.now();
  const system = new LinearSystem(model);
  // The first Φ (on a uniform grid the only one) gets a two-thread product for the recursion.
  const cache = new IntervalLengths<ZohEntry>();
  let parallelTaken = false;
  try {
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

    const x = Float64Array.from(opts.initialState);
    if (input.impulseWeights) {
      const jump = system.inputTerm(input.impulseWeights);
      for (let i = 0; i < n; i++) x[i] += jump[i];
    }

    // Events: output times and input jumps inside (0, tEnd], merged in order; `isOutput` marks the
    // events that are output times (a jump at an output time is one event).
    const events: number[] = [];
    const isOutput: boolean[] = [];
    const tol = 1e-12 * opts.tEnd;
    {
      const bp = input.breakpoints.filter((b) => b > 0 && b < opts.tEnd);
      let i = 0;
      let j = 0;
      const out = opts.times;
      while (i < out.length || j < bp.length) {
        const fromOutput = j >= bp.length || (i < out.length && out[i] <= bp[j]);
        const next = fromOutput ? out[i++] : bp[j++];
        if (next <= 0) continue;
        if (events.length === 0 || next - events[events.length - 1] > tol) {
          events.push(next);
          isOutput.push(fromOutput);
        } else if (fromOutput) {
          isOutput[isOutput.length - 1] = true;
        }
      }
    }

    let exponentials = 0;
    let steps = 0;
    const next = new Float64Array(n);
    const gu = new Float64Array(n);
    let t = 0;
    while (!recorder.done && recorder.nextTime <= 0) recorder.record(x);

    const zohFor = (L: number): ZohEntry => {
      let zoh = cache.get(L);
      if (!zoh) {
        const shared = opts.sharedExponentials;
        let z: { Phi: Matrix; Gamma: Matrix };
        let computed = true;
        if (shared && shared.A === model.A && shared.B === model.B && (input.kind === 'step' || input.kind === 'impulse')) {
          const hit = shared.get(L);
          computed = hit.computed;
          // A step's input term is B·w = G, so its Γ is Γ_B·w; an impulse needs Φ only (G has no columns).
          const Gamma = zeros(n, G.cols);
          if (G.cols === 1) {
            const w = input.values[1];
            const m = model.B.cols;
            for (let i = 0; i < n; i++) {
              let acc = 0;
              for (let j = 0; j < m; j++) acc += hit.zoh.Gamma.data[i * m + j] * w[j];
              Gamma.data[i] = acc;
            }
          }
          z = { Phi: hit.zoh.Phi, Gamma };
        } else {
          z = zohMatrices(model.A, G, L);
        }
        let product: ParallelMatVec | null = null;
        if (!parallelTaken) {
          parallelTaken = true;
          const pm = new ParallelMatVec(z.Phi);
          if (pm.fast) product = pm;
        }
        zoh = { Phi: z.Phi, Gamma: z.Gamma, product, powers: new Map(), terms: new Map() };
        cache.set(L, zoh);
        if (computed) exponentials++;
      }
      return zoh;
    };
    const phiTimes = (zoh: ZohEntry, v: Float64Array, out: Float64Array): void => {
      if (zoh.product) zoh.product.applyTo(v, out);
      else matVec(zoh.Phi, v, out);
    };
    /** Events from `first` on that end intervals of length L with input piece `piece`, all output times. */
    const runLength = (first: number, L: number, piece: number): number => {
      let k = first;
      let start = first === 0 ? 0 : events[first - 1];
      while (k < events.length && isOutput[k] && Math.abs(events[k] - start - L) <= 1e-11 * L) {
        if (k > first && pieceAfter(input, start, tol) !== piece) break;
        start = events[k];
        k++;
      }
      return k - first;
    };

    let plainUntil = 0; // events before this index go step by step (a run already judged not worth blocks)
    let cx = new Float64Array(0);
    for (let ei = 0; ei < events.length; ) {
      const e = events[ei];
      const L = e - t;
      const zoh = zohFor(L);
      const piece = pieceAfter(input, t, tol);
      const u = inputVector(piece);

      if (ei >= plainUntil) {
        const run = runLength(ei, L, piece);
        const m = blockFactor(n, system.p, run, zoh.product?.simd ?? false);
        if (m === 1) {
          plainUntil = ei + Math.max(run, 1);
        } else {
          // m steps at a time (exact-blocks.ts); the last run % m steps go one by one below.
          let power = zoh.powers.get(m);
          if (!power) {
            power = new PowerOfPhi(zoh.Phi, m);
            zoh.powers.set(m, power);
          }
          const key = `${piece}:${m}`;
          let terms = zoh.terms.get(key);
          if (!terms) {
            const g = new Float64Array(n);
            if (u.length > 0) matVec(zoh.Gamma, u, g);
            terms = blockTerms(system, zoh.Phi, g, m, (v, out) => phiTimes(zoh, v, out));
            zoh.terms.set(key, terms);
          }
          if (cx.length < terms.W.rows) cx = new Float64Array(terms.W.rows);
          const blocks = Math.floor(run / m);
          const p = system.p;
          for (let b = 0; b < blocks; b++) {
            matVec(terms.W, x, cx);
            for (let i = 0; i < terms.offsets.length; i++) cx[i] += terms.offsets[i];
            for (let i = 1; i < m; i++) {
              const te = events[ei + i - 1];
              while (!recorder.done && recorder.nextTime <= te + tol) recorder.recordFromCx(cx, (i - 1) * p);
            }
            power.apply(x, next);
            for (let i = 0; i < n; i++) x[i] = next[i] + terms.gm[i];
            ei += m;
            steps += m;
            t = events[ei - 1];
            while (!recorder.done && recorder.nextTime <= t + tol) recorder.record(x);
          }
          plainUntil = ei + (run % m);
          continue;
        }
      }

      phiTimes(zoh, x, next);
      if (u.length > 0) {
        matVec(zoh.Gamma, u, gu);
        for (let i = 0; i < n; i++) x[i] = next[i] + gu[i];
      } else {
        x.set(next);
      }
      steps++;
      t = e;
      ei++;
      while (!recorder.done && recorder.nextTime <= t + tol) recorder.record(x);
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
  } finally {
    cache.forEachValue((z) => {
      z.product?.dispose();
      z.powers.forEach((pw) => pw.dispose());
    });
    system.dispose();
  }
}
