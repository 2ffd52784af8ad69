import { describe, it, expect } from 'vitest';
import {
  frequencyResponse,
  frequencyEvaluator,
  complexSingularValues,
  bodeData,
  logFrequencyGrid,
  defaultFrequencyBand,
} from '../../../reduction/frequency';
import { fromRows, zeros } from '../../../reduction/linalg/index';
import { solveShiftedHessenberg } from '../../../reduction/linalg/hessenberg-solve';
import { randomStableModel, rigidBodyModel, heatEquation, disguise, firstOrderLag, randomMatrix, gaussian, rng } from '../../fixtures/engine/models';
import { runReference } from '../../fixtures/engine/reference';
import type { StateSpaceModel } from '../../../reduction/model';

/**
 * Largest |ΔG_ij(jω)| / (|G_ij(jω)| + 1e-4·peak), peak = max over ω, i, j of |G_ij|: relative agreement
 * wherever the response is within 4 decades of its peak; far below it (a diffusion model's response at
 * high frequency, 1e-20 of its peak) both solvers lose relative accuracy to cancellation, and there the
 * check is absolute against the peak.
 */
function maxRelativeDifference(
  ours: ReturnType<typeof frequencyResponse>,
  theirs: { re: number[][]; im: number[][] }[],
): number {
  let peak = 0;
  for (const g of theirs) g.re.forEach((row, i) => row.forEach((re, j) => (peak = Math.max(peak, Math.hypot(re, g.im[i][j])))));
  let worst = 0;
  ours.response.forEach((h, k) => {
    const m = h.re.cols;
    theirs[k].re.forEach((row, i) =>
      row.forEach((re, j) => {
        const im = theirs[k].im[i][j];
        const diff = Math.hypot(h.re.data[i * m + j] - re, h.im.data[i * m + j] - im);
        worst = Math.max(worst, diff / (Math.hypot(re, im) + 1e-4 * peak));
      }),
    );
  });
  return worst;
}

describe('frequency response on a Hessenberg form (Laub 1981)', () => {
  it('agrees with C(jωI − A)⁻¹B + D from numpy.linalg.solve (LAPACK zgesv) on seeded and structured models', () => {
    const w = Array.from(logFrequencyGrid(1e-3, 1e4, 40));
    const models: StateSpaceModel[] = [
      randomStableModel(501, 10, 1, 1),
      randomStableModel(502, 30, 3, 2, { decades: 4, withD: true }),
      disguise(heatEquation(40), 503),
      disguise(rigidBodyModel(), 504),
    ];
    const ref = runReference(models.map((model, i) => ({ name: `response-${i}`, model, tasks: ['response'], frequencies: w })));
    models.forEach((model, i) => {
      const ours = frequencyResponse(model, w);
      expect(maxRelativeDifference(ours, ref[i].response!)).toBeLessThan(1e-8);
      // The Hessenberg form on every model; the modal form wherever it accepts the model.
      const hess = frequencyEvaluator(model, { form: 'hessenberg' });
      expect(hess.form).toBe('hessenberg');
      expect(maxRelativeDifference({ frequencies: Float64Array.from(w), response: hess.many(w) }, ref[i].response!)).toBeLessThan(1e-8);
      const auto = frequencyEvaluator(model);
      if (auto.form === 'modal') expect(maxRelativeDifference({ frequencies: Float64Array.from(w), response: auto.many(w) }, ref[i].response!)).toBeLessThan(1e-8);
    });
  });

  it('of k/(s+a) is k/(jω + a) (closed form)', () => {
    const r = frequencyResponse(firstOrderLag(2, 3), [0, 3, 30]);
    [0, 3, 30].forEach((w, k) => {
      const den = 9 + w * w;
      expect(r.response[k].re.data[0]).toBeCloseTo((2 * 3) / den, 14);
      expect(r.response[k].im.data[0]).toBeCloseTo((-2 * w) / den, 14);
    });
  });

  it('solves a shifted Hessenberg system with complex pivoting: residual of (jωI − H)X = F at rounding level', () => {
    const n = 25;
    const g = gaussian(rng(505));
    const H = randomMatrix(n, n, g);
    for (let i = 0; i < n; i++) for (let j = 0; j < i - 1; j++) H.data[i * n + j] = 0;
    const F = randomMatrix(n, 3, g);
    for (const w of [0, 0.7, 12]) {
      const x = solveShiftedHessenberg(H, w, F);
      let worst = 0;
      for (let i = 0; i < n; i++) {
        for (let c = 0; c < 3; c++) {
          // r = (jωI − H)x − f
          let rr = -F.data[i * 3 + c] - w * x.im[i * 3 + c];
          let ri = w * x.re[i * 3 + c];
          for (let k = 0; k < n; k++) {
            rr -= H.data[i * n + k] * x.re[k * 3 + c];
            ri -= H.data[i * n + k] * x.im[k * 3 + c];
          }
          worst = Math.max(worst, Math.hypot(rr, ri));
        }
      }
      expect(worst).toBeLessThan(1e-10);
    }
  });

  it('of a model without states is D', () => {
    const D = fromRows([[1, 2]]);
    const model = { A: zeros(0, 0), B: zeros(0, 2), C: zeros(1, 0), D };
    const r = frequencyResponse(model, [1]);
    expect(Array.from(r.response[0].re.data)).toEqual([1, 2]);
  });
});

describe('singular values and Bode data', () => {
  it('complex singular values agree with numpy.linalg.svd of G(jω) (LAPACK zgesdd)', () => {
    const model = randomStableModel(510, 12, 3, 2, { withD: true });
    const w = [0, 0.1, 1, 10];
    const [ref] = runReference([{ name: 'sv', model, tasks: ['sv'], frequencies: w }]);
    frequencyResponse(model, w).response.forEach((h, k) => {
      const s = complexSingularValues(h);
      expect(s.length).toBe(2);
      s.forEach((x, i) => expect(Math.abs(x / ref.sv![k][i] - 1)).toBeLessThan(1e-10));
    });
  });

  it('unwraps the phase of 1/(s+1)³ to −3·atan(ω), passing −180° without a jump (closed form)', () => {
    const model = {
      A: fromRows([
        [-1, 1, 0],
        [0, -1, 1],
        [0, 0, -1],
      ]),
      B: fromRows([[0], [0], [1]]),
      C: fromRows([[1, 0, 0]]),
      D: fromRows([[0]]),
    };
    const w = logFrequencyGrid(0.01, 100, 81);
    const bode = bodeData(model, w);
    w.forEach((wk, k) => {
      expect(bode.phaseDegrees[0][0][k]).toBeCloseTo((-3 * Math.atan(wk) * 180) / Math.PI, 9);
      expect(bode.magnitude[0][0][k]).toBeCloseTo((1 + wk * wk) ** -1.5, 12);
      expect(bode.largestSingularValue[k]).toBeCloseTo(bode.magnitude[0][0][k], 14);
    });
    expect(bode.phaseDegrees[0][0][80]).toBeLessThan(-260);
  });

  it('log grid spans its ends and the default band covers every pole corner by a decade', () => {
    const g = logFrequencyGrid(0.1, 1000, 5);
    expect(Array.from(g)).toEqual([0.1, 1, 10, 100, 1000].map((x) => expect.closeTo(x, 10)));
    const band = defaultFrequencyBand({ re: [-2, -300, 0], im: [0, 400, 0] });
    expect(band[0]).toBeCloseTo(0.2, 12);
    expect(band[1]).toBeCloseTo(5000, 9);
  });
});
