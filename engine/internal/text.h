// Internal text helpers shared by the engine's parsers. Not part of the API.
//
// Example:
//   QuoteForMessage("Fe\x01");  // "'Fe\\x01'"
//   DecodeDigit("²", &value);   // consumes the superscript two

#ifndef SHELLWRIGHT_ENGINE_INTERNAL_TEXT_H_
#define SHELLWRIGHT_ENGINE_INTERNAL_TEXT_H_

#include <string>

#include "absl/strings/string_view.h"

namespace shellwright::internal {

// Single-quoted, with control bytes and invalid UTF-8 escaped as \xNN and the
// text cut to `max_chars` characters (with "..." appended) so that hostile
// input cannot flood an error message.
std::string QuoteForMessage(absl::string_view text, size_t max_chars = 64);

// Kinds of digit accepted by DecodeDigit.
enum class DigitForms { kAscii, kAsciiOrSuperscript, kAsciiOrSubscript };

// If `text` starts with a digit of an accepted form, stores its value in
// `*value`, returns the number of bytes it occupies, and otherwise returns 0.
size_t DecodeDigit(absl::string_view text, DigitForms forms, int* value);

// ASCII-only lower-casing.
std::string AsciiLower(absl::string_view text);

}  // namespace shellwright::internal

#endif  // SHELLWRIGHT_ENGINE_INTERNAL_TEXT_H_
