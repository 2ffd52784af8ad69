import { describe, expect, it } from 'vitest';
import { accuracyRows, simulationCostRows, type AccuracyFigures, type SimulationCost } from '@/components/workspace/figures-rows';
import { progressView } from '@/components/workspace/progress';

const NB = '\u00a0';

// An invented accuracy report (demo-style figures); expected strings and ratios worked out by hand.
const FIGURES: AccuracyFigures = {
  fullOrder: 1200,
  reducedOrder: 18,
  hInfinityError: 3.2e-4,
  hInfinityErrorRelative: 0.008,
  errorBound: 9.1e-4,
  h2Error: 1.5e-4,
  zeroFrequencyGainError: null,
  peakStepError: 2.25e-3,
  stiffnessRatioFull: 4.8e5,
  stiffnessRatioReduced: 35.2,
};
const FULL: SimulationCost = { solver: 'explicit', steps: 250000, rejectedSteps: 1200, rhsEvaluations: 1507200, pointsStored: 2001, wallMs: 4500 };
const REDUCED: SimulationCost = { solver: 'explicit', steps: 1000, rejectedSteps: 0, rhsEvaluations: 6006, pointsStored: 2001, wallMs: 12 };

describe('accuracy figures', () => {
  const rows = Object.fromEntries(accuracyRows(FIGURES).map((r) => [r.label, r]));

  it('formats each figure with its unit or as a percentage', () => {
    expect(rows['H∞ error ‖G − Gr‖∞'].value).toBe('3.2e-4');
    expect(rows['H∞ error, relative to ‖G‖∞'].value).toBe(`0.8${NB}%`);
    expect(rows['A-priori bound'].value).toBe('9.1e-4');
    expect(rows['H2 error ‖G − Gr‖2'].value).toBe('1.5e-4');
    expect(rows['Peak step-response error'].value).toBe('2.25e-3');
    expect(rows['Order, full → reduced'].value).toBe('1200 → 18');
    expect(rows['Stiffness ratio, full → reduced'].value).toBe('4.8e5 → 35.2');
  });

  it('explains a DC-gain error that is not defined instead of showing zero', () => {
    expect(rows['DC-gain error']).toMatchObject({ value: '—', note: expect.stringMatching(/pole at 0/) });
  });

  it('checks the measured error against the bound and flags a violation', () => {
    expect(rows['Error within bound'].value).toBe('yes');
    const broken = Object.fromEntries(accuracyRows({ ...FIGURES, hInfinityError: 1e-3 }).map((r) => [r.label, r]));
    expect(broken['Error within bound']).toMatchObject({ value: 'no', note: expect.stringMatching(/exceeds/) });
    const noBound = accuracyRows({ ...FIGURES, errorBound: null }).map((r) => r.label);
    expect(noBound).not.toContain('Error within bound');
  });
});

describe('simulation cost, full against reduced', () => {
  const rows = Object.fromEntries(simulationCostRows(FULL, REDUCED).map((r) => [r.label, r]));

  it('lists each solver figure side by side with the ratio full ÷ reduced, computed by hand', () => {
    expect(rows['Solver']).toMatchObject({ full: 'explicit', reduced: 'explicit' });
    expect(rows['Steps']).toEqual({ label: 'Steps', full: '250\u202f000', reduced: '1000', ratio: '250×' });
    expect(rows['Right-hand-side evaluations'].ratio).toBe('251×'); // 1 507 200 / 6006 = 250.95
    expect(rows['Points stored'].ratio).toBe('1×');
    expect(rows['Wall time']).toMatchObject({ full: `4.5${NB}s`, reduced: `12${NB}ms`, ratio: '375×' });
  });

  it('shows no ratio against zero and leaves out figures neither solver reported', () => {
    expect(rows['Rejected steps'].ratio).toBe('—');
    expect(rows['Factorisations']).toBeUndefined();
  });
});

describe('job progress', () => {
  it('reports a running job in whole percent, never 100 % before it is done', () => {
    expect(progressView('running', 'Computing Hankel singular values', 0.426)).toEqual({
      percent: 42.6,
      valueText: `Computing Hankel singular values, 42${NB}%`,
    });
    expect(progressView('running', 'Writing results', 1).percent).toBe(99);
    expect(progressView('succeeded', '', 1)).toEqual({ percent: 100, valueText: `Done, 100${NB}%` });
  });

  it('clamps out-of-range fractions and makes unknown ones indeterminate', () => {
    expect(progressView('running', 'x', -0.5).percent).toBe(0);
    expect(progressView('running', 'x', NaN).percent).toBeNull();
    expect(progressView('running', 'x', null)).toEqual({ percent: null, valueText: 'x' });
    expect(progressView('queued', '', 0.3)).toEqual({ percent: null, valueText: 'Waiting for a worker' });
  });
});
