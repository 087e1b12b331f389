// Internal text helpers shared by the engine's parsers. Not part of the API.
//
// Example:
//   int value = 0;
//   DecodeDigit("²", DigitForms::kAsciiOrSuperscript, &value);
//   // returns 2 (the bytes of '²'); value == 2

#ifndef SHELLWRIGHT_ENGINE_INTERNAL_TEXT_H_
#define SHELLWRIGHT_ENGINE_INTERNAL_TEXT_H_

#include <string>

#include "absl/strings/string_view.h"
#include "util/utf8.h"

namespace shellwright::internal {

// The parsers quote input in their messages with util/utf8.h's
// QuoteForMessage.
using ::shellwright::QuoteForMessage;

// Kinds of digit accepted by DecodeDigit.
enum class DigitForms { kAscii, kAsciiOrSuperscript, kAsciiOrSubscript };

// If `text` starts with a digit of an accepted form, stores its value in
// `*value`, returns the number of bytes it occupies, and otherwise returns 0.
size_t DecodeDigit(absl::string_view text, DigitForms forms, int* value);

// ASCII-only lower-casing.
std::string AsciiLower(absl::string_view text);

}  // namespace shellwright::internal

#endif  // SHELLWRIGHT_ENGINE_INTERNAL_TEXT_H_
