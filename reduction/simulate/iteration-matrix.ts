/**
 * The iteration matrix W = I − γ·h·A of an implicit method on ẋ = Ax + b, factorised once per step size
 * and reused for every stage solve while h is unchanged. For a linear system the stage equations are
 * linear, so one solve with W is exact (no Newton iteration). A few recent factorisations are kept, so
 * returning to an earlier step size (after a rejection, say) does not refactorise.
 * The factorisation is the engine's LU with partial pivoting (`linalg`); the triangular solves for single
 * vectors are done here in place, without allocating, because they sit in the solver's inner loop.
 */
import { ModelError } from '../errors';
import { type LuFactorization, luFactor } from '../linalg/index';
import type { Matrix } from '../linalg/matrix';

/** x ← W⁻¹x using P·W = L·U (unit lower L and U packed in f.lu); `work` has length n. */
export function luSolveVector(f: LuFactorization, x: Float64Array, work: Float64Array): void {
  const { n, lu, perm } = f;
  for (let k = 0; k < n; k++) work[k] = x[perm[k]];
  for (let i = 1; i < n; i++) {
    const o = i * n;
    let s = work[i];
    for (let j = 0; j < i; j++) s -= lu[o + j] * work[j];
    work[i] = s;
  }
  for (let i = n - 1; i >= 0; i--) {
    const o = i * n;
    let s = work[i];
    for (let j = i + 1; j < n; j++) s -= lu[o + j] * work[j];
    work[i] = s / lu[o + i];
  }
  x.set(work);
}

export class IterationMatrix {
  /** Factorisations performed (cache hits are not counted). */
  factorizations = 0;
  private readonly cache: { h: number; lu: LuFactorization }[] = [];
  private readonly work: Float64Array;

  constructor(
    private readonly A: Matrix,
    private readonly gamma: number,
    private readonly keep = 3,
  ) {
    this.work = new Float64Array(A.rows);
  }

  /** The factorisation of I − γhA, from the cache when h was used recently. */
  factorFor(h: number): LuFactorization {
    const hit = this.cache.findIndex((c) => c.h === h);
    if (hit >= 0) {
      const [entry] = this.cache.splice(hit, 1);
      this.cache.unshift(entry);
      return entry.lu;
    }
    const n = this.A.rows;
    const W = { rows: n, cols: n, data: new Float64Array(n * n) };
    const gh = this.gamma * h;
    const a = this.A.data;
    for (let k = 0; k < n * n; k++) W.data[k] = -gh * a[k];
    for (let i = 0; i < n; i++) W.data[i * n + i] += 1;
    const lu = luFactor(W);
    this.factorizations++;
    if (lu.zeroPivot >= 0) {
      throw new ModelError(
        'unstable',
        'A',
        `I − ${this.gamma.toPrecision(4)}·h·A is singular at h = ${h}: A has an eigenvalue at 1/(γh) in the right half-plane`,
      );
    }
    this.cache.unshift({ h, lu });
    if (this.cache.length > this.keep) this.cache.pop();
    return lu;
  }

  /** x ← (I − γhA)⁻¹ x. */
  solve(lu: LuFactorization, x: Float64Array): void {
    luSolveVector(lu, x, this.work);
  }
}
