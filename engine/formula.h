// Chemical formula parsing with exact stoichiometry.
//
// Accepted syntax:
//   - element symbols with their standard capitalisation: Fe, O, Uuo is not;
//   - counts after a symbol or group: integers (Fe2), decimals (La0.7) or
//     Unicode subscript digits (Fe₂O₃);
//   - nested groups () and [] with a count after the closing bracket:
//     Ca3(PO4)2, K3[Fe(CN)6];
//   - adduct or hydrate parts joined by '·' (U+00B7), '•' (U+2022), '∙'
//     (U+2219), '⋅' (U+22C5) or '*', each with an optional leading
//     multiplier: CuSO4·5H2O, NiSO4*6H2O.
// '.' is always a decimal point. A decimal count directly followed by H2O
// (CuSO4.5H2O) parses as written, but earns the warning
// "possible_hydrate_typo": the author may have meant CuSO4·5H2O.
//
// Notations that composition records use (docs/method.md, "Formula
// notations"):
//   - a charge suffix sets Formula::charge: a sign at the end ("NH4+",
//     "OH-": digits before it after a symbol are that symbol's count), or
//     digits and a sign after a closing bracket ("[Fe(H2O)6]2+"), after
//     '^' ("SO4^2-") or in superscript ("SO₄²⁻", "Fe³⁺"); a lone symbol
//     takes digits and sign as its charge, as `atom` does ("Fe3+", "Fe+3");
//   - nonstoichiometry: a count may be a variable (x, y, z, d or δ) or a
//     number plus or minus a number times a variable ("O7-δ", "La1-xSrx",
//     "Li1+xMn2-xO4", "Fe1-0.5x"). Values come from
//     FormulaOptions::variables; δ and d without one are taken as 0 with
//     the info "nonstoichiometry_assumed"; x, y and z without one are the
//     error "variable_without_value";
//   - a part whose multiplier is 'n' ("CuSO4·nH2O": unknown hydration) is
//     left out of the amounts, with the info "unknown_hydration";
//   - a mineral site mixture "(Fe,Ni)9S8", "(Mg,Fe)2SiO4": distinct
//     element symbols without counts between commas, alone in '(' ')',
//     share the site equally (Fe 9/2, Ni 9/2), with the info
//     "site_mixture_equal_split"; any other comma is "malformed_formula";
//   - D and T (deuterium, tritium) count as hydrogen;
//   - ligand abbreviations (data/ligand_abbreviations.tsv, case-sensitive:
//     "bpy", "en", "acac", "Cp", ...) stand for their unit's atoms:
//     "[Fe(bpy)3]Cl2" is read as "[Fe(C10H8N2)3]Cl2". Alone in brackets
//     ("(bpy)3") the atoms are that group's terms; elsewhere ("[PtCl2en]",
//     "FeCp2") they form a group of their own with the count written after
//     the abbreviation. Element symbols always win ("Co" is cobalt); a
//     lowercase word that is neither an abbreviation nor a miscased symbol
//     is the error "unknown ligand abbreviation 'bpz' at column 5 (known:
//     ...)".
//
// Limits: kMaxFormulaLength bytes, nesting depth kMaxFormulaDepth, each
// count at most kMaxFormulaCount with at most kMaxCountDecimals decimals.
// Errors carry a code, a 1-based column (in characters) and the offending
// text, e.g. "column 6: unmatched ')'".
//
// Example:
//
//   shellwright::FormulaIssue issue;
//   absl::StatusOr<shellwright::Formula> f =
//       shellwright::ParseFormula("La0.7Sr0.3MnO3", &issue);
//   f->amounts[0].element->symbol;       // "La"
//   f->amounts[0].count.ToString();      // "7/10"
//   // ParseFormula("K4[Fe(CN)6]"): groups[0] is '[' (terms Fe, C, N),
//   // groups[1] is '(' inside it with count 6 (terms C, N).
//   shellwright::ParseFormula("Fe2O3)", &issue);
//   // issue.code == "malformed_formula", issue.column == 6
//
// Thread safety: pure functions.

#ifndef SHELLWRIGHT_ENGINE_FORMULA_H_
#define SHELLWRIGHT_ENGINE_FORMULA_H_

#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "absl/status/statusor.h"
#include "absl/strings/string_view.h"
#include "absl/types/span.h"
#include "engine/element.h"
#include "engine/rational.h"

