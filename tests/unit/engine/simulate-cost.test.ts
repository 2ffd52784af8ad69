/**
 * The simulation-cost report (issue 4): full and reduced model under the same input and tolerances, each
 * solver's figures side by side with the ratios. The reduced model here is an exact modal truncation by
 * hand: a block-diagonal full model whose fast modes barely reach the output, and its slow block.
 */
import { describe, expect, it } from 'vitest';
import { simulationCostReport } from '@/reduction/simulate/cost-report';
import { stepInput } from '@/reduction/simulate';
import { assembleModel } from '@/reduction/io';
import { fromRows } from '@/reduction/linalg/matrix';
import { ModelError } from '@/reduction/errors';

const rates = [1, 2, 300, 600, 1000];
const full = assembleModel({
  A: fromRows(rates.map((r, i) => rates.map((_, j) => (i === j ? -r : 0)))),
  B: fromRows(rates.map(() => [1])),
  C: fromRows([[1, 1, 1e-3, 1e-3, 1e-3]]),
});
const reduced = assembleModel({ A: fromRows([[-1, 0], [0, -2]]), B: fromRows([[1], [1]]), C: fromRows([[1, 1]]) });

describe('simulation-cost report', () => {
  const report = simulationCostReport(full, reduced, stepInput(full), { tEnd: 8, points: 81, relTol: 1e-4, absTol: 1e-8 });

  it('has one row per solver with both models’ figures and full ÷ reduced ratios', () => {
    expect(report.rows.map((r) => r.solver)).toEqual(['exact', 'explicit', 'stiff']);
    expect(report.fullStates).toBe(5);
    expect(report.reducedStates).toBe(2);
    for (const row of report.rows) {
      expect(row.ratios.steps).toBeCloseTo(row.full.steps / row.reduced.steps, 12);
      expect(row.ratios.pointsStored).toBe(1);
    }
    const exact = report.rows[0];
    expect(exact.ratios.rhsEvaluations).toBeNull(); // the exact solver calls no right-hand side
  });

  it('shows what dropping the fast modes buys the explicit solver (stability bound 1000·8/3.3 ≈ 2400 steps)', () => {
    const explicit = report.rows[1];
    expect(explicit.full.steps).toBeGreaterThan(2000);
    expect(explicit.ratios.steps!).toBeGreaterThan(20);
  });

  it('reports the output difference: the fast modes contribute 1e-3·(1/300 + 1/600 + 1/1000) at steady state', () => {
    // Their step responses settle within 0.02 s, so after t = 0.1 the difference is that constant.
    const dcGap = 1e-3 * (1 / 300 + 1 / 600 + 1 / 1000);
    const yMax = 1 + 0.5 + dcGap; // full DC gain
    expect(report.rows[0].maxOutputDifference).toBeCloseTo(dcGap, 10);
    expect(report.relativeOutputDifference).toBeCloseTo(dcGap / yMax, 6);
  });

  it('refuses models whose inputs or outputs differ', () => {
    const other = assembleModel({ A: fromRows([[-1]]), B: fromRows([[1, 1]]), C: fromRows([[1]]) });
    expect(() => simulationCostReport(full, other, stepInput(full), { tEnd: 1 })).toThrow(ModelError);
  });
});
