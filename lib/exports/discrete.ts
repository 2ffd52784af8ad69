// The discretised export: the zero-order-hold equivalent of a registered (continuous-time) reduced model at
// a controller's sample time, by the engine's exact ZOH (reduction/discretize.ts: Van Loan 1978, augmented
// matrix exponential), with its discrete poles and a check that the sample time resolves the kept dynamics.
//
// The check (common practice, not a published bound): at least five samples per fastest kept time
// constant, i.e. warn when ts > SAMPLE_TIME_FRACTION * tau_min with SAMPLE_TIME_FRACTION = 0.2. The time
// constant of a pole is taken as 1/|lambda| (for a real pole its usual time constant, for a complex pair
// 1/omega_n, which also keeps ts well below the Nyquist limit pi/omega_d); poles at the origin (integrators,
// rigid-body modes) have none and are left out.
//
// Sample times travel in seconds; a model whose time unit is not seconds is discretised at ts converted
// into its own unit.
import { discretePoles, discretizeZoh, fromRows, modelPoles, ModelError, toRows, type StateSpaceModel } from '@/reduction/index';
import { DEFAULT_STABILITY_TOLERANCE } from '@/reduction/poles';
import { ApiError } from '@/lib/http';
import { matricesSha256, type StateSpaceRows } from '@/lib/checksums';
import type { ExportSource, RegisteredMatrices } from './source';

export const SAMPLE_TIME_FRACTION = 0.2;
/** Seconds per unit for the time units a model may state; others cannot be discretised at a ts in seconds. */
export const TIME_BASE_SECONDS: Readonly<Record<string, number>> = { s: 1, ms: 1e-3, us: 1e-6, 'µs': 1e-6, min: 60, h: 3600 };
export const MAX_SAMPLE_TIME_SECONDS = 86_400;

export interface DiscretePole {
  re: number;
  im: number;
  magnitude: number;
}

export interface SampleTimeCheck {
  /** Seconds; null when every kept pole is at the origin. */
  fastestTimeConstant: number | null;
  fraction: number;
  /** fraction * fastestTimeConstant, seconds. */
  largestAdvisedTs: number | null;
  resolvesDynamics: boolean;
  warning: string | null;
}

export interface Discretisation {
  method: 'zero-order hold';
  /** Seconds. */
  ts: number;
  /** ts in the model's own time unit (what the ZOH was computed at). */
  tsInModelUnit: number;
  tsSource: 'query' | 'project';
  matrices: RegisteredMatrices;
  matricesSha256: string;
  poles: DiscretePole[];
  check: SampleTimeCheck;
}

/**
 * Reads `ts` as the query gives it: a positive decimal number of seconds, or "project" for the project's
 * sample time. Throws a 400 naming `ts` otherwise.
 */
export function parseSampleTime(raw: string | undefined | null, projectSampleTime: number | null): { ts: number; source: 'query' | 'project' } | null {
  if (raw === undefined || raw === null) return null;
  if (raw === 'project') {
    if (projectSampleTime === null) {
      throw new ApiError(400, 'invalid_request', 'ts: this project has no sample time set; give ts in seconds, e.g. ts=0.001.', 'ts');
    }
    return { ts: projectSampleTime, source: 'project' };
  }
  if (!/^(\d+(\.\d*)?|\.\d+)([eE][-+]?\d+)?$/.test(raw)) {
    throw new ApiError(400, 'invalid_request', `ts: "${raw.slice(0, 40)}" is not a sample time; give a positive number of seconds, e.g. ts=0.001, or ts=project.`, 'ts');
  }
  const ts = Number(raw);
  if (!Number.isFinite(ts) || ts <= 0) {
    throw new ApiError(400, 'invalid_request', `ts: the sample time must be a positive number of seconds, got ${raw.slice(0, 40)}.`, 'ts');
  }
  if (ts > MAX_SAMPLE_TIME_SECONDS) {
    throw new ApiError(400, 'invalid_request', `ts: the sample time must be at most ${MAX_SAMPLE_TIME_SECONDS} s.`, 'ts');
  }
  return { ts, source: 'query' };
}

