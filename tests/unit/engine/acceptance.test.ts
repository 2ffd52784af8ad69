// The acceptance band's verdict (reduction/acceptance.ts), the one rule the worker stores and every page,
// export and API shows. The error curves are made up; every expected verdict and number below is worked
// out by hand in the comment beside it (linear interpolation in log10 ω between two samples).
import { describe, expect, it } from 'vitest';
import { acceptanceVerdict } from '@/reduction/acceptance';
import { ModelError } from '@/reduction/errors';

const W = [1, 10, 100, 1000];
const ERR = [1e-4, 5e-4, 2e-3, 1e-2];

describe('acceptanceVerdict', () => {
  it('fails when a sample in the band exceeds the maximum error', () => {
    // samples in [1, 100]: 1e-4, 5e-4, 2e-3 → worst 2e-3 at 100 > 1e-3, margin -1e-3
    const v = acceptanceVerdict(W, ERR, { minFrequency: 1, maxFrequency: 100, maxError: 1e-3 });
    expect(v).toMatchObject({ status: 'fail', worstError: 2e-3, worstFrequency: 100, pointsChecked: 3, computedRange: [1, 1000] });
    expect(v.margin).toBeCloseTo(-1e-3, 15);
  });

  it('interpolates the error at a band edge between samples (linear in log ω) and passes below the limit', () => {
    // edge 20 between 10 and 100: s = log10(2) = 0.30103, err = 5e-4 + 0.30103·(2e-3 - 5e-4) = 9.51545e-4 ≤ 1e-3
    const v = acceptanceVerdict(W, ERR, { minFrequency: 1, maxFrequency: 20, maxError: 1e-3 });
    expect(v.status).toBe('pass');
    expect(v.worstFrequency).toBe(20);
    expect(v.worstError!).toBeCloseTo(9.51545e-4, 9);
    expect(v.pointsChecked).toBe(3);
    // edge 50: s = log10(5) = 0.69897, err = 5e-4 + 0.69897·1.5e-3 = 1.548455e-3 > 1e-3: a grid-only check
    // (samples 1, 10 in the band, worst 5e-4) would have passed this band.
    const f = acceptanceVerdict(W, ERR, { minFrequency: 1, maxFrequency: 50, maxError: 1e-3 });
    expect(f.status).toBe('fail');
    expect(f.worstError!).toBeCloseTo(1.548455e-3, 9);
  });

  it('passes at exactly the maximum error (the limit is inclusive)', () => {
    expect(acceptanceVerdict(W, ERR, { minFrequency: 1, maxFrequency: 10, maxError: 5e-4 }).status).toBe('pass');
  });

  it('checks a band that lies between two samples through both interpolated edges', () => {
    // [2, 5] inside (1, 10): err(2) = 1e-4 + 0.30103·4e-4 = 2.20412e-4, err(5) = 1e-4 + 0.69897·4e-4 = 3.79588e-4
    const v = acceptanceVerdict(W, ERR, { minFrequency: 2, maxFrequency: 5, maxError: 1e-3 });
    expect(v.status).toBe('pass');
    expect(v.pointsChecked).toBe(2);
    expect(v.worstFrequency).toBe(5);
    expect(v.worstError!).toBeCloseTo(3.79588e-4, 9);
  });

  it('does not pass a band that reaches beyond the computed frequencies: not checked', () => {
    const v = acceptanceVerdict(W, ERR, { minFrequency: 0.1, maxFrequency: 10, maxError: 1e-3 });
    expect(v.status).toBe('not-checked');
    expect(v.pointsChecked).toBe(2);
    const none = acceptanceVerdict(W, ERR, { minFrequency: 2000, maxFrequency: 5000, maxError: 1 });
    expect(none).toMatchObject({ status: 'not-checked', pointsChecked: 0, worstError: null, worstFrequency: null, margin: null });
  });

  it('still fails a partly covered band when a covered sample exceeds the limit', () => {
    expect(acceptanceVerdict(W, ERR, { minFrequency: 0.1, maxFrequency: 10, maxError: 3e-4 }).status).toBe('fail');
  });

  it('rejects bad input with a ModelError naming the field', () => {
    const field = (f: () => unknown) => {
      try {
        f();
      } catch (e) {
        expect(e).toBeInstanceOf(ModelError);
        return (e as ModelError).field;
      }
      return null;
    };
    expect(field(() => acceptanceVerdict(W, ERR, { minFrequency: 10, maxFrequency: 10, maxError: 1 }))).toBe('band.maxFrequency');
    expect(field(() => acceptanceVerdict(W, ERR, { minFrequency: 0, maxFrequency: 10, maxError: 1 }))).toBe('band.minFrequency');
    expect(field(() => acceptanceVerdict(W, ERR, { minFrequency: 1, maxFrequency: 10, maxError: 0 }))).toBe('band.maxError');
    expect(field(() => acceptanceVerdict(W, [1, 2, NaN, 3], { minFrequency: 1, maxFrequency: 10, maxError: 1 }))).toBe('error');
    expect(field(() => acceptanceVerdict(W, [1, 2], { minFrequency: 1, maxFrequency: 10, maxError: 1 }))).toBe('error');
    expect(field(() => acceptanceVerdict([1, 1, 2, 3], ERR, { minFrequency: 1, maxFrequency: 10, maxError: 1 }))).toBe('frequencies');
    expect(() => acceptanceVerdict(W, [1, 2], { minFrequency: 1, maxFrequency: 10, maxError: 1 })).toThrow(/error must have as many entries as frequencies/);
  });
});
