/**
 * Analysis of a full model: poles with their modal data, the stable / marginal / unstable split,
 * stiffness ratio, DC gain, H2 and H∞ norms, Hankel singular values of the stable part and the modal
 * dominance ranking.
 *
 * Modal data of a pole λ (natural frequency, damping ratio, time constant) and the stable / marginal /
 * unstable classification: `poles.ts`, one rule shared with the pages.
 * Stiffness ratio: the fastest over the slowest decay rate among the stable poles (poles.ts). DC gain
 * G(0) = D − C A⁻¹ B, not defined with a pole at s = 0 (integrator or rigid-body mode).
 * Norms: `norms.ts`; Hankel singular values: `balanced.ts`; dominance: `modal.ts`; the stable part:
 * `spectral-split.ts`; fixed-step limits: `step-limits.ts`; each cites its method.
 */
import { type Matrix, type ComplexVector, solve, matmul, sub, frobeniusNorm, eig } from './linalg/index';
import type { StateSpaceModel } from './model';
import { stateCount, inputCount, outputCount } from './model';
import {
  classifyPoles,
  modelPoles,
  DEFAULT_STABILITY_TOLERANCE,
  relativeToleranceOption,
  type PoleClassification,
  type PoleStability,
} from './spectral-split';
import { hInfinityNorm, h2Norm, type HInfinityResult, type NormValue } from './norms';
import { balancedCertificate, DEFAULT_RANK_TOLERANCE, type BalancedRealization } from './balanced';
import { PreparationCache } from './preparation';
import { rankedModalForm, isReliableModalForm, type Mode } from './modal';
import { stepLimitsFromPoles, type StepLimits } from './step-limits';
import { modalFigures, stiffnessFromRates, type Stiffness } from './poles';

export interface PoleData {
  readonly re: number;
  readonly im: number;
  /** |λ|, rad per time unit. */
  readonly naturalFrequency: number;
  /** −Re λ/|λ|; null for λ = 0. */
  readonly dampingRatio: number | null;
  /** 1/|Re λ|: decay time of a stable pole, e-folding growth time of an unstable one; null for a marginal pole. */
  readonly timeConstant: number | null;
  readonly stability: PoleStability;
}

export type ZeroFrequencyGain = { readonly defined: true; readonly value: Matrix } | { readonly defined: false; readonly reason: string };

export interface ModalDominance {
  /** Stable modes, most dominant first (a complex pair is one mode). */
  readonly modes: readonly Mode[];
  readonly eigenvectorCondition: number;
  /** False when A's stable part is (nearly) defective or its eigenvectors are inaccurate: the residues are then not meaningful. */
  readonly reliable: boolean;
}

export interface ModelAnalysis {
  readonly states: number;
  readonly inputs: number;
  readonly outputs: number;
  readonly poles: readonly PoleData[];
  /** True when every pole is stable (Re λ < −tol·scale). */
  readonly stable: boolean;
  readonly stablePoles: number;
  readonly marginalPoles: number;
  readonly unstablePoles: number;
  readonly stabilityTolerance: number;
  /** Fastest over slowest decay rate of the stable poles; null without stable poles. */
  readonly stiffnessRatio: number | null;
  readonly slowestDecayRate: number | null;
  readonly fastestDecayRate: number | null;
  readonly zeroFrequencyGain: ZeroFrequencyGain;
  readonly h2Norm: NormValue;
  readonly hInfinityNorm: HInfinityResult;
  /** Hankel singular values of the stable part, descending. */
  readonly hankelSingularValues: Float64Array;
  readonly modalDominance: ModalDominance;
  /** Largest stable fixed step of forward Euler and classical RK4 on the spectrum (`step-limits.ts`). */
  readonly stepLimits: StepLimits;
}

export interface AnalysisOptions {
  readonly stabilityTolerance?: number;
  /** Shared with later reductions of the same model (the split and the balanced realization). */
  readonly cache?: PreparationCache;
}

/**
 * Relative accuracy asked of ‖G‖∞ when its certification runs on a balanced truncation: the slack
 * 2Σσ(tail) stays below this fraction of σ₁ ≤ ‖G‖∞ (common practice: far below any figure shown).
 */
export const H_INFINITY_CERTIFICATION_SLACK = 1e-6;

export function poleData(classification: PoleClassification): PoleData[] {
  const { poles, stability } = classification;
  return stability.map((s, i) => {
    const re = poles.re[i];
    const im = poles.im[i];
    const { naturalFrequency, dampingRatio, timeConstant } = modalFigures(re, im, s);
    return { re, im, naturalFrequency, dampingRatio, timeConstant, stability: s };
  });
}

/** max|Re λ| / min|Re λ| over the stable poles, with both rates; nulls without stable poles (poles.ts). */
export function stiffnessOf(classification: PoleClassification): Stiffness {
  const { poles, stability } = classification;
  return stiffnessFromRates(stability.flatMap((s, i) => (s === 'stable' ? [-poles.re[i]] : [])));
}

