// Dense kernels: BLAS level 3 through CBLAS and LAPACK through LAPACKE (row-major layout, so the
// engine's row-major Float64Arrays pass without copies on the JavaScript side; LAPACKE transposes to
// LAPACK's column order internally where the routine needs it, an O(n²) cost beside O(n³) work).
#include <cblas.h>
#include <lapacke.h>

#include <algorithm>
#include <cmath>
#include <thread>

#include "common.h"

namespace {

using ms::Args;
using ms::fail;

napi_value Gemm(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    bool ta = a.boolean(0, "transposeA"), tb = a.boolean(1, "transposeB");
    int64_t m = a.integer(2, "m"), n = a.integer(3, "n"), k = a.integer(4, "k");
    double alpha = a.number(5, "alpha");
    int64_t offA = a.integer(7, "offsetA"), lda = a.integer(8, "lda");
    int64_t offB = a.integer(10, "offsetB"), ldb = a.integer(11, "ldb");
    double beta = a.number(12, "beta");
    int64_t offC = a.integer(14, "offsetC"), ldc = a.integer(15, "ldc");
    if (m < 0 || n < 0 || k < 0) fail("invalid_option", "gemm: negative dimension");
    if (m == 0 || n == 0) return ms::undefinedValue(env);
    int64_t aRows = ta ? k : m, aCols = ta ? m : k, bRows = tb ? n : k, bCols = tb ? k : n;
    size_t needA = aRows > 0 ? (size_t)(offA + (aRows - 1) * lda + aCols) : 0;
    size_t needB = bRows > 0 ? (size_t)(offB + (bRows - 1) * ldb + bCols) : 0;
    double* A = a.f64(6, "A", needA);
    double* B = a.f64(9, "B", needB);
    double* C = a.f64(13, "C", (size_t)(offC + (m - 1) * ldc + n));
    cblas_dgemm(CblasRowMajor, ta ? CblasTrans : CblasNoTrans, tb ? CblasTrans : CblasNoTrans, (int)m, (int)n, (int)k, alpha,
                A + offA, (int)std::max<int64_t>(1, lda), B + offB, (int)std::max<int64_t>(1, ldb), beta, C + offC,
                (int)std::max<int64_t>(1, ldc));
    return ms::undefinedValue(env);
  });
}

// LU with partial pivoting in place (row-major): P·A = L·U; perm[k] = original row of row k.
// Returns [zeroPivot (−1 when none), permutationSign].
napi_value LuFactor(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    int64_t n = a.integer(1, "n");
    double* lu = a.f64(0, "A", (size_t)(n * n));
    int32_t* perm = a.i32(2, "perm", (size_t)n);
    ms::requireFinite(lu, (size_t)(n * n), (size_t)n, "A");
    std::vector<lapack_int> ipiv(std::max<int64_t>(1, n));
    int info2 = n > 0 ? LAPACKE_dgetrf(LAPACK_ROW_MAJOR, (int)n, (int)n, lu, (int)n, ipiv.data()) : 0;
    ms::lapackCheck(info2 < 0 ? info2 : 0, "dgetrf", "A");
    for (int64_t i = 0; i < n; i++) perm[i] = (int32_t)i;
    int sign = 1;
    for (int64_t k = 0; k < n; k++) {
      int64_t p = ipiv[k] - 1;
      if (p != k) {
        std::swap(perm[k], perm[p]);
        sign = -sign;
      }
    }
    napi_value out;
    napi_create_array_with_length(env, 2, &out);
    napi_set_element(env, out, 0, ms::num(env, info2 > 0 ? info2 - 1 : -1));
    napi_set_element(env, out, 1, ms::num(env, sign));
    return out;
  });
}

// B ← U⁻¹·L⁻¹·P·B for an n×w row-major B (in place).
napi_value LuSolve(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    int64_t n = a.integer(1, "n"), w = a.integer(4, "columns");
    double* lu = a.f64(0, "LU", (size_t)(n * n));
    int32_t* perm = a.i32(2, "perm", (size_t)n);
    double* b = a.f64(3, "B", (size_t)(n * w));
    if (n == 0 || w == 0) return ms::undefinedValue(env);
    std::vector<double> tmp((size_t)(n * w));
    for (int64_t k = 0; k < n; k++) std::memcpy(&tmp[(size_t)(k * w)], b + (size_t)perm[k] * w, sizeof(double) * w);
    std::memcpy(b, tmp.data(), sizeof(double) * n * w);
    cblas_dtrsm(CblasRowMajor, CblasLeft, CblasLower, CblasNoTrans, CblasUnit, (int)n, (int)w, 1.0, lu, (int)n, b, (int)w);
    cblas_dtrsm(CblasRowMajor, CblasLeft, CblasUpper, CblasNoTrans, CblasNonUnit, (int)n, (int)w, 1.0, lu, (int)n, b, (int)w);
    return ms::undefinedValue(env);
  });
}

