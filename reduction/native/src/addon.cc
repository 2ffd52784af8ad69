// Modeshelf's native numerical backend: dense kernels from LAPACK/BLAS (Debian's OpenBLAS and LAPACKE)
// and sparse factorizations from SuiteSparse (UMFPACK, CHOLMOD, AMD, COLAMD), exposed through Node-API.
// Context-aware (NAPI_MODULE_INIT), so every worker thread loads its own instance.
// The TypeScript side is reduction/linalg/native.ts; matrices are row-major Float64Arrays.
#include "common.h"

extern "C" {
void openblas_set_num_threads(int);
int openblas_get_num_threads(void);
char* openblas_get_config(void);
}

namespace ms {
int blasThreads() { return openblas_get_num_threads(); }
void setBlasThreads(int threads) { openblas_set_num_threads(threads); }
}  // namespace ms

namespace {

napi_value SetThreads(napi_env env, napi_callback_info info) {
  return ms::guard(env, [&] {
    ms::Args a(env, info);
    int64_t t = a.integer(0, "threads");
    if (t < 1 || t > 256) ms::fail("invalid_option", "threads must be between 1 and 256");
    openblas_set_num_threads((int)t);
    return ms::undefinedValue(env);
  });
}

napi_value GetThreads(napi_env env, napi_callback_info) { return ms::num(env, openblas_get_num_threads()); }

napi_value Config(napi_env env, napi_callback_info) {
  napi_value s;
  const char* c = openblas_get_config();
  napi_create_string_utf8(env, c ? c : "unknown", NAPI_AUTO_LENGTH, &s);
  return s;
}

}  // namespace

NAPI_MODULE_INIT() {
  ms::define(env, exports, "setThreads", SetThreads);
  ms::define(env, exports, "threads", GetThreads);
  ms::define(env, exports, "blasConfig", Config);
  ms::registerDense(env, exports);
  ms::registerSparse(env, exports);
  ms::registerHammarling(env, exports);
  return exports;
}
