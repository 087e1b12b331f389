#include "engine/internal/text.h"

namespace shellwright::internal {

size_t DecodeDigit(absl::string_view text, DigitForms forms, int* value) {
  if (text.empty()) return 0;
  const unsigned char c0 = static_cast<unsigned char>(text[0]);
  if (c0 >= '0' && c0 <= '9') {
    *value = c0 - '0';
    return 1;
  }
  if (forms == DigitForms::kAscii || text.size() < 2) return 0;
  const unsigned char c1 = static_cast<unsigned char>(text[1]);
  if (forms == DigitForms::kAsciiOrSuperscript) {
    // U+00B9, U+00B2, U+00B3 are two-byte sequences C2 B9/B2/B3.
    if (c0 == 0xC2) {
      if (c1 == 0xB9) {
        *value = 1;
        return 2;
      }
      if (c1 == 0xB2) {
        *value = 2;
        return 2;
      }
      if (c1 == 0xB3) {
        *value = 3;
        return 2;
      }
      return 0;
    }
    // U+2070 and U+2074..U+2079 are E2 81 B0 and E2 81 B4..B9.
    if (c0 == 0xE2 && c1 == 0x81 && text.size() >= 3) {
      const unsigned char c2 = static_cast<unsigned char>(text[2]);
      if (c2 == 0xB0) {
        *value = 0;
        return 3;
      }
      if (c2 >= 0xB4 && c2 <= 0xB9) {
        *value = c2 - 0xB0;
        return 3;
      }
    }
    return 0;
  }
  // Subscripts U+2080..U+2089 are E2 82 80..89.
  if (c0 == 0xE2 && c1 == 0x82 && text.size() >= 3) {
    const unsigned char c2 = static_cast<unsigned char>(text[2]);
    if (c2 >= 0x80 && c2 <= 0x89) {
      *value = c2 - 0x80;
      return 3;
    }
  }
  return 0;
}

std::string AsciiLower(absl::string_view text) {
  std::string out(text);
  for (char& c : out) {
    if (c >= 'A' && c <= 'Z') c = static_cast<char>(c - 'A' + 'a');
  }
  return out;
}

}  // namespace shellwright::internal