// out ← A⁻¹ from the packed factorisation (dgetri).
napi_value LuInverse(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    int64_t n = a.integer(1, "n");
    double* lu = a.f64(0, "LU", (size_t)(n * n));
    int32_t* perm = a.i32(2, "perm", (size_t)n);
    double* out = a.f64(3, "out", (size_t)(n * n));
    if (n == 0) return ms::undefinedValue(env);
    // perm (a permutation) back into LAPACK's sequential interchanges.
    std::vector<lapack_int> ipiv(n), cur(n), pos(n);
    for (int64_t i = 0; i < n; i++) cur[i] = pos[i] = (lapack_int)i;
    for (int64_t k = 0; k < n; k++) {
      lapack_int p = pos[perm[k]];
      ipiv[k] = p + 1;
      lapack_int rk = cur[k], rp = cur[p];
      cur[k] = rp;
      cur[p] = rk;
      pos[rp] = (lapack_int)k;
      pos[rk] = p;
    }
    if (out != lu) std::memcpy(out, lu, sizeof(double) * n * n);
    int r = LAPACKE_dgetri(LAPACK_ROW_MAJOR, (int)n, out, (int)n, ipiv.data());
    ms::lapackCheck(r < 0 ? r : 0, "dgetri", "A");
    if (r > 0) fail("singular", "A is singular: pivot " + std::to_string(r - 1) + " is zero");
    return ms::undefinedValue(env);
  });
}

// Reciprocal condition number in the 1-norm from the packed factorisation and ‖A‖₁ (dgecon).
napi_value LuReciprocalCondition(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    int64_t n = a.integer(1, "n");
    double* lu = a.f64(0, "LU", (size_t)(n * n));
    double anorm = a.number(2, "norm1");
    if (n == 0) return ms::num(env, 1);
    double rcond = 0;
    int r = LAPACKE_dgecon(LAPACK_ROW_MAJOR, '1', (int)n, lu, (int)n, anorm, &rcond);
    ms::lapackCheck(r, "dgecon", "A");
    return ms::num(env, rcond);
  });
}

// Eigenvalues of a general real matrix (dgeev with balancing, no vectors). A is not modified.
napi_value Eigenvalues(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    int64_t n = a.integer(1, "n");
    double* A = a.f64(0, "A", (size_t)(n * n));
    double* wr = a.f64(2, "re", (size_t)n);
    double* wi = a.f64(3, "im", (size_t)n);
    if (n == 0) return ms::undefinedValue(env);
    ms::requireFinite(A, (size_t)(n * n), (size_t)n, "A");
    // A itself in LAPACK's column order (one transposed copy), not the column-major view Aᵀ: the same
    // eigenvalues either way, but the QR iteration then sees the matrix numpy's eigvals sees.
    std::vector<double> work((size_t)(n * n));
    for (int64_t j = 0; j < n; j++)
      for (int64_t i = 0; i < n; i++) work[j * n + i] = A[i * n + j];
    int r = LAPACKE_dgeev(LAPACK_COL_MAJOR, 'N', 'N', (int)n, work.data(), (int)n, wr, wi, nullptr, 1, nullptr, 1);
    ms::lapackCheck(r < 0 ? r : 0, "dgeev", "A");
    if (r > 0) fail("not_converged", "eigenvalues: the QR algorithm did not converge for A");
    return ms::undefinedValue(env);
  });
}

