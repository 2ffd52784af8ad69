import { describe, expect, it } from 'vitest';
import {
  formatComplex,
  formatCount,
  formatDecibel,
  formatDegrees,
  formatFactor,
  formatFrequency,
  formatNumber,
  formatOptional,
  formatPercent,
  formatTime,
  formatWallTime,
} from '@/lib/format';

// Expected strings are worked out by hand from the rules in format.ts (3 significant figures by default,
// exponent form outside [0.01, 10 000), unit after a no-break space).
const NB = '\u00a0';

describe('formatNumber', () => {
  it('writes small values in compact exponent form', () => {
    expect(formatNumber(3.2e-4)).toBe('3.2e-4');
    expect(formatNumber(-2.5e-7)).toBe('-2.5e-7');
    expect(formatNumber(0.009)).toBe('9e-3');
    expect(formatNumber(1.23456e-12)).toBe('1.23e-12');
  });

  it('writes large values in compact exponent form', () => {
    expect(formatNumber(1.5e6)).toBe('1.5e6');
    expect(formatNumber(1e6)).toBe('1e6');
    expect(formatNumber(10000)).toBe('1e4');
    expect(formatNumber(123456)).toBe('1.23e5');
  });

  it('writes mid-range values in fixed form with trailing zeros trimmed', () => {
    expect(formatNumber(12.5)).toBe('12.5');
    expect(formatNumber(0.8)).toBe('0.8');
    expect(formatNumber(0.01)).toBe('0.01');
    expect(formatNumber(2 / 3)).toBe('0.667');
    expect(formatNumber(0.123456)).toBe('0.123');
    expect(formatNumber(9999)).toBe('9999');
    expect(formatNumber(-45)).toBe('-45');
  });

  it('keeps every integer digit below 10 000 rather than rounding to tens', () => {
    expect(formatNumber(1234.5)).toBe('1235');
  });

  it('rounds up across a decade without a stray zero', () => {
    expect(formatNumber(9.996)).toBe('10');
    expect(formatNumber(9.9996e-5)).toBe('1e-4');
  });

  it('honours the number of significant figures asked for', () => {
    expect(formatNumber(0.123456, { significant: 5 })).toBe('0.12346');
    expect(formatNumber(3.14159e-4, { significant: 2 })).toBe('3.1e-4');
    expect(() => formatNumber(1, { significant: 0 })).toThrow(/significant/);
  });

  it('shows zero, infinities and NaN without pretending to a value', () => {
    expect(formatNumber(0)).toBe('0');
    expect(formatNumber(-0)).toBe('0');
    expect(formatNumber(Infinity)).toBe('∞');
    expect(formatNumber(-Infinity)).toBe('-∞');
    expect(formatNumber(NaN)).toBe('—');
  });
});

describe('numbers with units', () => {
  it('puts the unit after a no-break space', () => {
    expect(formatFrequency(12.5)).toBe(`12.5${NB}rad/s`);
    expect(formatFrequency(3e-5, 'h')).toBe(`3e-5${NB}rad/h`);
    expect(formatTime(0.25)).toBe(`0.25${NB}s`);
    expect(formatDecibel(-3.0103)).toBe(`-3.01${NB}dB`);
  });

  it('shows a fraction as a percentage', () => {
    expect(formatPercent(0.008)).toBe(`0.8${NB}%`);
    expect(formatPercent(0.5)).toBe(`50${NB}%`);
  });

  it('writes degrees without a space', () => {
    expect(formatDegrees(-252.86)).toBe('-253°');
  });

  it('chooses µs, ms or s for wall time given in ms', () => {
    expect(formatWallTime(0.25)).toBe(`250${NB}µs`);
    expect(formatWallTime(12.3)).toBe(`12.3${NB}ms`);
    expect(formatWallTime(4500)).toBe(`4.5${NB}s`);
    expect(formatWallTime(0)).toBe(`0${NB}ms`);
  });

  it('keeps every digit of a count and groups by three from 10 000', () => {
    expect(formatCount(1234)).toBe('1234');
    expect(formatCount(123456)).toBe('123\u202f456');
    expect(formatCount(1234567)).toBe('1\u202f234\u202f567');
    expect(formatCount(-98765)).toBe('-98\u202f765');
  });

  it('writes ratios with a multiplication sign', () => {
    expect(formatFactor(12)).toBe('12×');
  });

  it('writes poles with an engineering j', () => {
    expect(formatComplex(-0.5, 12.3)).toBe('-0.5 + 12.3j');
    expect(formatComplex(-0.5, -12.3)).toBe('-0.5 - 12.3j');
    expect(formatComplex(-0.5, 12.3, { pair: true })).toBe('-0.5 ± 12.3j');
    expect(formatComplex(-2, 0)).toBe('-2');
    expect(formatComplex(0, 3)).toBe('3j');
    expect(formatComplex(0, -3)).toBe('-3j');
  });

  it('shows a figure that was not computed as a dash', () => {
    expect(formatOptional(null, formatNumber)).toBe('—');
    expect(formatOptional(undefined, formatNumber)).toBe('—');
    expect(formatOptional(0.5, formatNumber)).toBe('0.5');
  });
});
