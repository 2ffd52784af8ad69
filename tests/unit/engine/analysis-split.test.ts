import { describe, it, expect } from 'vitest';
import { splitStableUnstable, classifyPoles, matrixSign } from '../../../reduction/spectral-split';
import { fromRows, zeros, eigenvalues, identity, matmul } from '../../../reduction/linalg/index';
import { frequencyResponse, frequencyEvaluator } from '../../../reduction/frequency';
import { parallel } from '../../../reduction/realization';
import { randomStableModel, rigidBodyModel, appendModels, disguise } from '../../fixtures/engine/models';
import { runReference, spectrumDistance } from '../../fixtures/engine/reference';
import type { StateSpaceModel } from '../../../reduction/model';

function pairs(v: { re: Float64Array; im: Float64Array }): [number, number][] {
  return Array.from(v.re, (re, i) => [re, v.im[i]] as [number, number]);
}

/** Stable random part ⊕ rigid body (Jordan block at 0) ⊕ an unstable pole at +0.3 ⊕ an integrator, disguised. */
function mixedModel(): StateSpaceModel {
  const stable = randomStableModel(901, 10, 1, 1, { withD: true });
  const rigid = rigidBodyModel();
  const unstable = { A: fromRows([[0.3]]), B: fromRows([[1]]), C: fromRows([[2]]), D: zeros(1, 1) };
  const integrator = { A: fromRows([[0]]), B: fromRows([[1]]), C: fromRows([[0.5]]), D: zeros(1, 1) };
  return disguise(appendModels(appendModels(appendModels(stable, rigid), unstable), integrator), 902);
}

describe('stable/unstable split by the matrix sign function (Roberts 1971)', () => {
  it('keeps rigid-body, integrator and unstable poles in the kept part and the rest in the stable part', () => {
    const model = mixedModel();
    const split = splitStableUnstable(model);
    // 10 random + 2 of the rigid body's damped pair are stable; 2 rigid + 1 unstable + 1 integrator kept.
    expect(split.stableStates).toBe(12);
    expect(split.unstableStates).toBe(4);
    expect(split.marginalPoles).toBe(3);
    expect(split.unstablePoles).toBe(1);
    const [ref] = runReference([{ name: 'mixed', model, tasks: ['eig'] }]);
    const scale = Math.max(...ref.eig!.map(([re, im]) => Math.hypot(re, im)));
    const refStable = ref.eig!.filter(([re]) => re < -1e-7 * scale);
    const refKept = ref.eig!.filter(([re]) => re >= -1e-7 * scale);
    expect(spectrumDistance(pairs(eigenvalues(split.stable.A)), refStable)).toBeLessThan(1e-9);
    // The double pole at 0 is defective: its computed eigenvalues spread by about √ε either way.
    expect(spectrumDistance(pairs(eigenvalues(split.unstable.A)), refKept)).toBeLessThan(1e-7);
    expect(split.couplingResidual).toBeLessThan(1e-12);
  });

  it('Gs + Gu has the frequency response of G (numpy.linalg.solve reference)', () => {
    const model = mixedModel();
    const split = splitStableUnstable(model);
    const w = [0.01, 0.1, 1, 10, 100];
    const [ref] = runReference([{ name: 'mixed-response', model, tasks: ['response'], frequencies: w }]);
    // The backward-stable Hessenberg form to 1e-9; the response curve (modal where κ(V) ≤ 1e10, here
    // with a defective double pole at 0) to the six digits RESPONSE_CONDITION_LIMIT promises.
    const recombined = parallel(split.stable, split.unstable);
    const hessenbergForm = frequencyEvaluator(recombined, { form: 'hessenberg' }).many(w);
    const curve = frequencyResponse(recombined, w).response;
    for (const [ours, tol] of [[hessenbergForm, 1e-9], [curve, 1e-6]] as const) {
      ours.forEach((h, k) => {
        const re = ref.response![k].re[0][0];
        const im = ref.response![k].im[0][0];
        expect(Math.hypot(h.re.data[0] - re, h.im.data[0] - im) / Math.hypot(re, im)).toBeLessThan(tol);
      });
    }
  });

  it('handles a triple integrator (3×3 Jordan block at 0) beside stable poles', () => {
    const chain = { A: fromRows([[0, 1, 0], [0, 0, 1], [0, 0, 0]]), B: fromRows([[0], [0], [1]]), C: fromRows([[1, 0, 0]]), D: zeros(1, 1) };
    const model = disguise(appendModels(chain, randomStableModel(910, 5, 1, 1)), 911);
    const split = splitStableUnstable(model);
    expect(split.unstableStates).toBe(3);
    expect(split.stableStates).toBe(5);
    expect(split.stable.A.data.every(Number.isFinite)).toBe(true);
  });

  it('leaves a stable model untouched and puts a model without stable poles wholly in the kept part', () => {
    const stable = randomStableModel(912, 6, 1, 1);
    expect(splitStableUnstable(stable).stable).toBe(stable);
    const kept = splitStableUnstable(rigidBodyModel(1, 0));
    expect(kept.stableStates).toBe(0);
    expect(kept.unstableStates).toBe(4);
  });

  it('classifies with a tolerance relative to the spectral radius', () => {
    const poles = { re: Float64Array.of(-1e-9, -1e-3, 2e-9, -1000), im: Float64Array.of(0, 0, 0, 0) };
    const c = classifyPoles(poles, 1e-9);
    // t = 1e-9·1000 = 1e-6: −1e-9 and +2e-9 are marginal, −1e-3 stable.
    expect(c.stability).toEqual(['marginal', 'stable', 'marginal', 'stable']);
    expect(classifyPoles({ re: Float64Array.of(5e-6), im: Float64Array.of(0) }).stability).toEqual(['unstable']);
  });

  it('computes sign(X) with sign(X)² = I and the eigenvalue signs (Higham, Functions of Matrices, 2008, ch. 5)', () => {
    const X = fromRows([[-2, 5, 1], [0, 3, 2], [0, 0, -0.5]]);
    const S = matrixSign(X);
    const S2 = matmul(S, S);
    const I = identity(3);
    for (let k = 0; k < 9; k++) expect(S2.data[k]).toBeCloseTo(I.data[k], 12);
    // trace = (#positive − #negative) eigenvalues = 1 − 2.
    expect(S.data[0] + S.data[4] + S.data[8]).toBeCloseTo(-1, 12);
  });
});
