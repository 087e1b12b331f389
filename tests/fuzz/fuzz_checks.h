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
//     FUZZ_CHECK(shellwright::fuzzing::IsValidUtf8(line), line);
//     return 0;
//   }
//
// Thread safety: pure functions.

#ifndef SHELLWRIGHT_TESTS_FUZZ_FUZZ_CHECKS_H_
#define SHELLWRIGHT_TESTS_FUZZ_FUZZ_CHECKS_H_

#include <cstdio>
#include <cstdlib>
#include <string>

#include "absl/strings/escaping.h"
#include "absl/strings/string_view.h"

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

namespace shellwright::fuzzing {

// True when `text` is well-formed UTF-8 as RFC 3629 defines it (no
// overlong forms, no surrogates, nothing above U+10FFFF). Written from the
// RFC's byte-range table rather than shared with the product code, so that
// it checks that code instead of repeating it.
inline bool IsValidUtf8(absl::string_view text) {
  // RFC 3629, section 4: the second byte's range depends on the first.
  struct Form {
    unsigned char first_lo, first_hi, second_lo, second_hi;
    int length;
  };
  static constexpr Form kForms[] = {
      {0xC2, 0xDF, 0x80, 0xBF, 2}, {0xE0, 0xE0, 0xA0, 0xBF, 3},
      {0xE1, 0xEC, 0x80, 0xBF, 3}, {0xED, 0xED, 0x80, 0x9F, 3},
      {0xEE, 0xEF, 0x80, 0xBF, 3}, {0xF0, 0xF0, 0x90, 0xBF, 4},
      {0xF1, 0xF3, 0x80, 0xBF, 4}, {0xF4, 0xF4, 0x80, 0x8F, 4},
  };
  size_t i = 0;
  while (i < text.size()) {
    const unsigned char c = static_cast<unsigned char>(text[i]);
    if (c < 0x80) {
      ++i;
      continue;
    }
    const Form* form = nullptr;
    for (const Form& f : kForms) {
      if (c >= f.first_lo && c <= f.first_hi) form = &f;
    }
    if (form == nullptr || i + form->length > text.size()) return false;
    const unsigned char second = static_cast<unsigned char>(text[i + 1]);
    if (second < form->second_lo || second > form->second_hi) return false;
    for (int k = 2; k < form->length; ++k) {
      const unsigned char next = static_cast<unsigned char>(text[i + k]);
      if (next < 0x80 || next > 0xBF) return false;
    }
    i += form->length;
  }
  return true;
}

}  // namespace shellwright::fuzzing

#endif  // SHELLWRIGHT_TESTS_FUZZ_FUZZ_CHECKS_H_