// Eigenvalues and right eigenvectors (dgeev): vectors in LAPACK's real packed form, unit 2-norm.
napi_value Eig(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    int64_t n = a.integer(1, "n");
    double* A = a.f64(0, "A", (size_t)(n * n));
    double* wr = a.f64(2, "re", (size_t)n);
    double* wi = a.f64(3, "im", (size_t)n);
    double* vr = a.f64(4, "vectors", (size_t)(n * n));
    if (n == 0) return ms::undefinedValue(env);
    ms::requireFinite(A, (size_t)(n * n), (size_t)n, "A");
    std::vector<double> work(A, A + n * n);
    int r = LAPACKE_dgeev(LAPACK_ROW_MAJOR, 'N', 'V', (int)n, work.data(), (int)n, wr, wi, nullptr, (int)n, vr, (int)n);
    ms::lapackCheck(r < 0 ? r : 0, "dgeev", "A");
    if (r > 0) fail("not_converged", "eig: the QR algorithm did not converge for A");
    return ms::undefinedValue(env);
  });
}

// Real Schur form in place: A = Z·T·Zᵀ (dgees, standardised 2×2 blocks).
napi_value Schur(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    int64_t n = a.integer(1, "n");
    double* T = a.f64(0, "A", (size_t)(n * n));
    double* Z = a.f64(2, "Z", (size_t)(n * n));
    double* wr = a.f64(3, "re", (size_t)n);
    double* wi = a.f64(4, "im", (size_t)n);
    if (n == 0) return ms::undefinedValue(env);
    ms::requireFinite(T, (size_t)(n * n), (size_t)n, "A");
    lapack_int sdim = 0;
    int r = LAPACKE_dgees(LAPACK_ROW_MAJOR, 'V', 'N', nullptr, (int)n, T, (int)n, &sdim, wr, wi, Z, (int)n);
    ms::lapackCheck(r < 0 ? r : 0, "dgees", "A");
    if (r > 0) fail("not_converged", "schur: the QR algorithm did not converge for A");
    return ms::undefinedValue(env);
  });
}

// Hessenberg form in place: A = Q·H·Qᵀ (dgehrd, dorghr).
napi_value Hessenberg(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    int64_t n = a.integer(1, "n");
    double* H = a.f64(0, "A", (size_t)(n * n));
    bool wantQ = !a.isNullish(2);
    double* Q = wantQ ? a.f64(2, "Q", (size_t)(n * n)) : nullptr;
    if (n == 0) return ms::undefinedValue(env);
    ms::requireFinite(H, (size_t)(n * n), (size_t)n, "A");
    std::vector<double> tau(std::max<int64_t>(1, n - 1));
    int r = LAPACKE_dgehrd(LAPACK_ROW_MAJOR, (int)n, 1, (int)n, H, (int)n, tau.data());
    ms::lapackCheck(r, "dgehrd", "A");
    if (wantQ) {
      std::memcpy(Q, H, sizeof(double) * n * n);
      r = LAPACKE_dorghr(LAPACK_ROW_MAJOR, (int)n, 1, (int)n, Q, (int)n, tau.data());
      ms::lapackCheck(r, "dorghr", "A");
    }
    for (int64_t i = 2; i < n; i++)
      for (int64_t j = 0; j < i - 1; j++) H[i * n + j] = 0;
    return ms::undefinedValue(env);
  });
}

// Thin SVD A = U·diag(s)·Vᵀ (dgesdd); U (m×k) and Vt (k×n) optional (both or neither). A not modified.
napi_value Svd(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    int64_t m = a.integer(1, "m"), n = a.integer(2, "n");
    int64_t k = std::min(m, n);
    double* A = a.f64(0, "A", (size_t)(m * n));
    double* s = a.f64(3, "s", (size_t)k);
    bool vectors = !a.isNullish(4);
    double* U = vectors ? a.f64(4, "U", (size_t)(m * k)) : nullptr;
    double* Vt = vectors ? a.f64(5, "Vt", (size_t)(k * n)) : nullptr;
    if (k == 0) return ms::undefinedValue(env);
    ms::requireFinite(A, (size_t)(m * n), (size_t)n, "A");
    std::vector<double> work(A, A + m * n);
    // Row-major LAPACKE checks the leading dimensions even when no vectors are wanted.
    int r = LAPACKE_dgesdd(LAPACK_ROW_MAJOR, vectors ? 'S' : 'N', (int)m, (int)n, work.data(), (int)n, s, U, (int)std::max<int64_t>(1, k), Vt,
                           (int)std::max<int64_t>(1, n));
    ms::lapackCheck(r < 0 ? r : 0, "dgesdd", "A");
    if (r > 0) fail("not_converged", "svd: the iteration did not converge for A");
    return ms::undefinedValue(env);
  });
}

