// An independent UTF-8 checker for tests: it decodes each code point and
// checks its range, where util/utf8.h checks byte patterns, so a test can
// check the project's own UTF-8 rules against it.
//
// Example:
//   EXPECT_TRUE(shellwright::testing::IsWellFormedUtf8(report.message()));
//
// Thread safety: pure function.

#ifndef SHELLWRIGHT_TESTS_TESTING_UTF8_CHECK_H_
#define SHELLWRIGHT_TESTS_TESTING_UTF8_CHECK_H_

#include <cstdint>

#include "absl/strings/string_view.h"

namespace shellwright::testing {

// True when `text` is well-formed UTF-8: no stray continuation bytes, no
// truncated or overlong sequences, no surrogates, nothing above U+10FFFF.
inline bool IsWellFormedUtf8(absl::string_view text) {
  size_t i = 0;
  while (i < text.size()) {
    const unsigned char c = static_cast<unsigned char>(text[i]);
    size_t extra;
    uint32_t min, cp;
    if (c < 0x80) {
      ++i;
      continue;
    } else if ((c & 0xE0) == 0xC0) {
      extra = 1;
      min = 0x80;
      cp = c & 0x1F;
    } else if ((c & 0xF0) == 0xE0) {
      extra = 2;
      min = 0x800;
      cp = c & 0x0F;
    } else if ((c & 0xF8) == 0xF0) {
      extra = 3;
      min = 0x10000;
      cp = c & 0x07;
    } else {
      return false;
    }
    if (i + extra >= text.size()) return false;  // Truncated.
    for (size_t k = 1; k <= extra; ++k) {
      const unsigned char cc = static_cast<unsigned char>(text[i + k]);
      if ((cc & 0xC0) != 0x80) return false;
      cp = (cp << 6) | (cc & 0x3F);
    }
    if (cp < min || cp > 0x10FFFF || (cp >= 0xD800 && cp <= 0xDFFF)) {
      return false;
    }
    i += extra + 1;
  }
  return true;
}

}  // namespace shellwright::testing

#endif  // SHELLWRIGHT_TESTS_TESTING_UTF8_CHECK_H_
