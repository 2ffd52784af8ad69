/**
 * Modal form, modal dominance and modal truncation of a stable model with diagonalizable A.
 *
 * With A V = V Λ (eigenvectors in real packed form), the similarity z = V⁻¹x gives the real modal form:
 * a 1×1 block λ for a real pole and the 2×2 block [a b; −b a] for a pair a ± jb, so complex pairs stay
 * together and the realization stays real (e.g. Antoulas, "Approximation of Large-Scale Dynamical Systems",
 * SIAM 2005, §9.2, modal approximation; Varga, "Enhanced modal approach for model reduction",
 * Mathematical Modelling of Systems 1, 1995).
 *
 * Each mode contributes Rᵢ/(s − λᵢ) (+ its conjugate) to G with the rank-one residue Rᵢ = cᵢ bᵢᵀ, and
 * ‖Rᵢ/(s − λᵢ)‖∞ = ‖cᵢ‖‖bᵢ‖/|Re λᵢ|. Truncating a set of modes therefore leaves an error bounded by the
 * sum of these terms over the discarded modes (twice each for a pair), the bound for diagonalizable A
 * (Antoulas 2005, §9.2; Green & Limebeer, "Linear Robust Control", 1995, §9.1). The same term ranks the
 * modes by dominance: it bounds the mode's share of ‖G‖∞ (for a lightly damped pair it is twice the
 * pair's resonant peak, the two conjugate terms each counting once).
 *
 * A defective or nearly defective A (repeated poles in Jordan chains, e.g. a cascade of equal lags) has an
 * ill-conditioned eigenvector matrix; the similarity, and with it the bound, is then meaningless, so
 * modal truncation refuses such a model and points to balanced truncation instead.
 */
import { type Matrix, zeros, eig, inverse, matmul, frobeniusNorm, norm1 } from './linalg/index';
import { ModelError } from './errors';
import type { StateSpaceModel } from './model';
import { selectColumns, selectRows } from './realization';
import { modalFigures } from './poles';
import { modeComparator, type ModalSelection } from './mode-ranking';

/** Eigenvector condition above which modal truncation refuses (common practice: about 1/√ε·100). */
export const MAX_EIGENVECTOR_CONDITION = 1e10;

/**
 * Relative residual ‖AV − VΛ‖_F/(‖A‖_F‖V‖_F) above which the computed eigenvectors are not trusted
 * (common practice: a backward-stable solver delivers about n·ε; 1e-8 leaves a wide margin).
 */
export const MAX_EIGENVECTOR_RESIDUAL = 1e-8;

export interface Mode {
  /** Real part of the pole (pairs: of the member with Im > 0). */
  readonly re: number;
  /** Imaginary part, ≥ 0 (a pair is one mode with `states` = 2). */
  readonly im: number;
  readonly states: 1 | 2;
  /** |λ| in rad per time unit. */
  readonly naturalFrequency: number;
  /** −Re λ / |λ|. */
  readonly dampingRatio: number;
  /** ‖Rᵢ‖₂ of one member's residue cᵢbᵢᵀ. */
  readonly residueNorm: number;
  /** ‖mode's contribution‖∞ bound: ‖cᵢ‖‖bᵢ‖/|Re λ| (real), 2‖Rᵢ‖/|Re λ| (pair). */
  readonly dominance: number;
}

export interface ModalForm {
  /** Modes in the order of the realization's states. */
  readonly modes: readonly Mode[];
  /** The real modal realization, states grouped by mode in `modes` order; D of the model. */
  readonly realization: StateSpaceModel;
  /** ‖V‖₁‖V⁻¹‖₁ of the eigenvector matrix. */
  readonly eigenvectorCondition: number;
  /** ‖AV − VΛ‖_F/(‖A‖_F‖V‖_F) of the computed eigenvectors (Λ in real block form). */
  readonly eigenvectorResidual: number;
}

interface RawMode extends Mode {
  readonly columns: readonly number[];
  /** Im λ of the pair member whose eigenvector the packed columns hold (its sign fixes the 2×2 block). */
  readonly blockIm: number;
}

