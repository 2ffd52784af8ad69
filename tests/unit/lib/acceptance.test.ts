// The stored acceptance verdict as every reader shows it (lib/acceptance.ts): reports written with the
// three-state verdict, older reports with `passed` only, and the column alone. The records are made up.
import { describe, expect, it } from 'vitest';
import { acceptancePassedColumn, acceptanceSentence, acceptanceWord, storedAcceptance } from '@/lib/acceptance';

const NB = '\u00a0';
const record = {
  minFrequency: 1,
  maxFrequency: 100,
  maxError: 1e-3,
  status: 'fail',
  passed: false,
  worstError: 2e-3,
  worstFrequency: 50,
  pointsChecked: 12,
  computedRange: [0.01, 1000],
};

describe('storedAcceptance', () => {
  it('reads the worker’s record as stored, whatever the column', () => {
    expect(storedAcceptance({ acceptance: record }, null)).toMatchObject({ status: 'fail', worstError: 2e-3, pointsChecked: 12, computedRange: [0.01, 1000] });
    expect(storedAcceptance({ acceptance: { ...record, status: 'not-checked', worstError: null, worstFrequency: null } }, null)?.status).toBe('not-checked');
  });

  it('reads older reports (passed only) through the column, then through passed and the samples checked', () => {
    const old = { minFrequency: 1, maxFrequency: 10, maxError: 0.01, passed: true, worstError: 1.5e-3, worstFrequency: 3, samplesChecked: 40 };
    expect(storedAcceptance({ acceptance: old }, undefined)?.status).toBe('pass');
    expect(storedAcceptance({ acceptance: old }, false)?.status).toBe('fail');
    expect(storedAcceptance({ acceptance: { ...old, passed: false, worstError: 0, samplesChecked: 0 } }, undefined)).toMatchObject({ status: 'not-checked', worstError: null });
  });

  it('falls back to the column when the report kept no record, and is null without a band', () => {
    expect(storedAcceptance({}, true)).toMatchObject({ status: 'pass', maxError: null });
    expect(storedAcceptance({}, null)).toBeNull();
    expect(storedAcceptance(null, undefined)).toBeNull();
  });

  it('maps the verdict to the column pins filter on', () => {
    expect([acceptancePassedColumn('pass'), acceptancePassedColumn('fail'), acceptancePassedColumn('not-checked'), acceptancePassedColumn(null)]).toEqual([true, false, null, null]);
  });
});

describe('the verdict in words', () => {
  it('writes a word for tables and a sentence for the chart, the review sheet and the exports', () => {
    const v = storedAcceptance({ acceptance: record }, false)!;
    expect(acceptanceWord(v)).toBe('FAIL');
    expect(acceptanceWord(null)).toBe('—');
    expect(acceptanceSentence(v)).toBe(`FAIL: error 2e-3 at 50${NB}rad/s exceeds 1e-3 in the band 1–100${NB}rad/s`);
    expect(acceptanceSentence(v, 'h', true)).toBe('FAIL: error 0.002 at 50 rad/h exceeds 0.001 in the band 1 to 100 rad/h');
    const pass = storedAcceptance({ acceptance: { ...record, status: 'pass', passed: true, worstError: 4e-4 } }, true)!;
    expect(acceptanceSentence(pass)).toBe(`PASS: largest error 4e-4 at 50${NB}rad/s is within 1e-3 over 1–100${NB}rad/s`);
    const partly = storedAcceptance({ acceptance: { ...record, status: 'not-checked', worstError: 4e-4, computedRange: [5, 1000] } }, null)!;
    expect(acceptanceSentence(partly)).toBe(`NOT CHECKED: the error was computed over 5–1000${NB}rad/s, the band is 1–100${NB}rad/s`);
  });
});
