// Sparse factorizations from SuiteSparse: UMFPACK (Davis 2004, "Algorithm 832: UMFPACK V4.3, an
// unsymmetric-pattern multifrontal method", ACM TOMS 30(2)) real and complex LU with the symbolic analysis
// kept for new values or shifts on the same pattern; CHOLMOD (Chen, Davis, Hager & Rajamanickam 2008,
// ACM TOMS 35(3)) for symmetric positive definite matrices; AMD and COLAMD orderings.
// Matrices arrive in compressed sparse column form (colPtr, rowIndex, values[, imaginary values]).
#include <amd.h>
#include <cholmod.h>
#include <colamd.h>
#include <umfpack.h>

#include <algorithm>
#include <cstdio>
#include <atomic>
#include <mutex>
#include <thread>

#include "common.h"

namespace {

using ms::Args;
using ms::fail;
using ms::Failure;

struct Csc {
  int n = 0;
  int32_t* p = nullptr;
  int32_t* i = nullptr;
  double* x = nullptr;
  double* z = nullptr;
  size_t nnz = 0;
};

Csc readCsc(const Args& a, size_t at, const char* name, bool withValues = true) {
  Csc c;
  int64_t n = a.integer(at, "n");
  if (n < 0 || n > 2147483647LL) fail("invalid_option", std::string(name) + ": n out of range");
  c.n = (int)n;
  c.p = a.i32(at + 1, "colPtr", (size_t)n + 1);
  int64_t nnz = c.p[n];
  if (nnz < 0 || c.p[0] != 0) fail("parse_error", std::string(name) + ": column pointers must start at 0 and not decrease");
  for (int64_t j = 0; j < n; j++)
    if (c.p[j + 1] < c.p[j]) fail("parse_error", std::string(name) + ": column pointers must not decrease");
  c.nnz = (size_t)nnz;
  c.i = a.i32(at + 2, "rowIndex", c.nnz);
  for (size_t k = 0; k < c.nnz; k++)
    if (c.i[k] < 0 || c.i[k] >= n) fail("parse_error", std::string(name) + ": row index " + std::to_string(c.i[k]) + " out of range");
  if (!withValues) return c;
  c.x = a.f64(at + 3, "values", c.nnz);
  ms::requireFinite(c.x, c.nnz, 0, name);
  if (!a.isNullish(at + 4)) {
    c.z = a.f64(at + 4, "imaginary values", c.nnz);
    ms::requireFinite(c.z, c.nnz, 0, name);
  }
  return c;
}

// ---- UMFPACK ----------------------------------------------------------------------------------

struct UmfHandle {
  void* object = nullptr;
  bool complex = false;
  bool numeric = false;
  ~UmfHandle() { release(); }
  void release() {
    if (!object) return;
    if (numeric) {
      if (complex) umfpack_zi_free_numeric(&object);
      else umfpack_di_free_numeric(&object);
    } else {
      if (complex) umfpack_zi_free_symbolic(&object);
      else umfpack_di_free_symbolic(&object);
    }
    object = nullptr;
  }
};

void finalizeUmf(napi_env, void* data, void*) { delete static_cast<UmfHandle*>(data); }

napi_value external(napi_env env, UmfHandle* h) {
  napi_value out;
  napi_create_external(env, h, finalizeUmf, nullptr, &out);
  return out;
}

UmfHandle* handleOf(const Args& a, size_t at, bool wantNumeric) {
  void* data = nullptr;
  if (napi_get_value_external(a.env, a.at(at, "factor"), &data) != napi_ok || !data) fail("invalid_option", "not a sparse factor handle");
  UmfHandle* h = static_cast<UmfHandle*>(data);
  if (!h->object) fail("invalid_option", "the sparse factor was freed");
  if (h->numeric != wantNumeric) fail("invalid_option", wantNumeric ? "expected a numeric factorization" : "expected a symbolic analysis");
  return h;
}

void umfStatus(int status, const char* what, const char* name) {
  if (status == UMFPACK_OK) return;
  if (status == UMFPACK_WARNING_singular_matrix) fail("singular", std::string(name) + " is singular (" + what + ")");
  if (status == UMFPACK_ERROR_out_of_memory) fail("out_of_memory", std::string(what) + ": out of memory for " + name);
  if (status == UMFPACK_ERROR_invalid_matrix) fail("parse_error", std::string(what) + ": " + name + " is not a valid compressed-column matrix");
  fail("native_error", std::string(what) + " failed for " + name + " (UMFPACK status " + std::to_string(status) + ")");
}

// umfpackSymbolic(n, colPtr, rowIndex, values, imag|null, name) → [handle, info]
napi_value UmfSymbolic(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    Csc c = readCsc(a, 0, "matrix");
    std::string name = a.isNullish(5) ? "matrix" : a.string(5, "name");
    double control[UMFPACK_CONTROL], inf[UMFPACK_INFO];
    auto* h = new UmfHandle();
    h->complex = c.z != nullptr;
    int status;
    if (h->complex) {
      umfpack_zi_defaults(control);
      status = umfpack_zi_symbolic(c.n, c.n, c.p, c.i, c.x, c.z, &h->object, control, inf);
    } else {
      umfpack_di_defaults(control);
      status = umfpack_di_symbolic(c.n, c.n, c.p, c.i, c.x, &h->object, control, inf);
    }
    if (status != UMFPACK_OK) {
      delete h;
      umfStatus(status, "symbolic analysis", name.c_str());
    }
    napi_value out, infoObj;
    napi_create_array_with_length(env, 2, &out);
    napi_create_object(env, &infoObj);
    double unit = inf[UMFPACK_SIZE_OF_UNIT];
    ms::setNumber(env, infoObj, "peakMemoryBytes", inf[UMFPACK_PEAK_MEMORY_ESTIMATE] * unit);
    ms::setNumber(env, infoObj, "numericSizeBytes", inf[UMFPACK_NUMERIC_SIZE_ESTIMATE] * unit);
    ms::setNumber(env, infoObj, "flopsEstimate", inf[UMFPACK_FLOPS_ESTIMATE]);
    ms::setNumber(env, infoObj, "lnzEstimate", inf[UMFPACK_LNZ_ESTIMATE]);
    ms::setNumber(env, infoObj, "unzEstimate", inf[UMFPACK_UNZ_ESTIMATE]);
    napi_set_element(env, out, 0, external(env, h));
    napi_set_element(env, out, 1, infoObj);
    return out;
  });
}

