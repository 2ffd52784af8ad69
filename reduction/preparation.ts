/**
 * The decompositions shared by the analysis and every reduction method of one model: the stable/unstable
 * split and the balanced realization of the stable part (`spectral-split.ts`, `balanced.ts`).
 */
import type { StateSpaceModel } from './model';
import type { ComplexVector } from './linalg/index';
import { splitStableUnstable, type SpectralSplit } from './spectral-split';
import { balancedRealization, type BalancedRealization } from './balanced';

/**
 * The decompositions that do not depend on the method, kept for further `prepareReduction` calls on the
 * same model (the analysis prepares both balanced methods: one split and one balanced realization serve
 * both). Keyed by the tolerances; use one cache per model.
 */
export class PreparationCache {
  private readonly splits = new Map<number, SpectralSplit>();
  private readonly realizations = new Map<string, BalancedRealization>();

  split(model: StateSpaceModel, tolerance: number, poles?: ComplexVector): SpectralSplit {
    let s = this.splits.get(tolerance);
    if (!s) {
      s = splitStableUnstable(model, { tolerance, poles });
      this.splits.set(tolerance, s);
    }
    return s;
  }

  balanced(stable: StateSpaceModel, stabilityTolerance: number, rankTolerance: number): BalancedRealization {
    const key = `${stabilityTolerance}:${rankTolerance}`;
    let r = this.realizations.get(key);
    if (!r) {
      r = balancedRealization(stable, { rankTolerance });
      this.realizations.set(key, r);
    }
    return r;
  }
}

