/**
 * IRKA on the dense path (reduction/irka.ts, reduce.ts). Sources beside each check:
 *  - the first-order H2-optimality conditions at the mirror images −λ̂ᵢ of the reduced poles with the
 *    residue directions b̂ᵢ, ĉᵢ: H(−λ̂ᵢ)b̂ᵢ = Hr(−λ̂ᵢ)b̂ᵢ, ĉᵢᵀH(−λ̂ᵢ) = ĉᵢᵀHr(−λ̂ᵢ), ĉᵢᵀH′(−λ̂ᵢ)b̂ᵢ = ĉᵢᵀHr′(−λ̂ᵢ)b̂ᵢ
 *    (one input and output: the Meier–Luenberger conditions, Theorem 3.4 of Gugercin, Antoulas & Beattie,
 *    "H2 model reduction for large-scale linear dynamical systems", SIAM J. Matrix Anal. Appl. 30(2), 2008,
 *    theorem number as recalled; p×m: the tangential conditions of Van Dooren, Gallivan & Absil, "H2-optimal
 *    model reduction of MIMO systems", Appl. Math. Lett. 21(12), 2008), evaluated by NumPy/SciPy
 *    (tests/reference/irka_reference.py: numpy.linalg.eig, scipy.linalg.solve) on the engine's reduced model;
 *  - the tangential interpolation a Petrov–Galerkin projection enforces at its own points (Gallivan,
 *    Vandendorpe & Van Dooren, "Model reduction of MIMO systems via tangential interpolation", SIAM J.
 *    Matrix Anal. Appl. 26(2), 2004), evaluated by the same script;
 *  - the converged shifts of an independent NumPy IRKA following Algorithm 4.1 of Gugercin, Antoulas &
 *    Beattie 2008 as printed (complex bases), from the same initial shifts;
 *  - the property that a local H2-optimal model of order r is at least about as good in H2 as balanced
 *    truncation of the same order (observed throughout Gugercin, Antoulas & Beattie 2008, §5, as recalled;
 *    here stated as ‖G − G_irka‖₂ ≤ 1.01·‖G − G_bt‖₂ on the models below, both measured by norms.ts).
 */
import { describe, expect, it } from 'vitest';
import { irka, initialPoints, irkaReport, iterateIrka, logSpacedShifts, mirrorPoints, shiftChange, slowestPoleShifts, type TangentialProjector } from '../../../reduction/irka';
import { fromRows } from '../../../reduction/linalg/matrix';
import { ShiftedHessenbergLu } from '../../../reduction/linalg/shifted-hessenberg';
import { hessenberg } from '../../../reduction/linalg/index';
import { reduceModel, prepareReduction, IRKA_NO_BOUND_NOTE } from '../../../reduction/reduce';
import { ModelError } from '../../../reduction/errors';
import { StoppedError } from '../../../reduction/stop';
import { modelPoles } from '../../../reduction/spectral-split';
import { appendModels, firstOrderLag, heatEquation, randomStableModel } from '../../fixtures/engine/models';
import { expandedShifts, irkaReference } from './irka-support';

const maxOf = (xs: number[]) => Math.max(...xs);