// Symmetric eigenproblem in place (dsyevd, lower triangle read): values ascending, vectors in columns.
napi_value SymmetricEig(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    int64_t n = a.integer(1, "n");
    double* A = a.f64(0, "A", (size_t)(n * n));
    double* w = a.f64(2, "values", (size_t)n);
    bool vectors = a.boolean(3, "vectors");
    if (n == 0) return ms::undefinedValue(env);
    ms::requireFinite(A, (size_t)(n * n), (size_t)n, "A");
    int r = LAPACKE_dsyevd(LAPACK_ROW_MAJOR, vectors ? 'V' : 'N', 'L', (int)n, A, (int)n, w);
    ms::lapackCheck(r < 0 ? r : 0, "dsyevd", "A");
    if (r > 0) fail("not_converged", "symmetricEig: the iteration did not converge for A");
    return ms::undefinedValue(env);
  });
}

// Cholesky A = L·Lᵀ in place (dpotrf, lower); the strict upper triangle is zeroed. Returns the failing
// column (−1 on success).
napi_value Cholesky(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    int64_t n = a.integer(1, "n");
    double* A = a.f64(0, "A", (size_t)(n * n));
    if (n == 0) return ms::num(env, -1);
    ms::requireFinite(A, (size_t)(n * n), (size_t)n, "A");
    int r = LAPACKE_dpotrf(LAPACK_ROW_MAJOR, 'L', (int)n, A, (int)n);
    ms::lapackCheck(r < 0 ? r : 0, "dpotrf", "A");
    for (int64_t i = 0; i < n; i++)
      for (int64_t j = i + 1; j < n; j++) A[i * n + j] = 0;
    return ms::num(env, r > 0 ? r - 1 : -1);
  });
}

// Pivoted Cholesky of a semidefinite X (dpstrf): writes F (n×rank, rows in X's order) with X ≈ F·Fᵀ,
// stopping where the pivot falls to tol²·max diag X. X is overwritten. Returns rank.
napi_value PivotedCholesky(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    int64_t n = a.integer(1, "n");
    double* X = a.f64(0, "X", (size_t)(n * n));
    double tol = a.number(2, "tolerance");
    double* F = a.f64(3, "F", (size_t)(n * n));
    if (n == 0) return ms::num(env, 0);
    ms::requireFinite(X, (size_t)(n * n), (size_t)n, "X");
    double dmax = 0;
    for (int64_t i = 0; i < n; i++) dmax = std::max(dmax, X[i * n + i]);
    if (!(dmax > 0)) return ms::num(env, 0);
    std::vector<lapack_int> piv(n);
    lapack_int rank = 0;
    int r = LAPACKE_dpstrf(LAPACK_ROW_MAJOR, 'L', (int)n, X, (int)n, piv.data(), &rank, tol * tol * dmax);
    ms::lapackCheck(r < 0 ? r : 0, "dpstrf", "X");
    for (int64_t k = 0; k < n; k++) {
      double* dst = F + (size_t)(piv[k] - 1) * rank;
      for (int64_t j = 0; j < rank; j++) dst[j] = j <= k ? X[k * n + j] : 0;
    }
    return ms::num(env, rank);
  });
}

// Thin QR (dgeqrf, dorgqr): A (m×n) = Q (m×k)·R (k×n), k = min(m, n). A not modified.
napi_value Qr(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    int64_t m = a.integer(1, "m"), n = a.integer(2, "n"), k = std::min(m, n);
    double* A = a.f64(0, "A", (size_t)(m * n));
    double* Q = a.f64(3, "Q", (size_t)(m * k));
    double* R = a.f64(4, "R", (size_t)(k * n));
    if (k == 0) return ms::undefinedValue(env);
    ms::requireFinite(A, (size_t)(m * n), (size_t)n, "A");
    std::vector<double> work(A, A + m * n), tau(k);
    int r = LAPACKE_dgeqrf(LAPACK_ROW_MAJOR, (int)m, (int)n, work.data(), (int)n, tau.data());
    ms::lapackCheck(r, "dgeqrf", "A");
    for (int64_t i = 0; i < k; i++)
      for (int64_t j = 0; j < n; j++) R[i * n + j] = j >= i ? work[i * n + j] : 0;
    for (int64_t i = 0; i < m; i++) std::memcpy(Q + i * k, &work[i * n], sizeof(double) * k);
    r = LAPACKE_dorgqr(LAPACK_ROW_MAJOR, (int)m, (int)k, (int)k, Q, (int)k, tau.data());
    ms::lapackCheck(r, "dorgqr", "A");
    return ms::undefinedValue(env);
  });
}

