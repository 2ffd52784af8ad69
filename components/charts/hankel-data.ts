/**
 * Figures derived from a list of Hankel singular values σ1 ≥ σ2 ≥ … ≥ σn ≥ 0 of the stable part.
 *
 * Error bound of balanced truncation (and of balanced residualization) at order r, 2 Σ_{i=r+1..n} σi: the
 * engine's rule (reduction/hankel-figures.ts, with its sources). Glover's statement counts each distinct σ
 * once; summing every entry, as there, gives a bound at least as large, so it stays valid. Pages should
 * prefer the bound the engine stores and pass it in.
 *
 * Cumulative energy at order k: Σ_{i≤k} σi² / Σ σi² by default. Σ σi² = trace(P Q) is the squared
 * Hilbert–Schmidt norm of the Hankel operator (A. C. Antoulas, "Approximation of Large-Scale Dynamical
 * Systems", SIAM 2005, ch. 5; cited from memory), so this is the share of that norm the first k states
 * carry. `'linear'` gives Σσi / Σσ instead, the complement of the bound relative to its value at r = 0.
 */
import { balancedErrorBounds } from '@/reduction/hankel-figures';
import { ChartDataError, requireNonNegative } from './series-checks';

export type EnergyMeasure = 'squared' | 'linear';

export function checkHankelSingularValues(chart: string, hsv: readonly number[]): void {
  requireNonNegative(chart, 'hankelSingularValues', hsv);
  for (let i = 1; i < hsv.length; i++) {
    if (hsv[i] > hsv[i - 1]) {
      throw new ChartDataError(chart, 'hankelSingularValues', `must be in non-increasing order (entry ${i} exceeds entry ${i - 1})`);
    }
  }
}

/** bound[r] = 2 Σ_{i>r} σi for r = 0..n (bound[n] = 0): the engine's rule (reduction/hankel-figures.ts), on checked input. */
export function balancedTruncationBound(hsv: readonly number[]): number[] {
  checkHankelSingularValues('balancedTruncationBound', hsv);
  return balancedErrorBounds(hsv);
}

/** energy[k-1] = percentage of the total carried by σ1..σk, k = 1..n. All-zero input gives 100 %. */
export function cumulativeEnergy(hsv: readonly number[], measure: EnergyMeasure = 'squared'): number[] {
  checkHankelSingularValues('cumulativeEnergy', hsv);
  const weight = measure === 'squared' ? hsv.map((s) => s * s) : [...hsv];
  const total = weight.reduce((a, b) => a + b, 0);
  const energy: number[] = [];
  let running = 0;
  for (const w of weight) {
    running += w;
    energy.push(total > 0 ? (100 * running) / total : 100);
  }
  return energy;
}
