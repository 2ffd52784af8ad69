// The order slider's figures, precomputed by the analysis task (lib/engine-tasks/order-figures.ts), against
// closed forms and Debian's NumPy/SciPy (tests/reference/order_figures_reference.py).
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { runAnalysis } from '@/lib/engine-tasks/analysis-task';
import { keptPolesOf, modalOrderFigures } from '@/lib/engine-tasks/order-figures';
import type { AnalysisRecord, OrderFigureTable } from '@/lib/engine-tasks/records';
import { kilnWallNetwork } from '@/db/seeds/demo/models';

const dir = mkdtempSync(path.join(os.tmpdir(), 'order-figures-'));

function analyse(name: string, model: Record<string, unknown>): AnalysisRecord {
  const file = path.join(dir, `${name}.json`);
  writeFileSync(file, JSON.stringify(model));
  return runAnalysis([{ role: 'model', name: `${name}.json`, path: file }], 'test', () => {});
}

function table(t: OrderFigureTable) {
  if (!t.available) throw new Error(`figures not available: ${t.reason}`);
  return t;
}

// The real-axis stability boundary of classical RK4: the real root of 1 + z/2 + z²/6 + z³/24 = 0
// (|R(z)| = 1 for real z < 0; Hairer & Wanner, "Solving Ordinary Differential Equations II", 2nd ed. 1996,
// §IV.2), from numpy.roots([1/24, 1/6, 1/2, 1]) on Debian's NumPy 1.24.
const RK4_REAL_BOUNDARY = 2.785293563405282;

describe('modal truncation figures from the analysis mode list', () => {
  // G(s) = 1/(s+1) + 2/(s+10) + 3/(s+100): diagonal A, so each mode's dominance is |c_i b_i| / |λ_i|
  // (Antoulas 2005, §9.2): 1, 0.2, 0.03.
  const a = analyse('diag', { A: [[-1, 0, 0], [0, -10, 0], [0, 0, -100]], B: [[1], [1], [1]], C: [[1, 2, 3]] });
  const kept = keptPolesOf(a.poles, a.stabilityTolerance);

  it('ranks by dominance and bounds the error by the discarded dominances', () => {
    const t = table(a.orderFigures.modalDominance);
    expect(t.orders).toEqual([1, 2, 3]);
    expect(t.figures[1].errorBound).toBeCloseTo(0.2 + 0.03, 12);
    expect(t.figures[2].errorBound).toBeCloseTo(0.03, 12);
    expect(t.figures[3].errorBound).toBeCloseTo(0, 12);
  });

  it('gives the kept modes’ stiffness ratio and the explicit steps of their fastest pole', () => {
    const t = table(a.orderFigures.modalDominance);
    expect(t.figures[1].stiffnessRatio).toBeCloseTo(1, 12);
    expect(t.figures[2].stiffnessRatio).toBeCloseTo(10, 10);
    // forward Euler: h ≤ 2/|λ| on a real pole (Hairer & Wanner 1996, §IV.2)
    expect(t.figures[2].maxStableStepEuler).toBeCloseTo(2 / 10, 10);
    expect(t.figures[3].maxStableStepEuler).toBeCloseTo(2 / 100, 10);
    expect(t.figures[3].maxStableStepRk4).toBeCloseTo(RK4_REAL_BOUNDARY / 100, 9);
  });

  it('puts the modes inside a band first for the band rule', () => {
    const t = table(modalOrderFigures(a.modes, kept, { rule: 'band', band: [5, 20] }, true));
    // the −10 mode first: discarding −1 and −100 leaves 1 + 0.03
    expect(t.figures[1].errorBound).toBeCloseTo(1.03, 12);
    expect(t.figures[1].maxStableStepEuler).toBeCloseTo(0.2, 10);
  });

  it('counts states kept for a rigid-body mode and does not let its double pole at 0 limit the step', () => {
    // free mass (double pole at 0) beside a damped mode at −2 ± 3j
    const r = analyse('rigid', {
      A: [[0, 1, 0, 0], [0, 0, 0, 0], [0, 0, -2, 3], [0, 0, -3, -2]],
      B: [[0], [1], [1], [0]],
      C: [[1, 0, 1, 0]],
    });
    const t = table(r.orderFigures.modalDominance);
    expect(t.orders).toEqual([4]);
    expect(t.figures[4]).toMatchObject({ keptMarginal: 2, keptUnstable: 0 });
    // Euler on −2 ± 3j: −2 Re λ/|λ|² = 4/13 (Hairer & Wanner 1996, §IV.2); the poles at 0 impose nothing
    expect(t.figures[4].maxStableStepEuler).toBeCloseTo(4 / 13, 10);
  });
});

describe('balanced truncation figures', () => {
  it('match SciPy gramians and NumPy eigenvalues of the truncated model at each order', () => {
    const m = kilnWallNetwork(6, 2); // 12 states, 2 inputs, 3 outputs, real stable poles
    const a = analyse('kiln', { A: m.A, B: m.B, C: m.C });
    const t = table(a.orderFigures.balanced);
    const orders = t.orders.slice(0, 5);
    const request = path.join(dir, 'request.json');
    const response = path.join(dir, 'response.json');
    writeFileSync(request, JSON.stringify({ A: m.A, B: m.B, C: m.C, orders }));
    execFileSync('/usr/bin/python3', [path.resolve(__dirname, '../../reference/order_figures_reference.py'), request, response]);
    const ref = JSON.parse(readFileSync(response, 'utf8')) as { hsv: number[]; figures: Record<string, { bound: number; stiffness: number; euler: number }> };
    for (let i = 0; i < 5; i++) expect(a.hankelSingularValues[i]).toBeCloseTo(ref.hsv[i], 8);
    for (const r of orders) {
      const f = t.figures[r];
      const want = ref.figures[String(r)];
      expect(Math.abs(f.errorBound! - want.bound)).toBeLessThanOrEqual(1e-8 * ref.hsv[0]);
      if (r > 1) expect(f.stiffnessRatio).toBeCloseTo(want.stiffness, 6);
      expect(f.maxStableStepEuler! / want.euler).toBeCloseTo(1, 7);
    }
  });
});
