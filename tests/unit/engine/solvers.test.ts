/**
 * The adaptive solvers — Dormand–Prince 5(4) (Dormand & Prince 1980), the variable-order NDFs
 * (Shampine & Reichelt 1997; more in bdf.test.ts) and, for fixed steps, TR-BDF2 (Hosea & Shampine
 * 1996) — against the exact zero-order-hold response (itself checked against scipy in simulate.test.ts),
 * their orders, their tolerance behaviour and their cost on stiff and non-stiff models.
 */
import { describe, expect, it } from 'vitest';
import { simulate, stepInput, type SimulationResult } from '@/reduction/simulate';
import { DOPRI5_TABLEAU } from '@/reduction/simulate/dormand-prince';
import { TRBDF2_TABLEAU } from '@/reduction/simulate/tr-bdf2';
import { logRates, modelWithRates } from './simulate-reference';

// ---------------------------------------------------------------------------------------------------
// Butcher's order conditions: Σ bᵢ Φᵢ(τ) = 1/γ(τ) for every rooted tree τ of order ≤ p (Butcher 1963;
// Hairer, Nørsett & Wanner 1993, §II.2, Theorem 2.13). Trees are generated, not listed by hand.
type Tree = Tree[];
const order = (t: Tree): number => 1 + t.reduce((s, c) => s + order(c), 0);
const density = (t: Tree): number => order(t) * t.reduce((s, c) => s * density(c), 1);
const key = (t: Tree): string => `[${t.map(key).sort().join('')}]`;

function treesOfOrder(n: number): Tree[] {
  if (n === 1) return [[]];
  const out = new Map<string, Tree>();
  // Children: multisets of trees whose orders sum to n − 1, built by adding one child at a time.
  const grow = (children: Tree[], remaining: number) => {
    if (remaining === 0) {
      out.set(key(children), children);
      return;
    }
    for (let k = 1; k <= remaining; k++) for (const c of treesOfOrder(k)) grow([...children, c], remaining - k);
  };
  grow([], n - 1);
  return [...out.values()];
}

function orderConditionDefects(tab: { c: readonly number[]; a: readonly (readonly number[])[] }, b: readonly number[], p: number): number[][] {
  const s = b.length;
  const aij = (i: number, j: number) => tab.a[i]?.[j] ?? 0;
  const phi = (t: Tree): number[] =>
    Array.from({ length: s }, (_, i) => t.reduce((prod, child) => {
      const pc = phi(child);
      let sum = 0;
      for (let j = 0; j < s; j++) sum += aij(i, j) * pc[j];
      return prod * sum;
    }, 1));
  const defects: number[][] = [];
  for (let q = 1; q <= p; q++) {
    defects.push(treesOfOrder(q).map((t) => {
      const ph = phi(t);
      return b.reduce((sum, bi, i) => sum + bi * ph[i], 0) - 1 / density(t);
    }));
  }
  return defects;
}

describe('Butcher order conditions of the tableaux', () => {
  it('generates 1, 1, 2, 4, 9 rooted trees of orders 1…5 (HNW93 Table II.2.1)', () => {
    expect([1, 2, 3, 4, 5].map((n) => treesOfOrder(n).length)).toEqual([1, 1, 2, 4, 9]);
  });
  it('row sums of A equal c for both tableaux', () => {
    for (const tab of [DOPRI5_TABLEAU, TRBDF2_TABLEAU]) {
      tab.a.forEach((row, i) => expect(row.reduce((s: number, v: number) => s + v, 0)).toBeCloseTo(tab.c[i], 14));
    }
  });
  it('Dormand–Prince: b satisfies all 17 conditions of order 5; b̂ those of order 4 but not all of order 5', () => {
    const d5 = orderConditionDefects(DOPRI5_TABLEAU, DOPRI5_TABLEAU.b, 6);
    for (let q = 0; q < 5; q++) for (const d of d5[q]) expect(Math.abs(d)).toBeLessThan(1e-14);
    expect(Math.max(...d5[5].map(Math.abs))).toBeGreaterThan(1e-6);
    const d4 = orderConditionDefects(DOPRI5_TABLEAU, DOPRI5_TABLEAU.bHat, 5);
    for (let q = 0; q < 4; q++) for (const d of d4[q]) expect(Math.abs(d)).toBeLessThan(1e-14);
    expect(Math.max(...d4[4].map(Math.abs))).toBeGreaterThan(1e-6);
  });
  it('TR-BDF2: b has order exactly 2, the embedded b̂ order 3 (Hosea & Shampine 1996)', () => {
    const d = orderConditionDefects(TRBDF2_TABLEAU, TRBDF2_TABLEAU.b, 3);
    for (const v of [...d[0], ...d[1]]) expect(Math.abs(v)).toBeLessThan(1e-15);
    expect(Math.max(...d[2].map(Math.abs))).toBeGreaterThan(1e-3);
    const dh = orderConditionDefects(TRBDF2_TABLEAU, TRBDF2_TABLEAU.bHat, 4);
    for (const v of [...dh[0], ...dh[1], ...dh[2]]) expect(Math.abs(v)).toBeLessThan(1e-15);
    expect(Math.max(...dh[3].map(Math.abs))).toBeGreaterThan(1e-4);
  });
});

