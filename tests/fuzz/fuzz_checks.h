// Assertions for the libFuzzer targets in tests/fuzz.
//
// A fuzz target reports a broken property by aborting, which libFuzzer
// records as a crash together with the input that caused it. FUZZ_CHECK
// prints what failed first, so the crash report says which property broke.
//
// Example:
//
//   extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
//     std::string line = ...;
//     FUZZ_CHECK(shellwright::testing::IsWellFormedUtf8(line), line);
//     return 0;
//   }
//
// The UTF-8 property is checked with tests/testing/utf8_check.h.
//
// Thread safety: pure functions.

#ifndef SHELLWRIGHT_TESTS_FUZZ_FUZZ_CHECKS_H_
#define SHELLWRIGHT_TESTS_FUZZ_FUZZ_CHECKS_H_

#include <cstdio>
#include <cstdlib>
#include <string>

#include "absl/strings/escaping.h"
#include "absl/strings/string_view.h"
#include "tests/testing/utf8_check.h"

// Aborts with `cond` and `detail` (C-escaped) on stderr when `cond` fails.
#define FUZZ_CHECK(cond, detail)                                             \
  do {                                                                       \
    if (!(cond)) {                                                           \
      std::fprintf(stderr, "%s:%d: FUZZ_CHECK failed: %s\n  %s\n", __FILE__, \
                   __LINE__, #cond,                                          \
                   absl::CEscape(absl::string_view(detail)).c_str());        \
      std::abort();                                                          \
    }                                                                        \
  } while (false)

#endif  // SHELLWRIGHT_TESTS_FUZZ_FUZZ_CHECKS_H_
