#include "util/utf8.h"

#include <cstdio>

namespace shellwright {

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

bool IsValidUtf8(absl::string_view text) {
  size_t i = 0;
  while (i < text.size()) {
    if (static_cast<unsigned char>(text[i]) < 0x80) {
      ++i;
      continue;
    }
    const size_t len = Utf8SequenceLength(text, i);
    if (len == 0) return false;
    i += len;
  }
  return true;
}

namespace utf8_internal {

absl::string_view CutAtBoundary(absl::string_view text, size_t max_bytes) {
  size_t n = max_bytes;
  // text[n] is the first byte left out: a continuation byte there means
  // the cut falls inside a character.
  while (n > 0 && (static_cast<unsigned char>(text[n]) & 0xC0) == 0x80) --n;
  return text.substr(0, n);
}

}  // namespace utf8_internal

void ReplaceInvalidUtf8(std::string* text) {
  const std::string& s = *text;
  size_t i = 0;
  while (i < s.size() && static_cast<unsigned char>(s[i]) < 0x80) ++i;
  if (i == s.size()) return;  // ASCII fast path.
  std::string out(s.data(), i);
  while (i < s.size()) {
    if (static_cast<unsigned char>(s[i]) < 0x80) {
      out.push_back(s[i++]);
    } else if (const size_t len = Utf8SequenceLength(s, i); len > 0) {
      out.append(s, i, len);
      i += len;
    } else {
      out.append("\xEF\xBF\xBD");
      ++i;
    }
  }
  *text = std::move(out);
}

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

}  // namespace shellwright