// ---------------------------------------------------------------------------------------------------
function maxError(r: SimulationResult, ref: SimulationResult): number {
  let e = 0;
  for (let k = 0; k < r.y.data.length; k++) e = Math.max(e, Math.abs(r.y.data[k] - ref.y.data[k]));
  return e;
}
function maxAbs(r: SimulationResult): number {
  return r.y.data.reduce((m, v) => Math.max(m, Math.abs(v)), 0);
}

describe('convergence order with fixed steps (HNW93 §II.3: halving h divides the error by about 2^p)', () => {
  const model = modelWithRates(logRates(6, 0.5, 2), 2, 2, 41, 2);
  const input = stepInput(model);
  const onGrid = [0.4, 0.8, 1.2, 1.6, 2];
  const offGrid = [0.73, 1.37, 1.91]; // never on a step of h = 0.2, 0.1, 0.05 or 0.025
  const exactOn = simulate(model, input, { tEnd: 2, times: onGrid, solver: 'exact' });
  const exactOff = simulate(model, input, { tEnd: 2, times: offGrid, solver: 'exact' });

  function observedOrders(solver: 'explicit' | 'stiff', steps: number[], times: number[], exact: SimulationResult): number[] {
    const errors = steps.map((h) => maxError(simulate(model, input, { tEnd: 2, times, solver, fixedStep: h }), exact));
    return errors.slice(1).map((e, k) => Math.log2(errors[k] / e));
  }

  it('Dormand–Prince is of order 5 at the steps', () => {
    for (const p of observedOrders('explicit', [0.2, 0.1, 0.05], onGrid, exactOn)) {
      expect(p).toBeGreaterThan(4.6);
      expect(p).toBeLessThan(5.6);
    }
  });
  it('its dense output between steps converges at least at order 4 (continuous extension of order 4, HNW93 §II.6)', () => {
    for (const p of observedOrders('explicit', [0.2, 0.1, 0.05], offGrid, exactOff)) expect(p).toBeGreaterThan(3.8);
  });
  it('TR-BDF2 is of order 2 at the steps and between them (cubic Hermite dense output)', () => {
    for (const times of [onGrid, offGrid]) {
      const exact = times === onGrid ? exactOn : exactOff;
      for (const p of observedOrders('stiff', [0.1, 0.05, 0.025], times, exact)) {
        expect(p).toBeGreaterThan(1.8);
        expect(p).toBeLessThan(2.3);
      }
    }
  });
});

