// How a frequency-limited balanced truncation's accuracy report reads (issue 15) on the comparison page
// (components/workspace/figures-rows.ts through ComparisonView's toFiguresTable), the review sheet
// (components/review/figure-lines.ts) and the exports' provenance lines (lib/exports/document.ts): the
// measured errors inside and outside the band, "no a-priori error bound for this method" where the bound
// would be, and the reduced model's stability flag. The figures are as the reduction job writes them.
import { describe, expect, it } from 'vitest';
import { accuracyRows } from '@/components/workspace/figures-rows';
import { toFiguresTable } from '@/components/reduced-models/ComparisonView';
import { figureLines } from '@/components/review/figure-lines';
import { accuracyLine, recipeLine } from '@/lib/exports/document';
import type { AccuracyFiguresRecord } from '@/lib/engine-tasks/records';
import type { ExportSource } from '@/lib/exports/source';

function flFigures(reducedStable: boolean): AccuracyFiguresRecord {
  return {
    fullOrder: 8,
    reducedOrder: 4,
    stableOrder: 4,
    unstableStatesKept: 0,
    method: 'frequency-limited',
    hInfinityError: reducedStable ? 2.5 : null,
    hInfinityErrorFrequency: reducedStable ? 1 : null,
    hInfinityErrorRelative: null,
    referenceHInfinityNorm: 12.5,
    errorBound: null,
    h2Error: null,
    h2ErrorNote: null,
    zeroFrequencyGainError: 0.5,
    peakStepError: 0.1,
    stiffnessRatioFull: 250,
    stiffnessRatioReduced: 3.3,
    reducedOrderFigures: { errorBound: null, keptUnstable: 0, keptMarginal: 0, stiffnessRatio: 3.3, maxStableStepEuler: null, maxStableStepRk4: null },
    simulation: null,
    simulationInput: 'unit step on every input',
    simulationEnd: 10,
    costRows: [],
    acceptance: null,
    orderRule: 'order',
    toleranceTarget: null,
    notes: [],
    errorBoundNote: 'no a-priori error bound for this method',
    reducedStable,
    frequencyLimited: {
      band: { minFrequency: 10, maxFrequency: 60 },
      inBandError: 0.0125,
      inBandErrorFrequency: 15,
      outOfBandError: 2.5,
      outOfBandErrorFrequency: 1,
      singularValues: [1, 0.5, 0.1, 0.01],
      reducedStable,
    },
    engineWallMs: 12,
  };
}

describe('comparison page: accuracy rows', () => {
  it('shows "none" with the note instead of a bound, the two band errors, and the stability flag', () => {
    const rows = accuracyRows(toFiguresTable(flFigures(true), 's'));
    const byLabel = Object.fromEntries(rows.map((r) => [r.label, r]));
    expect(byLabel['A-priori bound']).toEqual({ label: 'A-priori bound', value: 'none', note: 'no a-priori error bound for this method' });
    expect(byLabel['Error inside the band 10–60\u00a0rad/s'].value).toBe('0.0125');
    expect(byLabel['Error inside the band 10–60\u00a0rad/s'].note).toBe('measured; largest at 15\u00a0rad/s');
    expect(byLabel['Error outside the band'].value).toBe('2.5');
    expect(byLabel['Reduced model stable'].value).toBe('yes');
    expect(rows.some((r) => r.label === 'Error within bound')).toBe(false);
  });

  it('says "no" with a warning for an unstable reduced model', () => {
    const rows = accuracyRows(toFiguresTable(flFigures(false), 's'));
    const stable = rows.find((r) => r.label === 'Reduced model stable')!;
    expect(stable.value).toBe('no');
    expect(stable.note).toMatch(/right half-plane/);
  });

  it('leaves the other methods\' rows as they were (no band rows, no stability row)', () => {
    const balanced = { ...flFigures(true), method: 'balanced', errorBound: 3, errorBoundNote: null, frequencyLimited: null };
    const rows = accuracyRows(toFiguresTable(balanced, 's'));
    expect(rows.find((r) => r.label === 'A-priori bound')!.value).toBe('3');
    expect(rows.some((r) => r.label.startsWith('Error inside the band') || r.label === 'Reduced model stable')).toBe(false);
  });
});

describe('review sheet: figure lines', () => {
  it('puts the no-bound sentence where the bound goes, and lists the band errors, the band and stability', () => {
    const lines = figureLines([flFigures(true) as unknown as Record<string, unknown>, flFigures(false) as unknown as Record<string, unknown>]);
    const byKey = Object.fromEntries(lines.map((l) => [l.key, l]));
    expect(byKey.errorBoundNote.values).toEqual(['no a-priori error bound for this method', 'no a-priori error bound for this method']);
    expect(byKey.errorBound).toBeUndefined();
    expect(byKey.inBandError.values).toEqual(['0.0125', '0.0125']);
    expect(byKey.outOfBandError.values).toEqual(['2.5', '2.5']);
    expect(byKey.band.values).toEqual(['10–60', '10–60']);
    expect(byKey.reducedStable.values).toEqual(['yes', 'NO']);
  });
});

describe('exports: recipe and accuracy lines', () => {
  const source = (figures: AccuracyFiguresRecord) =>
    ({
      timeBase: 's',
      version: { order: 4 },
      recipe: { method: 'frequency-limited', order: 4, tolerance: null, options: { band: { minFrequency: 10, maxFrequency: 60 } }, acceptance: null },
      accuracyReport: { figures: figures as unknown as Record<string, unknown>, acceptancePassed: null },
    }) as unknown as ExportSource;

  it('names the band and says that no bound applies, with the measured errors and stability', () => {
    expect(recipeLine(source(flFigures(true)))).toBe(
      'Recipe: frequency-limited balanced truncation on the band 10 to 60 rad/s, order 4, no a-priori error bound for this method',
    );
    expect(accuracyLine(source(flFigures(false)))).toBe(
      'Accuracy: no a-priori error bound for this method; measured error inside the band 0.0125, outside the band 2.5, H-infinity error not reported; reduced model stable: NO',
    );
  });

  it('keeps the bound line for a balanced recipe', () => {
    const s = source({ ...flFigures(true), method: 'balanced', errorBound: 3, errorBoundNote: null, frequencyLimited: null });
    (s.recipe as { method: string }).method = 'balanced';
    expect(recipeLine(s)).toBe('Recipe: balanced truncation, order 4');
    expect(accuracyLine(s)).toBe('Accuracy: H-infinity error 2.5, relative not reported, bound 3');
  });
});
