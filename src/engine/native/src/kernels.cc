// Triskel's dense complex kernels on OpenBLAS (CBLAS) and LAPACK (LAPACKE), for Node.js.
//
// Every matrix crosses the boundary as a Float64Array of interleaved (re, im) pairs in ROW-major
// order, exactly as src/engine/linalg/kernels.ts describes. Inputs are read in place (no copy);
// a routine that must overwrite its operand (LU, eigensolvers) works on one private copy.
//
// Row-major without LAPACKE's row-major copies: the row-major buffer of A is, read column-major,
// the transpose A^T. So
//   - zgemm uses CBLAS's row-major entry (which only swaps operands, no copy);
//   - the LU of the buffer is the LU of A^T, P A^T = L U; A X = B becomes X^T A^T = B^T, and the
//     row-major buffer of B is B^T column-major: two right-sided triangular solves and a column
//     permutation give X^T, i.e. X row-major, in the output buffer itself;
//   - inv(A^T) = inv(A)^T, so zgetri on the buffer leaves inv(A) row-major;
//   - a Hermitian A read column-major is conj(A): same eigenvalues, conjugated eigenvectors;
//   - eig(A^T) = eig(A) for the general eigenvalues.
//
// Errors: RangeError for shapes, TypeError for argument kinds, and an Error whose `code` is
// "TRISKEL_SINGULAR" for a singular matrix (the TypeScript wrapper maps it to SingularMatrixError).

#include <complex>
#define lapack_complex_float std::complex<float>
#define lapack_complex_double std::complex<double>
#include <cblas.h>
#include <lapacke.h>

#include <napi.h>

#include "slack.h"

#include <cmath>
#include <cstdint>
#include <malloc.h>

#include <algorithm>
#include <cstdlib>
#include <cstring>
#include <mutex>
#include <string>
#include <vector>

