import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { toRows } from '../../../reduction/linalg/matrix';
import { randomStableModel } from '../../fixtures/engine/models';

const ROOT = resolve(__dirname, '../../..');
const FIX = 'tests/fixtures/engine';

function cli(...args: string[]): { status: number | null; stdout: string; stderr: string } {
  const r = spawnSync('npx', ['tsx', 'reduction/cli.ts', ...args], { cwd: ROOT, encoding: 'utf8' });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

function json(args: string[]): Record<string, unknown> {
  const r = cli(...args);
  if (r.status !== 0) throw new Error(`cli ${args.join(' ')} exited ${r.status}: ${r.stderr}`);
  return JSON.parse(r.stdout) as Record<string, unknown>;
}

let dir: string;
let randomPath: string;

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'modeshelf-cli-'));
  const m = randomStableModel(801, 12, 2, 2);
  randomPath = join(dir, 'random.json');
  writeFileSync(randomPath, JSON.stringify({ A: toRows(m.A), B: toRows(m.B), C: toRows(m.C), D: toRows(m.D) }));
});

afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('cli analyze', () => {
  it('prints the contract keys for a JSON model; 3/(s+2) has HSV k/(2a), H∞ k/a, H2 k/√(2a) (closed forms)', () => {
    const out = json(['analyze', `${FIX}/first-order-lag.json`]);
    for (const key of ['states', 'inputs', 'outputs', 'poles', 'stable', 'stiffnessRatio', 'hankelSingularValues', 'hInfinityNorm', 'h2Norm', 'zeroFrequencyGain']) {
      expect(out).toHaveProperty(key);
    }
    // 3/(s+2): pole −2, HSV 3/4, ‖G‖∞ = 3/2 at ω = 0, ‖G‖₂ = 3/√4 = 1.5, G(0) = 1.5 (closed forms).
    expect(out.states).toBe(1);
    expect(out.poles).toEqual([[-2, 0]]);
    expect(out.stable).toBe(true);
    expect(out.hankelSingularValues).toEqual([expect.closeTo(0.75, 12)]);
    expect(out.hInfinityNorm).toBeCloseTo(1.5, 12);
    expect(out.h2Norm).toBeCloseTo(1.5, 12);
    expect(out.zeroFrequencyGain).toEqual([[expect.closeTo(1.5, 12)]]);
  });

  it('reads Matrix Market A, B, C files and reports the rigid-body poles, with DC gain not defined', () => {
    const out = json(['analyze', `${FIX}/rigid-body/A.mtx`, `${FIX}/rigid-body/B.mtx`, `${FIX}/rigid-body/C.mtx`]);
    expect(out.states).toBe(4);
    expect(out.stable).toBe(false);
    expect(out.marginalPoles).toBe(2);
    expect(out.zeroFrequencyGain).toBeNull();
    expect(out.zeroFrequencyGainNote).toMatch(/s = 0/);
    expect(out.hInfinityNorm).toBeNull();
    // Stable part (1/2)/(s² + 0.2s + 2): two HSVs.
    expect((out.hankelSingularValues as number[]).length).toBe(2);
  });

  it('reads CSV A, B, C, D files: a resonance with ωn = 2, ζ = 0.1 and D = 0.5', () => {
    const out = json(['analyze', ...['A', 'B', 'C', 'D'].map((m) => `${FIX}/resonant/${m}.csv`)]);
    const poles = out.poles as [number, number][];
    for (const [re, im] of poles) {
      expect(re).toBeCloseTo(-0.2, 12);
      expect(Math.abs(im)).toBeCloseTo(2 * Math.sqrt(0.99), 12);
    }
    // G(0) = 1 + D = 1.5; H2 is not finite with D ≠ 0.
    expect(out.zeroFrequencyGain).toEqual([[expect.closeTo(1.5, 12)]]);
    expect(out.h2Norm).toBeNull();
  });
});

describe('cli reduce', () => {
  it('balanced --order 4 prints the reduced model with its bound, which covers the measured error', () => {
    const out = json(['reduce', randomPath, '--method', 'balanced', '--order', '4']);
    for (const key of ['method', 'order', 'A', 'B', 'C', 'D', 'errorBound', 'hInfinityError', 'hankelSingularValues']) {
      expect(out).toHaveProperty(key);
    }
    expect(out.method).toBe('balanced');
    expect(out.order).toBe(4);
    expect((out.A as number[][]).length).toBe(4);
    expect((out.B as number[][])[0].length).toBe(2);
    expect((out.C as number[][]).length).toBe(2);
    const hsv = out.hankelSingularValues as number[];
    expect(out.hInfinityError as number).toBeGreaterThanOrEqual(hsv[4] * (1 - 1e-7));
    expect(out.hInfinityError as number).toBeLessThanOrEqual((out.errorBound as number) * (1 + 1e-7));
  });

  it('residualization --tolerance picks an order whose bound meets tolerance·‖G‖∞', () => {
    const out = json(['reduce', randomPath, '--method', 'residualization', '--tolerance', '0.01']);
    expect(out.orderRule).toBe('tolerance');
    expect(out.errorBound as number).toBeLessThanOrEqual(0.01 * (out.referenceNorm as number));
    expect(out.zeroFrequencyGainError as number).toBeLessThan(1e-9);
  });

  it('modal keeps the rigid-body poles of the Matrix Market model and says so', () => {
    const out = json([
      'reduce',
      `${FIX}/rigid-body/A.mtx`,
      `${FIX}/rigid-body/B.mtx`,
      `${FIX}/rigid-body/C.mtx`,
      '--method=modal',
      '--order=2',
    ]);
    expect(out.order).toBe(2);
    expect(out.unstableStatesKept).toBe(2);
    expect(out.hankelSingularValues).toBeNull();
  });
});