export function stiffnessRatio(poles: ComplexVector, tolerance = DEFAULT_STABILITY_TOLERANCE): number | null {
  return stiffnessOf(classifyPoles(poles, tolerance)).stiffnessRatio;
}

/** G(0) = D − C A⁻¹ B, or why it is not defined (a pole at s = 0 within the relative tolerance). */
export function zeroFrequencyGain(model: StateSpaceModel, classification?: PoleClassification): ZeroFrequencyGain {
  if (model.A.rows === 0) return { defined: true, value: model.D };
  const c = classification ?? classifyPoles(modelPoles(model.A));
  const t = c.tolerance * c.scale;
  let atZero = 0;
  for (let i = 0; i < c.poles.re.length; i++) {
    if (Math.abs(c.poles.re[i]) <= t && Math.abs(c.poles.im[i]) <= t) atZero++;
  }
  if (atZero > 0) {
    return {
      defined: false,
      reason: `not defined: ${atZero} pole(s) at s = 0 (integrator or rigid-body mode)`,
    };
  }
  return { defined: true, value: sub(model.D, matmul(model.C, solve(model.A, model.B))) };
}

/**
 * Poles as the fixed-step limits should see them: a marginal pole's real part is set to 0 (it is within
 * the tolerance of the axis, and a computed double pole at 0 comes out as ±√ε-sized values of either
 * sign, which would otherwise read as "unstable for every step"), and its imaginary part too when that is
 * within tolerance·scale of 0. Also used for the poles kept exactly by a reduction (the order slider).
 */
export function snapMarginalPoles(
  re: ArrayLike<number>,
  im: ArrayLike<number>,
  stability: ArrayLike<string>,
  tolerance: number,
  scale: number,
): ComplexVector {
  const outRe = Float64Array.from(re);
  const outIm = Float64Array.from(im);
  const t = tolerance * scale;
  for (let i = 0; i < outRe.length; i++) {
    if (stability[i] !== 'marginal') continue;
    outRe[i] = 0;
    if (Math.abs(outIm[i]) <= t) outIm[i] = 0;
  }
  return { re: outRe, im: outIm };
}

function polesForStepLimits(c: PoleClassification): ComplexVector {
  return snapMarginalPoles(c.poles.re, c.poles.im, c.stability, c.tolerance, c.scale);
}

/** The full analysis of a model (see the file header). */
export function analyzeModel(model: StateSpaceModel, options: AnalysisOptions = {}): ModelAnalysis {
  const tolerance = relativeToleranceOption(options.stabilityTolerance, DEFAULT_STABILITY_TOLERANCE, 'stabilityTolerance');
  // One eigendecomposition of A serves the poles and, for a stable model (whose stable part is the model
  // itself), the modal form and the modal frequency response (linalg's eig memo).
  if (model.A.rows > 0) eig(model.A);
  const poles = modelPoles(model.A);
  const classification = classifyPoles(poles, tolerance);
  const cache = options.cache ?? new PreparationCache();
  const split = cache.split(model, tolerance, poles);
  const modal = rankedModalForm(split.stable, { rule: 'dominance' });
  const stable = split.unstableStates === 0;
  // One balanced realization of the stable part: its Hankel singular values, and for a stable model a
  // small realization within 1e-6·σ₁ on which the H∞ norm is certified (O(q³) instead of O(n³)).
  const balanced: BalancedRealization = cache.balanced(split.stable, tolerance, DEFAULT_RANK_TOLERANCE);
  const hsv = balanced.hankelSingularValues;
  const certifyOn = stable && hsv.length > 0 ? (balancedCertificate(balanced, H_INFINITY_CERTIFICATION_SLACK * hsv[0]) ?? undefined) : undefined;
  return {
    states: stateCount(model),
    inputs: inputCount(model),
    outputs: outputCount(model),
    poles: poleData(classification),
    stable,
    stablePoles: split.stableStates,
    marginalPoles: split.marginalPoles,
    unstablePoles: split.unstablePoles,
    stabilityTolerance: tolerance,
    ...stiffnessOf(classification),
    zeroFrequencyGain: zeroFrequencyGain(model, classification),
    // ‖G‖₂ = ‖C Lc‖_F from the factor the balancing already has (stable, strictly proper G only).
    h2Norm:
      stable && balanced.factors && frobeniusNorm(model.D) === 0
        ? { finite: true, value: frobeniusNorm(matmul(split.stable.C, balanced.factors.controllability)) }
        : h2Norm(model, { poles, stabilityTolerance: tolerance }),
    hInfinityNorm: hInfinityNorm(model, { poles, stabilityTolerance: tolerance, certifyOn }),
    hankelSingularValues: hsv,
    modalDominance: {
      modes: modal.modes,
      eigenvectorCondition: modal.eigenvectorCondition,
      reliable: isReliableModalForm(modal),
    },
    stepLimits: stepLimitsFromPoles(polesForStepLimits(classification)),
  };
}