// QR with column pivoting (dgeqp3) truncated at the numerical rank r where |R_kk| ≤ tol·|R_00|:
// Q (m×r), R (r×n, pivoted column order), perm[j] = original column of column j. Returns r.
napi_value PivotedQr(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    int64_t m = a.integer(1, "m"), n = a.integer(2, "n"), k = std::min(m, n);
    double* A = a.f64(0, "A", (size_t)(m * n));
    double tol = a.number(3, "tolerance");
    int32_t* perm = a.i32(4, "perm", (size_t)n);
    double* Q = a.f64(5, "Q", (size_t)(m * k));
    double* R = a.f64(6, "R", (size_t)(k * n));
    for (int64_t j = 0; j < n; j++) perm[j] = (int32_t)j;
    if (k == 0) return ms::num(env, 0);
    ms::requireFinite(A, (size_t)(m * n), (size_t)n, "A");
    std::vector<double> work(A, A + m * n), tau(k);
    std::vector<lapack_int> jpvt(n, 0);
    int r = LAPACKE_dgeqp3(LAPACK_ROW_MAJOR, (int)m, (int)n, work.data(), (int)n, jpvt.data(), tau.data());
    ms::lapackCheck(r, "dgeqp3", "A");
    int64_t rank = 0;
    double first = std::fabs(work[0]);
    while (rank < k && first > 0 && std::fabs(work[rank * n + rank]) > tol * first) rank++;
    for (int64_t j = 0; j < n; j++) perm[j] = jpvt[j] - 1;
    for (int64_t i = 0; i < rank; i++)
      for (int64_t j = 0; j < n; j++) R[i * n + j] = j >= i ? work[i * n + j] : 0;
    if (rank > 0) {
      std::vector<double> q((size_t)(m * rank));
      for (int64_t i = 0; i < m; i++) std::memcpy(&q[i * rank], &work[i * n], sizeof(double) * rank);
      r = LAPACKE_dorgqr(LAPACK_ROW_MAJOR, (int)m, (int)rank, (int)rank, q.data(), (int)rank, tau.data());
      ms::lapackCheck(r, "dorgqr", "A");
      std::memcpy(Q, q.data(), sizeof(double) * m * rank);
    }
    return ms::num(env, rank);
  });
}

// Column-pivoted QR of Mᵀ for the n×w row-major M in `work`, in place (the contract of the portable
// pivotedQrOfRows): the column-major view of M is Mᵀ, so dgeqp3 runs on it without a copy. On return
// row j holds column j of [R₁₁ R₁₂] (entries 0..r−1, zeros after), perm[j] is the original row. Returns r.
napi_value PivotedQrOfRows(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    int64_t n = a.integer(1, "n"), w = a.integer(2, "w");
    double* M = a.f64(0, "work", (size_t)(n * w));
    double tol = a.number(3, "tolerance");
    int32_t* perm = a.i32(4, "perm", (size_t)n);
    for (int64_t j = 0; j < n; j++) perm[j] = (int32_t)j;
    int64_t k = std::min(n, w);
    if (k == 0) return ms::num(env, 0);
    std::vector<double> tau(k);
    std::vector<lapack_int> jpvt(n, 0);
    int r = LAPACKE_dgeqp3(LAPACK_COL_MAJOR, (int)w, (int)n, M, (int)w, jpvt.data(), tau.data());
    ms::lapackCheck(r, "dgeqp3", "factor");
    int64_t rank = 0;
    double first = std::fabs(M[0]);
    while (rank < k && first > 0 && std::fabs(M[rank * w + rank]) > tol * first) rank++;
    for (int64_t j = 0; j < n; j++) {
      perm[j] = jpvt[j] - 1;
      double* col = M + j * w;
      for (int64_t i = std::min(j + 1, rank); i < w; i++) col[i] = 0;
    }
    return ms::num(env, rank);
  });
}

