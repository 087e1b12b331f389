// An independent UTF-8 checker for tests and fuzz targets, written from
// RFC 3629's byte-range table rather than shared with util/utf8.h, so that
// it checks the product's UTF-8 rules instead of repeating them.
//
// Example:
//   EXPECT_TRUE(shellwright::testing::IsWellFormedUtf8(report.message()));
//
// Thread safety: pure function.

#ifndef SHELLWRIGHT_TESTS_TESTING_UTF8_CHECK_H_
#define SHELLWRIGHT_TESTS_TESTING_UTF8_CHECK_H_

#include <cstddef>

#include "absl/strings/string_view.h"

namespace shellwright::testing {

// True when `text` is well-formed UTF-8 as RFC 3629 defines it: no stray
// continuation bytes, no truncated or overlong sequences, no surrogates,
// nothing above U+10FFFF.
inline bool IsWellFormedUtf8(absl::string_view text) {
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

}  // namespace shellwright::testing

#endif  // SHELLWRIGHT_TESTS_TESTING_UTF8_CHECK_H_
