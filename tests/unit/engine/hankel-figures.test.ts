// Hankel-singular-value figures (reduction/hankel-figures.ts), shared by the engine and the Hankel chart.
// Expected values are sums and counts worked out by hand beside each check.
import { describe, expect, it } from 'vitest';
import { balancedErrorBound, balancedErrorBounds, numericalOrder, roundingFloor } from '@/reduction/hankel-figures';

describe('Hankel figures', () => {
  it('bounds balanced truncation by twice the tail sum (Enns 1984; Glover 1984)', () => {
    // σ = 4, 2, 1, 0.5: 2·7.5 = 15, 2·3.5 = 7, 2·1.5 = 3, 2·0.5 = 1, 0
    expect(balancedErrorBounds([4, 2, 1, 0.5])).toEqual([15, 7, 3, 1, 0]);
    expect([0, 1, 2, 3, 4].map((r) => balancedErrorBound([4, 2, 1, 0.5], r))).toEqual([15, 7, 3, 1, 0]);
    expect(balancedErrorBounds([])).toEqual([0]);
  });

  it('counts the values above the rank tolerance σ1·1e-12 as the numerical order', () => {
    expect(numericalOrder([1, 1e-6, 1e-12, 1e-15])).toBe(2); // 1e-12 is not above 1e-12·1
    expect(numericalOrder([2, 1e-11, 1e-13], 1e-12)).toBe(2);
    expect(numericalOrder([])).toBe(0);
  });

  it('puts the rounding floor at σ1·n·ε', () => {
    expect(roundingFloor([3, 1, 0.1, 0.01])).toBe(3 * 4 * Number.EPSILON);
    expect(roundingFloor([])).toBe(0);
  });
});
