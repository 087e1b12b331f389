#include "engine/internal/text.h"

#include <cstdio>

namespace shellwright::internal {

namespace {

// Length of the valid UTF-8 sequence starting at text[i], or 0.
size_t Utf8SequenceLength(absl::string_view text, size_t i) {
  const unsigned char c = static_cast<unsigned char>(text[i]);
  size_t len = 0;
  if (c >= 0xC2 && c <= 0xDF) {
    len = 2;
  } else if (c >= 0xE0 && c <= 0xEF) {
    len = 3;
  } else if (c >= 0xF0 && c <= 0xF4) {
    len = 4;
  } else {
    return 0;
  }
  if (i + len > text.size()) return 0;
  for (size_t k = 1; k < len; ++k) {
    const unsigned char cc = static_cast<unsigned char>(text[i + k]);
    if ((cc & 0xC0) != 0x80) return 0;
  }
  const unsigned char c1 = static_cast<unsigned char>(text[i + 1]);
  if (c == 0xE0 && c1 < 0xA0) return 0;   // Overlong.
  if (c == 0xED && c1 >= 0xA0) return 0;  // Surrogate.
  if (c == 0xF0 && c1 < 0x90) return 0;   // Overlong.
  if (c == 0xF4 && c1 >= 0x90) return 0;  // Above U+10FFFF.
  return len;
}

}  // namespace

std::string QuoteForMessage(absl::string_view text, size_t max_chars) {
  std::string out = "'";
  size_t shown = 0;
  size_t i = 0;
  while (i < text.size()) {
    if (shown == max_chars) {
      out += "...";
      break;
    }
    const unsigned char c = static_cast<unsigned char>(text[i]);
    if (c >= 0x20 && c < 0x7f && c != '\'') {
      out.push_back(static_cast<char>(c));
      ++i;
    } else if (c == '\'') {
      out += "\\'";
      ++i;
    } else if (size_t len = c >= 0x80 ? Utf8SequenceLength(text, i) : 0;
               len > 0) {
      // Valid UTF-8 (·, ₂, ²) stays readable.
      out.append(text.data() + i, len);
      i += len;
    } else {
      char buf[8];
      std::snprintf(buf, sizeof(buf), "\\x%02x", c);
      out += buf;
      ++i;
    }
    ++shown;
  }
  out.push_back('\'');
  return out;
}

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
