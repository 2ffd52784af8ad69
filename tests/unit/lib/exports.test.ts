// The pure parts of the exports (lib/exports/): reading ts, the sample-time check on closed-form poles,
// and the C and CSV spellings of numbers and names. The exports as a whole are checked against the database,
// gcc and scipy in tests/integration/pull-api-exports.test.ts.
import { describe, expect, it } from 'vitest';
import { checkSampleTime, parseSampleTime, SAMPLE_TIME_FRACTION, unitSeconds } from '@/lib/exports/discrete';
import { cIdentifier, cNumber, cString } from '@/lib/exports/c-header';
import { csvNumber, matrixCsv } from '@/lib/exports/csv-bundle';

const poles = (list: [number, number][]) => ({ re: list.map((p) => p[0]), im: list.map((p) => p[1]) });

describe('parseSampleTime', () => {
  it('reads seconds, "project", and nothing', () => {
    expect(parseSampleTime('0.001', null)).toEqual({ ts: 0.001, source: 'query' });
    expect(parseSampleTime('2.5e-4', null)).toEqual({ ts: 2.5e-4, source: 'query' });
    expect(parseSampleTime('project', 0.02)).toEqual({ ts: 0.02, source: 'project' });
    expect(parseSampleTime(undefined, 0.02)).toBeNull();
  });

  it.each(['', '0', '-1', '1e', 'Infinity', '1,5', ' 1', '86401'])('refuses %j naming ts', (raw) => {
    expect(() => parseSampleTime(raw, null)).toThrow(expect.objectContaining({ status: 400, field: 'ts' }));
  });

  it('refuses "project" when the project has no sample time', () => {
    expect(() => parseSampleTime('project', null)).toThrow(/no sample time set/);
  });
});

describe('checkSampleTime', () => {
  // Poles -1 and -100 rad/s: the fastest time constant is 1/100 s (closed form).
  const realPoles = poles([[-1, 0], [-100, 0]]);

  it(`admits ts up to ${SAMPLE_TIME_FRACTION} x the fastest time constant and warns beyond it`, () => {
    const fine = checkSampleTime(realPoles, 0.002, 1, 100);
    expect(fine.fastestTimeConstant).toBeCloseTo(0.01, 15);
    expect(fine.largestAdvisedTs).toBeCloseTo(0.002, 15);
    expect(fine).toMatchObject({ resolvesDynamics: true, warning: null });
    const coarse = checkSampleTime(realPoles, 0.003, 1, 100);
    expect(coarse.resolvesDynamics).toBe(false);
    expect(coarse.warning).toMatch(/ts = 0.003 s exceeds 0.2 x the fastest kept time constant \(0.0100 s\)/);
  });

  it('takes 1/|lambda| = 1/omega_n for a complex pair (poles -3 ± 4j: |lambda| = 5)', () => {
    expect(checkSampleTime(poles([[-3, 4], [-3, -4]]), 0.01, 1, 7).fastestTimeConstant).toBeCloseTo(0.2, 15);
  });

  it('leaves out poles at the origin (integrators) and converts a model unit into seconds', () => {
    // A double integrator's eigenvalues come back at rounding level of ||A|| = 1, not exactly 0.
    const integratorOnly = checkSampleTime(poles([[0, 0], [1e-17, 0]]), 10, 1, 1);
    expect(integratorOnly).toMatchObject({ fastestTimeConstant: null, resolvesDynamics: true, warning: null });
    // -50 per millisecond: tau = 0.02 ms = 2e-5 s.
    expect(checkSampleTime(poles([[0, 0], [-50, 0]]), 1e-6, unitSeconds('ms'), 50).fastestTimeConstant).toBeCloseTo(2e-5, 18);
  });

  it('refuses a time unit it cannot convert, naming ts', () => {
    expect(() => unitSeconds('fortnight')).toThrow(expect.objectContaining({ status: 422, code: 'unknown_time_base' }));
  });
});

describe('C and CSV spellings', () => {
  it('write doubles that read back exactly, always as floating constants in C', () => {
    for (const x of [1 / 3, -2.5e-300, 5e-324, 1.7976931348623157e308, 0.1 + 0.2, 7]) {
      expect(Number(cNumber(x))).toBe(x);
      expect(Number(csvNumber(x))).toBe(x);
    }
    expect(cNumber(7)).toBe('7.0');
    expect(cNumber(-0)).toBe('0.0');
    expect(csvNumber(-0)).toBe('0');
    expect(() => cNumber(Number.NaN)).toThrow(/non-finite/);
    expect(matrixCsv([[1, 0.5], [-3, 1e-7]])).toBe('1,0.5\n-3,1e-7\n');
  });

  it('make identifiers from slugs and ASCII string literals from any name', () => {
    expect(cIdentifier('kiln-zone-2')).toBe('kiln_zone_2');
    expect(cIdentifier('3-zone')).toBe('m_3_zone');
    expect(cString('T "zone" \\ a?')).toBe('"T \\"zone\\" \\\\ a\\077"');
    expect(cString('süd')).toBe('"s\\303\\274d"'); // UTF-8 bytes C3 BC as octal escapes
  });
});