// umfpackNumeric(symbolic, n, colPtr, rowIndex, values, imag|null, name) → [handle, info]
napi_value UmfNumeric(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    UmfHandle* s = handleOf(a, 0, false);
    Csc c = readCsc(a, 1, "matrix");
    std::string name = a.isNullish(6) ? "matrix" : a.string(6, "name");
    if ((c.z != nullptr) != s->complex) fail("invalid_option", "numeric factorization: real/complex does not match the analysis");
    double control[UMFPACK_CONTROL], inf[UMFPACK_INFO];
    auto* h = new UmfHandle();
    h->complex = s->complex;
    h->numeric = true;
    int status;
    if (h->complex) {
      umfpack_zi_defaults(control);
      status = umfpack_zi_numeric(c.p, c.i, c.x, c.z, s->object, &h->object, control, inf);
    } else {
      umfpack_di_defaults(control);
      status = umfpack_di_numeric(c.p, c.i, c.x, s->object, &h->object, control, inf);
    }
    if (status != UMFPACK_OK) {
      delete h;
      umfStatus(status, "numeric factorization", name.c_str());
    }
    napi_value out, infoObj;
    napi_create_array_with_length(env, 2, &out);
    napi_create_object(env, &infoObj);
    ms::setNumber(env, infoObj, "lnz", inf[UMFPACK_LNZ]);
    ms::setNumber(env, infoObj, "unz", inf[UMFPACK_UNZ]);
    ms::setNumber(env, infoObj, "flops", inf[UMFPACK_FLOPS]);
    ms::setNumber(env, infoObj, "reciprocalCondition", inf[UMFPACK_RCOND]);
    ms::setNumber(env, infoObj, "memoryBytes", inf[UMFPACK_NUMERIC_SIZE] * inf[UMFPACK_SIZE_OF_UNIT]);
    napi_set_element(env, out, 0, external(env, h));
    napi_set_element(env, out, 1, infoObj);
    return out;
  });
}