export function unitSeconds(timeBase: string): number {
  const factor = TIME_BASE_SECONDS[timeBase];
  if (factor === undefined) {
    throw new ApiError(
      422,
      'unknown_time_base',
      `The model's time unit "${timeBase}" is not one of ${Object.keys(TIME_BASE_SECONDS).join(', ')}, so a sample time in seconds cannot be applied to it.`,
      'ts',
    );
  }
  return factor;
}

/**
 * The sample-time check on the continuous poles (in the model's unit; unitToSeconds converts). `scale` is
 * the size of A (its infinity norm): a pole whose modulus is below 1e-10 of it is taken to be at the origin,
 * since eigenvalues of a singular A come back at rounding level rather than exactly zero.
 */
export function checkSampleTime(
  poles: { re: ArrayLike<number>; im: ArrayLike<number> },
  tsSeconds: number,
  unitToSeconds: number,
  scale: number,
): SampleTimeCheck {
  // At the origin: within the stability tolerance of 0, the engine's rule for a pole at s = 0 (reduction/poles.ts).
  const origin = DEFAULT_STABILITY_TOLERANCE * scale;
  let fastestRate = 0;
  for (let i = 0; i < poles.re.length; i++) {
    const modulus = Math.hypot(poles.re[i], poles.im[i]);
    if (modulus > origin && modulus > fastestRate) fastestRate = modulus;
  }
  if (fastestRate === 0) {
    return { fastestTimeConstant: null, fraction: SAMPLE_TIME_FRACTION, largestAdvisedTs: null, resolvesDynamics: true, warning: null };
  }
  const tau = unitToSeconds / fastestRate;
  const advised = SAMPLE_TIME_FRACTION * tau;
  const resolves = tsSeconds <= advised;
  return {
    fastestTimeConstant: tau,
    fraction: SAMPLE_TIME_FRACTION,
    largestAdvisedTs: advised,
    resolvesDynamics: resolves,
    warning: resolves
      ? null
      : `ts = ${tsSeconds} s exceeds ${SAMPLE_TIME_FRACTION} x the fastest kept time constant (${tau.toPrecision(3)} s): the samples do not resolve the fastest kept dynamics. Common practice is at least ${Math.round(1 / SAMPLE_TIME_FRACTION)} samples per time constant, ts <= ${advised.toPrecision(3)} s.`,
  };
}

export function continuousModel(source: ExportSource): StateSpaceModel {
  try {
    return {
      A: fromRows(source.matrices.A),
      B: fromRows(source.matrices.B),
      C: fromRows(source.matrices.C),
      D: fromRows(source.matrices.D),
    };
  } catch (err) {
    if (err instanceof ModelError) throw new ApiError(500, 'corrupt_version', `The stored matrices do not form a model: ${err.message}`);
    throw err;
  }
}

export function discretise(source: ExportSource, ts: number, tsSource: 'query' | 'project'): Discretisation {
  const toSeconds = unitSeconds(source.timeBase);
  const model = continuousModel(source);
  const tsModel = ts / toSeconds;
  let discrete;
  try {
    discrete = discretizeZoh(model, tsModel);
  } catch (err) {
    if (err instanceof ModelError) throw new ApiError(400, 'invalid_request', `ts: ${err.message}`, 'ts');
    throw err;
  }
  const matrices: RegisteredMatrices = {
    A: toRows(discrete.Ad),
    B: toRows(discrete.Bd),
    C: toRows(discrete.Cd),
    D: toRows(discrete.Dd),
  };
  for (const key of ['A', 'B'] as const) {
    if (matrices[key].some((r) => r.some((x) => !Number.isFinite(x)))) {
      throw new ApiError(400, 'invalid_request', `ts: at ts = ${ts} s the discrete matrix ${key} overflows; the model grows too fast over one sample.`, 'ts');
    }
  }
  const z = discretePoles(discrete);
  const poles: DiscretePole[] = [];
  for (let i = 0; i < z.re.length; i++) poles.push({ re: z.re[i], im: z.im[i], magnitude: Math.hypot(z.re[i], z.im[i]) });
  return {
    method: 'zero-order hold',
    ts,
    tsInModelUnit: tsModel,
    tsSource,
    matrices,
    matricesSha256: matricesSha256(matrices as StateSpaceRows),
    poles,
    check: checkSampleTime(modelPoles(model.A), ts, toSeconds, Math.max(...source.matrices.A.map((r) => r.reduce((sum, x) => sum + Math.abs(x), 0)))),
  };
}