describe('IRKA on a stable model: convergence and the H2-optimality conditions', () => {
  const heat = heatEquation(60); // one input, one output
  const mimo = randomStableModel(2, 40, 2, 3); // two inputs, three outputs
  const siso = irka(heat, 6, { tolerance: 1e-10 });
  const tangential = irka(mimo, 8, { tolerance: 1e-10, maxIterations: 200 });
  const [refSiso, refMimo] = irkaReference([
    {
      name: 'heat',
      model: heat,
      reduced: siso.model,
      conditions: true,
      points: siso.report.interpolationPoints,
      irka: { shifts: expandedShifts(siso.report.initialShifts), tolerance: 1e-8, maxIterations: 200 },
    },
    { name: 'mimo', model: mimo, reduced: tangential.model, conditions: true, points: tangential.report.interpolationPoints },
  ]);

  it('converges and says so: iterations, the shift change history ending below the tolerance, a stable reduced model', () => {
    for (const r of [siso, tangential]) {
      expect(r.report.converged).toBe(true);
      expect(r.report.iterations).toBe(r.report.shiftChangeHistory.length);
      expect(r.report.iterations).toBeGreaterThan(1);
      expect(r.report.shiftChange).toBeLessThanOrEqual(1e-10);
      expect(r.report.shiftChangeHistory[0]).toBeGreaterThan(1e-3);
      expect(r.report.reducedStable).toBe(true);
      expect(r.report.initialShiftRule).toBe('slowest-poles');
    }
    expect(siso.model.A.rows).toBe(6);
    expect(tangential.model.A.rows).toBe(8);
    expect(tangential.model.B.cols).toBe(2);
    expect(tangential.model.C.rows).toBe(3);
  });

  it('one input and output: H(−λ̂ᵢ) = Hr(−λ̂ᵢ) and H′(−λ̂ᵢ) = Hr′(−λ̂ᵢ) at every reduced pole (numpy/scipy)', () => {
    const c = refSiso.conditions!;
    expect(c).toHaveLength(6);
    expect(maxOf(c.map((x) => x.right))).toBeLessThan(1e-9);
    expect(maxOf(c.map((x) => x.hermite))).toBeLessThan(1e-9);
    // The reduced poles scipy finds are the mirror images of the interpolation points (to the tolerance).
    const mirrored = c.map((x) => ({ re: -x.pole[0], im: x.pole[1] }));
    expect(shiftChange(siso.report.interpolationPoints, mirrored.filter((p) => p.im >= 0))).toBeLessThan(1e-8);
  });

  it('two inputs and three outputs: the tangential conditions, right, left and Hermite, at every reduced pole (numpy/scipy)', () => {
    const c = refMimo.conditions!;
    expect(c).toHaveLength(8);
    expect(maxOf(c.map((x) => x.right))).toBeLessThan(1e-9);
    expect(maxOf(c.map((x) => x.left))).toBeLessThan(1e-9);
    expect(maxOf(c.map((x) => x.hermite))).toBeLessThan(1e-9);
  });

  it('the reduced model interpolates tangentially at its own points and directions (projection theorem, numpy/scipy)', () => {
    for (const ref of [refSiso, refMimo]) {
      const pc = ref.pointConditions!;
      expect(maxOf(pc.map((x) => Math.max(x.right, x.left, x.hermite)))).toBeLessThan(1e-10);
    }
  });

  it('the converged shifts match an independent numpy IRKA (Algorithm 4.1 as printed) from the same initial shifts', () => {
    const ref = refSiso.irka!;
    expect(ref.converged).toBe(true);
    const ours = expandedShifts(siso.report.interpolationPoints);
    expect(ref.shifts).toHaveLength(ours.length);
    // Pair each reference shift with the nearest of ours.
    const theirs = ref.shifts.map(([re, im]) => ({ re, im }));
    const mine = ours.map(([re, im]) => ({ re, im }));
    for (const t of theirs) {
      const d = Math.min(...mine.map((m) => Math.hypot(m.re - t.re, m.im - t.im)));
      expect(d / Math.hypot(t.re, t.im)).toBeLessThan(1e-6);
    }
  });
});