// umfpackSolve(numeric, n, colPtr, rowIndex, values, imag|null, bRe, bIm|null, xRe, xIm|null, transpose)
// Solves A·x = b (or Aᵀ·x = b; for complex A the plain transpose, not the conjugate) with iterative refinement.
napi_value UmfSolve(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    UmfHandle* h = handleOf(a, 0, true);
    Csc c = readCsc(a, 1, "matrix");
    size_t n = (size_t)c.n;
    double* bx = a.f64(6, "b", n);
    double* bz = a.isNullish(7) ? nullptr : a.f64(7, "b (imaginary)", n);
    double* xx = a.f64(8, "x", n);
    double* xz = a.isNullish(9) ? nullptr : a.f64(9, "x (imaginary)", n);
    bool transpose = a.boolean(10, "transpose");
    double control[UMFPACK_CONTROL], inf[UMFPACK_INFO];
    int status;
    if (h->complex) {
      if (!xz) fail("invalid_option", "complex solve needs an imaginary output");
      std::vector<double> zeroIm;
      if (!bz) {
        zeroIm.assign(n, 0);
        bz = zeroIm.data();
      }
      umfpack_zi_defaults(control);
      status = umfpack_zi_solve(transpose ? UMFPACK_Aat : UMFPACK_A, c.p, c.i, c.x, c.z, xx, xz, bx, bz, h->object, control, inf);
    } else {
      if (bz || xz) fail("invalid_option", "real factorization: solve real and imaginary parts separately");
      umfpack_di_defaults(control);
      status = umfpack_di_solve(transpose ? UMFPACK_At : UMFPACK_A, c.p, c.i, c.x, xx, bx, h->object, control, inf);
    }
    umfStatus(status, "solve", "matrix");
    return ms::undefinedValue(env);
  });
}

napi_value UmfFree(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    void* data = nullptr;
    if (napi_get_value_external(env, a.at(0, "factor"), &data) == napi_ok && data) static_cast<UmfHandle*>(data)->release();
    return ms::undefinedValue(env);
  });
}

std::string showNumber(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.6g", v);
  return buf;
}

// Runs work(j) for j = 0 … count−1, the indices taken in turn by `threads` threads (this one included), each
// with its own `State` (per-thread workspace, made by makeState). BLAS runs single-threaded meanwhile, so the
// threads and BLAS do not oversubscribe the cores, and is set back afterwards. The first failure stops the
// others from taking new indices and is rethrown here; std::bad_alloc becomes out_of_memory naming `what`.
template <typename MakeState, typename Work>
void inThreads(size_t count, int threads, const std::string& what, MakeState makeState, Work work) {
  std::atomic<size_t> next{0};
  std::atomic<bool> failed{false};
  std::mutex errorLock;
  Failure firstError;
  auto run = [&]() {
    try {
      auto state = makeState();
      for (size_t j; !failed.load() && (j = next.fetch_add(1)) < count;) work(j, state);
    } catch (const Failure& e) {
      std::lock_guard<std::mutex> hold(errorLock);
      if (!failed.exchange(true)) firstError = e;
    } catch (const std::bad_alloc&) {
      std::lock_guard<std::mutex> hold(errorLock);
      if (!failed.exchange(true)) firstError = Failure{"out_of_memory", what + ": out of memory"};
    }
  };
  int blas = ms::blasThreads();
  if (threads > 1) ms::setBlasThreads(1);
  std::vector<std::thread> pool;
  for (int t = 1; t < threads; t++) pool.emplace_back(run);
  run();
  for (auto& th : pool) th.join();
  if (threads > 1) ms::setBlasThreads(blas);
  if (failed.load()) throw firstError;
}

