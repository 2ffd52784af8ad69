/**
 * The command line's modal figures on the sparse path (reduction/cli/sparse-modes.ts): `analyze` with the
 * dense path's keys plus what the sparse path adds, and `reduce --method modal --path sparse`. Sources beside
 * each check: the dense path on the same small models (every pole, a certified H∞ norm: reduction/analysis.ts,
 * reduction/reduce.ts), whose figures the sparse path must reproduce where it computes them and bound from
 * below where it estimates; the 2-D Dirichlet Laplacian's closed-form eigenvalues (R. J. LeVeque, "Finite
 * Difference Methods for Ordinary and Partial Differential Equations", SIAM 2007, §3.4 — section from memory).
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { fromRows } from '@/reduction/linalg/matrix';
import { frequencyResponse, largestSingularValue, logFrequencyGrid } from '@/reduction/frequency';
import type { StateSpaceModel } from '@/reduction/model';
import { plateModel, relDiff, writeModel } from './sparse-support';
import { laplacianEigenvalues } from './sparse-modes-support';

const ROOT = path.resolve(__dirname, '../../..');

function cli(...args: string[]): { status: number | null; stdout: string; stderr: string } {
  const r = spawnSync(path.join(ROOT, 'node_modules/.bin/tsx'), ['reduction/cli.ts', ...args], { cwd: ROOT, encoding: 'utf8' });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

function json(r: { status: number | null; stdout: string; stderr: string }): any {
  expect(r.status, r.stderr).toBe(0);
  return JSON.parse(r.stdout);
}

const modelOf = (o: any): StateSpaceModel => ({ A: fromRows(o.A), B: fromRows(o.B), C: fromRows(o.C), D: fromRows(o.D) });

describe('analyze on the sparse path beside the dense path (5-point Laplacian, N = 12, 144 states)', () => {
  const N = 12;
  const dir = writeModel(plateModel(N, { inputs: 2, outputs: 2 }));
  const files = ['A.mtx', 'B.mtx', 'C.mtx'].map((x) => path.join(dir, x));
  const sparse = json(cli('analyze', ...files, '--path', 'sparse', '--pole-count', '5'));
  const dense = json(cli('analyze', ...files, '--path', 'dense'));

  it("has every key of the dense path's document, plus polesComplete, hsvComplete, gramianResidual and estimated", () => {
    const denseOnly = ['hInfinityNormCertificate'];
    for (const k of Object.keys(dense)) if (!denseOnly.includes(k)) expect(sparse, `key ${k}`).toHaveProperty(k);
    expect(sparse.engine.path).toBe('sparse');
    expect(sparse.polesComplete).toBe(false);
    expect(sparse.hsvComplete).toBe(false);
    expect(typeof sparse.gramianResidual).toBe('object');
    for (const k of sparse.estimated) expect(sparse, `estimated key ${k}`).toHaveProperty(k);
    for (const k of ['poles', 'stiffnessRatio', 'stepLimits', 'modalDominance', 'hInfinityNorm', 'hankelSingularValues', 'h2Norm']) expect(sparse.estimated).toContain(k);
  });

  it('computes the slowest poles to the closed form (LeVeque 2007), each a pole of the dense path', () => {
    const exact = laplacianEigenvalues(N); // slowest first
    const poles: [number, number][] = sparse.poles;
    const slow = poles.map((p) => p[0]).sort((a, b) => b - a).slice(0, 5);
    for (let i = 0; i < 5; i++) expect(relDiff(slow[i], exact[i])).toBeLessThan(1e-12);
    for (const [re, im] of poles) {
      const near = Math.min(...dense.poles.map((q: [number, number]) => Math.hypot(q[0] - re, q[1] - im)));
      expect(near / Math.hypot(re, im)).toBeLessThan(1e-9);
    }
    expect(sparse.poleResiduals.every((r: number) => r < 1e-8)).toBe(true);
  });

  it('reproduces the stiffness ratio, step limits and zero-frequency gain, and bounds ‖G‖∞ from below', () => {
    // Here the slowest and fastest poles are among those computed, so the ratio and the limits agree.
    expect(relDiff(sparse.stiffnessRatio, dense.stiffnessRatio)).toBeLessThan(1e-8);
    expect(relDiff(sparse.stepLimits.forwardEuler.maxStep, dense.stepLimits.forwardEuler.maxStep)).toBeLessThan(1e-8);
    expect(relDiff(sparse.stepLimits.rk4.maxStep, dense.stepLimits.rk4.maxStep)).toBeLessThan(1e-8);
    for (let r = 0; r < 2; r++) for (let c = 0; c < 2; c++) expect(relDiff(sparse.zeroFrequencyGain[r][c], dense.zeroFrequencyGain[r][c])).toBeLessThan(1e-10);
    expect(sparse.hInfinityNorm).toBeLessThanOrEqual(dense.hInfinityNorm * (1 + 1e-10));
    expect(relDiff(sparse.hInfinityNorm, dense.hInfinityNorm)).toBeLessThan(1e-6);
    expect(sparse.stable).toBe(true);
    // The dominant poles are poles of the dense path, with its dominance figures where the pole is simple (the
    // residues of a multiple pole, λ(j,k) = λ(k,j) here, depend on the basis chosen in its eigenspace).
    let simple = 0;
    for (const m of sparse.modalDominance.modes) {
      const same = dense.modalDominance.modes.filter((q: any) => Math.hypot(q.pole[0] - m.pole[0], q.pole[1] - m.pole[1]) < 1e-8 * Math.abs(m.pole[0]));
      expect(same.length).toBeGreaterThan(0);
      if (same.length > 1) continue;
      simple++;
      expect(relDiff(m.dominance, same[0].dominance)).toBeLessThan(1e-6);
    }
    expect(simple).toBeGreaterThan(0);
  });
});

describe('reduce --method modal on the sparse path', () => {
  // Convection–diffusion (nonsymmetric), 2 inputs and 2 outputs, 196 states: small enough for the dense path.
  const dir = writeModel(plateModel(14, { convection: 15, inputs: 2, outputs: 2 }));
  const files = ['A.mtx', 'B.mtx', 'C.mtx'].map((x) => path.join(dir, x));

  it('--keep slowest: the same reduced model as the dense path; the sampled error bounds the certified one from below', () => {
    const sparse = json(cli('reduce', ...files, '--path', 'sparse', '--method', 'modal', '--keep', 'slowest', '--order', '6', '--error-points', '30'));
    const dense = json(cli('reduce', ...files, '--path', 'dense', '--method', 'modal', '--keep', 'slowest', '--order', '6'));
    expect(sparse.engine.path).toBe('sparse');
    expect(sparse.order).toBe(dense.order);
    expect(sparse.errorBound).toBeNull();
    expect(sparse.polesComplete).toBe(false);
    expect(sparse.estimated).toContain('hInfinityError');
    const w = logFrequencyGrid(0.1, 1e5, 50);
    const a = frequencyResponse(modelOf(dense), w).response, b = frequencyResponse(modelOf(sparse), w).response;
    for (let k = 0; k < w.length; k++) {
      const d = { re: { ...a[k].re, data: a[k].re.data.map((x, i) => x - b[k].re.data[i]) }, im: { ...a[k].im, data: a[k].im.data.map((x, i) => x - b[k].im.data[i]) } };
      expect(largestSingularValue(d)).toBeLessThanOrEqual(1e-8 * largestSingularValue(a[k]));
    }
    expect(sparse.hInfinityError).toBeLessThanOrEqual(dense.hInfinityError * (1 + 1e-8));
    expect(relDiff(sparse.hInfinityError, dense.hInfinityError)).toBeLessThan(5e-2);
    // Computed modes beyond those kept make the lower estimate of the modal bound positive.
    expect(sparse.discardedComputedBound).toBeGreaterThan(0);
    expect(sparse.discardedComputedBound).toBeLessThanOrEqual(dense.errorBound * (1 + 1e-8));
  });

  it('refuses --tolerance (its bound needs every discarded mode), exit 2 naming the option', () => {
    const r = cli('reduce', ...files, '--path', 'sparse', '--method', 'modal', '--tolerance', '1e-3');
    expect(r.status).toBe(2);
    expect(r.stderr).toContain('field: tolerance');
  });
});
