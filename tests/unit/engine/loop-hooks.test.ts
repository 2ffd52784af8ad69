/**
 * The engine's long loops take optional hooks (reduction/stop.ts): a stop flag looked at between
 * iterations and a per-iteration report. The reports must be the loop's own figures (the ADI residual the
 * result keeps in residualHistory, the frequency count), and a set flag must stop the loop with
 * StoppedError before the next iteration, returning nothing. No numerical reference is needed: the hooks
 * are compared with the same call made without them.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { linalgThreads, setLinalgThreads } from '@/reduction/linalg/index';
import { lowRankGramians, type AdiStep } from '@/reduction/sparse/adi';
import { sparseFrequencyResponse } from '@/reduction/sparse/frequency';
import { StoppedError, throwIfStopped } from '@/reduction/stop';
import { plateModel } from './sparse-support';

const initialThreads = linalgThreads();

describe('stop flag', () => {
  it('throws StoppedError only once the flag is set', () => {
    const signal = { aborted: false };
    expect(() => throwIfStopped(signal, 'x')).not.toThrow();
    expect(() => throwIfStopped(undefined, 'x')).not.toThrow();
    signal.aborted = true;
    expect(() => throwIfStopped(signal, 'the test loop')).toThrow(StoppedError);
    expect(() => throwIfStopped(signal, 'the test loop')).toThrow(/stopped on request during the test loop/);
  });

  it('accepts an AbortSignal', () => {
    const controller = new AbortController();
    expect(() => throwIfStopped(controller.signal, 'x')).not.toThrow();
    controller.abort();
    expect(() => throwIfStopped(controller.signal, 'x')).toThrow(StoppedError);
  });
});

describe('low-rank ADI hooks', () => {
  const model = plateModel(12, { inputs: 1, outputs: 1 });

  it('reports every step of each equation with the residual the result keeps', () => {
    const steps: AdiStep[] = [];
    const g = lowRankGramians(model, { onStep: (s) => steps.push(s), maxIterations: 120 });
    for (const side of ['controllability', 'observability'] as const) {
      const own = steps.filter((s) => s.equation === side);
      const f = g[side]!;
      expect(own.map((s) => s.residual)).toEqual(f.residualHistory);
      expect(own[own.length - 1].step).toBe(f.iterations);
      for (let k = 1; k < own.length; k++) expect(own[k].step).toBeGreaterThan(own[k - 1].step);
      for (const s of own) expect(s).toMatchObject({ maxSteps: 120, tolerance: 1e-10 });
    }
    // The same run without hooks gives the same factors.
    const plain = lowRankGramians(model, { maxIterations: 120 });
    expect(Array.from(plain.controllability!.Z.data)).toEqual(Array.from(g.controllability!.Z.data));
  });

  it('stops before the next step once the flag is set, returning nothing', () => {
    const signal = { aborted: false };
    let reported = 0;
    expect(() =>
      lowRankGramians(model, {
        signal,
        onStep: () => {
          reported++;
          if (reported === 3) signal.aborted = true;
        },
      }),
    ).toThrow(StoppedError);
    // Steps run in lockstep over both equations: the flag set during the second step's reports stops the third.
    expect(reported).toBeLessThanOrEqual(4);
    expect(reported).toBeGreaterThanOrEqual(3);
  });
});

describe('sparse frequency sweep hooks', () => {
  const model = plateModel(8);
  const w = [0.1, 1, 10, 100, 1000, 3000, 10000];

  it('reports done of total after each batch of frequencies and returns the same response, one thread or two', () => {
    const seen: { done: number; total: number }[] = [];
    setLinalgThreads(2);
    const g = sparseFrequencyResponse(model, w, Infinity, { onStep: (s) => seen.push(s) });
    // Batches of twice the thread count: 4, then the last 3.
    expect(seen).toEqual([
      { done: 4, total: w.length },
      { done: 7, total: w.length },
    ]);
    setLinalgThreads(1);
    const single = sparseFrequencyResponse(model, w);
    expect(g.response.map((h) => Array.from(h.re.data))).toEqual(single.response.map((h) => Array.from(h.re.data)));
    expect(g.response.map((h) => Array.from(h.im.data))).toEqual(single.response.map((h) => Array.from(h.im.data)));
  });

  it('stops at the flag between batches', () => {
    setLinalgThreads(1);
    const signal = { aborted: false };
    let done = 0;
    expect(() =>
      sparseFrequencyResponse(model, w, Infinity, {
        signal,
        onStep: (s) => {
          done = s.done;
          signal.aborted = true;
        },
      }),
    ).toThrow(StoppedError);
    expect(done).toBe(2);
  });

  afterAll(() => setLinalgThreads(initialThreads));
});