// umfpackSweep(symbolic, n, colPtr, rowIndex, aValues, eValues, frequencies, B, m, C, p, re, im, threads, name)
// The frequency sweep of a sparse model: for every ω of `frequencies`, the complex LU of A − iωE (real
// part `aValues`, imaginary part −ω·`eValues`, both on the analysed pattern; a tiny imaginary part at
// ω = 0 keeps the factor complex), the m solves (A − iωE) X = B and −C·X written into re/im as
// [frequency][p][m], so that G(iω) = that + D. B is n×m and C p×n, row-major. The frequencies are taken in
// turn by `threads` threads, each with its own numeric factorization of the one shared symbolic analysis
// (UMFPACK reads Symbolic and writes nothing to it); BLAS runs single-threaded meanwhile, so the threads
// and BLAS do not oversubscribe the cores, and is set back afterwards. A singular A − iωE (iω an
// eigenvalue) fails naming the frequency.
napi_value UmfSweep(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    UmfHandle* s = handleOf(a, 0, false);
    if (!s->complex) fail("invalid_option", "frequency sweep: the analysis must be of a complex matrix");
    Csc c = readCsc(a, 1, "matrix", false);
    size_t n = (size_t)c.n;
    double* av = a.f64(4, "aValues", c.nnz);
    double* ev = a.f64(5, "eValues", c.nnz);
    ms::requireFinite(av, c.nnz, 0, "A");
    ms::requireFinite(ev, c.nnz, 0, "E");
    size_t nf = 0;
    double* w = a.f64(6, "frequencies", 0, &nf);
    ms::requireFinite(w, nf, 0, "frequencies");
    int64_t m = a.integer(8, "m"), p = a.integer(10, "p");
    if (m < 1 || p < 1) fail("invalid_option", "frequency sweep: m and p must be at least 1");
    double* B = a.f64(7, "B", n * (size_t)m);
    double* C = a.f64(9, "C", (size_t)p * n);
    double* re = a.f64(11, "re", nf * (size_t)(p * m));
    double* im = a.f64(12, "im", nf * (size_t)(p * m));
    int64_t requested = a.integer(13, "threads");
    std::string name = a.isNullish(14) ? "matrix" : a.string(14, "name");
    int threads = (int)std::max<int64_t>(1, std::min<int64_t>(requested, (int64_t)nf));

    std::vector<double> cols(n * (size_t)m);  // B's columns, contiguous
    for (size_t i = 0; i < n; i++)
      for (int64_t k = 0; k < m; k++) cols[(size_t)k * n + i] = B[i * (size_t)m + (size_t)k];

    struct Work {
      std::vector<double> z, xr, xi, zero;
      double control[UMFPACK_CONTROL], inf[UMFPACK_INFO];
    };
    auto makeWork = [&] {
      Work ws{std::vector<double>(c.nnz), std::vector<double>(n), std::vector<double>(n), std::vector<double>(n, 0.0), {}, {}};
      umfpack_zi_defaults(ws.control);
      return ws;
    };
    inThreads(nf, threads, "frequency sweep of " + name, makeWork, [&](size_t f, Work& ws) {
      double omega = w[f] == 0 ? 5e-324 : w[f];
      for (size_t k = 0; k < c.nnz; k++) ws.z[k] = -omega * ev[k];
      void* num = nullptr;
      int status = umfpack_zi_numeric(c.p, c.i, av, ws.z.data(), s->object, &num, ws.control, ws.inf);
      if (status != UMFPACK_OK) {
        if (num) umfpack_zi_free_numeric(&num);
        umfStatus(status, ("numeric factorization at ω = " + showNumber(w[f])).c_str(), name.c_str());
      }
      for (int64_t k = 0; k < m && status == UMFPACK_OK; k++) {
        status = umfpack_zi_solve(UMFPACK_A, c.p, c.i, av, ws.z.data(), ws.xr.data(), ws.xi.data(), cols.data() + (size_t)k * n, ws.zero.data(), num, ws.control, ws.inf);
        if (status != UMFPACK_OK) break;
        for (int64_t r = 0; r < p; r++) {
          const double* crow = C + (size_t)r * n;
          double sr = 0, si = 0;
          for (size_t i = 0; i < n; i++) {
            sr += crow[i] * ws.xr[i];
            si += crow[i] * ws.xi[i];
          }
          // (iωE − A) x = b  ⇔  (A − iωE) x = −b
          re[f * (size_t)(p * m) + (size_t)(r * m + k)] = -sr;
          im[f * (size_t)(p * m) + (size_t)(r * m + k)] = -si;
        }
      }
      umfpack_zi_free_numeric(&num);
      if (status != UMFPACK_OK) umfStatus(status, ("solve at ω = " + showNumber(w[f])).c_str(), name.c_str());
    });
    return ms::undefinedValue(env);
  });
}

