/**
 * System norms of a stable continuous-time model.
 *
 * H∞ norm: the Hamiltonian method. γ is a singular value of G(jω) exactly when jω is an eigenvalue of
 *
 *   H(γ) = [ A + B R⁻¹DᵀC        γ B R⁻¹ Bᵀ          ]     R = γ²I − DᵀD,  S = γ²I − DDᵀ
 *          [ −γ Cᵀ S⁻¹ C         −(A + B R⁻¹DᵀC)ᵀ    ]
 *
 * (Boyd, Balakrishnan & Kabamba, "A bisection method for computing the H∞ norm of a transfer matrix and
 * related problems", Math. Control Signals Systems 2, 1989; Boyd & Balakrishnan, "A regularity result for
 * the singular values of a transfer matrix and a quadratically convergent algorithm for computing its
 * L∞-norm", Systems & Control Letters 15, 1990). The level-set iteration of Bruinsma & Steinbuch ("A fast
 * algorithm to compute the H∞-norm of a transfer function matrix", Systems & Control Letters 14, 1990)
 * starts from a lower bound γ_lb, finds the imaginary-axis eigenvalues jω₁ < … < jω_k of H((1+2ε)γ_lb),
 * raises γ_lb to the largest σ_max(G(jω)) at the midpoints of consecutive ω_i, and stops when H has no
 * imaginary eigenvalue: then γ_lb ≤ ‖G‖∞ ≤ (1+2ε)γ_lb. Convergence is quadratic. Because those
 * eigenvalues can be ill-conditioned (error systems far below the model they are computed from), the
 * peak is then polished by a golden-section search on σ_max(G(jω)) and re-tested; the reported upper
 * bound is only as reliable as the Hamiltonian's eigenvalues, the value is always attained.
 *
 * H2 norm: ‖G‖₂² = trace(C P Cᵀ) with the controllability gramian P, for stable, strictly proper G
 * (Zhou, Doyle & Glover, "Robust and Optimal Control", 1996, Lemma 4.4), evaluated as ‖C Lc‖_F² with the
 * square-root factor P = Lc Lcᵀ. Same value, but for an error system G − Gr the dense trace is a
 * difference of nearly equal terms and loses everything below about √ε·‖G‖₂, while the factored form
 * cancels entry by entry and keeps an absolute accuracy of order ε·‖G‖₂.
 */
import {
  type Matrix,
  type ComplexVector,
  zeros,
  matmul,
  transpose,
  inverse,
  eigenvalues,
  svd,
  frobeniusNorm,
  lyapunovFactor,
  kernels,
} from './linalg/index';
import { hammarlingLyapunovFactor } from './linalg/lyapunov-schur';
import type { StateSpaceModel } from './model';
import {
  frequencyEvaluator,
  largestSingularValue,
  defaultFrequencyBand,
  logFrequencyGrid,
  type FrequencyEvaluator,
} from './frequency';
import { classifyPoles, modelPoles, DEFAULT_STABILITY_TOLERANCE } from './spectral-split';

/** A norm that is finite, or a reason it is not (a pole on or right of the axis; a feedthrough for H2). */
export type NormValue = { readonly finite: true; readonly value: number } | { readonly finite: false; readonly reason: string };

export interface HInfinityNorm {
  readonly finite: true;
  readonly value: number;
  /** Frequency (rad per time unit) where the peak is attained; Infinity when the peak is σ_max(D) at ω → ∞. */
  readonly peakFrequency: number;
  /** The iteration's bracket: lowerBound ≤ ‖G‖∞ ≤ upperBound. */
  readonly lowerBound: number;
  readonly upperBound: number;
  readonly iterations: number;
  /** How the bracket was certified: Hamiltonian tests on the model itself, or on a smaller realization within `certificationSlack`. */
  readonly method: 'hamiltonian' | 'hamiltonian-on-reduced-realization';
  /** Eigenvalue computations of a Hamiltonian matrix (the O(n³) steps), and their order. */
  readonly hamiltonianSolves: number;
  readonly hamiltonianOrder: number;
  /** ‖G − G_q‖∞ bound of the realization the Hamiltonian tests ran on (0 when on G itself). */
  readonly certificationSlack: number;
}

export type HInfinityResult = HInfinityNorm | { readonly finite: false; readonly reason: string };

