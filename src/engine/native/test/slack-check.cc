// Over-read check of the LAPACK and BLAS routines the kernels call (kernels.cc), on this machine's
// libraries: each case runs in a child process in which ONE buffer ends exactly at a PROT_NONE
// page (an "electric fence"), so reading or writing a byte past its end kills the child with
// SIGSEGV. Buffers the kernels allocate get the slack of slack.h, as kernels.cc gives them;
// buffers JavaScript owns (inputs read in place, the result arrays) get none.
//
//   slack-check slack   every case as kernels.cc allocates            (all must print "ok")
//   slack-check none    no slack anywhere: what the libraries read    (report only)
//   slack-check control a deliberate one-element over-read            (must print "CRASH")
//
// Output: one line per case, "<routine> <buffer>: ok" or "<routine> <buffer>: CRASH".
// Built and run by tests/unit/engine/native-slack.test.ts.
#include <complex>
#define lapack_complex_float std::complex<float>
#define lapack_complex_double std::complex<double>
#include <cblas.h>
#include <lapacke.h>
#include <sys/mman.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <string>

#include "../src/slack.h"

using cd = std::complex<double>;

namespace {

bool g_slack = true;
int g_fenced = -1;  // index of the fenced buffer in the case being run
int g_next = 0;     // index of the next buffer a case asks for

// A zero-filled buffer of `bytes` for an n x n problem; `ours`: allocated by the kernels (slack
// added when on), else owned by JavaScript (exact). The fenced one ends at a PROT_NONE page.
void* Buffer(std::size_t bytes, std::size_t n, bool ours) {
  const int me = g_next++;
  if (ours && g_slack) bytes += triskel::SlackBytes(n);
  if (me != g_fenced) return std::calloc(1, bytes + (1 << 20));
  const std::size_t page = 4096, pages = (bytes + page - 1) / page;
  char* base = static_cast<char*>(mmap(nullptr, (pages + 1) * page, PROT_READ | PROT_WRITE, MAP_PRIVATE | MAP_ANONYMOUS, -1, 0));
  if (base == MAP_FAILED) std::exit(3);
  mprotect(base + pages * page, page, PROT_NONE);
  return base + pages * page - bytes;
}
cd* Complex(std::size_t count, std::size_t n, bool ours) { return static_cast<cd*>(Buffer(16 * count, n, ours)); }

void Fill(cd* a, std::size_t count, unsigned seed) {
  for (std::size_t i = 0; i < count; i++) {
    seed = seed * 1103515245u + 12345u;
    a[i] = cd(static_cast<double>(seed % 997) / 997 - 0.5, static_cast<double>((seed >> 10) % 991) / 991 - 0.5);
  }
}

// The cases: what each kernel of kernels.cc hands to the libraries, with the same sizes.
void MatmulCase(int n) {  // matmul / gemmAccumulate: JavaScript's arrays in place
  const int m = n + 3, k = n / 2 + 1;
  cd *a = Complex(static_cast<std::size_t>(m) * k, n, false), *b = Complex(static_cast<std::size_t>(k) * n, n, false),
     *c = Complex(static_cast<std::size_t>(m) * n, n, false);
  Fill(a, static_cast<std::size_t>(m) * k, 1);
  Fill(b, static_cast<std::size_t>(k) * n, 2);
  const cd one(1, 0);
  cblas_zgemm(CblasRowMajor, CblasNoTrans, CblasNoTrans, m, n, k, &one, a, k, b, n, &one, c, n);
}
void SolveCase(int n) {  // solve: private LU copy and pivots (ours), result array (JavaScript's)
  const int nrhs = n / 2 + 1;
  cd* lu = Complex(static_cast<std::size_t>(n) * n, n, true);
  lapack_int* ipiv = static_cast<lapack_int*>(Buffer(sizeof(lapack_int) * n, n, true));
  cd* x = Complex(static_cast<std::size_t>(n) * nrhs, n, false);
  Fill(lu, static_cast<std::size_t>(n) * n, 3);
  for (int i = 0; i < n; i++) lu[static_cast<std::size_t>(i) * n + i] += static_cast<double>(n);
  Fill(x, static_cast<std::size_t>(n) * nrhs, 4);
  LAPACKE_zgetrf_work(LAPACK_COL_MAJOR, n, n, lu, n, ipiv);
  const cd one(1, 0);
  cblas_ztrsm(CblasColMajor, CblasRight, CblasUpper, CblasNoTrans, CblasNonUnit, nrhs, n, &one, lu, n, x, nrhs);
  cblas_ztrsm(CblasColMajor, CblasRight, CblasLower, CblasNoTrans, CblasUnit, nrhs, n, &one, lu, n, x, nrhs);
}
void InverseCase(int n) {  // inverse: result array (JavaScript's) in place, pivots and work (ours)
  cd* w = Complex(static_cast<std::size_t>(n) * n, n, false);
  lapack_int* ipiv = static_cast<lapack_int*>(Buffer(sizeof(lapack_int) * n, n, true));
  Fill(w, static_cast<std::size_t>(n) * n, 5);
  for (int i = 0; i < n; i++) w[static_cast<std::size_t>(i) * n + i] += static_cast<double>(n);
  LAPACKE_zgetrf_work(LAPACK_COL_MAJOR, n, n, w, n, ipiv);
  cd q;
  LAPACKE_zgetri_work(LAPACK_COL_MAJOR, n, w, n, ipiv, &q, -1);
  lapack_int lwork = std::max<lapack_int>(static_cast<lapack_int>(q.real()), n);
  cd* work = Complex(lwork, n, true);
  LAPACKE_zgetri_work(LAPACK_COL_MAJOR, n, w, n, ipiv, work, lwork);
}
void HermitianCase(int n, char jobz) {  // eigHermitian: private copy and work arrays (ours), values (JavaScript's)
  cd* h = Complex(static_cast<std::size_t>(n) * n, n, true);
  double* values = static_cast<double*>(Buffer(8 * static_cast<std::size_t>(n), n, false));
  for (int i = 0; i < n; i++)
    for (int j = 0; j <= i; j++) {
      const cd v(static_cast<double>((i * 7 + j * 3) % 11), i == j ? 0.0 : 0.5);
      h[i + static_cast<std::size_t>(j) * n] = v;
      h[j + static_cast<std::size_t>(i) * n] = std::conj(v);
    }
  cd wq;
  double rwq;
  lapack_int iwq;
  LAPACKE_zheevd_work(LAPACK_COL_MAJOR, jobz, 'U', n, h, n, values, &wq, -1, &rwq, -1, &iwq, -1);
  const lapack_int lwork = std::max<lapack_int>(1, static_cast<lapack_int>(wq.real()));
  const lapack_int lrwork = std::max<lapack_int>(1, static_cast<lapack_int>(rwq)), liwork = std::max<lapack_int>(1, iwq);
  cd* work = Complex(lwork, n, true);
  double* rwork = static_cast<double*>(Buffer(8 * static_cast<std::size_t>(lrwork), n, true));
  lapack_int* iwork = static_cast<lapack_int*>(Buffer(sizeof(lapack_int) * liwork, n, true));
  LAPACKE_zheevd_work(LAPACK_COL_MAJOR, jobz, 'U', n, h, n, values, work, lwork, rwork, lrwork, iwork, liwork);
}
void GeneralCase(int n) {  // eigGeneral: private copy, rwork and work (ours), values (JavaScript's)
  cd* h = Complex(static_cast<std::size_t>(n) * n, n, true);
  double* rwork = static_cast<double*>(Buffer(8 * 2 * static_cast<std::size_t>(n), n, true));
  cd* values = Complex(n, n, false);
  Fill(h, static_cast<std::size_t>(n) * n, 6);
  cd q, dummy;
  LAPACKE_zgeev_work(LAPACK_COL_MAJOR, 'N', 'N', n, h, n, values, &dummy, 1, &dummy, 1, &q, -1, rwork);
  const lapack_int lwork = std::max<lapack_int>(static_cast<lapack_int>(q.real()), 2 * n);
  cd* work = Complex(lwork, n, true);
  LAPACKE_zgeev_work(LAPACK_COL_MAJOR, 'N', 'N', n, h, n, values, &dummy, 1, &dummy, 1, work, lwork, rwork);
}
void ControlCase(int n) {  // reads one element past the end of its only buffer
  const volatile double* a = reinterpret_cast<double*>(Complex(n, n, false));
  volatile double sink = a[2 * n];
  (void)sink;
}

struct Case {
  const char* name;
  int buffers;
  void (*run)(int);
};
const Case kCases[] = {
    {"matmul", 3, MatmulCase},
    {"solve", 3, SolveCase},
    {"inverse", 3, InverseCase},
    {"eigHermitian-values", 5, [](int n) { HermitianCase(n, 'N'); }},
    {"eigHermitian-vectors", 5, [](int n) { HermitianCase(n, 'V'); }},
    {"eigGeneral", 4, GeneralCase},
};
// Sizes around LAPACK's block sizes and crossovers (32, 64, 128), and the one seen to crash (240).
const int kSizes[] = {1, 2, 3, 5, 8, 16, 31, 32, 33, 47, 63, 64, 65, 96, 100, 127, 128, 129, 160, 200, 240};

bool Survives(void (*run)(int), int fenced) {
  std::fflush(stdout);
  const pid_t pid = fork();
  if (pid == 0) {
    g_fenced = fenced;
    for (int n : kSizes) {
      g_next = 0;
      run(n);
    }
    _exit(0);
  }
  int status = 0;
  waitpid(pid, &status, 0);
  return WIFEXITED(status) && WEXITSTATUS(status) == 0;
}

}  // namespace

int main(int argc, char** argv) {
  const std::string mode = argc > 1 ? argv[1] : "slack";
  if (mode == "control") {
    std::printf("control 0: %s\n", Survives(ControlCase, 0) ? "ok" : "CRASH");
    return 0;
  }
  if (mode != "slack" && mode != "none") {
    std::fprintf(stderr, "usage: slack-check slack|none|control\n");
    return 2;
  }
  g_slack = mode == "slack";
  for (const Case& c : kCases)
    for (int b = 0; b < c.buffers; b++) std::printf("%s %d: %s\n", c.name, b, Survives(c.run, b) ? "ok" : "CRASH");
  return 0;
}