describe('IRKA against balanced truncation of the same order (H2 error)', () => {
  const cases = [
    { name: 'heat equation, n = 60, order 6', model: heatEquation(60), order: 6 },
    { name: 'random 2×3 model, n = 40, order 8', model: randomStableModel(2, 40, 2, 3), order: 8 },
    { name: 'random one-input model over three decades, n = 30, order 6', model: randomStableModel(4, 30, 1, 1, { decades: 3 }), order: 6 },
  ];
  for (const c of cases) {
    it(`${c.name}: ‖G − G_irka‖₂ ≤ 1.01·‖G − G_bt‖₂`, () => {
      const a = reduceModel(c.model, { method: 'irka', order: c.order, irka: { tolerance: 1e-8 } });
      const b = reduceModel(c.model, { method: 'balanced', order: c.order });
      expect(a.irka!.converged).toBe(true);
      expect(a.h2Error.finite && b.h2Error.finite).toBe(true);
      if (!a.h2Error.finite || !b.h2Error.finite) return;
      expect(a.h2Error.value).toBeLessThanOrEqual(1.01 * b.h2Error.value);
      expect(a.h2Error.value).toBeGreaterThan(0);
    });
  }
});

describe('IRKA through the engine entry (reduceModel)', () => {
  it('reports no bound (NaN with a note), the measured errors and the IRKA block', () => {
    const r = reduceModel(heatEquation(40), { method: 'irka', order: 4 });
    expect(r.method).toBe('irka');
    expect(r.order).toBe(4);
    expect(Number.isNaN(r.errorBound)).toBe(true);
    expect(r.notes[0]).toBe(IRKA_NO_BOUND_NOTE);
    expect(r.hankelSingularValues).toBeNull();
    expect(r.irka?.converged).toBe(true);
    expect(r.hInfinityError.finite && r.hInfinityError.value > 0).toBe(true);
    expect(r.h2Error.finite && r.h2Error.value > 0).toBe(true);
  });

  it('keeps an unstable pole exactly and reduces only the stable part', () => {
    // A stable 20-state model beside an unstable lag 1/(s − 0.5) (pole at +0.5).
    const model = appendModels(randomStableModel(11, 20, 1, 1), firstOrderLag(1, -0.5));
    const r = reduceModel(model, { method: 'irka', order: 5 });
    expect(r.unstableStatesKept).toBe(1);
    expect(r.stableOrder).toBe(4);
    expect(r.order).toBe(5);
    const poles = modelPoles(r.model.A);
    const unstable = Array.from(poles.re).filter((x) => x > 0);
    expect(unstable).toHaveLength(1);
    expect(Math.abs(unstable[0] - 0.5)).toBeLessThan(1e-9);
    // G − Gr = Gs − Gsr is stable, so its norms are finite.
    expect(r.h2Error.finite).toBe(true);
    expect(r.notes.some((n) => n.includes('kept exactly'))).toBe(true);
  });

  it('an order for the basis is a run of its own, kept per order', () => {
    const basis = prepareReduction(heatEquation(30), { method: 'irka' });
    expect(basis.allowedOrders()).toEqual(Array.from({ length: 31 }, (_, k) => k));
    const a = basis.truncateAt(3);
    expect(a.irka?.converged).toBe(true);
    expect(basis.truncateAt(3).model).toBe(a.model);
    expect(Number.isNaN(basis.summaryAt(3).errorBound)).toBe(true);
  });

  it('refuses a tolerance (no bound to meet) and orders outside the stable part, naming the field', () => {
    const heat = heatEquation(10);
    expect(() => reduceModel(heat, { method: 'irka', tolerance: 0.01 })).toThrow(ModelError);
    try {
      reduceModel(heat, { method: 'irka', tolerance: 0.01 });
    } catch (e) {
      expect((e as ModelError).field).toBe('tolerance');
    }
    expect(() => reduceModel(heat, { method: 'irka', order: 11 })).toThrow(/larger than the model/);
  });
});

