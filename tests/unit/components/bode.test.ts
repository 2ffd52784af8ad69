import { execFileSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { buildBodeOption, buildSingularValueOption, FULL_SERIES, phaseAxisRange, REDUCED_SERIES } from '@/components/charts/bode-option';
import { alignPhase, magnitudeDb, phaseDegrees, unwrapDegrees } from '@/components/charts/frequency-data';
import { FULL_LINE, INK, REDUCED_LINE } from '@/components/charts/theme';

type Series = { name: string; xAxisIndex: number; yAxisIndex: number; data: [number, number | null][]; lineStyle: { color: string; type: string } };
type Axis = { type: string; gridIndex?: number; min?: number; max?: number; interval?: number };

/** G(jω) = 1/(1 + jω)³ sampled at the given frequencies. */
function thirdOrderLag(w: number[]): { re: number[]; im: number[] } {
  const re: number[] = [];
  const im: number[] = [];
  for (const x of w) {
    // (1 + jx)³ = (1 - 3x²) + j(3x - x³); its reciprocal is the conjugate over the squared modulus.
    const a = 1 - 3 * x * x;
    const b = 3 * x - x ** 3;
    const d = a * a + b * b;
    re.push(a / d);
    im.push(-b / d);
  }
  return { re, im };
}

const W = Array.from({ length: 61 }, (_, i) => 10 ** (-2 + i / 15)); // 1e-2 .. 1e2 rad/s

describe('magnitude and phase', () => {
  it('matches the closed form of 1/(1+jω)³: -3·atan(ω) in degrees, unwrapped past -180°', () => {
    // Closed form: ∠G = -3·atan(ω), |G| = (1+ω²)^(-3/2) (product of three first-order lags).
    const g = thirdOrderLag(W);
    const phase = phaseDegrees(g);
    const db = magnitudeDb(g);
    W.forEach((x, i) => {
      expect(phase[i]).toBeCloseTo((-3 * Math.atan(x) * 180) / Math.PI, 9);
      expect(db[i]!).toBeCloseTo(-30 * Math.log10(1 + x * x), 9);
    });
    expect(phase[60]).toBeLessThan(-180);
    // at ω = 1: -3·10·log10(2) = -9.0309 dB, -135°
    const one = magnitudeDb(thirdOrderLag([1]))[0]!;
    expect(one).toBeCloseTo(-9.0309, 4);
  });

  it('unwraps like numpy.unwrap (Debian python3-numpy as reference)', () => {
    const wrapped = [170, -175, -160, 179, -179, 10, 200 - 360, -90, 95, -100, 80, 0, 181 - 360, 359 - 720];
    const script = `import json,sys,numpy as np; x=np.array(json.loads(sys.argv[1])); print(json.dumps(np.degrees(np.unwrap(np.radians(x))).tolist()))`;
    const reference = JSON.parse(execFileSync('/usr/bin/python3', ['-c', script, JSON.stringify(wrapped)], { encoding: 'utf8' })) as number[];
    const ours = unwrapDegrees(wrapped);
    ours.forEach((v, i) => expect(v).toBeCloseTo(reference[i], 9));
  });

  it('moves the reduced phase onto the branch of the full phase', () => {
    expect(alignPhase([170, 160], [-190, -200])).toEqual([-190, -200]);
    expect(alignPhase([-10, -20], [-5, 0])).toEqual([-10, -20]);
  });

  it('gives zero gain no decibel value', () => {
    expect(magnitudeDb({ re: [0, 1], im: [0, 0] })).toEqual([null, 0]);
  });

  it('ticks the phase axis on multiples of 90°', () => {
    expect(phaseAxisRange([-10, -260])).toEqual({ min: -270, max: 0, interval: 90 });
    expect(phaseAxisRange([0, -1000]).interval).toBe(180);
  });
});

describe('buildBodeOption', () => {
  const full = thirdOrderLag(W);
  const reduced = { re: full.re.map((v) => v * 1.01), im: full.im.map((v) => v * 1.01) };
  const option = buildBodeOption({ frequencies: W, full, reduced, channelLabel: 'u1 → y1' });
  const series = option.series as unknown as Series[];

  it('uses log frequency axes on both grids', () => {
    const x = option.xAxis as unknown as Axis[];
    expect(x.map((a) => [a.type, a.gridIndex])).toEqual([
      ['log', 0],
      ['log', 1],
    ]);
    expect(x[1]).toMatchObject({ min: 0.01, max: 100 });
  });

  it('draws the full model solid graphite and the reduced model dashed teal, in magnitude and phase', () => {
    const full = series.filter((s) => s.name === FULL_SERIES);
    const red = series.filter((s) => s.name === REDUCED_SERIES);
    expect(full.map((s) => s.yAxisIndex)).toEqual([0, 1]);
    expect(red.map((s) => s.yAxisIndex)).toEqual([0, 1]);
    for (const s of full) expect(s.lineStyle).toMatchObject({ color: INK.graphite, type: 'solid' });
    for (const s of red) expect(s.lineStyle).toMatchObject({ color: INK.teal, type: 'dashed' });
    expect(FULL_LINE.type).toBe('solid');
    expect(REDUCED_LINE.type).toBe('dashed');
  });

  it('plots magnitude in dB by default and on a log axis when absolute', () => {
    expect((option.yAxis as unknown as Axis[])[0].type).toBe('value');
    expect(series[0].data[0][1]).toBeCloseTo(-30 * Math.log10(1 + 1e-4), 9);
    const abs = buildBodeOption({ frequencies: W, full, magnitudeScale: 'absolute' });
    expect((abs.yAxis as unknown as Axis[])[0].type).toBe('log');
    expect((abs.series as unknown as Series[]).map((s) => s.name)).toEqual([FULL_SERIES, FULL_SERIES]);
  });

  it('rejects a bad frequency grid or response with the field named', () => {
    expect(() => buildBodeOption({ frequencies: [1, 1], full: { re: [1, 1], im: [0, 0] } })).toThrow(/frequencies must be strictly increasing/);
    expect(() => buildBodeOption({ frequencies: [0, 1], full: { re: [1, 1], im: [0, 0] } })).toThrow(/frequencies must be positive/);
    expect(() => buildBodeOption({ frequencies: [1, 2], full: { re: [1], im: [0] } })).toThrow(/full must have one sample per frequency/);
    expect(() => buildBodeOption({ frequencies: [1], full: { re: [1], im: [NaN] } })).toThrow(/full.im must hold finite numbers/);
  });
});

describe('buildSingularValueOption', () => {
  it('draws σmax of full solid graphite and reduced dashed teal on a log frequency axis', () => {
    const option = buildSingularValueOption({ frequencies: [1, 10, 100], full: [1, 0.1, 0.01], reduced: [1, 0.1, 0.02] });
    const series = option.series as unknown as Series[];
    expect((option.xAxis as unknown as Axis).type).toBe('log');
    expect(series[0].lineStyle).toMatchObject({ color: INK.graphite, type: 'solid' });
    expect(series[1].lineStyle).toMatchObject({ color: INK.teal, type: 'dashed' });
    expect(series[0].data).toEqual([[1, 0], [10, -20], [100, -40]]);
    expect(() => buildSingularValueOption({ frequencies: [1, 2], full: [1, -1] })).toThrow(/SingularValueChart: full must not be negative/);
  });
});