// Quasi-triangular Sylvester equation op(A)·X + isgn·X·op(B) = scale·C in place (dtrsyl3, level 3).
// Returns scale (≤ 1; < 1 when the solution was scaled to avoid overflow).
napi_value Trsyl(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    bool ta = a.boolean(0, "transposeA"), tb = a.boolean(1, "transposeB");
    int64_t isgn = a.integer(2, "sign");
    int64_t m = a.integer(3, "m"), n = a.integer(4, "n");
    double* A = a.f64(5, "A", (size_t)(m * m));
    double* B = a.f64(6, "B", (size_t)(n * n));
    double* C = a.f64(7, "C", (size_t)(m * n));
    if (m == 0 || n == 0) return ms::num(env, 1);
    double scale = 1;
    int r = LAPACKE_dtrsyl3(LAPACK_ROW_MAJOR, ta ? 'T' : 'N', tb ? 'T' : 'N', (int)isgn, (int)m, (int)n, A, (int)m, B, (int)n, C, (int)n,
                            &scale);
    ms::lapackCheck(r < 0 ? r : 0, "dtrsyl3", "A");
    if (r == 1) scale = -std::fabs(scale);  // A and −isgn·B have (nearly) common eigenvalues: perturbed
    return ms::num(env, scale);
  });
}

// One frequency of the Hessenberg response (Laub 1981): X = (jωI − H)⁻¹F by Gaussian elimination with
// adjacent-row pivoting (Golub & Van Loan 2013, ch. 4), then G = CQ·X + D. Real and imaginary parts in
// separate arrays and right-hand sides stored by column, so every inner loop is a contiguous, vectorizable
// axpy or dot product.
struct ShiftedHessenbergWork {
  std::vector<double> mr, mi, xr, xi;
  ShiftedHessenbergWork(int64_t n, int64_t m) : mr(n * n), mi(n * n), xr(n * m), xi(n * m) {}
};

static void shiftedHessenbergResponse(const double* H, int64_t n, const double* F, int64_t m, const double* CQ, int64_t p,
                                      const double* D, double w, double* gr, double* gi, ShiftedHessenbergWork& ws) {
  double* mr = ws.mr.data();
  double* mi = ws.mi.data();
  double* xr = ws.xr.data();
  double* xi = ws.xi.data();
  for (int64_t i = 0; i < n; i++) {
    int64_t j0 = i == 0 ? 0 : i - 1;
    for (int64_t j = j0; j < n; j++) {
      mr[i * n + j] = -H[i * n + j];
      mi[i * n + j] = 0;
    }
    mi[i * n + i] = w;
  }
  for (int64_t j = 0; j < m; j++)
    for (int64_t k = 0; k < n; k++) {
      xr[j * n + k] = F[k * m + j];
      xi[j * n + k] = 0;
    }
  for (int64_t k = 0; k + 1 < n; k++) {
    double* rkr = mr + k * n;
    double* rki = mi + k * n;
    double* rsr = rkr + n;
    double* rsi = rki + n;
    if (std::fabs(rsr[k]) + std::fabs(rsi[k]) > std::fabs(rkr[k]) + std::fabs(rki[k])) {
      for (int64_t j = k; j < n; j++) {
        std::swap(rkr[j], rsr[j]);
        std::swap(rki[j], rsi[j]);
      }
      for (int64_t j = 0; j < m; j++) {
        std::swap(xr[j * n + k], xr[j * n + k + 1]);
        std::swap(xi[j * n + k], xi[j * n + k + 1]);
      }
    }
    double sr = rsr[k], si = rsi[k];
    if (sr == 0 && si == 0) continue;
    double pr = rkr[k], pi = rki[k];
    double den = pr * pr + pi * pi;
    double lr = (sr * pr + si * pi) / den, li = (si * pr - sr * pi) / den;
    rsr[k] = 0;
    rsi[k] = 0;
#pragma omp simd
    for (int64_t j = k + 1; j < n; j++) {
      double ar = rkr[j], ai = rki[j];
      rsr[j] -= lr * ar - li * ai;
      rsi[j] -= lr * ai + li * ar;
    }
    for (int64_t j = 0; j < m; j++) {
      double ar = xr[j * n + k], ai = xi[j * n + k];
      xr[j * n + k + 1] -= lr * ar - li * ai;
      xi[j * n + k + 1] -= lr * ai + li * ar;
    }
  }
  for (int64_t i = n - 1; i >= 0; i--) {
    const double* rr = mr + i * n;
    const double* ri = mi + i * n;
    double dr = rr[i], di = ri[i], den = dr * dr + di * di;
    for (int64_t j = 0; j < m; j++) {
      const double* yr = xr + j * n;
      const double* yi = xi + j * n;
      double sr = 0, si = 0;
#pragma omp simd reduction(+ : sr, si)
      for (int64_t k = i + 1; k < n; k++) {
        sr += rr[k] * yr[k] - ri[k] * yi[k];
        si += rr[k] * yi[k] + ri[k] * yr[k];
      }
      double br = xr[j * n + i] - sr, bi = xi[j * n + i] - si;
      xr[j * n + i] = (br * dr + bi * di) / den;
      xi[j * n + i] = (bi * dr - br * di) / den;
    }
  }
  for (int64_t i = 0; i < p; i++)
    for (int64_t j = 0; j < m; j++) {
      double sr = D[i * m + j], si = 0;
      const double* c = CQ + i * n;
      const double* yr = xr + j * n;
      const double* yi = xi + j * n;
#pragma omp simd reduction(+ : sr, si)
      for (int64_t k = 0; k < n; k++) {
        sr += c[k] * yr[k];
        si += c[k] * yi[k];
      }
      gr[i * m + j] = sr;
      gi[i * m + j] = si;
    }
}

