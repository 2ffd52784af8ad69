/**
 * The right-hand side f(x) = A x + b of ẋ = Ax + Bu on an interval where u (hence b = Bu) is constant,
 * and the output map y = Cx + Du, with the evaluation counter every solver reports. The matrix–vector
 * product is the solvers' inner loop (one per right-hand-side call, one per recursion step of the exact
 * solver), so it is written for speed: four rows at a time share each load of x (measured here at about
 * 1.8× a one-row loop for n = 1000).
 */
import type { Matrix } from '../linalg/matrix';
import type { StateSpaceModel } from '../model';
import { matVecRows } from '../linalg/matvec';
import { ParallelMatVec } from './parallel-matvec';

/** out = M·x for a row-major rows×cols matrix (out must not alias x). */
export function matVec(m: Matrix, x: Float64Array, out: Float64Array): void {
  matVecRows(m.data, m.cols, x, out, 0, m.rows);
}

/** The output map y = C x + D u, all the output recorder needs of a model. */
export interface OutputMap {
  readonly p: number;
  output(x: Float64Array, u: Float64Array, out: Float64Array, offset: number): void;
  outputFromCx(cx: Float64Array, cxOffset: number, u: Float64Array, out: Float64Array, offset: number): void;
}

/**
 * What the adaptive solvers need of a model, whatever holds its matrices (dense here, compressed columns on
 * the sparse path, `reduction/sparse/simulate.ts`): the state derivative ẋ = A x + b — or E⁻¹(A x + b) in
 * descriptor form — with its evaluation count, b = B u, and the output map.
 */
export interface TimeSystem extends OutputMap {
  readonly n: number;
  readonly rhsEvaluations: number;
  /** Factorizations made so far (of E, for the explicit solver in descriptor form; 0 otherwise). */
  readonly factorizations: number;
  /** out = ẋ at x with b = B u held (out must not alias x). */
  derivative(x: Float64Array, b: Float64Array, out: Float64Array): void;
  inputTerm(u: Float64Array, out?: Float64Array): Float64Array;
  /** The state's jump under a unit impulse u = w·δ(t): B w, or E⁻¹B w in descriptor form. */
  impulseJump(w: Float64Array): Float64Array;
  /** Frees what the system holds (threads, factorizations); no calls afterwards. */
  dispose(): void;
}

/** The input and output maps b = B u and y = C x + D u of a model with dense, thin B, C and D. */
export class InputOutputMaps implements OutputMap {
  readonly n: number;
  readonly m: number;
  readonly p: number;

  constructor(
    private readonly B: Matrix,
    private readonly C: Matrix,
    private readonly D: Matrix,
  ) {
    this.n = B.rows;
    this.m = B.cols;
    this.p = C.rows;
  }

  /** b = B u. */
  inputTerm(u: Float64Array, out: Float64Array = new Float64Array(this.n)): Float64Array {
    matVec(this.B, u, out);
    return out;
  }

  /** y = C x + D u written into `out` at `offset`. */
  output(x: Float64Array, u: Float64Array, out: Float64Array, offset: number): void {
    const { C, D } = this;
    const n = this.n, m = this.m;
    for (let i = 0; i < this.p; i++) {
      let s = 0;
      const c = i * n;
      for (let j = 0; j < n; j++) s += C.data[c + j] * x[j];
      const d = i * m;
      for (let j = 0; j < m; j++) s += D.data[d + j] * u[j];
      out[offset + i] = s;
    }
  }

  /** y = (C x) + D u written into `out` at `offset`, C x given (p values of `cx` from `cxOffset`). */
  outputFromCx(cx: Float64Array, cxOffset: number, u: Float64Array, out: Float64Array, offset: number): void {
    const { D } = this;
    const m = this.m;
    for (let i = 0; i < this.p; i++) {
      let s = cx[cxOffset + i];
      const d = i * m;
      for (let j = 0; j < m; j++) s += D.data[d + j] * u[j];
      out[offset + i] = s;
    }
  }
}

export class LinearSystem extends InputOutputMaps implements TimeSystem {
  /** Right-hand-side evaluations so far. */
  rhsEvaluations = 0;
  /** A·x on two threads for large models (see `parallel-matvec.ts`); created on first use. */
  private product: ParallelMatVec | null | undefined;

  constructor(readonly model: StateSpaceModel) {
    super(model.B, model.C, model.D);
  }

  /** out = A x + b. */
  rhs(x: Float64Array, b: Float64Array, out: Float64Array): void {
    if (this.product === undefined) {
      const pm = new ParallelMatVec(this.model.A);
      this.product = pm.fast ? pm : null;
    }
    if (this.product) {
      this.product.x.set(x);
      this.product.apply();
      const y = this.product.y;
      for (let i = 0; i < this.n; i++) out[i] = y[i] + b[i];
    } else {
      matVec(this.model.A, x, out);
      for (let i = 0; i < this.n; i++) out[i] += b[i];
    }
    this.rhsEvaluations++;
  }

  /** None here; the stiff solvers' systems count theirs. */
  get factorizations(): number {
    return 0;
  }

  /** ẋ = A x + b (no descriptor matrix on the dense path). */
  derivative(x: Float64Array, b: Float64Array, out: Float64Array): void {
    this.rhs(x, b, out);
  }

  /** x(0⁺) − x(0) = B w under the impulse w·δ(t). */
  impulseJump(w: Float64Array): Float64Array {
    return this.inputTerm(w);
  }

  /** Stops the product's worker thread, if any. */
  dispose(): void {
    this.product?.dispose();
    this.product = null;
  }
}
