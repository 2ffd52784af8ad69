// Shared helpers of the Modeshelf native addon: argument reading and error reporting through Node-API.
// Every failure is thrown as a JavaScript Error with a `code` (the engine's error codes) and a message
// naming the matrix; nothing here aborts the process.
#pragma once
#include <node_api.h>
#include <cstdint>
#include <cstring>
#include <string>
#include <vector>

namespace ms {

// A failure raised by a binding; converted into a thrown JS Error by `wrap`.
struct Failure {
  std::string code;
  std::string message;
};

[[noreturn]] inline void fail(const std::string& code, const std::string& message) { throw Failure{code, message}; }

struct Args {
  napi_env env;
  size_t argc = 0;
  napi_value argv[24];
  Args(napi_env e, napi_callback_info info) : env(e) {
    argc = 24;
    napi_get_cb_info(env, info, &argc, argv, nullptr, nullptr);
  }
  napi_value at(size_t i, const char* name) const {
    if (i >= argc) fail("invalid_option", std::string("missing argument ") + name);
    return argv[i];
  }
  double number(size_t i, const char* name) const {
    double v;
    if (napi_get_value_double(env, at(i, name), &v) != napi_ok) fail("invalid_option", std::string(name) + " must be a number");
    return v;
  }
  int64_t integer(size_t i, const char* name) const {
    double v = number(i, name);
    if (v != (double)(int64_t)v) fail("invalid_option", std::string(name) + " must be an integer");
    return (int64_t)v;
  }
  bool boolean(size_t i, const char* name) const {
    bool v;
    if (napi_get_value_bool(env, at(i, name), &v) != napi_ok) fail("invalid_option", std::string(name) + " must be a boolean");
    return v;
  }
  std::string string(size_t i, const char* name) const {
    char buf[256];
    size_t len = 0;
    if (napi_get_value_string_utf8(env, at(i, name), buf, sizeof buf, &len) != napi_ok) fail("invalid_option", std::string(name) + " must be a string");
    return std::string(buf, len);
  }
  bool isNullish(size_t i) const {
    if (i >= argc) return true;
    napi_valuetype t;
    napi_typeof(env, argv[i], &t);
    return t == napi_undefined || t == napi_null;
  }
  // A Float64Array of at least `minLength` entries (the typed array's own view: no copy).
  double* f64(size_t i, const char* name, size_t minLength, size_t* length = nullptr) const {
    return typed<double>(i, name, napi_float64_array, "Float64Array", minLength, length);
  }
  int32_t* i32(size_t i, const char* name, size_t minLength, size_t* length = nullptr) const {
    return typed<int32_t>(i, name, napi_int32_array, "Int32Array", minLength, length);
  }

 private:
  template <typename T>
  T* typed(size_t i, const char* name, napi_typedarray_type want, const char* wantName, size_t minLength, size_t* length) const {
    napi_value v = at(i, name);
    bool is = false;
    napi_is_typedarray(env, v, &is);
    if (!is) fail("invalid_option", std::string(name) + " must be a " + wantName);
    napi_typedarray_type type;
    size_t len;
    void* data;
    napi_value buffer;
    size_t offset;
    if (napi_get_typedarray_info(env, v, &type, &len, &data, &buffer, &offset) != napi_ok || type != want) {
      fail("invalid_option", std::string(name) + " must be a " + wantName);
    }
    if (len < minLength) {
      fail("dimension_mismatch", std::string(name) + " has " + std::to_string(len) + " entries, needs " + std::to_string(minLength));
    }
    if (length) *length = len;
    return static_cast<T*>(data);
  }
};

inline napi_value num(napi_env env, double v) {
  napi_value out;
  napi_create_double(env, v, &out);
  return out;
}

inline napi_value undefinedValue(napi_env env) {
  napi_value out;
  napi_get_undefined(env, &out);
  return out;
}

inline void setNumber(napi_env env, napi_value obj, const char* key, double v) { napi_set_named_property(env, obj, key, num(env, v)); }

// Throws when any of the first `count` entries is NaN or infinite, naming the matrix and the entry.
inline void requireFinite(const double* a, size_t count, size_t cols, const char* name) {
  for (size_t k = 0; k < count; k++) {
    if (!(a[k] - a[k] == 0)) {
      fail("non_finite", std::string(name) + "(" + std::to_string(cols ? k / cols : k) + ", " + std::to_string(cols ? k % cols : 0) +
                             ") is not finite");
    }
  }
}

// A LAPACK info code turned into a message: negative is a bad argument (a bug of ours), -1010 out of memory.
inline void lapackCheck(int info, const char* routine, const char* name) {
  if (info == 0) return;
  if (info == -1010) fail("out_of_memory", std::string(routine) + ": out of memory for " + name);
  if (info < 0) fail("invalid_option", std::string(routine) + ": argument " + std::to_string(-info) + " is invalid (" + name + ")");
}

typedef napi_value (*Binding)(napi_env, napi_callback_info);

// Runs a binding body, turning Failure and std::bad_alloc into thrown JS errors with a code.
template <typename F>
napi_value guard(napi_env env, F&& body) {
  try {
    return body();
  } catch (const Failure& f) {
    napi_throw_error(env, f.code.c_str(), f.message.c_str());
  } catch (const std::bad_alloc&) {
    napi_throw_error(env, "out_of_memory", "native backend: out of memory");
  } catch (const std::exception& e) {
    napi_throw_error(env, "native_error", e.what());
  }
  return nullptr;
}

int blasThreads();
void setBlasThreads(int threads);
void registerDense(napi_env env, napi_value exports);
void registerSparse(napi_env env, napi_value exports);
void registerHammarling(napi_env env, napi_value exports);

inline void define(napi_env env, napi_value exports, const char* name, napi_callback cb) {
  napi_value fn;
  napi_create_function(env, name, NAPI_AUTO_LENGTH, cb, nullptr, &fn);
  napi_set_named_property(env, exports, name, fn);
}

}  // namespace ms