describe('shifted Hessenberg LU (linalg/shifted-hessenberg.ts)', () => {
  // Residual checks: ‖(σI − H)x − f‖ ≤ c·ε·(‖H‖ + |σ|)‖x‖ for a backward-stable solve (Golub & Van Loan 2013, ch. 3–4).
  const H = hessenberg(randomStableModel(3, 30, 1, 1).A).H;
  const n = H.rows;
  const f = { re: Float64Array.from({ length: n }, (_, i) => Math.sin(i + 1)), im: Float64Array.from({ length: n }, (_, i) => Math.cos(2 * i)) };
  const residual = (s: { re: number; im: number }, x: { re: Float64Array; im: Float64Array }, transpose: boolean) => {
    let worst = 0, hnorm = 0, xnorm = 0;
    for (let k = 0; k < H.data.length; k++) hnorm = Math.max(hnorm, Math.abs(H.data[k]));
    for (let i = 0; i < n; i++) xnorm = Math.max(xnorm, Math.hypot(x.re[i], x.im[i]));
    for (let i = 0; i < n; i++) {
      let rr = s.re * x.re[i] - s.im * x.im[i] - f.re[i];
      let ri = s.re * x.im[i] + s.im * x.re[i] - f.im[i];
      for (let j = 0; j < n; j++) {
        const h = transpose ? H.data[j * n + i] : H.data[i * n + j];
        rr -= h * x.re[j];
        ri -= h * x.im[j];
      }
      worst = Math.max(worst, Math.hypot(rr, ri));
    }
    return worst / ((n * hnorm + Math.hypot(s.re, s.im)) * xnorm);
  };
  for (const s of [{ re: 0.7, im: 0 }, { re: 0.3, im: 2.5 }, { re: 0, im: 40 }]) {
    it(`σ = ${s.re} + ${s.im}i: solve and transposed solve leave residuals at rounding level`, () => {
      const lu = new ShiftedHessenbergLu(H, s.re, s.im);
      expect(lu.pivotRatio).toBeGreaterThan(0);
      expect(residual(s, lu.solve(f.re, f.im), false)).toBeLessThan(1e-14);
      expect(residual(s, lu.solveTranspose(f.re, f.im), true)).toBeLessThan(1e-14);
    });
  }
});