export interface NormOptions {
  /** Relative accuracy ε of the H∞ bracket (default 1e-9). */
  readonly relativeTolerance?: number;
  /** Poles already computed (saves one eigenvalue computation). */
  readonly poles?: ComplexVector;
  readonly stabilityTolerance?: number;
  /** An evaluator already built for this model. */
  readonly evaluator?: FrequencyEvaluator;
  /**
   * A smaller realization G_q with ‖G − G_q‖∞ ≤ slack (e.g. a balanced truncation at an order whose
   * tail 2Σσ is below the accuracy wanted): the Hamiltonian tests run on it instead of G, which costs
   * O(q³) instead of O(n³), and the upper bound is widened by the slack on each side. σ(G(jω)) is still
   * evaluated on G itself, so the value returned is attained by G.
   */
  readonly certifyOn?: { readonly model: StateSpaceModel; readonly slack: number };
}

function unstableReason(model: StateSpaceModel, options: NormOptions): string | null {
  const poles = options.poles ?? modelPoles(model.A);
  const c = classifyPoles(poles, options.stabilityTolerance ?? DEFAULT_STABILITY_TOLERANCE);
  const marginal = c.stability.filter((s) => s === 'marginal').length;
  const unstable = c.stability.filter((s) => s === 'unstable').length;
  if (unstable > 0) return `not finite: ${unstable} pole(s) in the right half-plane`;
  if (marginal > 0) return `not finite: ${marginal} pole(s) on the imaginary axis`;
  return null;
}

function largestSingular(m: Matrix): number {
  if (m.rows === 0 || m.cols === 0) return 0;
  return svd(m).s[0];
}

/** H(γ) of the header, 2n×2n. */
export function hamiltonian(model: StateSpaceModel, gamma: number): Matrix {
  const { A, B, C, D } = model;
  const n = A.rows;
  const m = B.cols;
  const p = C.rows;
  const g2 = gamma * gamma;
  const R = zeros(m, m);
  const S = zeros(p, p);
  const DtD = matmul(transpose(D), D);
  const DDt = matmul(D, transpose(D));
  for (let k = 0; k < R.data.length; k++) R.data[k] = -DtD.data[k];
  for (let i = 0; i < m; i++) R.data[i * m + i] += g2;
  for (let k = 0; k < S.data.length; k++) S.data[k] = -DDt.data[k];
  for (let i = 0; i < p; i++) S.data[i * p + i] += g2;
  const Ri = inverse(R);
  const Si = inverse(S);
  const BRi = matmul(B, Ri);
  const F = matmul(matmul(BRi, transpose(D)), C);
  const top = matmul(BRi, transpose(B));
  const bottom = matmul(matmul(transpose(C), Si), C);
  const N = 2 * n;
  const H = zeros(N, N);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const a = A.data[i * n + j] + F.data[i * n + j];
      H.data[i * N + j] = a;
      H.data[(n + j) * N + n + i] = -a;
      H.data[i * N + n + j] = gamma * top.data[i * n + j];
      H.data[(n + i) * N + j] = -gamma * bottom.data[i * n + j];
    }
  }
  return H;
}

/**
 * Frequencies ω (both signs) with jω (numerically) an eigenvalue of H, ascending. Keeping the negative
 * ones makes the level-set interval that contains ω = 0 show up as the pair (−ω₁, ω₁).
 *
 * An eigenvalue counts as imaginary when |Re λ| ≤ 1e-3·(|λ| + 1e-8·ρ(H)). That is loose on purpose.
 * The imaginary eigenvalues of H(γ) can be ill-conditioned: for an error system G − Gr, which is tiny
 * beside the realization it is computed from, rounding moves them off the axis by 1e-5·|λ| and more
 * (seen on a balanced-truncation error of a heat-equation model), and a missed crossing would stop the
 * iteration below the peak. A spurious candidate is harmless: every candidate only leads to σ_max
 * evaluations at midpoints, and γ is raised only to a value σ_max actually attains, so the result stays a
 * true lower bound and the loop still ends when no midpoint raises it (Bruinsma & Steinbuch 1990 use a
 * relative test of this kind).
 */
function imaginaryAxisFrequencies(H: Matrix): number[] {
  const ev = eigenvalues(H);
  let radius = 0;
  for (let i = 0; i < ev.re.length; i++) radius = Math.max(radius, Math.hypot(ev.re[i], ev.im[i]));
  const out: number[] = [];
  for (let i = 0; i < ev.re.length; i++) {
    const mag = Math.hypot(ev.re[i], ev.im[i]);
    if (Math.abs(ev.re[i]) <= 1e-3 * (mag + 1e-8 * radius)) out.push(ev.im[i]);
  }
  return out.sort((a, b) => a - b);
}

/**
 * Test frequencies for the starting lower bound (Bruinsma & Steinbuch 1990, step 1): ω = 0, the natural
 * frequency of the poles with the largest |Im λ / (Re λ · |λ|)| (the ones most likely to make a resonant
 * peak; here the 20 best of that ranking rather than only the first), the fastest pole, and a coarse log
 * grid over the poles' band. The grid matters when the peak is not at a pole, for instance the error of
 * a residualized model, whose feedthrough D − Dr ≠ 0: starting from γ_lb = σ_max(D) would make
 * R = γ²I − DᵀD singular in the first Hamiltonian. All of these cost O(n²) each on the Hessenberg form.
 */