function rowNorm2(m: Matrix, i: number): number {
  let s = 0;
  for (let j = 0; j < m.cols; j++) s += m.data[i * m.cols + j] ** 2;
  return s;
}

function colNorm2(m: Matrix, j: number): number {
  let s = 0;
  for (let i = 0; i < m.rows; i++) s += m.data[i * m.cols + j] ** 2;
  return s;
}

/** V⁻¹ and the 1-norm condition ‖V‖₁‖V⁻¹‖₁ (within a factor n of the 2-norm one, and free given V⁻¹). */
function invertWithCondition(v: Matrix): { inv: Matrix | null; cond: number } {
  let inv: Matrix;
  try {
    inv = inverse(v);
  } catch {
    return { inv: null, cond: Infinity };
  }
  const cond = norm1(v) * norm1(inv);
  return Number.isFinite(cond) ? { inv, cond } : { inv: null, cond: Infinity };
}

/** The real modal form in the eigenvalue solver's order (see the file header). */
export function modalForm(stable: StateSpaceModel): ModalForm {
  const n = stable.A.rows;
  if (n === 0) return { modes: [], realization: stable, eigenvectorCondition: 1, eigenvectorResidual: 0 };
  const { values, vectors } = eig(stable.A);
  const { inv, cond } = invertWithCondition(vectors);
  const residual = eigenvectorResidual(stable.A, values.re, values.im, vectors);
  const Bm = inv ? matmul(inv, stable.B) : zeros(n, stable.B.cols);
  const Cm = matmul(stable.C, vectors);
  const raw: RawMode[] = [];
  for (let j = 0; j < n; j++) {
    const re = values.re[j];
    const im = values.im[j];
    // The stable part's poles are stable by construction (spectral-split.ts), so ωn > 0 and ζ is defined.
    const { naturalFrequency: mag, dampingRatio } = modalFigures(re, im, 'stable');
    const damping = dampingRatio ?? 1;
    if (im !== 0 && j + 1 < n) {
      // Real packed pair (j, j+1): columns Re v, Im v of the eigenvector of values[j].
      const c2 = colNorm2(Cm, j) + colNorm2(Cm, j + 1);
      const b2 = rowNorm2(Bm, j) + rowNorm2(Bm, j + 1);
      const residue = 0.5 * Math.sqrt(c2 * b2);
      raw.push({
        re,
        im: Math.abs(im),
        states: 2,
        naturalFrequency: mag,
        dampingRatio: damping,
        residueNorm: residue,
        dominance: (2 * residue) / Math.abs(re),
        columns: [j, j + 1],
        blockIm: im,
      });
      j++;
    } else {
      const residue = Math.sqrt(colNorm2(Cm, j) * rowNorm2(Bm, j));
      raw.push({
        re,
        im: 0,
        states: 1,
        naturalFrequency: mag,
        dampingRatio: damping,
        residueNorm: residue,
        dominance: residue / Math.abs(re),
        columns: [j],
        blockIm: 0,
      });
    }
  }
  return assemble(raw, Bm, Cm, stable.D, cond, residual);
}

/** ‖AV − VΛ‖_F/(‖A‖_F‖V‖_F) with Λ the real block form of the eigenvalues in the solver's order. */
function eigenvectorResidual(A: Matrix, re: Float64Array, im: Float64Array, V: Matrix): number {
  const n = A.rows;
  const R = matmul(A, V);
  for (let j = 0; j < n; j++) {
    if (im[j] !== 0 && j + 1 < n) {
      // Pair a ± jb in columns (Re v, Im v): A·Re v = a·Re v − b·Im v, A·Im v = b·Re v + a·Im v.
      for (let i = 0; i < n; i++) {
        const vr = V.data[i * n + j];
        const vi = V.data[i * n + j + 1];
        R.data[i * n + j] -= re[j] * vr - im[j] * vi;
        R.data[i * n + j + 1] -= im[j] * vr + re[j] * vi;
      }
      j++;
    } else {
      for (let i = 0; i < n; i++) R.data[i * n + j] -= re[j] * V.data[i * n + j];
    }
  }
  const scale = frobeniusNorm(A) * frobeniusNorm(V);
  return scale > 0 ? frobeniusNorm(R) / scale : 0;
}

