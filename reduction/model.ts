/**
 * The engine's model type: continuous-time ẋ = A x + B u, y = C x + D u, validated once at the boundary
 * (the loaders in `reduction/io/` build it through `createStateSpaceModel`); nothing deeper re-checks shapes.
 */
import type { Matrix } from './linalg/matrix';

export interface StateSpaceModel {
  readonly A: Matrix; // n×n
  readonly B: Matrix; // n×m
  readonly C: Matrix; // p×n
  readonly D: Matrix; // p×m (zeros when the input gave none)
  /** Names of the inputs (m), outputs (p) and states (n), each optional. */
  readonly labels?: ModelLabels;
  /** The unit of time the matrices are written in, e.g. "s" (frequencies are in rad per this unit). */
  readonly timeBase?: string;
}

export interface ModelLabels {
  readonly inputs?: readonly string[];
  readonly outputs?: readonly string[];
  readonly states?: readonly string[];
}

export function stateCount(m: StateSpaceModel): number {
  return m.A.rows;
}
export function inputCount(m: StateSpaceModel): number {
  return m.B.cols;
}
export function outputCount(m: StateSpaceModel): number {
  return m.C.rows;
}