function startingFrequencies(poles: ComplexVector): number[] {
  const scored: { w: number; score: number }[] = [];
  let fastest = 0;
  for (let i = 0; i < poles.re.length; i++) {
    const mag = Math.hypot(poles.re[i], poles.im[i]);
    fastest = Math.max(fastest, mag);
    if (poles.im[i] > 0) scored.push({ w: mag, score: Math.abs(poles.im[i] / (poles.re[i] * mag)) });
  }
  scored.sort((a, b) => b.score - a.score);
  const [lo, hi] = defaultFrequencyBand(poles);
  return [0, fastest, ...scored.slice(0, 20).map((s) => s.w), ...logFrequencyGrid(lo, hi, 40)];
}

/**
 * Golden-section search for the largest σ(ω) with log10 ω within ±halfWidth of log10 w0 (Kiefer 1953,
 * "Sequential minimax search for a maximum", Proc. AMS 4): for the top of a peak that is unimodal there.
 */
function maximizeNear(sigmaAt: (w: number) => number, w0: number, halfWidth: number): { w: number; value: number } {
  const ratio = (Math.sqrt(5) - 1) / 2;
  let a = Math.log10(w0) - halfWidth;
  let b = Math.log10(w0) + halfWidth;
  let x1 = b - ratio * (b - a);
  let x2 = a + ratio * (b - a);
  let f1 = sigmaAt(10 ** x1);
  let f2 = sigmaAt(10 ** x2);
  for (let it = 0; it < 80 && b - a > 1e-13 * Math.max(1, Math.abs(a)); it++) {
    if (f1 >= f2) {
      b = x2;
      x2 = x1;
      f2 = f1;
      x1 = b - ratio * (b - a);
      f1 = sigmaAt(10 ** x1);
    } else {
      a = x1;
      x1 = x2;
      f1 = f2;
      x2 = a + ratio * (b - a);
      f2 = sigmaAt(10 ** x2);
    }
  }
  return f1 >= f2 ? { w: 10 ** x1, value: f1 } : { w: 10 ** x2, value: f2 };
}

