// Hammarling's method for the Cholesky factor of a stable Lyapunov equation's solution, on a real Schur
// form: S. J. Hammarling, "Numerical solution of the stable, non-negative definite Lyapunov equation",
// IMA J. Numer. Anal. 2 (1982) 303–323, §§5–6 (the complex triangular case, a column of the factor at a
// time from the bottom right corner).
//
// Given T (n×n, real quasi-triangular, the Schur form of A) and W (n×m), find F (n×n) with Y = F·Fᵀ and
//   T·Y + Y·Tᵀ + W·Wᵀ = 0        (transpose = false; controllability gramian in Schur coordinates)
//   Tᵀ·Y + Y·T + W·Wᵀ = 0        (transpose = true;  observability gramian)
// Y is never formed, so small Hankel singular values keep their relative accuracy instead of drowning in
// the rounding of a full solution (Hammarling 1982, §1).
//
// Steps: (1) each 2×2 block of T is triangularised by one complex unitary rotation (applied to the two
// rows and columns it touches, O(n) per block), so T becomes complex upper triangular Tc = Qᴴ·T·Q and the
// right-hand side Wc = Qᴴ·W; the transposed equation is turned into the plain one by reversing the order
// of the unknowns. (2) Hammarling's recursion, one column of the upper triangular factor U per step: a
// Householder reflection from the right leaves the last row of the current right-hand factor with one
// entry ρ; then ν = |ρ|/√(−2 Re τ), a shifted triangular solve (T₁ + τ̄·I)·u = −r·ρ̄/ν − t·ν (level 2,
// ztrsv), and the rank-one update y = r − (ρ/ν)·u of the remaining right-hand factor (Hammarling 1982,
// eqs. 6.6–6.10, in the notation of the upper-triangular variant). (3) The complex factor Q·U gives
// Y = Re(QU)·Re(QU)ᵀ + Im(QU)·Im(QU)ᵀ; a QR factorization of [Re Im]ᵀ makes it one real n×n factor.
#include <cblas.h>
#include <lapacke.h>

#include <algorithm>
#include <cmath>
#include <complex>
#include <vector>
#include <xmmintrin.h>

#include "common.h"

