import { describe, expect, it } from 'vitest';
import {
  checkAllowedOrders,
  figuresFor,
  nearestOrderIndex,
  orderValueText,
  snapToAllowedOrder,
  stepAllowedOrder,
  type OrderFigures,
} from '@/components/workspace/order-steps';

// Allowed orders of a model with two rigid-body states kept exactly and complex pairs that must not be
// split: 3 and 5 are left out because they would cut a pair.
const ORDERS = [2, 4, 6, 7, 10];

const FIG: OrderFigures = {
  errorBound: 3.2e-4,
  keptUnstable: 0,
  keptMarginal: 2,
  stiffnessRatio: 12.5,
  maxStableStepEuler: 0.01,
  maxStableStepRk4: 0.0278,
};

describe('allowed orders', () => {
  it('snaps a typed order to the nearest allowed one, halfway going to the larger', () => {
    expect(snapToAllowedOrder(3, ORDERS)).toBe(4); // 2 and 4 equally near → 4
    expect(snapToAllowedOrder(5, ORDERS)).toBe(6);
    expect(snapToAllowedOrder(8, ORDERS)).toBe(7);
    expect(snapToAllowedOrder(8.6, ORDERS)).toBe(10);
    expect(snapToAllowedOrder(-4, ORDERS)).toBe(2);
    expect(snapToAllowedOrder(99, ORDERS)).toBe(10);
    expect(nearestOrderIndex(7, ORDERS)).toBe(3);
  });

  it('steps one allowed order up or down, stopping at the ends', () => {
    expect(stepAllowedOrder(4, ORDERS, 1)).toBe(6);
    expect(stepAllowedOrder(4, ORDERS, -1)).toBe(2);
    expect(stepAllowedOrder(2, ORDERS, -1)).toBe(2);
    expect(stepAllowedOrder(10, ORDERS, 1)).toBe(10);
  });

  it('steps from a value that is not allowed to the next allowed one in that direction', () => {
    expect(stepAllowedOrder(5, ORDERS, 1)).toBe(6);
    expect(stepAllowedOrder(5, ORDERS, -1)).toBe(4);
    expect(stepAllowedOrder(1, ORDERS, -1)).toBe(2);
    expect(stepAllowedOrder(11, ORDERS, 1)).toBe(10);
  });

  it('refuses an empty, unordered or fractional list with a clear message', () => {
    expect(() => checkAllowedOrders([])).toThrow(/at least one allowed order/);
    expect(() => checkAllowedOrders([2, 2])).toThrow(/strictly increasing \(entry 1/);
    expect(() => checkAllowedOrders([1.5])).toThrow(/non-negative integers \(entry 0 is 1.5\)/);
    expect(() => checkAllowedOrders(ORDERS)).not.toThrow();
  });
});

describe('figures per order', () => {
  it('reads them from a precomputed record or from a callback', () => {
    expect(figuresFor({ 4: FIG }, 4)).toBe(FIG);
    expect(figuresFor({ 4: FIG }, 6)).toBeUndefined();
    expect(figuresFor((r) => (r === 6 ? FIG : undefined), 6)).toBe(FIG);
    expect(figuresFor(undefined, 6)).toBeUndefined();
  });

  it('tells assistive technology the order, bound, exact states and RK4 step', () => {
    expect(orderValueText(4, FIG)).toBe(
      'order 4, error bound 3.2e-4, 2 kept exactly for unstable or marginal poles, largest stable RK4 step 0.0278\u00a0s',
    );
    expect(orderValueText(4, undefined)).toBe('order 4');
    expect(orderValueText(4, { ...FIG, errorBound: null, keptMarginal: 0, maxStableStepRk4: null })).toBe('order 4');
  });
});