/** ‖G‖∞ and its peak frequency by the Hamiltonian level-set iteration (see the file header). */
export function hInfinityNorm(model: StateSpaceModel, options: NormOptions = {}): HInfinityResult {
  const eps = options.relativeTolerance ?? 1e-9;
  const n = model.A.rows;
  const dNorm = largestSingular(model.D);
  if (n === 0) {
    return {
      finite: true, value: dNorm, peakFrequency: Infinity, lowerBound: dNorm, upperBound: dNorm, iterations: 0,
      method: 'hamiltonian', hamiltonianSolves: 0, hamiltonianOrder: 0, certificationSlack: 0,
    };
  }
  const poles = options.poles ?? modelPoles(model.A);
  const reason = unstableReason(model, { ...options, poles });
  if (reason) return { finite: false, reason };
  if (options.certifyOn && options.certifyOn.model.A.rows < n) {
    // The whole level-set iteration on G_q; then σ of G itself at G_q's peak, so the value is attained
    // by G, and the bracket widened by the slack: ‖G‖∞ ≤ ‖G_q‖∞ + ‖G − G_q‖∞.
    const { model: small, slack } = options.certifyOn;
    const r = hInfinityNorm(small, { relativeTolerance: eps, stabilityTolerance: options.stabilityTolerance });
    if (r.finite) {
      const evaluator = options.evaluator ?? frequencyEvaluator(model);
      const attained = Number.isFinite(r.peakFrequency) ? largestSingularValue(evaluator.at(r.peakFrequency)) : dNorm;
      return {
        finite: true,
        value: attained,
        peakFrequency: r.peakFrequency,
        lowerBound: Math.max(attained, r.lowerBound - slack),
        upperBound: r.upperBound + slack,
        iterations: r.iterations,
        method: 'hamiltonian-on-reduced-realization',
        hamiltonianSolves: r.hamiltonianSolves,
        hamiltonianOrder: r.hamiltonianOrder,
        certificationSlack: slack,
      };
    }
  }
  const evaluator = options.evaluator ?? frequencyEvaluator(model);
  const sigmaAt = (w: number) => largestSingularValue(evaluator.at(w));

  let lower = dNorm;
  let peak = Infinity;
  const samples: { w: number; s: number }[] = [];
  for (const w of startingFrequencies(poles)) {
    const s = sigmaAt(w);
    samples.push({ w, s });
    if (s > lower) {
      lower = s;
      peak = w;
    }
  }
  const band = defaultFrequencyBand(poles);
  const gridStep = Math.log10(band[1] / band[0]) / 39;
  // Polish the three highest test frequencies before the first Hamiltonian test (common practice: a
  // starting bound at the top of the peak lets the first test certify it, so each O(n³) eigenvalue
  // computation saved is worth thousands of O(n²) evaluations of σ_max).
  const candidates = samples.filter((c) => c.w > 0 && Number.isFinite(c.w) && c.s > 0).sort((x, y) => y.s - x.s);
  const polishedAt: number[] = [];
  for (const c of candidates) {
    if (polishedAt.length >= 3) break;
    if (polishedAt.some((w) => Math.abs(Math.log10(w / c.w)) < gridStep)) continue;
    polishedAt.push(c.w);
    const p = maximizeNear(sigmaAt, c.w, gridStep);
    if (p.value > lower) {
      lower = p.value;
      peak = p.w;
    }
  }
  if (lower === 0) {
    // σ_max vanishes at every test frequency, more of them than a nonzero transfer function of this
    // size (up to degree 60) can have zeros: G ≡ 0.
    return {
      finite: true, value: 0, peakFrequency: 0, lowerBound: 0, upperBound: 0, iterations: 0,
      method: 'hamiltonian', hamiltonianSolves: 0, hamiltonianOrder: 0, certificationSlack: 0,
    };
  }
  let iterations = 0;
  let upper = Infinity;
  let hamiltonianSolves = 0;
  for (let pass = 0; pass < 3; pass++) {
    for (; iterations < 60; iterations++) {
      // Never test at σ_max(D) itself, where R = γ²I − DᵀD is singular.
      const gamma = Math.max((1 + 2 * eps) * lower, (1 + 1e-7) * dNorm);
      hamiltonianSolves++;
      const ws = imaginaryAxisFrequencies(hamiltonian(model, gamma));
      if (ws.length === 0) {
        upper = gamma;
        break;
      }
      let best = lower;
      let bestW = peak;
      for (let k = 0; k + 1 < ws.length; k++) {
        // σ(G(−jω)) = σ(G(jω)) for a real model, so a midpoint counts by its magnitude.
        const w = Math.abs(0.5 * (ws[k] + ws[k + 1]));
        const s = sigmaAt(w);
        if (s > best) {
          best = s;
          bestW = w;
        }
      }
      if (best <= gamma) {
        // Candidates without a higher midpoint: spurious near-axis eigenvalues at the top of the peak.
        upper = gamma;
        break;
      }
      lower = best;
      peak = bestW;
    }
    // Polish the peak on σ_max itself, which is evaluated accurately even where the Hamiltonian's
    // eigenvalues are not (see imaginaryAxisFrequencies); only attained values are accepted, and a raised
    // value goes through the Hamiltonian test again (so the last pass does not polish).
    if (pass === 2 || !(peak > 0 && Number.isFinite(peak))) break;
    const polished = maximizeNear(sigmaAt, peak, gridStep);
    if (polished.value <= lower * (1 + eps)) break;
    lower = polished.value;
    peak = polished.w;
  }
  return {
    finite: true,
    value: lower,
    peakFrequency: peak,
    lowerBound: lower,
    upperBound: Number.isFinite(upper) ? upper : (1 + 2 * eps) * lower,
    iterations,
    method: 'hamiltonian',
    hamiltonianSolves,
    hamiltonianOrder: 2 * n,
    certificationSlack: 0,
  };
}

/** ‖G‖₂ = ‖C Lc‖_F; not finite for a nonzero D or a pole on or right of the axis. */
export function h2Norm(model: StateSpaceModel, options: NormOptions = {}): NormValue {
  if (model.A.rows === 0) {
    return frobeniusNorm(model.D) === 0 ? { finite: true, value: 0 } : { finite: false, reason: 'not finite: D ≠ 0' };
  }
  const reason = unstableReason(model, options);
  if (reason) return { finite: false, reason };
  if (frobeniusNorm(model.D) !== 0) return { finite: false, reason: 'not finite: the model has a direct feedthrough D ≠ 0' };
  // A method that never forms P, so an error system far below G keeps its relative accuracy (a dense P,
  // as Bartels–Stewart gives, would lose everything below √ε·‖G‖₂): Hammarling's factor on the native
  // backend (about twice as fast as the sign iteration at n = 1000, measured), the factored sign
  // iteration on the portable one, which has no Hammarling kernel.
  const factor =
    kernels().name === 'native' ? hammarlingLyapunovFactor(kernels().schur(model.A), model.B, false) : lyapunovFactor(model.A, model.B);
  return { finite: true, value: frobeniusNorm(matmul(model.C, factor)) };
}
