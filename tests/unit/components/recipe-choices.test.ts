// The recipe form's arithmetic on stored figures (components/source-models/recipe-choices.ts): the order the
// tolerance rule picks (reduction/order.ts: the smallest order with bound ≤ tolerance·‖G‖∞) and the poles a
// modal truncation keeps, on hand-made tables whose answers are read off directly.
import { describe, expect, it } from 'vitest';
import { keptPoles, orderForTolerance, storedTable, suggestedOrder } from '@/components/source-models/recipe-choices';
import type { AnalysisRecord, OrderFigureTable } from '@/lib/engine-tasks/records';

const figures = (bound: number) => ({ errorBound: bound, keptUnstable: 0, keptMarginal: 0, stiffnessRatio: null, maxStableStepEuler: null, maxStableStepRk4: null });
const table: OrderFigureTable = { available: true, orders: [1, 2, 4], figures: { 1: figures(0.5), 2: figures(0.05), 4: figures(0.001) }, limitNote: null };

describe('orderForTolerance', () => {
  it('takes the smallest order whose bound meets tolerance × ‖G‖∞', () => {
    expect(orderForTolerance(table, 0.1, 1)).toEqual({ order: 2, bound: 0.05 });
    expect(orderForTolerance(table, 0.01, 2)).toEqual({ order: 4, bound: 0.001 });
  });
  it('says when no offered order meets it, or when there is no reference norm', () => {
    expect(orderForTolerance(table, 1e-6, 1)).toBeNull();
    expect(orderForTolerance(table, 0.1, null)).toBeNull();
  });
  it('suggests the order meeting 1 % of the norm', () => {
    expect(suggestedOrder(table, 10)).toBe(2);
  });
});

describe('keptPoles for modal truncation', () => {
  // poles: a pair −1 ± 2j, a real −5, a double pole at 0 (marginal); ranked by dominance: −5 first, then the pair
  const analysis = {
    poles: { re: [-1, -1, -5, 0, 0], im: [2, -2, 0, 0, 0], stability: ['stable', 'stable', 'stable', 'marginal', 'marginal'] },
    marginalPoles: 2,
    unstablePoles: 0,
    modes: [
      { re: -1, im: 2, pair: true, stability: 'stable', dominance: 0.3, states: 2 },
      { re: -5, im: 0, pair: false, stability: 'stable', dominance: 0.9, states: 1 },
      { re: 0, im: 0, pair: false, stability: 'marginal', dominance: null, states: 1 },
    ],
    orderFigures: { balanced: table, residualization: table, modalDominance: table, modalSlowest: table },
  } as unknown as AnalysisRecord;

  it('keeps the marginal poles and the most dominant modes up to the order', () => {
    expect(keptPoles(analysis, 'modal', 'dominance', 3)).toEqual([false, false, true, true, true]);
    expect(keptPoles(analysis, 'modal', 'dominance', 5)).toEqual([true, true, true, true, true]);
  });
  it('ranks the slowest first for the slowest rule (|Re λ| = 1 before 5)', () => {
    expect(keptPoles(analysis, 'modal', 'slowest', 4)).toEqual([true, true, false, true, true]);
  });
  it('has nothing to say for the balanced methods, whose poles are not a subset', () => {
    expect(keptPoles(analysis, 'balanced', 'dominance', 3)).toBeNull();
    expect(storedTable(analysis, 'modal', 'band')).toBeNull();
  });
});