namespace {

using cd = std::complex<double>;

constexpr double kPivotFloor = 1e-300;  // |pivot| below this: singular (kernels.ts)
constexpr int64_t kMaxDim = 1 << 30;

struct View {
  double* data;
  size_t length;  // in doubles
};

View ArrayArg(const Napi::CallbackInfo& info, size_t index, const std::string& what) {
  Napi::Value v = info[index];
  if (!v.IsTypedArray() || v.As<Napi::TypedArray>().TypedArrayType() != napi_float64_array) {
    throw Napi::TypeError::New(info.Env(), what + ": expected a Float64Array");
  }
  Napi::Float64Array a = v.As<Napi::Float64Array>();
  return View{a.Data(), a.ElementLength()};
}

int64_t IntArg(const Napi::CallbackInfo& info, size_t index, const std::string& what) {
  Napi::Value v = info[index];
  if (!v.IsNumber()) throw Napi::TypeError::New(info.Env(), what + ": expected a number");
  double d = v.As<Napi::Number>().DoubleValue();
  if (!(d >= 0) || d > static_cast<double>(kMaxDim) || std::floor(d) != d) {
    throw Napi::RangeError::New(info.Env(), what + ": expected a non-negative integer, got " + std::to_string(d));
  }
  return static_cast<int64_t>(d);
}

void Need(const Napi::Env& env, const View& v, int64_t complexCount, const std::string& what) {
  if (static_cast<int64_t>(v.length) < 2 * complexCount) {
    throw Napi::RangeError::New(env, what + ": array holds " + std::to_string(v.length / 2) +
                                         " complex numbers, needs " + std::to_string(complexCount));
  }
}

cd* Z(double* p) { return reinterpret_cast<cd*>(p); }

[[noreturn]] void ThrowSingular(const Napi::Env& env, const std::string& what) {
  Napi::Error e = Napi::Error::New(env, "singular matrix in " + what);
  e.Value().Set("code", Napi::String::New(env, "TRISKEL_SINGULAR"));
  throw e;
}

[[noreturn]] void ThrowLapack(const Napi::Env& env, const std::string& what, lapack_int info) {
  throw Napi::Error::New(env, what + ": LAPACK error " + std::to_string(info));
}

// LAPACK's workspace protocol for routines with one complex work array: ask for its size
// (lwork = -1; a failed query throws, naming `query`), allocate at least `minimum`, call again.
// Returns the status of the real call, for the caller to read.
// The work array has the slack of an n x n problem after it (slack.h).
template <typename Routine>
lapack_int WithWork(const Napi::Env& env, const std::string& query, lapack_int minimum, int64_t n, Routine routine) {
  cd size;
  lapack_int st = routine(&size, -1);
  if (st != 0) ThrowLapack(env, query, st);
  lapack_int lwork = std::max<lapack_int>(static_cast<lapack_int>(size.real()), minimum);
  std::vector<cd> work = triskel::WithSlack<cd>(lwork, n);
  return routine(work.data(), lwork);
}

// LU of the n x n column-major buffer in place; throws on a (numerically) zero pivot.
void Factor(const Napi::Env& env, cd* lu, lapack_int n, lapack_int* ipiv, const std::string& what) {
  lapack_int info = LAPACKE_zgetrf_work(LAPACK_COL_MAJOR, n, n, lu, n, ipiv);
  if (info < 0) ThrowLapack(env, what + " (zgetrf)", info);
  if (info > 0) ThrowSingular(env, what);
  for (lapack_int i = 0; i < n; i++) {
    double mag = std::abs(lu[static_cast<size_t>(i) * n + i]);
    if (!(mag >= kPivotFloor) || !std::isfinite(mag)) ThrowSingular(env, what);
  }
}

// matmul(a, b, m, k, n): C = A B, packed row-major; new array.
Napi::Value Matmul(const Napi::CallbackInfo& info) {
  Napi::Env env = info.Env();
  View a = ArrayArg(info, 0, "matmul a");
  View b = ArrayArg(info, 1, "matmul b");
  int64_t m = IntArg(info, 2, "matmul m"), k = IntArg(info, 3, "matmul k"), n = IntArg(info, 4, "matmul n");
  Need(env, a, m * k, "matmul a");
  Need(env, b, k * n, "matmul b");
  Napi::Float64Array c = Napi::Float64Array::New(env, static_cast<size_t>(2 * m * n));
  if (m > 0 && n > 0 && k > 0) {
    // The new array is zero-filled already: accumulate into it (beta = 1). With beta = 0 OpenBLAS
    // first clears C in a separate pass, measurably slower at N = 64.
    const cd one(1, 0);
    cblas_zgemm(CblasRowMajor, CblasNoTrans, CblasNoTrans, m, n, k, &one, a.data, k, b.data, n, &one, c.Data(), n);
  }
  return c;
}

// gemmAccumulate(m, n, k, a, aOff, lda, b, bOff, ldb, c, cOff, ldc): C += A B in place on c.
// Offsets count doubles (index of the real part), leading dimensions count complex elements.
Napi::Value GemmAccumulate(const Napi::CallbackInfo& info) {
  Napi::Env env = info.Env();
  int64_t m = IntArg(info, 0, "gemmAccumulate m"), n = IntArg(info, 1, "gemmAccumulate n"), k = IntArg(info, 2, "gemmAccumulate k");
  View a = ArrayArg(info, 3, "gemmAccumulate a");
  int64_t aOff = IntArg(info, 4, "gemmAccumulate aOffset"), lda = IntArg(info, 5, "gemmAccumulate lda");
  View b = ArrayArg(info, 6, "gemmAccumulate b");
  int64_t bOff = IntArg(info, 7, "gemmAccumulate bOffset"), ldb = IntArg(info, 8, "gemmAccumulate ldb");
  View c = ArrayArg(info, 9, "gemmAccumulate c");
  int64_t cOff = IntArg(info, 10, "gemmAccumulate cOffset"), ldc = IntArg(info, 11, "gemmAccumulate ldc");
  if (m == 0 || n == 0 || k == 0) return env.Undefined();
  if (lda < k || ldb < n || ldc < n) throw Napi::RangeError::New(env, "gemmAccumulate: leading dimension too small");
  if (aOff + 2 * ((m - 1) * lda + k) > static_cast<int64_t>(a.length) ||
      bOff + 2 * ((k - 1) * ldb + n) > static_cast<int64_t>(b.length) ||
      cOff + 2 * ((m - 1) * ldc + n) > static_cast<int64_t>(c.length)) {
    throw Napi::RangeError::New(env, "gemmAccumulate: matrix exceeds its array");
  }
  const cd one(1, 0);
  cblas_zgemm(CblasRowMajor, CblasNoTrans, CblasNoTrans, m, n, k, &one, a.data + aOff, lda, b.data + bOff, ldb, &one,
              c.data + cOff, ldc);
  return env.Undefined();
}

// solve(a, b, n, nrhs): X with A X = B; new array.
Napi::Value Solve(const Napi::CallbackInfo& info) {
  Napi::Env env = info.Env();
  View a = ArrayArg(info, 0, "solve a");
  View b = ArrayArg(info, 1, "solve b");
  int64_t n = IntArg(info, 2, "solve n"), nrhs = IntArg(info, 3, "solve nrhs");
  Need(env, a, n * n, "solve a");
  Need(env, b, n * nrhs, "solve b");
  Napi::Float64Array out = Napi::Float64Array::New(env, static_cast<size_t>(2 * n * nrhs));
  if (n == 0) return out;
  std::vector<cd> lu = triskel::WithSlack<cd>(n * n, n);  // column-major view: A^T
  std::copy(Z(a.data), Z(a.data) + n * n, lu.begin());
  std::vector<lapack_int> ipiv = triskel::WithSlack<lapack_int>(n, n);
  Factor(env, lu.data(), static_cast<lapack_int>(n), ipiv.data(), "solve");
  if (nrhs == 0) return out;
  cd* x = Z(out.Data());
  std::memcpy(out.Data(), b.data, sizeof(double) * 2 * n * nrhs);  // column-major nrhs x n: B^T
  // P A^T = L U, so X^T P^T L U = B^T: Z = B^T U^-1 L^-1, then X^T = Z P.
  const cd one(1, 0);
  cblas_ztrsm(CblasColMajor, CblasRight, CblasUpper, CblasNoTrans, CblasNonUnit, nrhs, n, &one, lu.data(), n, x, nrhs);
  cblas_ztrsm(CblasColMajor, CblasRight, CblasLower, CblasNoTrans, CblasUnit, nrhs, n, &one, lu.data(), n, x, nrhs);
  // P = P_{n-1} ... P_0 (P_k swaps k and ipiv[k]-1): Z P applies the column swaps from k = n-1 down.
  for (int64_t kk = n - 1; kk >= 0; kk--) {
    int64_t p = ipiv[kk] - 1;
    if (p != kk) std::swap_ranges(x + kk * nrhs, x + (kk + 1) * nrhs, x + p * nrhs);
  }
  return out;
}

// inverse(a, n): A^-1; new array.
Napi::Value Inverse(const Napi::CallbackInfo& info) {
  Napi::Env env = info.Env();
  View a = ArrayArg(info, 0, "inverse a");
  int64_t n = IntArg(info, 1, "inverse n");
  Need(env, a, n * n, "inverse a");
  Napi::Float64Array out = Napi::Float64Array::New(env, static_cast<size_t>(2 * n * n));
  if (n == 0) return out;
  cd* w = Z(out.Data());
  std::memcpy(out.Data(), a.data, sizeof(double) * 2 * n * n);
  std::vector<lapack_int> ipiv = triskel::WithSlack<lapack_int>(n, n);
  Factor(env, w, static_cast<lapack_int>(n), ipiv.data(), "inverse");
  lapack_int info2 = WithWork(env, "inverse (zgetri query)", static_cast<lapack_int>(n), n, [&](cd* work, lapack_int lwork) {
    return LAPACKE_zgetri_work(LAPACK_COL_MAJOR, n, w, n, ipiv.data(), work, lwork);
  });
  if (info2 > 0) ThrowSingular(env, "inverse");
  if (info2 < 0) ThrowLapack(env, "inverse (zgetri)", info2);
  return out;
}

// eigHermitian(a, n, wantVectors): { values (ascending), vectors (columns, row-major) | null }.
Napi::Value EigHermitian(const Napi::CallbackInfo& info) {
  Napi::Env env = info.Env();
  View a = ArrayArg(info, 0, "eigHermitian a");
  int64_t n = IntArg(info, 1, "eigHermitian n");
  bool wantVectors = info[2].ToBoolean().Value();
  Need(env, a, n * n, "eigHermitian a");
  Napi::Float64Array values = Napi::Float64Array::New(env, static_cast<size_t>(n));
  Napi::Object result = Napi::Object::New(env);
  result.Set("values", values);
  if (n == 0) {
    result.Set("vectors", wantVectors ? Napi::Value(Napi::Float64Array::New(env, 0)) : env.Null());
    return result;
  }
  // Column-major view of the buffer is A^T = conj(A); A's lower triangle is the view's upper one.
  std::vector<cd> h = triskel::WithSlack<cd>(n * n, n);
  std::copy(Z(a.data), Z(a.data) + n * n, h.begin());
  const char jobz = wantVectors ? 'V' : 'N';
  cd wq;
  double rwq;
  lapack_int iwq;
  lapack_int st = LAPACKE_zheevd_work(LAPACK_COL_MAJOR, jobz, 'U', n, h.data(), n, values.Data(), &wq, -1, &rwq, -1, &iwq, -1);
  if (st != 0) ThrowLapack(env, "eigHermitian (zheevd query)", st);
  lapack_int lwork = std::max<lapack_int>(1, static_cast<lapack_int>(wq.real()));
  lapack_int lrwork = std::max<lapack_int>(1, static_cast<lapack_int>(rwq));
  lapack_int liwork = std::max<lapack_int>(1, iwq);
  std::vector<cd> work = triskel::WithSlack<cd>(lwork, n);
  std::vector<double> rwork = triskel::WithSlack<double>(lrwork, n);
  std::vector<lapack_int> iwork = triskel::WithSlack<lapack_int>(liwork, n);
  st = LAPACKE_zheevd_work(LAPACK_COL_MAJOR, jobz, 'U', n, h.data(), n, values.Data(), work.data(), lwork, rwork.data(),
                           lrwork, iwork.data(), liwork);
  if (st > 0) throw Napi::Error::New(env, "eigHermitian: no convergence");
  if (st < 0) ThrowLapack(env, "eigHermitian (zheevd)", st);
  if (!wantVectors) {
    result.Set("vectors", env.Null());
    return result;
  }
  // Column c of the view holds u_c with conj(A) u_c = w_c u_c, so v_c = conj(u_c); write row-major.
  Napi::Float64Array vectors = Napi::Float64Array::New(env, static_cast<size_t>(2 * n * n));
  cd* v = Z(vectors.Data());
  for (int64_t c = 0; c < n; c++) {
    const cd* u = h.data() + c * n;
    for (int64_t r = 0; r < n; r++) v[r * n + c] = std::conj(u[r]);
  }
  result.Set("vectors", vectors);
  return result;
}

// eigGeneral(a, n): the n eigenvalues (interleaved complex); new array.
Napi::Value EigGeneral(const Napi::CallbackInfo& info) {
  Napi::Env env = info.Env();
  View a = ArrayArg(info, 0, "eigGeneral a");
  int64_t n = IntArg(info, 1, "eigGeneral n");
  Need(env, a, n * n, "eigGeneral a");
  Napi::Float64Array out = Napi::Float64Array::New(env, static_cast<size_t>(2 * n));
  if (n == 0) return out;
  std::vector<cd> h = triskel::WithSlack<cd>(n * n, n);  // A^T: same eigenvalues
  std::copy(Z(a.data), Z(a.data) + n * n, h.begin());
  std::vector<double> rwork = triskel::WithSlack<double>(2 * n, n);
  cd dummy;
  lapack_int st = WithWork(env, "eigGeneral (zgeev query)", static_cast<lapack_int>(2 * n), n, [&](cd* work, lapack_int lwork) {
    return LAPACKE_zgeev_work(LAPACK_COL_MAJOR, 'N', 'N', n, h.data(), n, Z(out.Data()), &dummy, 1, &dummy, 1, work, lwork,
                              rwork.data());
  });
  if (st > 0) throw Napi::Error::New(env, "eigGeneral: no convergence");
  if (st < 0) ThrowLapack(env, "eigGeneral (zgeev)", st);
  return out;
}

// Library facts for the loader, the self-test log and the bench.
Napi::Value CoreName(const Napi::CallbackInfo& info) {
  const char* name = openblas_get_corename();
  return Napi::String::New(info.Env(), name ? name : "unknown");
}

Napi::Value Config(const Napi::CallbackInfo& info) {
  const char* cfg = openblas_get_config();
  return Napi::String::New(info.Env(), cfg ? cfg : "unknown");
}

Napi::Value GetThreads(const Napi::CallbackInfo& info) {
  return Napi::Number::New(info.Env(), openblas_get_num_threads());
}

Napi::Value SetThreads(const Napi::CallbackInfo& info) {
  int64_t t = IntArg(info, 0, "setThreads count");
  if (t < 1) throw Napi::RangeError::New(info.Env(), "setThreads: count must be at least 1");
  openblas_set_num_threads(static_cast<int>(t));
  return info.Env().Undefined();
}

// Every kernel returns a fresh Float64Array. With glibc's defaults, freed result buffers at the top
// of the heap are given back to the system (trim threshold 128 KiB) and larger ones are mmapped, so
// nearly every new result takes page faults on first touch: at N = 64 a product costs twice what
// the same zgemm into a warm buffer costs. Keep freed memory for reuse instead (process-wide, once;
// skipped when the environment already tunes malloc or TRISKEL_MALLOC_TUNING=0).
bool malloc_tuned = false;
std::once_flag malloc_once;

void TuneMalloc() {
  const char* opt = std::getenv("TRISKEL_MALLOC_TUNING");
  if ((opt && std::string(opt) == "0") || std::getenv("GLIBC_TUNABLES") || std::getenv("MALLOC_TRIM_THRESHOLD_") ||
      std::getenv("MALLOC_MMAP_THRESHOLD_")) {
    return;
  }
  malloc_tuned = mallopt(M_MMAP_THRESHOLD, 16 << 20) == 1 && mallopt(M_TRIM_THRESHOLD, 64 << 20) == 1;
}

Napi::Value MallocTuned(const Napi::CallbackInfo& info) { return Napi::Boolean::New(info.Env(), malloc_tuned); }

Napi::Object Init(Napi::Env env, Napi::Object exports) {
  std::call_once(malloc_once, TuneMalloc);
  exports.Set("matmul", Napi::Function::New(env, Matmul, "matmul"));
  exports.Set("gemmAccumulate", Napi::Function::New(env, GemmAccumulate, "gemmAccumulate"));
  exports.Set("solve", Napi::Function::New(env, Solve, "solve"));
  exports.Set("inverse", Napi::Function::New(env, Inverse, "inverse"));
  exports.Set("eigHermitian", Napi::Function::New(env, EigHermitian, "eigHermitian"));
  exports.Set("eigGeneral", Napi::Function::New(env, EigGeneral, "eigGeneral"));
  exports.Set("coreName", Napi::Function::New(env, CoreName, "coreName"));
  exports.Set("config", Napi::Function::New(env, Config, "config"));
  exports.Set("getThreads", Napi::Function::New(env, GetThreads, "getThreads"));
  exports.Set("setThreads", Napi::Function::New(env, SetThreads, "setThreads"));
  exports.Set("mallocTuned", Napi::Function::New(env, MallocTuned, "mallocTuned"));
  return exports;
}

}  // namespace

NODE_API_MODULE(triskel_kernels, Init)
