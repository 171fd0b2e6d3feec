// Room after the end of every buffer the kernels hand to LAPACK.
//
// Debian's OpenBLAS 0.3.21 reads past the end of the matrix and of the work array in zheevd (its
// AVX2 zgemv_n kernel, called from zlatrd): up to one column, n complex numbers, beyond each. In
// the worker that killed the whole process with SIGSEGV now and then, when such a buffer happened
// to end at the top of a thread's malloc arena; elsewhere the extra reads saw whatever lay there.
// Found with buffers that end at a PROT_NONE page: src/engine/native/test/slack-check.cc, run on
// every machine by tests/unit/engine/native-slack.test.ts, which also checks that the rule below
// is enough for every routine kernels.cc calls.
//
// So every buffer kernels.cc allocates for LAPACK is longer than LAPACK asks for by one column of
// the matrix and a cache line, zero-filled: the extra reads stay in memory we own and read zeros.
#pragma once
#include <complex>
#include <cstddef>
#include <vector>

namespace triskel {

// Extra bytes after a buffer for an n x n problem: one complex column and a 128-byte cache line.
inline std::size_t SlackBytes(std::size_t n) { return 16 * n + 128; }

// A zero-filled vector of `count` elements of T with the slack of an n x n problem after them.
template <typename T>
std::vector<T> WithSlack(std::size_t count, std::size_t n) {
  return std::vector<T>(count + (SlackBytes(n) + sizeof(T) - 1) / sizeof(T));
}

}  // namespace triskel