// hessenbergResponse(H, n, QtB, m, CQ, p, D, w, re, im): every frequency of w, re/im as [frequency][p][m];
// the frequencies are spread over the BLAS thread count.
napi_value HessenbergResponse(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    int64_t n = a.integer(1, "n"), m = a.integer(3, "m"), p = a.integer(5, "p");
    double* H = a.f64(0, "H", (size_t)(n * n));
    double* F = a.f64(2, "QtB", (size_t)(n * m));
    double* CQ = a.f64(4, "CQ", (size_t)(p * n));
    double* D = a.f64(6, "D", (size_t)(p * m));
    size_t nf = 0;
    double* w = a.f64(7, "frequencies", 0, &nf);
    double* re = a.f64(8, "re", nf * p * m);
    double* im = a.f64(9, "im", nf * p * m);
    ms::requireFinite(H, (size_t)(n * n), (size_t)n, "A");
    ms::requireFinite(w, nf, 0, "frequencies");
    int threads = std::max(1, std::min<int>(ms::blasThreads(), (int)nf));
    if (n < 64) threads = 1;
    auto run = [&](size_t from, size_t to) {
      ShiftedHessenbergWork ws(n, m);
      for (size_t f = from; f < to; f++) shiftedHessenbergResponse(H, n, F, m, CQ, p, D, w[f], re + f * p * m, im + f * p * m, ws);
    };
    if (threads == 1) {
      run(0, nf);
    } else {
      std::vector<std::thread> pool;
      size_t chunk = (nf + threads - 1) / threads;
      for (int t = 1; t < threads; t++) {
        size_t from = t * chunk, to = std::min(nf, from + chunk);
        if (from < to) pool.emplace_back(run, from, to);
      }
      run(0, std::min(nf, chunk));
      for (auto& th : pool) th.join();
    }
    return ms::undefinedValue(env);
  });
}

}  // namespace

namespace ms {
void registerDense(napi_env env, napi_value exports) {
  define(env, exports, "gemm", Gemm);
  define(env, exports, "luFactor", LuFactor);
  define(env, exports, "luSolve", LuSolve);
  define(env, exports, "luInverse", LuInverse);
  define(env, exports, "luReciprocalCondition", LuReciprocalCondition);
  define(env, exports, "eigenvalues", Eigenvalues);
  define(env, exports, "eig", Eig);
  define(env, exports, "schur", Schur);
  define(env, exports, "hessenberg", Hessenberg);
  define(env, exports, "svd", Svd);
  define(env, exports, "symmetricEig", SymmetricEig);
  define(env, exports, "cholesky", Cholesky);
  define(env, exports, "pivotedCholesky", PivotedCholesky);
  define(env, exports, "qr", Qr);
  define(env, exports, "pivotedQr", PivotedQr);
  define(env, exports, "pivotedQrOfRows", PivotedQrOfRows);
  define(env, exports, "trsyl", Trsyl);
  define(env, exports, "hessenbergResponse", HessenbergResponse);
}
}  // namespace ms
