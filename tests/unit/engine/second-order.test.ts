/**
 * Second-order structural models M q̈ + D q̇ + K q = F u in first-order form x = [q; q̇]
 * (Tisseur & Meerbergen, SIAM Review 43(2), 2001, §3.4), and their validation.
 */
import { describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { ModelError } from '@/reduction/errors';
import { parseModelJson, secondOrderToFirstOrder } from '@/reduction/io';
import { eigenvalues } from '@/reduction/linalg';
import { fromRows, toRows } from '@/reduction/linalg/matrix';

const BAD = path.resolve(__dirname, '../../fixtures/engine/io/bad');
const GOOD = path.resolve(__dirname, '../../fixtures/engine/io/good');

function caught(fn: () => unknown): ModelError {
  try {
    fn();
  } catch (e) {
    if (e instanceof ModelError) return e;
    throw e;
  }
  throw new Error('expected a ModelError');
}

describe('second-order to first-order', () => {
  it('builds the companion form of a 1-DOF mass-spring-damper by hand', () => {
    // m = 2, c = 0.4, k = 8: A = [[0, 1], [-k/m, -c/m]], B = [[0], [1/m]], C = [Cd, Cv].
    const m = parseModelJson(readFileSync(path.join(GOOD, 'msd_1dof.json'), 'utf8'));
    expect(toRows(m.A)).toEqual([
      [0, 1],
      [-4, -0.2],
    ]);
    expect(toRows(m.B)).toEqual([[0], [0.5]]);
    expect(toRows(m.C)).toEqual([[1, 0.5]]);
    expect(m.labels).toEqual({ states: ['q', 'd(q)/dt'] });
    expect(m.timeBase).toBe('s');
  });

  it('has poles −ζω ± iω√(1−ζ²) with ω = √(k/m), ζ = c/(2√(km)) (any vibration text, e.g. Meirovitch 1986)', () => {
    const m = parseModelJson(readFileSync(path.join(GOOD, 'msd_1dof.json'), 'utf8'));
    const ev = eigenvalues(m.A);
    const w = 2;
    const zeta = 0.05;
    const re = Array.from(ev.re);
    const im = Array.from(ev.im).map(Math.abs);
    for (let k = 0; k < 2; k++) {
      expect(re[k]).toBeCloseTo(-zeta * w, 12);
      expect(im[k]).toBeCloseTo(w * Math.sqrt(1 - zeta * zeta), 12);
    }
  });

  it('matches numpy.linalg.solve for M⁻¹K, M⁻¹D, M⁻¹F on a 3-DOF chain (Debian python3-numpy)', () => {
    const M = [[2, 0.5, 0], [0.5, 3, 0.2], [0, 0.2, 1.5]];
    const K = [[20, -10, 0], [-10, 20, -10], [0, -10, 10]];
    const Dm = [[0.2, -0.1, 0], [-0.1, 0.2, -0.1], [0, -0.1, 0.1]];
    const F = [[1, 0], [0, 0], [0, 1]];
    const ref = JSON.parse(
      execFileSync('/usr/bin/python3', [
        '-c',
        'import json,sys,numpy as np; d=json.load(sys.stdin); M=np.array(d["M"]);' +
          'print(json.dumps({k: np.linalg.solve(M, np.array(d[k])).tolist() for k in ("K","D","F")}))',
      ], { input: JSON.stringify({ M, K, D: Dm, F }) }).toString(),
    ) as Record<string, number[][]>;
    const m = secondOrderToFirstOrder({
      mass: fromRows(M),
      damping: fromRows(Dm),
      stiffness: fromRows(K),
      force: fromRows(F),
      velocityOutput: fromRows([[0, 0, 1]]),
    });
    for (let i = 0; i < 3; i++) {
      for (let j = 0; j < 3; j++) {
        expect(m.A.data[i * 6 + 3 + j]).toBe(i === j ? 1 : 0);
        expect(m.A.data[(3 + i) * 6 + j]).toBeCloseTo(-ref.K[i][j], 12);
        expect(m.A.data[(3 + i) * 6 + 3 + j]).toBeCloseTo(-ref.D[i][j], 12);
      }
      for (let j = 0; j < 2; j++) {
        expect(m.B.data[i * 2 + j]).toBe(0);
        expect(m.B.data[(3 + i) * 2 + j]).toBeCloseTo(ref.F[i][j], 12);
      }
    }
    expect(toRows(m.C)).toEqual([[0, 0, 0, 0, 0, 1]]);
  });
});

describe('second-order validation (malformed files)', () => {
  const cases: [string, string, string, RegExp][] = [
    ['mass_singular_rank2.json', 'singular_mass', 'mass', /mass is singular to working precision/],
    ['mass_nearly_singular.json', 'singular_mass', 'mass', /reciprocal condition number/],
    ['second_order_no_outputs.json', 'missing_field', 'displacementOutput', /needs displacementOutput or velocityOutput/],
    ['stiffness_size_mismatch.json', 'dimension_mismatch', 'stiffness', /stiffness is 3×3 but mass is 2×2/],
    ['output_rows_mismatch.json', 'dimension_mismatch', 'velocityOutput', /velocityOutput has 2 rows but displacementOutput has 1/],
  ];
  for (const [file, code, field, message] of cases) {
    it(`${file}: ${code} on ${field}`, () => {
      const e = caught(() => parseModelJson(readFileSync(path.join(BAD, file), 'utf8'), file));
      expect(e.code).toBe(code);
      expect(e.field).toBe(field);
      expect(e.message).toMatch(message);
    });
  }

  it('accepts a badly scaled but well-conditioned mass (relative, not absolute, check)', () => {
    const m = secondOrderToFirstOrder({
      mass: fromRows([[1e-9, 0], [0, 2e-9]]),
      stiffness: fromRows([[2, -1], [-1, 2]]),
      force: fromRows([[1], [0]]),
      displacementOutput: fromRows([[1, 0]]),
    });
    expect(m.A.data[2 * 4 + 0]).toBeCloseTo(-2e9, 0);
  });
});