function assemble(
  raw: readonly RawMode[],
  Bm: Matrix,
  Cm: Matrix,
  D: Matrix,
  cond: number,
  residual: number,
): ModalForm {
  const order = raw.flatMap((r) => r.columns);
  const n = order.length;
  const A = zeros(n, n);
  let k = 0;
  for (const r of raw) {
    if (r.states === 1) {
      A.data[k * n + k] = r.re;
      k += 1;
    } else {
      // A [Re v, Im v] = [Re v, Im v] [a b; −b a] for A v = (a + jb) v.
      A.data[k * n + k] = r.re;
      A.data[k * n + k + 1] = r.blockIm;
      A.data[(k + 1) * n + k] = -r.blockIm;
      A.data[(k + 1) * n + k + 1] = r.re;
      k += 2;
    }
  }
  const modes = raw.map(({ columns: _columns, blockIm: _blockIm, ...mode }) => mode);
  return {
    modes,
    realization: { A, B: selectRows(Bm, order), C: selectColumns(Cm, order), D },
    eigenvectorCondition: cond,
    eigenvectorResidual: residual,
  };
}

/** The modal form with modes sorted by a selection rule: the modes to keep first. */
export function rankedModalForm(stable: StateSpaceModel, selection: ModalSelection = { rule: 'dominance' }): ModalForm {
  const form = modalForm(stable);
  const entries = form.modes.map((mode, i) => ({ mode, i }));
  let offset = 0;
  const starts = form.modes.map((m) => {
    const s = offset;
    offset += m.states;
    return s;
  });
  const order = modeComparator<Mode>(selection, (m) => m);
  entries.sort((a, b) => order(a.mode, b.mode));
  const A = form.realization.A;
  const raw: RawMode[] = entries.map(({ mode, i }) => ({
    ...mode,
    columns: mode.states === 1 ? [starts[i]] : [starts[i], starts[i] + 1],
    blockIm: mode.states === 1 ? 0 : A.data[starts[i] * A.cols + starts[i] + 1],
  }));
  const { realization } = form;
  return assemble(raw, realization.B, realization.C, realization.D, form.eigenvectorCondition, form.eigenvectorResidual);
}

/** Whether the modal form can be trusted: well-conditioned eigenvectors that are accurate. */
export function isReliableModalForm(form: ModalForm): boolean {
  return form.eigenvectorCondition <= MAX_EIGENVECTOR_CONDITION && form.eigenvectorResidual <= MAX_EIGENVECTOR_RESIDUAL;
}

/** Refuse modal truncation on a (nearly) defective A, where its similarity and bound do not hold. */
export function requireDiagonalizable(form: ModalForm): void {
  if (!(form.eigenvectorResidual <= MAX_EIGENVECTOR_RESIDUAL)) {
    throw new ModelError(
      'invalid_option',
      'method',
      `modal truncation needs accurate eigenvectors, but those computed for the stable part leave a relative ` +
        `residual of ${form.eigenvectorResidual.toExponential(1)} (typically repeated poles); use balanced truncation`,
    );
  }
  if (!(form.eigenvectorCondition <= MAX_EIGENVECTOR_CONDITION)) {
    throw new ModelError(
      'invalid_option',
      'method',
      `modal truncation needs a diagonalizable A, but the stable part's eigenvector matrix has condition ` +
        `${form.eigenvectorCondition.toExponential(1)} (repeated poles in a Jordan chain); use balanced truncation`,
    );
  }
}

/** Stable orders at which the ranked realization can be cut without splitting a complex pair. */
export function modalCutPoints(form: ModalForm): number[] {
  const cuts = [0];
  for (const m of form.modes) cuts.push(cuts[cuts.length - 1] + m.states);
  return cuts;
}

/** Σ of the dominance terms of the modes after the first r states (r a cut point). */
export function modalErrorBound(form: ModalForm, r: number): number {
  let states = 0;
  let bound = 0;
  for (const m of form.modes) {
    if (states >= r) bound += m.dominance;
    states += m.states;
  }
  return bound;
}
