// UTF-8 text: validation, repair, cutting at character boundaries, and
// quoting untrusted text for error messages. The one home for these rules:
// the engine's parsers, the record readers and the report writers all use
// them, so a cut or a repair never leaves text that proto strings (which
// must be valid UTF-8) would reject.
//
// Example:
//
//   shellwright::IsValidUtf8("Fe³⁺");                 // true
//   shellwright::Utf8Prefix("CuSO4·5H2O", 6);         // "CuSO4" (· is 2 bytes)
//   std::string s = "Fe\xff";
//   shellwright::ReplaceInvalidUtf8(&s);              // "Fe\uFFFD"
//   shellwright::QuoteForMessage("Fe\x01");           // "'Fe\\x01'"
//
// Thread safety: pure functions.

#ifndef SHELLWRIGHT_UTIL_UTF8_H_
#define SHELLWRIGHT_UTIL_UTF8_H_

#include <cstddef>
#include <string>

#include "absl/strings/string_view.h"

namespace shellwright {

// The length (2..4) of the well-formed multi-byte UTF-8 sequence that
// starts at text[i], or 0 when there is none there (an ASCII byte, a
// truncated, overlong or surrogate sequence, or one above U+10FFFF).
// REQUIRES: i < text.size().
size_t Utf8SequenceLength(absl::string_view text, size_t i);

// True when `text` is well-formed UTF-8.
bool IsValidUtf8(absl::string_view text);

// The longest prefix of `text` of at most `max_bytes` bytes that does not
// end inside a UTF-8 sequence. Ids, echoed formulas and quoted fields are
// cut with it.
inline absl::string_view Utf8Prefix(absl::string_view text, size_t max_bytes);

// Replaces every byte that does not begin a well-formed sequence with
// U+FFFD, so that a bad byte costs one replacement character, never the
// text around it. ASCII text is left untouched without a copy.
void ReplaceInvalidUtf8(std::string* text);

// `text` single-quoted for an error message: quotes escaped, control bytes
// and invalid UTF-8 as \xNN, valid UTF-8 (·, ₂, ²) kept readable, and cut
// to `max_chars` characters with "..." appended, so that hostile input
// cannot flood a message.
std::string QuoteForMessage(absl::string_view text, size_t max_chars = 64);

// Implementation details.

namespace utf8_internal {
absl::string_view CutAtBoundary(absl::string_view text, size_t max_bytes);
}  // namespace utf8_internal

// Inline: most texts fit, and reports cut every formula they echo.
inline absl::string_view Utf8Prefix(absl::string_view text, size_t max_bytes) {
  if (text.size() <= max_bytes) return text;
  return utf8_internal::CutAtBoundary(text, max_bytes);
}

}  // namespace shellwright

#endif  // SHELLWRIGHT_UTIL_UTF8_H_
