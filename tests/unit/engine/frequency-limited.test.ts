/**
 * Frequency-limited balanced truncation (Gawronski & Juang, Int. J. Systems Science 21(2), 1990), issue 15:
 * the matrix logarithm, the band integral S(ω) and the frequency-limited gramians against Debian's scipy
 * (tests/reference/frequency_limited_reference.py: scipy.linalg.logm, solve_continuous_lyapunov, and a
 * quad_vec quadrature of the defining integral), closed forms, and the in-band advantage over plain
 * balanced truncation on a lightly damped structural model (invented data).
 */
import { describe, expect, it } from 'vitest';
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import {
  bandErrors,
  bandIntegral,
  frequencyLimitedGramians,
  frequencyLimitedRealization,
  frequencyLimitedReduction,
  gaussLegendre01,
  matrixLogarithm,
} from '@/reduction/frequency-limited';
import { hankelSingularValues } from '@/reduction/balanced';
import { reduceModel } from '@/reduction/reduce';
import { ModelError } from '@/reduction/errors';
import { type Matrix, fromRows, toRows, zeros } from '@/reduction/linalg/matrix';
import { inverse, matmul } from '@/reduction/linalg';
import type { StateSpaceModel } from '@/reduction/model';
import { randomMatrix, seeded } from './simulate-reference';

const ROOT = path.resolve(__dirname, '../../..');
const SCRIPT = path.resolve(__dirname, '../../reference/frequency_limited_reference.py');
function scipy<T>(request: Record<string, unknown>): T {
  return JSON.parse(execFileSync('/usr/bin/python3', [SCRIPT], { input: JSON.stringify(request), maxBuffer: 1 << 26 }).toString()) as T;
}

function relErr(a: Matrix, b: number[][]): number {
  let d = 0;
  let s = 0;
  for (let i = 0; i < a.rows; i++) {
    for (let j = 0; j < a.cols; j++) {
      d = Math.max(d, Math.abs(a.data[i * a.cols + j] - b[i][j]));
      s = Math.max(s, Math.abs(b[i][j]));
    }
  }
  return d / s;
}

/**
 * A lightly damped structure in a dense realization: modes at 1, 4, 15 and 50 rad/s with damping ratio
 * 0.02 (blocks [[0, 1], [−ω², −2ζω]]), made dense by a seeded well-conditioned similarity; two inputs,
 * two outputs. Invented data.
 */
function structure(seed = 5): StateSpaceModel {
  const freqs = [1, 4, 15, 50];
  const zeta = 0.02;
  const n = 2 * freqs.length;
  const L = zeros(n, n);
  freqs.forEach((w, k) => {
    const i = 2 * k;
    L.data[i * n + i + 1] = 1;
    L.data[(i + 1) * n + i] = -w * w;
    L.data[(i + 1) * n + i + 1] = -2 * zeta * w;
  });
  const rand = seeded(seed);
  const T = randomMatrix(n, n, rand);
  for (let k = 0; k < T.data.length; k++) T.data[k] *= 0.3 / Math.sqrt(n);
  for (let i = 0; i < n; i++) T.data[i * n + i] += 1;
  return { A: matmul(matmul(T, L), inverse(T)), B: randomMatrix(n, 2, rand), C: randomMatrix(2, n, rand), D: zeros(2, 2) };
}

describe('building blocks against closed forms and scipy.linalg.logm', () => {
  it('Gauss–Legendre on [0, 1]: the 3-point rule is ½ ± √15/10 with weights 5/18, 4/9 (Abramowitz & Stegun 25.4.29, as recalled); 8 points integrate t¹⁵ exactly', () => {
    const g3 = gaussLegendre01(3);
    expect(g3.nodes[0]).toBeCloseTo(0.5 - Math.sqrt(15) / 10, 15);
    expect(g3.nodes[1]).toBeCloseTo(0.5, 15);
    expect(g3.weights[0]).toBeCloseTo(5 / 18, 15);
    expect(g3.weights[1]).toBeCloseTo(4 / 9, 15);
    const g8 = gaussLegendre01(8);
    const integral = g8.nodes.reduce((s, t, k) => s + g8.weights[k] * t ** 15, 0);
    expect(integral).toBeCloseTo(1 / 16, 14);
  });

  it('log of a non-normal matrix with a spread spectrum agrees with scipy.linalg.logm to 1e-10', () => {
    // Real form of −A − jωI for the structure at ω = 8: eigenvalues from about 0.02 to 60 in modulus.
    const A = structure().A;
    const n = A.rows;
    const w = 8;
    const M = zeros(2 * n, 2 * n);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        M.data[i * 2 * n + j] = -A.data[i * n + j];
        M.data[(n + i) * 2 * n + n + j] = -A.data[i * n + j];
      }
      M.data[i * 2 * n + n + i] = w;
      M.data[(n + i) * 2 * n + i] = -w;
    }
    const ref = scipy<{ logm: number[][] }>({ op: 'logm', M: toRows(M) });
    expect(relErr(matrixLogarithm(M), ref.logm)).toBeLessThan(1e-10);
    // A triangular case by hand: log [[2, 1], [0, 3]] = [[ln 2, ln(3/2)], [0, ln 3]] (divided difference).
    const L = matrixLogarithm(fromRows([[2, 1], [0, 3]]));
    expect(L.data[0]).toBeCloseTo(Math.LN2, 14);
    expect(L.data[1]).toBeCloseTo(Math.log(1.5), 14);
    expect(L.data[3]).toBeCloseTo(Math.log(3), 14);
  });

  it('S(ω) of a scalar a < 0 is arctan(ω/|a|)/π, and tends to ½ as ω → ∞ (from the defining integral)', () => {
    expect(bandIntegral(fromRows([[-2]]), 3).data[0]).toBeCloseTo(Math.atan(1.5) / Math.PI, 14);
    expect(bandIntegral(fromRows([[-2]]), 1e9).data[0]).toBeCloseTo(0.5, 8);
    expect(bandIntegral(fromRows([[-2]]), 0).data[0]).toBe(0);
  });
});