describe('adaptive solvers agree with the exact response within their tolerances', () => {
  const models = {
    'non-stiff MIMO (8 states, 2 in, 3 out)': modelWithRates(logRates(8, 0.5, 5), 2, 3, 31, 2),
    'stiff MIMO (12 states, rates 1 … 1e4)': modelWithRates(logRates(12, 1, 1e4), 2, 2, 32, 4),
  };
  for (const [name, model] of Object.entries(models)) {
    const input = stepInput(model);
    const exact = simulate(model, input, { tEnd: 5, points: 101, solver: 'exact' });
    const scale = maxAbs(exact);
    for (const solver of ['explicit', 'stiff'] as const) {
      for (const relTol of [1e-3, 1e-5]) {
        it(`${name}, ${solver}, relTol ${relTol}: max error ≤ 10·(relTol·max|y| + absTol) (common practice)`, () => {
          const absTol = relTol * 1e-3;
          const r = simulate(model, input, { tEnd: 5, points: 101, solver, relTol, absTol });
          expect(maxError(r, exact)).toBeLessThan(10 * (relTol * scale + absTol));
          expect(r.stats.pointsStored).toBe(101);
          expect(r.stats.steps).toBeGreaterThan(0);
        });
      }
    }
  }

  it('the error follows the tolerance asked for: it falls with relTol at a rate of tol^(2/3…1) (HNW93 §II.4)', () => {
    const model = models['non-stiff MIMO (8 states, 2 in, 3 out)'];
    const input = stepInput(model);
    const exact = simulate(model, input, { tEnd: 5, points: 101, solver: 'exact' });
    // Error-per-step control of a method of order p gives global error ∝ tol^(p/(p+1)) without local
    // extrapolation and ∝ tol with it (Dormand–Prince propagates the higher order). The stiff solver is
    // the variable-order NDF (bdf.ts): its order rises as the tolerance tightens, so the slope runs from
    // p/(p+1) of its low orders (2/3 at order 2) towards 1 (measured 0.92 here).
    const expected = { explicit: [0.8, 1.2], stiff: [0.6, 1.1] } as const;
    for (const solver of ['explicit', 'stiff'] as const) {
      const tols = [1e-3, 1e-5, 1e-7];
      const errs = tols.map((relTol) => maxError(simulate(model, input, { tEnd: 5, points: 101, solver, relTol, absTol: relTol * 1e-3 }), exact));
      for (let k = 1; k < tols.length; k++) {
        const slope = Math.log(errs[k - 1] / errs[k]) / Math.log(tols[k - 1] / tols[k]);
        expect(slope).toBeGreaterThan(expected[solver][0]);
        expect(slope).toBeLessThan(expected[solver][1]);
      }
    }
  });
});

describe('stiffness (common practice: an explicit step is bound by the fastest pole)', () => {
  // Same size (20 states), same input, same tolerances; decay rates over 3 decades versus a factor 3.
  const stiff = modelWithRates(logRates(20, 1, 1000), 2, 2, 51, 4);
  const nonStiff = modelWithRates(logRates(20, 1, 3), 2, 2, 51, 4);
  const opts = { tEnd: 10, points: 101, relTol: 1e-3, absTol: 1e-6 };
  const run = (m: typeof stiff, solver: 'explicit' | 'stiff') => simulate(m, stepInput(m), { ...opts, solver }).stats;
  const explicitStiff = run(stiff, 'explicit');
  const implicitStiff = run(stiff, 'stiff');
  const explicitNonStiff = run(nonStiff, 'explicit');
  const implicitNonStiff = run(nonStiff, 'stiff');

  it('on the stiff model the explicit solver takes at least 20× the stiff solver’s steps', () => {
    expect(explicitStiff.steps).toBeGreaterThanOrEqual(20 * implicitStiff.steps);
  });
  it('the explicit solver’s steps grow more than 20× from the non-stiff to the stiff model', () => {
    expect(explicitStiff.steps).toBeGreaterThan(20 * explicitNonStiff.steps);
  });
  it('the stiff solver’s steps grow less than 3×', () => {
    expect(implicitStiff.steps).toBeLessThan(3 * implicitNonStiff.steps);
  });
  it('the explicit step count sits at the stability bound |hλ_max| ≈ 3.3 (Hairer & Wanner 1996, §IV.2)', () => {
    // 1000·10/3.3 ≈ 3030 steps; the stability boundary of DOPRI5 on the real axis is near −3.3.
    expect(explicitStiff.steps).toBeGreaterThan(2500);
    expect(explicitStiff.steps).toBeLessThan(4000);
  });
  it('the stiff solver reuses its factorisation: far fewer factorisations than steps', () => {
    expect(implicitStiff.factorizations).toBeLessThan(implicitStiff.steps / 2);
    expect(explicitStiff.factorizations).toBe(0);
  });
});
