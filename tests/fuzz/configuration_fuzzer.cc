// Fuzzes Configuration::Parse (engine/configuration.h) with arbitrary bytes,
// and Hund's rules on whatever it accepts.
//
// Properties: an accepted configuration prints in each of its notations to
// a text that parses back to the same configuration; its Hund's-rules term
// is a well-formed term symbol that reads back from its ASCII form.

#include <cstddef>
#include <cstdint>

#include "absl/strings/string_view.h"
#include "engine/configuration.h"
#include "engine/term_symbol.h"
#include "tests/fuzz/fuzz_checks.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  using shellwright::Configuration;
  const absl::string_view text(reinterpret_cast<const char*>(data), size);
  absl::StatusOr<Configuration> config = Configuration::Parse(text);
  if (!config.ok()) {
    FUZZ_CHECK(config.status().code() == absl::StatusCode::kInvalidArgument,
               text);
    return 0;
  }
  FUZZ_CHECK(config->electrons() >= 0 &&
                 config->electrons() <= Configuration::MaxElectrons(),
             text);
  // A bare nucleus ("1s0") prints as "", which is not a configuration.
  if (config->electrons() == 0) return 0;
  for (const std::string& notation :
       {config->ToCoreNotation(), config->ToFullNotation(),
        config->ToFillingOrderNotation()}) {
    absl::StatusOr<Configuration> again = Configuration::Parse(notation);
    FUZZ_CHECK(again.ok() && *again == *config, notation);
  }
  const shellwright::TermSymbol term = shellwright::HundGroundTerm(*config);
  FUZZ_CHECK(term.two_s == config->UnpairedElectrons(), text);
  if (static_cast<size_t>(term.l) < shellwright::kTermLetters.size()) {
    absl::StatusOr<shellwright::TermSymbol> again =
        shellwright::TermSymbol::Parse(term.ToAscii());
    FUZZ_CHECK(again.ok() && *again == term, term.ToAscii());
  }
  return 0;
}
