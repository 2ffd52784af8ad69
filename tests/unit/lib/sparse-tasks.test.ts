/**
 * The engine tasks of the large-model path (lib/engine-tasks/sparse-analysis-task.ts, sparse-reduction-task.ts)
 * on the demo's hearth plate at 12 × 12 nodes with its E (144 states, a descriptor model, so the sparse path).
 * Sources beside each check:
 *  - Debian's SciPy (tests/reference/sparse_reference.py): G(jω) = C (jωE − A)⁻¹ B by SuperLU ("response"),
 *    so G(0) and the full model's curve; the Hankel singular values from dense Bartels–Stewart gramians ("hsv");
 *  - the dense path's eigenvalues of E⁻¹A (LAPACK through reduction/linalg, tested against numpy) for the
 *    slowest and fastest decay rates;
 *  - the balanced-truncation bound ‖G − Gr‖∞ ≤ 2 Σ_{i>r} σᵢ (Enns 1984; Glover 1984) for the sampled error.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { hearthPlate } from '@/db/seeds/demo/plate';
import { runAnalysis } from '@/lib/engine-tasks/analysis-task';
import { adiFraction } from '@/lib/engine-tasks/sparse-analysis-task';
import { runSparseReduction } from '@/lib/engine-tasks/sparse-reduction-task';
import { runInputResponse } from '@/lib/engine-tasks/response-task';
import type { ModelFile } from '@/lib/engine-tasks/model-files';
import type { ProgressDetail } from '@/lib/engine-tasks/progress';
import type { AnalysisSummary } from '@/lib/engine-tasks/reduction-task';
import { parseMatrixFile, StoppedError } from '@/reduction/index';
import { writeMatrixMarket } from '@/reduction/io/matrix-market';
import { eigenvalues, solve } from '@/reduction/linalg/index';
import { fromRows } from '@/reduction/linalg/matrix';
import { sparseReference } from '../engine/sparse-support';

const side = 12;
const n = side * side;
const plate = hearthPlate(side);
const dir = mkdtempSync(path.join(tmpdir(), 'modeshelf-sparse-task-'));
for (const k of ['A', 'E'] as const) writeFileSync(path.join(dir, `${k}.mtx`), plate[k]);
// B and C as dense arrays, the form the reference script reads.
for (const k of ['B', 'C'] as const) writeFileSync(path.join(dir, `${k}.mtx`), writeMatrixMarket(parseMatrixFile(plate[k], k, `${k}.mtx`)));
const files: ModelFile[] = (['A', 'B', 'C', 'E'] as const).map((role) => ({ role, name: `${role}.mtx`, path: path.join(dir, `${role}.mtx`) }));

const reports: { stage: string; detail: ProgressDetail | null | undefined }[] = [];
const analysis = runAnalysis(files, 'test', (stage, _f, detail) => reports.push({ stage, detail }));
const ref = sparseReference(dir, ['dense', 'hsv', 'response'], { frequencies: [0, 1e-4, 1e-3, 1e-2, 0.1] }) as {
  A: number[][];
  E: number[][];
  hsv: number[];
  response: { re: number[][]; im: number[][] }[];
};

const summaryOf = (): AnalysisSummary => ({
  frequencyBand: analysis.frequencyBand,
  stablePartHInfinityNorm: analysis.stablePartHInfinityNorm,
  stiffnessRatio: analysis.stiffnessRatio,
  modes: analysis.modes,
  fastestDecayRate: analysis.fastestDecayRate,
  poles: analysis.poles,
  stabilityTolerance: analysis.stabilityTolerance,
});

describe('analysis on the large-model path', () => {
  it('is marked sparse, lists what is estimated, and keeps the DC gain exact (SciPy: −C A⁻¹ B)', () => {
    expect(analysis.path).toBe('sparse');
    expect(analysis.states).toBe(n);
    expect(analysis.sparse!.descriptor).toBe(true);
    expect(analysis.sparse!.estimated).toEqual(expect.arrayContaining(['poles', 'stiffnessRatio', 'hInfinityNorm', 'hankelSingularValues', 'h2Norm']));
    expect(analysis.sparse!.estimated).not.toContain('zeroFrequencyGain');
    expect(analysis.zeroFrequencyGain.defined).toBe(true);
    const g0 = (analysis.zeroFrequencyGain as { value: number[][] }).value;
    ref.response[0].re.forEach((row, i) => row.forEach((x, j) => expect(Math.abs(g0[i][j] - x)).toBeLessThan(1e-10 * Math.abs(x))));
  });

  it('the leading Hankel singular values agree with the dense gramians of SciPy', () => {
    const ours = analysis.hankelSingularValues;
    expect(ours.length).toBeGreaterThanOrEqual(8);
    for (let k = 0; k < 8; k++) expect(Math.abs(ours[k] - ref.hsv[k])).toBeLessThan(1e-6 * ref.hsv[0]);
    expect(analysis.sparse!.hsvResolved).toBe(ours.length);
    expect(analysis.orderFigures.balanced.available && analysis.orderFigures.balanced.orders.at(-1)).toBe(ours.length);
  });

  it('the slowest and fastest decay rates are those of the dense eigenvalues of E⁻¹A', () => {
    const dense = eigenvalues(solve(fromRows(ref.E), fromRows(ref.A)));
    const rates = Array.from(dense.re, (re) => -re);
    expect(Math.abs(analysis.slowestDecayRate! - Math.min(...rates))).toBeLessThan(1e-8 * Math.min(...rates));
    expect(Math.abs(analysis.fastestDecayRate! - Math.max(...rates))).toBeLessThan(1e-5 * Math.max(...rates));
    expect(analysis.stable).toBe(true);
  });

  it('reports each ADI step with its counts and residual, and stops when the job is cancelled', () => {
    const adi = reports.filter((r) => r.detail?.unit === 'ADI step');
    expect(adi.length).toBeGreaterThan(4);
    expect(adi[0].detail).toMatchObject({ atMost: true, total: 300 });
    expect(adi[0].detail!.note).toMatch(/^residual /);
    // The bar follows the residual's way down to the tolerance (log scale) when that is further than the steps.
    expect(adiFraction({ equation: 'controllability', step: 8, maxSteps: 300, residual: 1e-5, tolerance: 1e-10 })).toBeCloseTo(0.5, 12);
    expect(adiFraction({ equation: 'observability', step: 150, maxSteps: 300, residual: 0.5, tolerance: 1e-10 })).toBeCloseTo(0.5, 12);
    let calls = 0;
    const signal = {
      get aborted() {
        return ++calls > 3;
      },
    };
    expect(() => runAnalysis(files, 'test', () => {}, { signal })).toThrow(StoppedError);
  });
});

describe('reduction on the large-model path', () => {
  it('balanced truncation to 6 states: the full model’s curve is SciPy’s, the sampled error within the estimated bound', () => {
    const steps: (ProgressDetail | null | undefined)[] = [];
    const r = runSparseReduction(files, { method: 'balanced', order: 6, tolerance: null, acceptance: { minFrequency: 1e-4, maxFrequency: 1e-2, maxError: 1 } }, summaryOf(), 'test', (_s, _f, d) => steps.push(d));
    expect(r.order).toBe(6);
    expect(r.figures.path).toBe('sparse');
    const bound = r.figures.errorBound!;
    const hsv = analysis.hankelSingularValues;
    expect(bound).toBeCloseTo(2 * hsv.slice(6).reduce((a, b) => a + b, 0), 12);
    expect(r.figures.hInfinityError!).toBeLessThanOrEqual(bound);
    expect(r.figures.estimated).toEqual(expect.arrayContaining(['hInfinityError', 'errorBound']));
    expect(r.figures.h2Error).toBeNull();
    expect(r.figures.errorBoundNote).toBeNull(); // there is a bound: no note stands in for it
    expect(r.figures.notes.join(' ')).toMatch(/A-priori bound estimated: 2Σσ\(r\+1\.\.k\)/);
    expect(r.figures.acceptance?.status).toBe('pass');
    const f = r.curves.frequency;
    expect(f.frequencies.length).toBeGreaterThanOrEqual(60);
    // The full model's step responses by the engine's sparse time integration: after the analysis' settling
    // window each output is near its DC gain (final value theorem; the window is five time constants of the
    // slowest mode that matters, so within 1 %), as is the reduced model's.
    expect(r.figures.fullTimeResponseNote).toBeNull();
    expect(r.curves.step.full).toHaveLength(2);
    const g0 = (analysis.zeroFrequencyGain as { value: number[][] }).value;
    for (const which of ['full', 'reduced'] as const) {
      r.curves.step[which].forEach((outputs, j) =>
        outputs.forEach((ys, i) => {
          expect(ys).toHaveLength(r.curves.step.t.length);
          expect(Math.abs(ys[ys.length - 1] - g0[i][j])).toBeLessThan(0.01 * Math.max(...g0.flat().map(Math.abs)));
        }),
      );
    }
    expect(r.figures.peakStepError!).toBeGreaterThanOrEqual(0);
    expect(r.figures.costRows).toHaveLength(1);
    expect(r.figures.costRows[0].full!.steps).toBeGreaterThan(0);
    expect(r.figures.simulation).not.toBeNull();
    // DC-gain error: σmax(G(0) − Gr(0)) ≤ the bound (balanced truncation).
    expect(r.figures.zeroFrequencyGainError!).toBeLessThanOrEqual(bound);
    expect(steps.some((d) => d?.unit === 'frequency' && d.total === f.frequencies.length + 1)).toBe(true);
  });

  it('the sweep matches SciPy’s G(jω) at frequencies it shares with the reference', () => {
    const r = runSparseReduction(files, { method: 'residualization', order: 5, tolerance: null }, summaryOf(), 'test', () => {});
    const w = r.curves.frequency.frequencies;
    const theirs = sparseReference(dir, ['response'], { frequencies: w.slice(0, 5) }).response as { re: number[][]; im: number[][] }[];
    for (let k = 0; k < 5; k++) {
      theirs[k].re.forEach((row, i) =>
        row.forEach((x, j) => {
          const y = theirs[k].im[i][j];
          const scale = Math.hypot(x, y);
          expect(Math.abs(r.curves.frequency.full.re[i][j][k] - x)).toBeLessThan(1e-9 * scale);
          expect(Math.abs(r.curves.frequency.full.im[i][j][k] - y)).toBeLessThan(1e-9 * scale + 1e-300);
        }),
      );
    }
  });

  it('IRKA and modal truncation at scale give models of the order asked, with no bound', () => {
    for (const method of ['irka', 'modal'] as const) {
      const r = runSparseReduction(files, { method, order: 4, tolerance: null, modal: method === 'modal' ? { selection: 'slowest' } : null }, summaryOf(), 'test', () => {});
      expect(r.order).toBe(4);
      expect(r.figures.errorBound).toBeNull();
      expect(r.figures.errorBoundNote).toBeTruthy();
      expect(r.figures.reducedStable).toBe(true);
    }
  });

  it('the response to an uploaded input runs the full model by sparse time integration (a held step on u2 settles to G(0)’s column)', () => {
    const r = runSparseReduction(files, { method: 'balanced', order: 8, tolerance: null }, summaryOf(), 'test', () => {});
    const settle = 5 / analysis.slowestDecayRate!;
    const csv = path.join(dir, 'held-step.csv');
    writeFileSync(csv, `time,u1,u2\n0,0,1\n${settle},0,1\n`);
    const out = runInputResponse(files, r.matrices, { path: csv, name: 'held-step.csv' }, () => {});
    const g0 = (analysis.zeroFrequencyGain as { value: number[][] }).value;
    const scale = Math.max(...g0.flat().map(Math.abs));
    expect(out.full).toHaveLength(3);
    out.full.forEach((ys, i) => expect(Math.abs(ys[ys.length - 1] - g0[i][1])).toBeLessThan(0.01 * scale));
    out.reduced.forEach((ys, i) => expect(Math.abs(ys[ys.length - 1] - g0[i][1])).toBeLessThan(0.01 * scale));
  });
});