describe('frequency-limited gramians of a lightly damped structure against scipy', () => {
  const model = structure();
  for (const band of [
    [0, 8],
    [3, 20],
  ] as const) {
    it(`band [${band[0]}, ${band[1]}] rad/s: S, P_Ω, Q_Ω and the singular values agree with scipy; P_Ω with the quadrature of its integral`, () => {
      const ref = scipy<{ S: number[][]; P_band: number[][]; Q_band: number[][]; P_quad: number[][]; sigma: number[] }>({
        op: 'gramians', A: toRows(model.A), B: toRows(model.B), C: toRows(model.C), band,
      });
      const g = frequencyLimitedGramians(model, band);
      expect(relErr(g.bandIntegral, ref.S)).toBeLessThan(1e-9);
      expect(relErr(g.controllability, ref.P_band)).toBeLessThan(1e-8);
      expect(relErr(g.observability, ref.Q_band)).toBeLessThan(1e-8);
      // The closed form against the integral itself (Gawronski & Juang 1990, the definition of P_Ω).
      expect(relErr(g.controllability, ref.P_quad)).toBeLessThan(1e-7);
      const s = frequencyLimitedRealization(model, band).singularValues;
      for (let k = 0; k < 4; k++) expect(Math.abs(s[k] - ref.sigma[k]) / ref.sigma[0]).toBeLessThan(1e-7);
    });
  }

  it('over (almost) the whole axis the frequency-limited singular values become the Hankel singular values', () => {
    const s = frequencyLimitedRealization(model, [0, 1e7]).singularValues;
    const hsv = hankelSingularValues(model);
    // S(ω) = ½I − O(‖A‖/ω): about 1e-5 relative at ω = 1e7 for poles up to 50 rad/s.
    for (let k = 0; k < hsv.length; k++) expect(Math.abs(s[k] - hsv[k]) / hsv[0]).toBeLessThan(1e-4);
  });
});

describe('reduction on the band', () => {
  const model = structure();
  // Measured on this model (σ_max of G − Gr on 200-point log grids): [0, 8] at 4 states, in-band 1.26
  // against plain balanced truncation's 9.17; [10, 60] at 4 states, 0.175 against 21.8. Outside the band
  // plain balanced truncation is the better one (27.5 against 21.5; 36.8 against 8.57).
  for (const [band, inBandRatio] of [
    [[0, 8], 0.25],
    [[10, 60], 0.05],
  ] as const) {
    it(`inside [${band[0]}, ${band[1]}] rad/s its error at 4 states is well below plain balanced truncation’s; outside it is larger`, () => {
      const fl = frequencyLimitedReduction(model, { band, order: 4 });
      const bt = reduceModel(model, { method: 'balanced', order: 4 });
      const btErrors = bandErrors(model, bt.model, band);
      expect(fl.order).toBe(4);
      expect(fl.errors.inBand).toBeLessThan(inBandRatio * btErrors.inBand);
      expect(fl.errors.outOfBand).toBeGreaterThan(btErrors.outOfBand);
      expect(fl.notes.join(' ')).toMatch(/no a-priori error bound/);
      expect(fl.reducedStable).toBe(true);
      expect(fl.hInfinityError).not.toBeNull();
      // ‖G − Gr‖∞ bounds every grid value from above (up to the H∞ algorithm's relative tolerance).
      expect(fl.hInfinityError!).toBeGreaterThanOrEqual(Math.max(fl.errors.inBand, fl.errors.outOfBand) * (1 - 1e-6));
    });
  }

  it('refuses a bad band and an order outside 0…n', () => {
    expect(() => frequencyLimitedReduction(model, { band: [5, 2], order: 2 })).toThrow(ModelError);
    expect(() => frequencyLimitedReduction(model, { band: [0, 8], order: 9 })).toThrow(/order must be a whole number from 0/);
  });

  it('the command line: reduce --method frequency-limited --band 0,8 --order 4, and a clean refusal without --band', () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'modeshelf-fl-'));
    try {
      const file = path.join(dir, 'structure.json');
      writeFileSync(file, JSON.stringify({ A: toRows(model.A), B: toRows(model.B), C: toRows(model.C), D: toRows(model.D) }));
      const ok = spawnSync('npx', ['tsx', 'reduction/cli.ts', 'reduce', file, '--method', 'frequency-limited', '--band', '0,8', '--order', '4'], { cwd: ROOT, encoding: 'utf8' });
      expect(ok.status).toBe(0);
      const out = JSON.parse(ok.stdout) as Record<string, unknown>;
      expect(out).toMatchObject({ method: 'frequency-limited', band: [0, 8], order: 4, errorBound: null, reducedStable: true });
      expect((out.A as number[][]).length).toBe(4);
      expect(out.inBandError as number).toBeLessThan(out.outOfBandError as number);
      const bad = spawnSync('npx', ['tsx', 'reduction/cli.ts', 'reduce', file, '--method', 'frequency-limited', '--order', '4'], { cwd: ROOT, encoding: 'utf8' });
      expect(bad.status).toBe(2);
      expect(bad.stderr).toMatch(/needs --band W1,W2/);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