namespace shellwright {

inline constexpr size_t kMaxFormulaLength = 1024;
inline constexpr int kMaxFormulaDepth = 16;
inline constexpr int64_t kMaxFormulaCount = 1000000;
inline constexpr int kMaxCountDecimals = 6;
// The largest denominator of a fractional count ("Ni1/3").
inline constexpr int64_t kMaxFractionDenominator = 1000000;

// How much of one element a formula unit holds.
struct ElementAmount {
  const Element* element;
  Rational count;  // Atoms per formula unit, > 0.
};

// A problem found while parsing: an error (returned as the status) or a
// warning (in Formula::warnings).
struct FormulaIssue {
  std::string code;     // "malformed_formula", "unknown_element", ...
  int column = 0;       // 1-based character column; 0 when not positional.
  std::string message;  // Human-readable, names the column and the text.
};

// An element symbol as written, with the count written after it, inside
// zero or more groups. Later stages read the written structure as hints:
// a group `(CN)6` or a run `NH4` may be a polyatomic unit.
struct WrittenTerm {
  const Element* element;
  Rational count;       // As written after the symbol; 1 when none.
  Rational multiplier;  // Product of the enclosing groups' and part's counts.
  int group = -1;       // Innermost enclosing group in Formula::groups.
  int part = 0;         // Adduct part: 0, then 1 after the first '·', ...
};

// A bracketed group, or an adduct part after a separator ('·5H2O').
struct WrittenGroup {
  char bracket;        // '(', '[', or '*' for an adduct part.
  int parent = -1;     // Enclosing group, or -1.
  int first_term = 0;  // The group's terms are [first_term, end_term).
  int end_term = 0;
  Rational count;       // Written after the closing bracket (the part's
                        // leading multiplier); 1 when none.
  Rational multiplier;  // count times the enclosing groups' counts.
};

// The value of a variable written in a formula's counts.
struct FormulaVariable {
  std::string name;  // "x", "y", "z", "d" or "δ".
  Rational value;
};

struct FormulaOptions {
  std::vector<FormulaVariable> variables;
};

// A ligand abbreviation accepted in formulas (data/ligand_abbreviations.tsv).
struct LigandAbbreviation {
  std::string abbreviation;  // As written: "bpy", "Cp".
  std::string unit;          // The unit it stands for: "2,2'-bipyridine".
  std::string formula;       // The unit written out: "C10H8N2".
  std::string source;
  // `formula` as (element, count) terms, in order: (C, 10), (H, 8), (N, 2).
  std::vector<std::pair<const Element*, int>> terms;
};

// Every abbreviation, in table order. Thread-safe; the table is built on
// first use.
absl::Span<const LigandAbbreviation> LigandAbbreviations();

// The abbreviation written exactly as `abbreviation` (case-sensitive), or
// null. Thread-safe.
const LigandAbbreviation* FindLigandAbbreviation(
    absl::string_view abbreviation);

// Parses a record's variables: "x=0.3", "x=0.3, δ=0.05" (',' or ';'
// between them; values are decimals with at most kMaxCountDecimals
// decimals). INVALID_ARGUMENT naming the part that is wrong.
absl::StatusOr<std::vector<FormulaVariable>> ParseFormulaVariables(
    absl::string_view text);

struct Formula {
  // One entry per element, in order of first appearance.
  std::vector<ElementAmount> amounts;
  std::vector<FormulaIssue> warnings;
  // Remarks that do not need a look: δ taken as 0, hydration left out.
  std::vector<FormulaIssue> infos;
  // The net charge a charge suffix gives ("NH4+": +1); nullopt without.
  std::optional<int> charge;
  // The formula as written: every symbol in order, and every group.
  std::vector<WrittenTerm> terms;
  std::vector<WrittenGroup> groups;

  // Total atoms per formula unit.
  Rational TotalAtoms() const;
};

// Parses `text`. On error returns INVALID_ARGUMENT with the issue's message
// and, when `error` is not null, fills it with the code and column. Codes:
// "empty_formula", "formula_too_long", "malformed_formula",
// "unknown_element", "nesting_too_deep", "count_too_large".
absl::StatusOr<Formula> ParseFormula(absl::string_view text,
                                     FormulaIssue* error = nullptr);

// The same with the values of the formula's variables; also
// "variable_without_value".
absl::StatusOr<Formula> ParseFormula(absl::string_view text,
                                     const FormulaOptions& options,
                                     FormulaIssue* error = nullptr);

// Hands the storage of a formula that is no longer needed back to this
// thread, for its next ParseFormula to fill: a long run of records then
// allocates no term, amount or group list per formula. Optional; each
// thread keeps the storage of one formula.
//
//   absl::StatusOr<Formula> f = ParseFormula("LiCoO2");
//   ...
//   if (f.ok()) RecycleFormula(*std::move(f));
void RecycleFormula(Formula&& formula);

}  // namespace shellwright

#endif  // SHELLWRIGHT_ENGINE_FORMULA_H_
