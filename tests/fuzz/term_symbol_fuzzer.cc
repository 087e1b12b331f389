// Fuzzes TermSymbol::Parse (engine/term_symbol.h) with arbitrary bytes.
//
// Properties: an accepted symbol obeys |L-S| <= J <= L+S, prints back to a
// text that parses to the same symbol, and its Unicode form is UTF-8.

#include <cstddef>
#include <cstdint>
#include <cstdlib>

#include "absl/strings/string_view.h"
#include "engine/term_symbol.h"
#include "tests/fuzz/fuzz_checks.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  const absl::string_view text(reinterpret_cast<const char*>(data), size);
  absl::StatusOr<shellwright::TermSymbol> term =
      shellwright::TermSymbol::Parse(text);
  if (!term.ok()) {
    FUZZ_CHECK(term.status().code() == absl::StatusCode::kInvalidArgument,
               text);
    return 0;
  }
  FUZZ_CHECK(term->two_s >= 0 && term->l >= 0 && term->two_j >= 0, text);
  FUZZ_CHECK(term->two_j >= std::abs(2 * term->l - term->two_s) &&
                 term->two_j <= 2 * term->l + term->two_s,
             text);
  const std::string ascii = term->ToAscii();
  absl::StatusOr<shellwright::TermSymbol> again =
      shellwright::TermSymbol::Parse(ascii);
  FUZZ_CHECK(again.ok() && *again == *term, ascii);
  FUZZ_CHECK(shellwright::testing::IsWellFormedUtf8(term->ToUnicode()), text);
  return 0;
}
