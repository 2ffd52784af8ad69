/**
 * `auto` solver choice: from the input (piecewise constant on few interval lengths?), the size, and the
 * stiffness ratio (fastest over slowest decay rate of the stable poles; ≥ 10³ counts as stiff, common
 * practice). The stiffness estimate is checked against the known poles of the test models.
 */
import { describe, expect, it } from 'vitest';
import { chooseSolver, estimateStiffness } from '@/reduction/simulate/auto';
import { checkOptions } from '@/reduction/simulate/output-grid';
import { stepInput, simulate } from '@/reduction/simulate';
import { logRates, modelWithRates } from './simulate-reference';

describe('stiffness estimate', () => {
  it('from eigenvalues for small models: the ratio of the given decay rates', () => {
    const m = modelWithRates(logRates(30, 2, 2000), 1, 1, 3);
    const s = estimateStiffness(m.A);
    expect(s.method).toBe('eigenvalues');
    expect(s.ratio).toBeCloseTo(1000, 6);
  });
  it('by power iteration above 200 states, within a few per cent for real poles', () => {
    const m = modelWithRates(logRates(240, 1, 5000), 1, 1, 4);
    const s = estimateStiffness(m.A);
    expect(s.method).toBe('power iteration');
    expect(s.fastest).toBeGreaterThan(5000 * 0.95);
    expect(s.fastest).toBeLessThan(5000 * 1.05);
    expect(s.slowest).toBeGreaterThan(0.95);
    expect(s.slowest).toBeLessThan(1.05);
  });
});

describe('chooseSolver', () => {
  it('a step on a small model goes to the exact solver, exact at any stiffness', () => {
    const m = modelWithRates(logRates(20, 1, 1e4), 1, 1, 5);
    const c = chooseSolver(m.A, stepInput(m), checkOptions({ tEnd: 5 }, 20));
    expect(c.solver).toBe('exact');
    expect(c.reason).toMatch(/piecewise constant.*exact at any stiffness/);
  });
  it('output times with many distinct intervals on a stiff model go to the stiff solver', () => {
    const m = modelWithRates(logRates(240, 1, 5000), 1, 1, 6);
    const times = Array.from({ length: 40 }, (_, k) => (k * k) / 400);
    const c = chooseSolver(m.A, stepInput(m), checkOptions({ tEnd: 4, times }, 240));
    expect(c.solver).toBe('stiff');
    const ratio = Number(/stiffness ratio ≈ ([\d.e+]+)/.exec(c.reason)![1]);
    expect(ratio).toBeGreaterThan(4500); // the model's rates span 1 … 5000
    expect(ratio).toBeLessThan(5500);
  });
  it('the same times on a non-stiff model go to the explicit solver', () => {
    const m = modelWithRates(logRates(240, 1, 4), 1, 1, 7);
    const times = Array.from({ length: 40 }, (_, k) => (k * k) / 400);
    const c = chooseSolver(m.A, stepInput(m), checkOptions({ tEnd: 4, times }, 240));
    expect(c.solver).toBe('explicit');
    expect(c.reason).toMatch(/^explicit: not stiff/);
  });
  it('simulate with solver "auto" reports the reason with the result', () => {
    const m = modelWithRates([1, 2, 3], 1, 1, 8);
    const r = simulate(m, stepInput(m), { tEnd: 2, points: 5 });
    expect(r.solver).toBe('exact');
    expect(r.reason).toBeDefined();
  });
});