describe('IRKA options and reports', () => {
  const heat = heatEquation(30);

  it('reports a run stopped at the most iterations as not converged, with its last shift change and a note', () => {
    const r = irka(heat, 4, { maxIterations: 2 });
    expect(r.report.converged).toBe(false);
    expect(r.report.iterations).toBe(2);
    expect(r.report.shiftChange).toBeGreaterThan(1e-6);
    expect(r.notes.some((n) => n.startsWith('IRKA did not converge'))).toBe(true);
  });

  it('a breakdown after the first projection ends the run with the last model formed, reported as not converged', () => {
    // A stand-in projection: always the model 1/(s + 1) + 1/(s + 2), breaking down on its third call.
    let calls = 0;
    const projector: TangentialProjector = {
      states: 10,
      inputs: 1,
      outputs: 1,
      project() {
        calls++;
        if (calls === 3) throw new ModelError('order_too_large', 'order', 'IRKA broke down: test');
        return { A: fromRows([[-1, 0], [0, -2]]), B: fromRows([[1], [1]]), C: fromRows([[1, 1]]) };
      },
    };
    const run = iterateIrka(projector, initialPoints([{ re: 5, im: 0 }, { re: 7, im: 0 }], 1, 1), { tolerance: 1e-12, maxIterations: 10 });
    expect(run.iterations).toBe(1);
    expect(run.converged).toBe(false);
    expect(run.points.map((p) => p.re).sort()).toEqual([1, 2]);
    expect(run.notes[0]).toMatch(/^IRKA stopped after 1 iteration\(s\): IRKA broke down: test/);
  });

  it('an unstable reduced pole gives a reflected shift, counted; an unstable final model is reported as such', () => {
    // Reduced poles +1 (unstable) and −2 ± 3i: shifts |1| = 1 (reflected) and the pair 2 ± 3i.
    const unstable = { A: fromRows([[1, 0, 0], [0, -2, 3], [0, -3, -2]]), B: fromRows([[1], [1], [0]]), C: fromRows([[1, 1, 1]]) };
    const next = mirrorPoints(unstable)!;
    expect(next.reflected).toBe(1);
    const shifts = next.points.map((p) => [p.re, p.im]).sort((a, b) => a[0] - b[0]);
    expect(shifts[0]).toEqual([1, 0]);
    expect(shifts[1][0]).toBeCloseTo(2, 12);
    expect(shifts[1][1]).toBeCloseTo(3, 12);
    const projector: TangentialProjector = { states: 10, inputs: 1, outputs: 1, project: () => unstable };
    const run = iterateIrka(projector, initialPoints([{ re: 5, im: 0 }, { re: 7, im: 1 }], 1, 1), { tolerance: 1e-6, maxIterations: 5 });
    expect(run.converged).toBe(true);
    expect(run.reflected).toBeGreaterThanOrEqual(1);
    expect(run.notes.some((n) => /reflected into the right half-plane/.test(n))).toBe(true);
    const report = irkaReport(run, { tolerance: 1e-6, maxIterations: 5 }, [{ re: 5, im: 0 }, { re: 7, im: 1 }], 'given');
    expect(report.reducedStable).toBe(false);
  });

  it('uses given initial shifts (a pair as one entry) and checks them', () => {
    const r = irka(heat, 4, { initialShifts: [{ re: 10, im: 5 }, { re: 100, im: 0 }, { re: 1000, im: 0 }] });
    expect(r.report.initialShiftRule).toBe('given');
    expect(r.report.converged).toBe(true);
    expect(() => irka(heat, 4, { initialShifts: [{ re: 10, im: 0 }] })).toThrow(/stand for 1 shifts/);
    expect(() => irka(heat, 2, { initialShifts: [{ re: -1, im: 0 }, { re: 3, im: 0 }] })).toThrow(/Re σ > 0/);
    expect(() => irka(heat, 2, { tolerance: 0 })).toThrow(ModelError);
    expect(() => irka(heat, 2, { maxIterations: 0.5 })).toThrow(ModelError);
  });

  it('reports each iteration and stops on the stop flag', () => {
    const steps: number[] = [];
    const r = irka(heat, 4, { onStep: (s) => steps.push(s.shiftChange) });
    expect(steps).toEqual(r.report.shiftChangeHistory);
    expect(() => irka(heat, 4, { signal: { aborted: true } })).toThrow(StoppedError);
  });

  it('default initial shifts: mirror images of the slowest poles, a pair kept together or replaced by |λ| when one place is left', () => {
    const poles = { re: Float64Array.from([-1, -2, -2, -50]), im: Float64Array.from([0, 3, -3, 0]) };
    expect(slowestPoleShifts(poles, 3, 50)).toEqual([{ re: 1, im: 0 }, { re: 2, im: 3 }]);
    expect(slowestPoleShifts(poles, 2, 50)).toEqual([{ re: 1, im: 0 }, { re: Math.hypot(2, 3), im: 0 }]);
    // Too few distinct poles (a repeated one counts once): the rest log-spaced above them, up to the largest |λ|.
    const repeated = { re: Float64Array.from([-1, -1]), im: Float64Array.from([0, 0]) };
    const s = slowestPoleShifts(repeated, 3, 100);
    expect(s[0]).toEqual({ re: 1, im: 0 });
    expect(s).toHaveLength(3);
    expect(s[1].re).toBeGreaterThan(1);
    expect(s[2].re).toBeGreaterThan(s[1].re);
    expect(s[2].re).toBeLessThan(100);
  });

  it('log-spaced initial shifts sit inside the spectral range, distinct even for a narrow range', () => {
    const s = logSpacedShifts(1, 1e4, 4).map((x) => x.re);
    expect(s[0]).toBeGreaterThan(1);
    expect(s[3]).toBeLessThan(1e4);
    expect(s[1] / s[0]).toBeCloseTo(10, 10);
    const narrow = logSpacedShifts(2, 2, 3).map((x) => x.re);
    expect(new Set(narrow).size).toBe(3);
  });
});
