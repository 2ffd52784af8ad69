/**
 * Low-rank square-root balanced truncation and residualization on the sparse path, the full-model
 * frequency sweep by sparse solves (issue 13; the command line's routing is in sparse-cli.test.ts). Sources beside each check:
 *  - the dense path (reduction/balanced.ts: Bartels–Stewart gramians, square-root balancing), itself tested
 *    against scipy, on a model small enough for both (n = 400);
 *  - scipy.sparse.linalg.splu (Debian python3-scipy, tests/reference/sparse_reference.py task "response") for
 *    the full model's G(iω), and the script's independent low-rank ADI + square-root balanced truncation
 *    (task "lradi") for the reduced model;
 *  - the balanced-truncation bounds σ_{r+1} ≤ ‖G − Gr‖∞ ≤ 2 Σ_{i>r} σᵢ (Glover, Int. J. Control 39(6),
 *    1984; Enns, 23rd IEEE CDC, 1984; residualization: Liu & Anderson, Int. J. Control 50(4), 1989), with
 *    the error measured by a sweep of the full model.
 */
import { describe, expect, it } from 'vitest';
import { lowRankGramians } from '@/reduction/sparse/adi';
import { sparseBalancedReduction } from '@/reduction/sparse/balanced';
import { sampledErrorPeak, sparseFrequencyResponse } from '@/reduction/sparse/frequency';
import { cscToDense, type SparseStateSpaceModel } from '@/reduction/sparse/model';
import { balancedRealization, balancedTruncation, balancedResidualization } from '@/reduction/balanced';
import { frequencyResponse, logFrequencyGrid } from '@/reduction/frequency';
import { fromRows, zeros } from '@/reduction/linalg/matrix';
import type { StateSpaceModel } from '@/reduction/model';
import { plateModel, relDiff, sparseReference, writeModel } from './sparse-support';

function denseOf(m: SparseStateSpaceModel): StateSpaceModel {
  return { A: cscToDense(m.A), B: m.B, C: m.C, D: m.D };
}

/** max over ω of ‖G1(iω) − G2(iω)‖_F / ‖G1(iω)‖_F. */
function responseGap(a: StateSpaceModel, b: StateSpaceModel, w: Float64Array): number {
  const ga = frequencyResponse(a, w).response, gb = frequencyResponse(b, w).response;
  let worst = 0;
  for (let k = 0; k < w.length; k++) {
    let num = 0, den = 0;
    for (let i = 0; i < ga[k].re.data.length; i++) {
      num += (ga[k].re.data[i] - gb[k].re.data[i]) ** 2 + (ga[k].im.data[i] - gb[k].im.data[i]) ** 2;
      den += ga[k].re.data[i] ** 2 + ga[k].im.data[i] ** 2;
    }
    worst = Math.max(worst, Math.sqrt(num / den));
  }
  return worst;
}

describe('sparse and dense paths agree where both apply (heat plate, n = 400, two inputs and outputs)', () => {
  const model = plateModel(20, { inputs: 2, outputs: 2 });
  const dense = balancedRealization(denseOf(model)); // the dense path
  const gramians = lowRankGramians(model);
  const w = logFrequencyGrid(1e-1, 1e5, 25);

  it('Hankel singular values', () => {
    const r = sparseBalancedReduction(model, { method: 'balanced', order: 6, gramians });
    for (let i = 0; i < 8; i++) expect(Math.abs(r.hankelSingularValues[i] - dense.hankelSingularValues[i]) / dense.hankelSingularValues[0]).toBeLessThan(1e-8);
    expect(r.factorRank).toBeLessThanOrEqual(gramians.controllability!.Z.cols);
  });

  for (const method of ['balanced', 'residualization'] as const) {
    it(`${method} to order 6: the same reduced transfer function`, () => {
      const r = sparseBalancedReduction(model, { method, order: 6, gramians });
      const d = method === 'balanced' ? balancedTruncation(dense, 6) : balancedResidualization(dense, 6);
      expect(r.model.A.rows).toBe(6);
      expect(responseGap(d, r.model, w)).toBeLessThan(1e-6);
    });
  }
});