namespace {

using cd = std::complex<double>;
using ms::Args;
using ms::fail;

struct Rotation {
  int64_t k;  // acts on indices k and k+1
  cd v1, v2;  // G = [[v1, −conj(v2)], [v2, conj(v1)]], unitary
};

// rows k, k+1 of a column-major complex matrix (leading dimension ld), columns [from, to): x ← Gᴴ·x
inline void rotateRows(cd* M, int64_t ld, const Rotation& g, int64_t from, int64_t to) {
  for (int64_t j = from; j < to; j++) {
    cd x = M[g.k + j * ld], y = M[g.k + 1 + j * ld];
    M[g.k + j * ld] = std::conj(g.v1) * x + std::conj(g.v2) * y;
    M[g.k + 1 + j * ld] = -g.v2 * x + g.v1 * y;
  }
}

napi_value HammarlingFactor(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    int64_t n = a.integer(1, "n");
    const double* T = a.f64(0, "T", (size_t)(n * n));
    int64_t m = a.integer(3, "m");
    const double* W = a.f64(2, "W", (size_t)(n * m));
    bool transpose = a.boolean(4, "transpose");
    double* F = a.f64(5, "F", (size_t)(n * n));
    if (n == 0) return ms::num(env, 0);
    if (m < 1) fail("dimension_mismatch", "W must have at least one column");
    ms::requireFinite(T, (size_t)(n * n), (size_t)n, "T");
    ms::requireFinite(W, (size_t)(n * m), (size_t)m, "W");

    // (1) Complex triangular form, column-major.
    std::vector<cd> Tc((size_t)(n * n)), R((size_t)(n * m));
    for (int64_t i = 0; i < n; i++)
      for (int64_t j = 0; j < n; j++) Tc[i + j * n] = T[i * n + j];
    for (int64_t i = 0; i < n; i++)
      for (int64_t j = 0; j < m; j++) R[i + j * n] = W[i * m + j];
    std::vector<Rotation> rotations;
    for (int64_t k = 0; k + 1 < n; k++) {
      double c = T[(k + 1) * n + k];
      if (c == 0) continue;
      double p = T[k * n + k], b = T[k * n + k + 1], d = T[(k + 1) * n + k + 1];
      double half = 0.5 * (p - d), disc = half * half + b * c;
      if (disc >= 0) fail("invalid_option", "T is not in standardized real Schur form (a 2×2 block has real eigenvalues)");
      cd lambda(0.5 * (p + d), std::sqrt(-disc));
      cd v1 = b, v2 = lambda - p;  // an eigenvector of the block for lambda
      double norm = std::sqrt(std::norm(v1) + std::norm(v2));
      Rotation g{k, v1 / norm, v2 / norm};
      rotateRows(Tc.data(), n, g, k, n);
      for (int64_t i = 0; i <= k + 1; i++) {  // columns k, k+1: x ← x·G
        cd x = Tc[i + k * n], y = Tc[i + (k + 1) * n];
        Tc[i + k * n] = x * g.v1 + y * g.v2;
        Tc[i + (k + 1) * n] = -x * std::conj(g.v2) + y * std::conj(g.v1);
      }
      Tc[k + 1 + k * n] = 0;
      rotateRows(R.data(), n, g, 0, m);
      rotations.push_back(g);
      k++;  // the next index belongs to this block
    }
    if (transpose) {
      // Tcᴴ·Y + Y·Tc = −Wc·Wcᴴ with the unknowns in reverse order J: T̃ = J·Tcᴴ·J is upper triangular and
      // T̃·Ỹ + Ỹ·T̃ᴴ = −(J·Wc)(J·Wc)ᴴ with Ỹ = J·Y·J.
      std::vector<cd> Tt((size_t)(n * n));
      for (int64_t i = 0; i < n; i++)
        for (int64_t j = i; j < n; j++) Tt[i + j * n] = std::conj(Tc[(n - 1 - j) + (n - 1 - i) * n]);
      Tc.swap(Tt);
      for (int64_t j = 0; j < m; j++)
        for (int64_t i = 0; i < n / 2; i++) std::swap(R[i + j * n], R[n - 1 - i + j * n]);
    }

    // (2) Hammarling's recursion: U upper triangular with Ỹ = U·Uᴴ. The right-hand factor decays towards
    // the top-left corner of a stiff model's Schur form into subnormal numbers, whose arithmetic is two
    // orders of magnitude slower on x86; they are flushed to zero for the recursion (FTZ/DAZ, restored
    // after), far below the factor's rounding level.
    const unsigned int savedCsr = _mm_getcsr();
    _mm_setcsr(savedCsr | 0x8040);
    struct RestoreCsr {
      unsigned int csr;
      ~RestoreCsr() { _mm_setcsr(csr); }
    } restoreCsr{savedCsr};
    std::vector<cd> U((size_t)(n * n), cd(0));
    std::vector<cd> v((size_t)m), diag((size_t)n);
    for (int64_t i = 0; i < n; i++) diag[i] = Tc[i + i * n];
    const int64_t last = m - 1;
    for (int64_t k = n - 1; k >= 0; k--) {
      cd rho;
      if (m == 1) {
        rho = R[k];
      } else {
        // Householder from the right: row k of R becomes (0, …, 0, ρ). The row is scaled by its largest
        // entry first: the right-hand factor decays towards the top-left corner and its squares would
        // underflow.
        double big = 0;
        for (int64_t j = 0; j < m; j++) big = std::max(big, std::abs(R[k + j * n]));
        rho = 0;
        if (big > 0) {
          double xnorm2 = 0;
          for (int64_t j = 0; j < m; j++) xnorm2 += std::norm(R[k + j * n] / big);
          double xnorm = std::sqrt(xnorm2);  // of the scaled row
          cd xm = R[k + last * n] / big;
          double axm = std::abs(xm);
          cd rhoScaled = -(axm > 0 ? xm / axm : cd(1)) * xnorm;
          rho = rhoScaled * big;
          // v = conj(x/big)ᵀ − conj(ρ/big)·e_m; H = I − 2·v·vᴴ/(vᴴv); x·H = ρ·e_mᵀ
          double vnorm2 = 0;
          for (int64_t j = 0; j < m; j++) {
            v[j] = std::conj(R[k + j * n] / big) - (j == last ? std::conj(rhoScaled) : cd(0));
            vnorm2 += std::norm(v[j]);
          }
          if (vnorm2 > 0) {
            double scale = 2 / vnorm2;
            for (int64_t i = 0; i < k; i++) {
              cd s = 0;
              for (int64_t j = 0; j < m; j++) s += R[i + j * n] * v[j];
              s *= scale;
              for (int64_t j = 0; j < m; j++) R[i + j * n] -= s * std::conj(v[j]);
            }
          }
        }
        for (int64_t j = 0; j < last; j++) R[k + j * n] = 0;
        R[k + last * n] = rho;
      }
      cd tau = diag[k];
      if (!(tau.real() < 0)) {
        fail("unstable", "A is not stable (an eigenvalue has real part " + std::to_string(tau.real()) +
                             "); the Lyapunov equation needs A stable");
      }
      double s = std::sqrt(-2 * tau.real());
      double arho = std::abs(rho);
      double nu = arho / s;
      U[k + k * n] = nu;
      if (k == 0) break;
      cd phase = arho > 0 ? rho / arho : cd(0);
      cd* u = &U[k * n];  // column k, rows 0..k-1
      const cd* t = &Tc[k * n];
      cd* r = &R[last * n];
      // (T₁ + τ̄ I)·u = −r·(ρ̄/ν) − t·ν, with ρ̄/ν = conj(phase)·s
      for (int64_t i = 0; i < k; i++) u[i] = -r[i] * (std::conj(phase) * s) - t[i] * nu;
      for (int64_t i = 0; i < k; i++) Tc[i + i * n] = diag[i] + std::conj(tau);
      cblas_ztrsv(CblasColMajor, CblasUpper, CblasNoTrans, CblasNonUnit, (int)k, Tc.data(), (int)n, u, 1);
      for (int64_t i = 0; i < k; i++) Tc[i + i * n] = diag[i];
      // y = r − (ρ/ν)·u, with ρ/ν = phase·s
      cd alpha = phase * s;
      for (int64_t i = 0; i < k; i++) r[i] -= alpha * u[i];
    }
    for (size_t q = 0; q < U.size(); q++) {
      if (!std::isfinite(U[q].real()) || !std::isfinite(U[q].imag())) fail("non_finite", "Hammarling factor: overflow (A too close to unstable)");
    }

    // (3) Back to the real Schur coordinates: undo the reversal, then apply Q = Π G to the rows.
    if (transpose) {
      for (int64_t j = 0; j < n; j++)
        for (int64_t i = 0; i < n / 2; i++) std::swap(U[i + j * n], U[n - 1 - i + j * n]);
    }
    for (const Rotation& g : rotations) {
      for (int64_t j = 0; j < n; j++) {  // x ← G·x on rows k, k+1
        cd x = U[g.k + j * n], y = U[g.k + 1 + j * n];
        U[g.k + j * n] = g.v1 * x - std::conj(g.v2) * y;
        U[g.k + 1 + j * n] = g.v2 * x + std::conj(g.v1) * y;
      }
    }
    if (rotations.empty()) {
      for (int64_t i = 0; i < n; i++)
        for (int64_t j = 0; j < n; j++) F[i * n + j] = U[i + j * n].real();
      return ms::num(env, n);
    }
    // Y = P·Pᵀ + S·Sᵀ with P = Re U, S = Im U: QR of M = [P S]ᵀ (2n×n, row-major) gives Y = RᵀR, F = Rᵀ.
    std::vector<double> M((size_t)(2 * n * n));
    for (int64_t j = 0; j < n; j++) {
      for (int64_t i = 0; i < n; i++) {
        M[j * n + i] = U[i + j * n].real();
        M[(n + j) * n + i] = U[i + j * n].imag();
      }
    }
    std::vector<double> tauq((size_t)n);
    int r = LAPACKE_dgeqrf(LAPACK_ROW_MAJOR, (int)(2 * n), (int)n, M.data(), (int)n, tauq.data());
    ms::lapackCheck(r, "dgeqrf", "Hammarling factor");
    for (int64_t i = 0; i < n; i++)
      for (int64_t j = 0; j < n; j++) F[i * n + j] = j <= i ? M[j * n + i] : 0;  // F = Rᵀ
    return ms::num(env, n);
  });
}

}  // namespace

namespace ms {
void registerHammarling(napi_env env, napi_value exports) { define(env, exports, "hammarlingFactor", HammarlingFactor); }
}  // namespace ms