// umfpackShiftedSolves(symbolic, n, colPtr, rowIndex, aValues, eValues, sigmaRe, sigmaIm, fRe, fIm, gRe, gIm,
//                      xRe, xIm, yRe, yIm, threads, name)
// For each of k shifts σⱼ (all real when the analysis is real, all complex otherwise): the LU of A − σⱼE
// (values `aValues` − Re σⱼ·`eValues`, imaginary part −Im σⱼ·`eValues`, on the analysed pattern), then
// x = (A − σⱼE)⁻¹ fⱼ and y = (A − σⱼE)⁻ᵀ gⱼ (the plain transpose). fⱼ, gⱼ, xⱼ, yⱼ are the j-th blocks of n
// entries of their arrays; the imaginary arrays are read and written for complex shifts only. The shifts are
// taken in turn by `threads` threads (inThreads), each with its own numeric factorization of the shared
// analysis. A singular A − σE fails naming the shift.
napi_value UmfShiftedSolves(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    UmfHandle* s = handleOf(a, 0, false);
    Csc c = readCsc(a, 1, "matrix", false);
    size_t n = (size_t)c.n;
    double* av = a.f64(4, "aValues", c.nnz);
    double* ev = a.f64(5, "eValues", c.nnz);
    ms::requireFinite(av, c.nnz, 0, "A");
    ms::requireFinite(ev, c.nnz, 0, "E");
    size_t k = 0;
    double* sr = a.f64(6, "sigmaRe", 0, &k);
    double* si = a.f64(7, "sigmaIm", k);
    ms::requireFinite(sr, k, 0, "shifts");
    ms::requireFinite(si, k, 0, "shifts");
    bool cx = s->complex;
    for (size_t j = 0; j < k; j++)
      if ((si[j] != 0) != cx) fail("invalid_option", cx ? "shifted solves: a real shift given to a complex analysis" : "shifted solves: a complex shift given to a real analysis");
    double* fr = a.f64(8, "fRe", k * n);
    double* fi = cx ? a.f64(9, "fIm", k * n) : nullptr;
    double* gr = a.f64(10, "gRe", k * n);
    double* gi = cx ? a.f64(11, "gIm", k * n) : nullptr;
    double* xr = a.f64(12, "xRe", k * n);
    double* xi = cx ? a.f64(13, "xIm", k * n) : nullptr;
    double* yr = a.f64(14, "yRe", k * n);
    double* yi = cx ? a.f64(15, "yIm", k * n) : nullptr;
    int64_t requested = a.integer(16, "threads");
    std::string name = a.isNullish(17) ? "matrix" : a.string(17, "name");
    int threads = (int)std::max<int64_t>(1, std::min<int64_t>(requested, (int64_t)k));

    struct Work {
      std::vector<double> x, z;
      double control[UMFPACK_CONTROL], inf[UMFPACK_INFO];
    };
    auto makeWork = [&] {
      Work ws{std::vector<double>(c.nnz), std::vector<double>(cx ? c.nnz : 0), {}, {}};
      if (cx) umfpack_zi_defaults(ws.control);
      else umfpack_di_defaults(ws.control);
      return ws;
    };
    inThreads(k, threads, "shifted solves with " + name, makeWork, [&](size_t j, Work& ws) {
      for (size_t q = 0; q < c.nnz; q++) ws.x[q] = av[q] - sr[j] * ev[q];
      if (cx) for (size_t q = 0; q < c.nnz; q++) ws.z[q] = -si[j] * ev[q];
      std::string at = "at σ = " + showNumber(sr[j]) + (cx ? " + " + showNumber(si[j]) + "i" : "");
      void* num = nullptr;
      int status = cx ? umfpack_zi_numeric(c.p, c.i, ws.x.data(), ws.z.data(), s->object, &num, ws.control, ws.inf)
                      : umfpack_di_numeric(c.p, c.i, ws.x.data(), s->object, &num, ws.control, ws.inf);
      if (status != UMFPACK_OK) {
        if (num) {
          if (cx) umfpack_zi_free_numeric(&num);
          else umfpack_di_free_numeric(&num);
        }
        umfStatus(status, ("numeric factorization " + at).c_str(), name.c_str());
      }
      size_t o = j * n;
      if (cx) {
        status = umfpack_zi_solve(UMFPACK_A, c.p, c.i, ws.x.data(), ws.z.data(), xr + o, xi + o, fr + o, fi + o, num, ws.control, ws.inf);
        if (status == UMFPACK_OK) status = umfpack_zi_solve(UMFPACK_Aat, c.p, c.i, ws.x.data(), ws.z.data(), yr + o, yi + o, gr + o, gi + o, num, ws.control, ws.inf);
        umfpack_zi_free_numeric(&num);
      } else {
        status = umfpack_di_solve(UMFPACK_A, c.p, c.i, ws.x.data(), xr + o, fr + o, num, ws.control, ws.inf);
        if (status == UMFPACK_OK) status = umfpack_di_solve(UMFPACK_At, c.p, c.i, ws.x.data(), yr + o, gr + o, num, ws.control, ws.inf);
        umfpack_di_free_numeric(&num);
      }
      if (status != UMFPACK_OK) umfStatus(status, ("solve " + at).c_str(), name.c_str());
    });
    return ms::undefinedValue(env);
  });
}