describe('cli sweep', () => {
  it('prints G(jω) per frequency: k/(jω+a) for the JSON lag (closed form), with the unit', () => {
    const out = json(['sweep', `${FIX}/first-order-lag.json`, '--at', '0,2,20']) as {
      frequencies: number[];
      frequencyUnit: string;
      response: { re: number[][]; im: number[][] }[];
      largestSingularValue: number[];
    };
    expect(out.frequencies).toEqual([0, 2, 20]);
    expect(out.frequencyUnit).toBe('rad/s');
    out.frequencies.forEach((w, k) => {
      expect(out.response[k].re[0][0]).toBeCloseTo(6 / (4 + w * w), 12);
      expect(out.response[k].im[0][0]).toBeCloseTo((-3 * w) / (4 + w * w), 12);
      // |k/(jω+a)| = k/√(a²+ω²) for the SISO lag
      expect(out.largestSingularValue[k]).toBeCloseTo(3 / Math.sqrt(4 + w * w), 12);
    });
  });

  it('--grid LOW,HIGH --count N: N log-spaced frequencies from LOW to HIGH inclusive', () => {
    const out = json(['sweep', `${FIX}/first-order-lag.json`, '--grid', '0.1,1000', '--count', '5']) as { frequencies: number[] };
    expect(out.frequencies).toHaveLength(5);
    [0.1, 1, 10, 100, 1000].forEach((w, k) => expect(out.frequencies[k] / w).toBeCloseTo(1, 12));
  });

  it('refuses both or neither of --at and --grid, a bad grid and --count without --grid, naming the option', () => {
    expect(cli('sweep', `${FIX}/first-order-lag.json`).stderr).toMatch(/--at w1,w2,… or a log-spaced grid as --grid LOW,HIGH/);
    expect(cli('sweep', `${FIX}/first-order-lag.json`, '--at', '1', '--grid', '1,10').stderr).toMatch(/field: at/);
    expect(cli('sweep', `${FIX}/first-order-lag.json`, '--grid', '10,1').stderr).toMatch(/--grid must be LOW,HIGH with 0 < LOW < HIGH/);
    expect(cli('sweep', `${FIX}/first-order-lag.json`, '--at', '1', '--count', '5').stderr).toMatch(/--count applies to --grid only/);
    expect(cli('sweep', `${FIX}/first-order-lag.json`, '--at', '-1').stderr).toMatch(/--at frequencies must be ≥ 0/);
  });
});

describe('cli errors', () => {
  it('names the matrix and the problem for a non-square A, exit non-zero', () => {
    const r = cli('analyze', `${FIX}/bad/A-not-square.mtx`, `${FIX}/rigid-body/B.mtx`, `${FIX}/rigid-body/C.mtx`);
    expect(r.status).not.toBe(0);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(/A must be square/);
  });

  it('names the file, row and column of a non-numeric CSV cell', () => {
    const r = cli('analyze', `${FIX}/bad/A-non-numeric.csv`, `${FIX}/resonant/B.csv`, `${FIX}/resonant/C.csv`);
    expect(r.status).not.toBe(0);
    expect(r.stderr).toMatch(/A-non-numeric\.csv.*row 2, column 1/);
  });

  it('refuses an order above the stable part, naming the order', () => {
    const r = cli('reduce', randomPath, '--method', 'balanced', '--order', '40');
    expect(r.status).not.toBe(0);
    expect(r.stderr).toMatch(/order 40 is larger/);
    expect(r.stderr).toMatch(/field: order/);
  });

  it('rejects an unknown method, an unknown option and a non-numeric frequency', () => {
    expect(cli('reduce', randomPath, '--method', 'fastest', '--order', '2').stderr).toMatch(/--method must be one of/);
    expect(cli('analyze', randomPath, '--frobnicate', '1').stderr).toMatch(/unknown option --frobnicate/);
    expect(cli('sweep', randomPath, '--at', '1,abc').stderr).toMatch(/--at must be a number, got "abc"/);
    expect(cli('transmogrify', randomPath).status).not.toBe(0);
  });
});