describe('the reduced model against the full model swept by sparse solves', () => {
  it("the full model's G(iω) matches scipy's SuperLU solves (convection–diffusion with E, n = 900)", () => {
    const model = plateModel(30, { convection: 300, descriptor: true, inputs: 2, outputs: 2 });
    const w = [0, 0.5, 30, 2e3, 1e5];
    const ref = sparseReference(writeModel(model), ['response'], { frequencies: w }).response;
    const g = sparseFrequencyResponse(model, w);
    for (let k = 0; k < w.length; k++) {
      for (let i = 0; i < 2; i++) {
        for (let j = 0; j < 2; j++) {
          const scale = Math.hypot(ref[k].re[i][j], ref[k].im[i][j]) + 1e-300;
          expect(Math.abs(g.response[k].re.data[i * 2 + j] - ref[k].re[i][j]) / scale).toBeLessThan(1e-9);
          expect(Math.abs(g.response[k].im.data[i * 2 + j] - ref[k].im[i][j]) / Math.max(scale, 1e-12)).toBeLessThan(1e-9);
        }
      }
    }
  });

  for (const [label, N, opts, order] of [
    ['heat plate, n = 2500', 50, {}, 4],
    ['convection–diffusion with a mass matrix, n = 900, 2×2', 30, { convection: 300, descriptor: true, inputs: 2, outputs: 2 }, 6],
  ] as const) {
    it(`σ_{r+1} ≤ measured error ≤ 2Σσ(r+1..k) (${label})`, () => {
      const model = plateModel(N, opts);
      const gramians = lowRankGramians(model);
      const w = Float64Array.from([0, ...logFrequencyGrid(1e-1, 1e5, 50)]);
      const full = sparseFrequencyResponse(model, w);
      const full0 = sparseFrequencyResponse(model, [0]);
      for (const method of ['balanced', 'residualization'] as const) {
        const r = sparseBalancedReduction(model, { method, order, gramians });
        const err = sampledErrorPeak(full, r.model, w);
        const sigma = r.hankelSingularValues[order];
        // The bound is an estimate (the tail past the factor rank k is not computed); the tail below σ_k
        // plus the ADI residual level is what it can miss, far below 1e-6 of σ_{r+1} here.
        expect(err.value).toBeLessThanOrEqual(r.errorBound * (1 + 1e-6));
        // A sweep is a lower bound of ‖G − Gr‖∞; on these grids it reaches Glover's lower bound σ_{r+1}.
        expect(err.value).toBeGreaterThanOrEqual(sigma * (1 - 1e-3));
        if (method === 'residualization') {
          // Residualization keeps the DC gain of the k-state balanced realization.
          expect(sampledErrorPeak(full0, r.model, [0]).value).toBeLessThan(1e-6 * sigma);
        }
      }
    });
  }

  it("agrees with scipy's independent low-rank ADI and square-root balanced truncation (heat plate, n = 900)", () => {
    const model = plateModel(30, { inputs: 2, outputs: 2 });
    const ref = sparseReference(writeModel(model), ['lradi'], { order: 5 }).lradi;
    const r = sparseBalancedReduction(model, { method: 'balanced', order: 5 });
    const scipyReduced: StateSpaceModel = { A: fromRows(ref.Ar), B: fromRows(ref.Br), C: fromRows(ref.Cr), D: zeros(2, 2) };
    expect(responseGap(scipyReduced, r.model, logFrequencyGrid(1e-1, 1e5, 25))).toBeLessThan(1e-5);
    for (let i = 0; i < 6; i++) expect(relDiff(r.hankelSingularValues[i], ref.hsv[i])).toBeLessThan(1e-5);
  });

  it('refuses an unstable model: its ADI never reaches the tolerance (heat plate shifted right by 100)', () => {
    // Shifting A by +100·I moves the plate's slowest eigenvalues −2π²(1 + O(h²)) ≈ −19.7 (LeVeque 2007)
    // and the next ones (≈ −49) into the right half-plane.
    const base = plateModel(10);
    const values = base.A.values.slice();
    for (let j = 0; j < base.A.n; j++) for (let p = base.A.colPtr[j]; p < base.A.colPtr[j + 1]; p++) if (base.A.rowIndex[p] === j) values[p] += 100;
    const unstable = { ...base, A: { ...base.A, values } };
    let error: (Error & { code?: string }) | null = null;
    try {
      sparseBalancedReduction(unstable, { method: 'balanced', order: 2, adi: { maxIterations: 60 } });
    } catch (e) {
      error = e as Error & { code?: string };
    }
    expect(error?.code).toBe('unstable');
    expect(error?.message).toMatch(/low-rank ADI stopped after \d+ steps/);
  });

  it('refuses an order past the resolved Hankel singular values, naming the order', () => {
    expect(() => sparseBalancedReduction(plateModel(10), { method: 'balanced', order: 90 })).toThrow(/--order 90 is past the \d+ Hankel singular values/);
  });
});