// ---- CHOLMOD ----------------------------------------------------------------------------------

struct CholHandle {
  cholmod_common common;
  cholmod_factor* factor = nullptr;
  bool started = false;
  ~CholHandle() { release(); }
  void release() {
    if (factor) cholmod_free_factor(&factor, &common);
    factor = nullptr;
    if (started) cholmod_finish(&common);
    started = false;
  }
};

void finalizeChol(napi_env, void* data, void*) { delete static_cast<CholHandle*>(data); }

CholHandle* cholOf(const Args& a, size_t at) {
  void* data = nullptr;
  if (napi_get_value_external(a.env, a.at(at, "factor"), &data) != napi_ok || !data) fail("invalid_option", "not a Cholesky handle");
  auto* h = static_cast<CholHandle*>(data);
  if (!h->factor) fail("invalid_option", "the Cholesky factor was freed");
  return h;
}

// A sparse view of our arrays (CHOLMOD reads the lower triangle: stype −1; nothing is copied).
cholmod_sparse view(const Csc& c) {
  cholmod_sparse s;
  std::memset(&s, 0, sizeof s);
  s.nrow = s.ncol = (size_t)c.n;
  s.nzmax = c.nnz;
  s.p = c.p;
  s.i = c.i;
  s.x = c.x;
  s.stype = -1;
  s.itype = CHOLMOD_INT;
  s.xtype = CHOLMOD_REAL;
  s.dtype = CHOLMOD_DOUBLE;
  s.sorted = 0;
  s.packed = 1;
  return s;
}

// cholmodFactor(n, colPtr, rowIndex, values, null, name) → [handle, info]: A = L·Lᵀ (lower triangle read).
napi_value CholFactor(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    Csc c = readCsc(a, 0, "matrix");
    std::string name = a.isNullish(5) ? "matrix" : a.string(5, "name");
    auto* h = new CholHandle();
    cholmod_start(&h->common);
    h->started = true;
    h->common.print = 0;
    h->common.error_handler = nullptr;
    // Always L·Lᵀ (supernodal): a simplicial L·D·Lᵀ would also factor an indefinite matrix.
    h->common.supernodal = CHOLMOD_SUPERNODAL;
    cholmod_sparse s = view(c);
    h->factor = cholmod_analyze(&s, &h->common);
    if (!h->factor) {
      int st = h->common.status;
      delete h;
      fail(st == CHOLMOD_OUT_OF_MEMORY ? "out_of_memory" : "native_error", "Cholesky analysis failed for " + name);
    }
    cholmod_factorize(&s, h->factor, &h->common);
    if (h->common.status == CHOLMOD_NOT_POSDEF || h->factor->minor < h->factor->n) {
      size_t minor = h->factor->minor;
      delete h;
      fail("not_positive_definite", name + " is not positive definite (leading minor " + std::to_string(minor + 1) + ")");
    }
    if (h->common.status < 0) {
      int st = h->common.status;
      delete h;
      fail(st == CHOLMOD_OUT_OF_MEMORY ? "out_of_memory" : "native_error", "Cholesky factorization failed for " + name);
    }
    napi_value out, infoObj, ext;
    napi_create_array_with_length(env, 2, &out);
    napi_create_object(env, &infoObj);
    ms::setNumber(env, infoObj, "lnz", h->common.lnz);
    ms::setNumber(env, infoObj, "flops", h->common.fl);
    ms::setNumber(env, infoObj, "memoryBytes", (double)h->common.memory_inuse);
    napi_create_external(env, h, finalizeChol, nullptr, &ext);
    napi_set_element(env, out, 0, ext);
    napi_set_element(env, out, 1, infoObj);
    return out;
  });
}

