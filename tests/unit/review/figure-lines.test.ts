// The accuracy figures of the review sheet and the old-versus-new view. Expected strings are worked by hand
// from components/charts/format.ts (three significant figures, no-break space before the unit).
import { describe, expect, it } from 'vitest';
import { acceptanceText, comparisonNote, figureLines } from '@/components/review/figure-lines';
import { STATUS_STYLE } from '@/components/review/status-style';
import { VERSION_STATUSES } from '@/lib/review/state-machine';

const NBSP = '\u00a0';

describe('figure lines', () => {
  it('lines up two reports, reading the older name of a figure too, with units', () => {
    const lines = figureLines([
      { fullOrder: 40, reducedOrder: 4, hInfinityErrorRelative: 1.2e-3, hInfinityError: 2.4e-3 },
      { fullOrder: 40, order: 4, hInfinityErrorRelative: 3.6e-3, hInfinityError: 7.2e-3 },
    ]);
    expect(lines.map((l) => [l.label, l.values])).toEqual([
      ['Full order', ['40', '40']],
      ['Reduced order', ['4', '4']],
      ['‖G − Gr‖∞', ['2.4e-3', '7.2e-3']],
      ['‖G − Gr‖∞ / ‖G‖∞', [`0.12${NBSP}%`, `0.36${NBSP}%`]],
    ]);
    expect(comparisonNote(lines[3])).toBe('3× larger');
    expect(comparisonNote(lines[0])).toBe(''); // an order is neither better nor worse
  });

  it('shows a missing or non-finite figure as a dash, never as zero, and drops lines no report states', () => {
    const lines = figureLines([{ h2Error: null, zeroFrequencyGainError: Number.NaN, peakStepError: 0.05 }, { peakStepError: 'n/a' }]);
    expect(lines.map((l) => [l.key, l.values])).toEqual([['peakStepError', ['0.05', '—']]]);
    expect(comparisonNote(lines[0])).toBe('');
    expect(figureLines([null, undefined])).toEqual([]);
  });

  it('writes the acceptance verdict as a word with the worst error, preferring the report column', () => {
    const figures = { acceptance: { passed: true, worstError: 1.5e-3, maxError: 0.01 } };
    expect(acceptanceText(figures, undefined)).toBe('PASS (worst 1.5e-3 against 0.01)');
    expect(acceptanceText(figures, false)).toBe('FAIL (worst 1.5e-3 against 0.01)');
    expect(acceptanceText({}, null)).toBe('—');
    expect(figureLines([{}, figures], [null, true]).at(-1)).toMatchObject({ key: 'acceptance', values: ['—', 'PASS (worst 1.5e-3 against 0.01)'] });
  });

  it('says how many times smaller an error became', () => {
    const [line] = figureLines([{ errorBound: 1e-2 }, { errorBound: 2.5e-3 }]);
    expect(comparisonNote(line)).toBe('4× smaller');
  });
});

describe('state styles', () => {
  it('give every state its own shape and glyph, so state never rests on colour alone', () => {
    const symbols = VERSION_STATUSES.map((s) => STATUS_STYLE[s].symbol);
    const glyphs = VERSION_STATUSES.map((s) => STATUS_STYLE[s].glyph);
    expect(new Set(symbols).size).toBe(VERSION_STATUSES.length);
    expect(new Set(glyphs).size).toBe(VERSION_STATUSES.length);
    expect(STATUS_STYLE.revise.label).toBe('revise and resubmit');
  });
});