// cholmodSolve(handle, b (n×k column-major), x (n×k column-major), k)
napi_value CholSolve(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    CholHandle* h = cholOf(a, 0);
    size_t n = h->factor->n;
    int64_t k = a.integer(3, "columns");
    double* b = a.f64(1, "b", n * (size_t)k);
    double* x = a.f64(2, "x", n * (size_t)k);
    cholmod_dense bd;
    std::memset(&bd, 0, sizeof bd);
    bd.nrow = n;
    bd.ncol = (size_t)k;
    bd.nzmax = n * (size_t)k;
    bd.d = n;
    bd.x = b;
    bd.xtype = CHOLMOD_REAL;
    bd.dtype = CHOLMOD_DOUBLE;
    cholmod_dense* xd = cholmod_solve(CHOLMOD_A, h->factor, &bd, &h->common);
    if (!xd) fail("native_error", "Cholesky solve failed");
    std::memcpy(x, xd->x, sizeof(double) * n * (size_t)k);
    cholmod_free_dense(&xd, &h->common);
    return ms::undefinedValue(env);
  });
}

napi_value CholFree(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    void* data = nullptr;
    if (napi_get_value_external(env, a.at(0, "factor"), &data) == napi_ok && data) static_cast<CholHandle*>(data)->release();
    return ms::undefinedValue(env);
  });
}

// ---- Orderings --------------------------------------------------------------------------------

// amdOrder(n, colPtr, rowIndex, perm) → {lnz, flops}: fill-reducing ordering of A + Aᵀ (Amestoy, Davis &
// Duff 1996, SIAM J. Matrix Anal. Appl. 17(4)).
napi_value AmdOrder(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    Csc c = readCsc(a, 0, "matrix", false);
    int32_t* perm = a.i32(3, "perm", (size_t)c.n);
    double control[AMD_CONTROL], inf[AMD_INFO];
    amd_defaults(control);
    int status = amd_order(c.n, c.p, c.i, perm, control, inf);
    if (status == AMD_OUT_OF_MEMORY) fail("out_of_memory", "AMD ordering: out of memory");
    if (status == AMD_INVALID) fail("parse_error", "AMD ordering: invalid matrix");
    napi_value o;
    napi_create_object(env, &o);
    ms::setNumber(env, o, "lnz", inf[AMD_LNZ]);
    ms::setNumber(env, o, "flops", inf[AMD_NDIV] + 2 * inf[AMD_NMULTSUBS_LU]);
    return o;
  });
}

// colamdOrder(nRows, nCols, colPtr, rowIndex, perm): column ordering for sparse LU (Davis, Gilbert,
// Larimore & Ng 2004, ACM TOMS 30(3)).
napi_value ColamdOrder(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    Args a(env, info);
    int64_t nr = a.integer(0, "rows"), nc = a.integer(1, "columns");
    int32_t* p = a.i32(2, "colPtr", (size_t)nc + 1);
    size_t nnz = (size_t)p[nc];
    int32_t* ri = a.i32(3, "rowIndex", nnz);
    int32_t* perm = a.i32(4, "perm", (size_t)nc);
    size_t alen = colamd_recommended((int)nnz, (int)nr, (int)nc);
    if (alen == 0) fail("invalid_option", "COLAMD: matrix too large");
    std::vector<int> A(alen), P((size_t)nc + 1);
    std::memcpy(A.data(), ri, sizeof(int) * nnz);
    std::memcpy(P.data(), p, sizeof(int) * ((size_t)nc + 1));
    double knobs[COLAMD_KNOBS];
    int stats[COLAMD_STATS];
    colamd_set_defaults(knobs);
    if (!colamd((int)nr, (int)nc, (int)alen, A.data(), P.data(), knobs, stats)) fail("parse_error", "COLAMD: invalid matrix");
    std::memcpy(perm, P.data(), sizeof(int) * nc);
    return ms::undefinedValue(env);
  });
}

}  // namespace

namespace ms {
void registerSparse(napi_env env, napi_value exports) {
  define(env, exports, "umfpackSymbolic", UmfSymbolic);
  define(env, exports, "umfpackNumeric", UmfNumeric);
  define(env, exports, "umfpackSolve", UmfSolve);
  define(env, exports, "umfpackFree", UmfFree);
  define(env, exports, "umfpackSweep", UmfSweep);
  define(env, exports, "umfpackShiftedSolves", UmfShiftedSolves);
  define(env, exports, "cholmodFactor", CholFactor);
  define(env, exports, "cholmodSolve", CholSolve);
  define(env, exports, "cholmodFree", CholFree);
  define(env, exports, "amdOrder", AmdOrder);
  define(env, exports, "colamdOrder", ColamdOrder);
}
}  // namespace ms
