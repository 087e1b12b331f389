#include "engine/formula.h"

#include <algorithm>
#include <array>
#include <cstdint>
#include <utility>

#include "absl/base/attributes.h"
#include "absl/container/inlined_vector.h"
#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_join.h"
#include "absl/strings/str_split.h"
#include "absl/strings/strip.h"
#include "engine/diagnostic_codes.h"
#include "engine/internal/data_tables.h"
#include "engine/internal/text.h"

namespace shellwright {
namespace {

using internal::QuoteForMessage;

// Amounts beyond this (numerator or denominator) are rejected so that the
// exact arithmetic downstream can never overflow.
constexpr int64_t kMaxExactMagnitude = 1000000000000;  // 1e12

// Typical formulas and groups hold a handful of items or terms.
constexpr size_t kTypicalTerms = 8;

// Inline storage: parsing should not allocate for typical items.
using Items =
    absl::InlinedVector<std::pair<const Element*, Rational>, kTypicalTerms>;

// CheckedMultiply for a factor other than 1, out of line: its 128-bit
// arithmetic needs a long prologue, which the usual factor 1 skips.
ABSL_ATTRIBUTE_NOINLINE bool CheckedMultiplyOther(const Rational& a,
                                                  const Rational& b,
                                                  Rational* out) {
  if (a.den() == 1 && b.den() == 1 && a.num() <= kMaxExactMagnitude &&
      b.num() <= kMaxExactMagnitude) {
    const __int128 p = static_cast<__int128>(a.num()) * b.num();
    if (p > kMaxExactMagnitude) return false;
    *out = Rational(static_cast<int64_t>(p));
    return true;
  }
  const __int128 num = static_cast<__int128>(a.num()) * b.num();
  const __int128 den = static_cast<__int128>(a.den()) * b.den();
  // Reduce before range-checking: 0.5 * 2 is fine however large the parts.
  __int128 x = num < 0 ? -num : num, y = den;
  while (y != 0) {
    __int128 t = x % y;
    x = y;
    y = t;
  }
  const __int128 g = x == 0 ? 1 : x;
  const __int128 rn = num / g, rd = den / g;
  if (rn > kMaxExactMagnitude || rd > kMaxExactMagnitude) return false;
  *out = Rational(static_cast<int64_t>(rn), static_cast<int64_t>(rd));
  return true;
}

bool CheckedMultiply(const Rational& a, const Rational& b, Rational* out) {
  // Fast paths: most counts are multiplied by 1 or are small integers.
  if (b.num() == 1 && b.den() == 1) {
    *out = a;
    return true;
  }
  return CheckedMultiplyOther(a, b, out);
}

// Superscript digits 0-9 and signs, as UTF-8.
constexpr absl::string_view kSuperscriptDigits[] = {
    "\u2070", "\u00B9", "\u00B2", "\u00B3", "\u2074",
    "\u2075", "\u2076", "\u2077", "\u2078", "\u2079"};
constexpr absl::string_view kSuperscriptPlus = "\u207A";
constexpr absl::string_view kSuperscriptMinus = "\u207B";

bool IsDigitChar(char c) { return c >= '0' && c <= '9'; }

// A lone element symbol ("Fe"), which takes trailing digits as its charge.
bool IsLoneSymbol(absl::string_view text) {
  return !text.empty() && text.size() <= 3 && text[0] >= 'A' &&
         text[0] <= 'Z' && FindElementBySymbol(text) != nullptr;
}

// The charge suffix at the end of `text` (formula.h's rules): returns its
// length in bytes and sets `charge`, or 0 when there is none.
size_t ChargeSuffix(absl::string_view text, int* charge) {
  // Superscripts: digits, then a sign; "²⁻", "⁺".
  for (const auto& [sign_text, sign] :
       {std::pair{kSuperscriptPlus, 1}, std::pair{kSuperscriptMinus, -1}}) {
    if (!absl::EndsWith(text, sign_text)) continue;
    size_t end = text.size() - sign_text.size();
    int magnitude = 0, place = 1;
    bool any = false;
    while (true) {
      bool matched = false;
      for (int d = 0; d < 10; ++d) {
        if (absl::EndsWith(text.substr(0, end), kSuperscriptDigits[d])) {
          end -= kSuperscriptDigits[d].size();
          magnitude += d * place;
          place *= 10;
          matched = any = true;
          break;
        }
      }
      if (!matched || place > 100) break;
    }
    if (end > 0 && text[end - 1] == '^') --end;
    *charge = sign * (any ? magnitude : 1);
    return end == 0 ? 0 : text.size() - end;
  }
  if (text.empty() || (text.back() != '+' && text.back() != '-')) {
    // "Fe+3": a lone symbol with a sign and digits.
    size_t digits = text.size();
    while (digits > 0 && IsDigitChar(text[digits - 1])) --digits;
    if (digits < text.size() && text.size() - digits <= 2 && digits > 1 &&
        (text[digits - 1] == '+' || text[digits - 1] == '-') &&
        IsLoneSymbol(text.substr(0, digits - 1))) {
      int magnitude = 0;
      for (size_t i = digits; i < text.size(); ++i) {
        magnitude = magnitude * 10 + (text[i] - '0');
      }
      *charge = (text[digits - 1] == '-' ? -1 : 1) * magnitude;
      return text.size() - digits + 1;
    }
    return 0;
  }
  const int sign = text.back() == '-' ? -1 : 1;
  size_t digits = text.size() - 1;
  while (digits > 0 && IsDigitChar(text[digits - 1]) &&
         text.size() - 1 - digits < 2) {
    --digits;
  }
  const absl::string_view before = text.substr(0, digits);
  int magnitude = 1;
  bool digits_are_charge = false;
  size_t start = text.size() - 1;
  if (digits < text.size() - 1) {
    digits_are_charge = absl::EndsWith(before, "^") ||
                        absl::EndsWith(before, ")") ||
                        absl::EndsWith(before, "]") || IsLoneSymbol(before);
    if (digits_are_charge) {
      magnitude = 0;
      for (size_t i = digits; i < text.size() - 1; ++i) {
        magnitude = magnitude * 10 + (text[i] - '0');
      }
      start = digits;
    }
  }
  if (start > 0 && text[start - 1] == '^') --start;
  if (start == 0) return 0;  // Nothing but a charge: not a formula.
  *charge = sign * magnitude;
  return text.size() - start;
}

// A variable at the start of `text` ("x", "δ"); its length, or 0.
size_t VariableAt(absl::string_view text, std::string* name) {
  if (text.empty()) return 0;
  if (text[0] == 'x' || text[0] == 'y' || text[0] == 'z' || text[0] == 'd') {
    *name = std::string(1, text[0]);
    return 1;
  }
  if (absl::StartsWith(text, "\u03B4")) {  // δ
    *name = "\u03B4";
    return 2;
  }
  return 0;
}

// A decimal with at most kMaxCountDecimals decimals, as an exact value.
bool ParseDecimal(absl::string_view text, Rational* out) {
  bool negative = false;
  if (!text.empty() && (text[0] == '-' || text[0] == '+')) {
    negative = text[0] == '-';
    text.remove_prefix(1);
  }
  int64_t num = 0, den = 1;
  bool any = false, dot = false;
  for (char c : text) {
    if (c == '.' && !dot) {
      dot = true;
      continue;
    }
    if (!IsDigitChar(c)) return false;
    if (num > kMaxFormulaCount * 1000000) return false;
    num = num * 10 + (c - '0');
    if (dot) {
      den *= 10;
      if (den > 1000000) return false;
    }
    any = true;
  }
  if (!any) return false;
  *out = Rational(negative ? -num : num, den);
  return true;
}

// The abbreviations, in table order, built once from the compiled tables.
const std::vector<LigandAbbreviation>& AbbreviationTable() {
  static const std::vector<LigandAbbreviation>* const kTable = [] {
    auto* table = new std::vector<LigandAbbreviation>;
    const absl::Span<const internal::UnitRow> units = internal::UnitRows();
    for (const internal::LigandAbbreviationRow& row :
         internal::LigandAbbreviationRows()) {
      LigandAbbreviation& a = table->emplace_back();
      const internal::UnitRow& unit = units[row.unit];
      a.abbreviation = row.abbreviation;
      a.unit = unit.name;
      a.source = row.source;
      // The unit's first written form: "C10H8N2" (compile_tables has
      // checked that it is a run of symbols holding the unit's atoms).
      const absl::string_view written =
          absl::string_view(unit.written)
              .substr(0, absl::string_view(unit.written).find('|'));
      a.formula = std::string(written);
      size_t i = 0;
      while (i < written.size()) {
        size_t j = i + 1;
        while (j < written.size() && written[j] >= 'a' && written[j] <= 'z') {
          ++j;
        }
        const Element* element = FindElementBySymbol(written.substr(i, j - i));
        int n = 0;
        size_t k = j;
        while (k < written.size() && IsDigitChar(written[k])) {
          n = n * 10 + (written[k] - '0');
          ++k;
        }
        a.terms.emplace_back(element, k == j ? 1 : n);
        i = k;
      }
    }
    return table;
  }();
  return *kTable;
}

// The joined abbreviations ("OAc", "Cp*"): those with a capital after the
// first letter or a closing '*', which the parser reads before element
// symbols. `first` and `second` mark their first and second letters, so
// that other symbols skip the comparison.
struct JoinedAbbreviations {
  std::vector<const LigandAbbreviation*> list;
  std::array<bool, 128> first{};
  std::array<bool, 128> second{};
};

const JoinedAbbreviations& JoinedAbbreviationTable() {
  static const JoinedAbbreviations* const kJoined = [] {
    auto* joined = new JoinedAbbreviations;
    for (const LigandAbbreviation& a : AbbreviationTable()) {
      const absl::string_view name = a.abbreviation;
      const bool star = absl::EndsWith(name, "*");
      const bool capital =
          std::any_of(name.begin() + 1, name.end(),
                      [](char c) { return c >= 'A' && c <= 'Z'; });
      if (!star && !capital) continue;
      joined->list.push_back(&a);
      joined->first[static_cast<unsigned char>(name[0]) & 127] = true;
      joined->second[static_cast<unsigned char>(name[1]) & 127] = true;
    }
    return joined;
  }();
  return *kJoined;
}

// "acac, bipy, bpy, ...": the known abbreviations, for messages.
const std::string& KnownAbbreviations() {
  static const std::string* const kText = [] {
    std::vector<absl::string_view> names;
    for (const LigandAbbreviation& a : AbbreviationTable()) {
      names.push_back(a.abbreviation);
    }
    return new std::string(absl::StrJoin(names, ", "));
  }();
  return *kText;
}

// The lists of the last formula handed back on this thread
// (RecycleFormula), emptied, keeping their storage for the next parse.
struct FormulaStorage {
  std::vector<ElementAmount> amounts;
  std::vector<WrittenTerm> terms;
  std::vector<WrittenGroup> groups;
};

FormulaStorage& ThreadFormulaStorage() {
  thread_local FormulaStorage storage;
  return storage;
}

class FormulaParser {
 public:
  FormulaParser(absl::string_view text, const FormulaOptions& options)
      : text_(text), full_text_(text), options_(options) {}

  absl::StatusOr<Formula> Parse(FormulaIssue* error) {
    Formula formula;
    int charge = 0;
    if (const size_t suffix = ChargeSuffix(text_, &charge); suffix > 0) {
      text_.remove_suffix(suffix);
      formula.charge = charge;
    }
    // "cis-[PtCl2(NH3)2]": geometric-isomer prefixes name an arrangement,
    // not a composition; they are noted and skipped.
    if (!text_.empty() &&
        (IsLower(text_[0]) || static_cast<unsigned char>(text_[0]) >= 0x80)) {
      SkipPrefixes();
    }
    // The storage of this thread's last formula, where it was handed back;
    // else one allocation each for most formulas' terms and amounts.
    FormulaStorage& storage = ThreadFormulaStorage();
    formula.amounts.swap(storage.amounts);
    terms_.swap(storage.terms);
    groups_.swap(storage.groups);
    terms_.reserve(kTypicalTerms);
    formula.amounts.reserve(kTypicalTerms);
    // Each element's place in formula.amounts plus one; 0 before it has one.
    static_assert(kMaxAtomicNumber < 255);
    std::array<uint8_t, kMaxAtomicNumber + 1> place{};
    while (true) {
      const size_t part_start = pos_;
      Rational multiplier(1);
      // "·nH2O": hydration not known; parsed, then left out.
      const bool unknown_amount =
          part_ > 0 && pos_ + 1 < text_.size() && text_[pos_] == 'n' &&
          (IsUpper(text_[pos_ + 1]) || text_[pos_ + 1] == '(' ||
           text_[pos_ + 1] == '[');
      if (unknown_amount) ++pos_;
      if (pos_ < text_.size() && IsAsciiDigit(text_[pos_])) {
        if (!ParseCount(&multiplier, /*warn_hydrate=*/false)) {
          return Failed(error);
        }
      }
      Items items;
      const int first_term = static_cast<int>(terms_.size());
      const int first_group = static_cast<int>(groups_.size());
      if (part_ > 0) {
        groups_.push_back(WrittenGroup{'*', -1, first_term, first_term,
                                       multiplier, Rational(1)});
      }
      current_group_ = part_ > 0 ? first_group : -1;
      if (!ParseSequence(0, '\0', &items)) return Failed(error);
      if (part_ > 0) {
        groups_[first_group].end_term = static_cast<int>(terms_.size());
      }
      if (!Multiply(first_term, first_group, multiplier)) {
        Fail(codes::kCountTooLarge, part_start, "stoichiometry is too large");
        return Failed(error);
      }
      if (items.empty()) {
        if (text_.empty()) {
          Fail(codes::kEmptyFormula, 0, "formula is empty");
          issue_.column = 0;
        } else {
          Fail(codes::kMalformedFormula, pos_,
               absl::StrCat("expected an element symbol at column ",
                            Column(pos_), Near(pos_)));
        }
        return Failed(error);
      }
      if (unknown_amount) {
        infos_.push_back(FormulaIssue{
            codes::kUnknownHydration, Column(part_start),
            absl::StrCat("the part at column ", Column(part_start),
                         " has an unknown multiplier 'n' and is left out "
                         "of the analysis")});
        terms_.resize(first_term);
        groups_.resize(first_group);
        items.clear();
      }
      for (auto& [element, count] : items) {
        if (count.IsZero()) continue;  // "Sr0" once x = 0.
        Rational total;
        if (!CheckedMultiply(count, multiplier, &total)) {
          Fail(codes::kCountTooLarge, part_start, "stoichiometry is too large");
          return Failed(error);
        }
        uint8_t& p = place[element->atomic_number];
        if (p == 0) {
          formula.amounts.push_back({element, total});
          p = static_cast<uint8_t>(formula.amounts.size());
        } else {
          Rational& sum = formula.amounts[p - 1].count;
          sum = sum + total;
          if (sum.num() > kMaxExactMagnitude ||
              sum.den() > kMaxExactMagnitude) {
            Fail(codes::kCountTooLarge, part_start,
                 "stoichiometry is too large");
            return Failed(error);
          }
        }
      }
      if (pos_ == text_.size()) break;
      if (size_t len = SeparatorLength(pos_); len > 0) {
        pos_ += len;
        ++part_;
        if (pos_ == text_.size()) {
          Fail(codes::kMalformedFormula, pos_ - len,
               absl::StrCat("nothing follows the separator at column ",
                            Column(pos_ - len)));
          return Failed(error);
        }
        continue;
      }
      const char c = text_[pos_];
      if (c == ')' || c == ']') {
        Fail(codes::kMalformedFormula, pos_,
             absl::StrCat("unmatched '", std::string(1, c), "' at column ",
                          Column(pos_)));
      } else {
        Fail(codes::kMalformedFormula, pos_, UnexpectedMessage(pos_));
      }
      return Failed(error);
    }
    if (formula.amounts.empty() && !infos_.empty()) {
      Fail(codes::kMalformedFormula, 0,
           "nothing is left once the parts of unknown amount are left out");
      return Failed(error);
    }
    formula.warnings = std::move(warnings_);
    formula.infos = std::move(infos_);
    formula.terms = std::move(terms_);
    formula.groups = std::move(groups_);
    return formula;
  }

 private:
  static bool IsAsciiDigit(char c) { return c >= '0' && c <= '9'; }
  static bool IsUpper(char c) { return c >= 'A' && c <= 'Z'; }
  static bool IsLower(char c) { return c >= 'a' && c <= 'z'; }

  // 1-based column in characters (UTF-8 continuation bytes do not count).
  int Column(size_t byte_pos) const {
    int column = 1;
    for (size_t i = 0; i < byte_pos && i < text_.size(); ++i) {
      if ((static_cast<unsigned char>(text_[i]) & 0xC0) != 0x80) ++column;
    }
    return column;
  }

  std::string Near(size_t byte_pos) const {
    if (byte_pos >= text_.size()) return " (end of formula)";
    return absl::StrCat(" near ", QuoteForMessage(text_.substr(byte_pos), 12));
  }

  std::string UnexpectedMessage(size_t byte_pos) const {
    const unsigned char c = static_cast<unsigned char>(text_[byte_pos]);
    if (c == ' ' || c == '\t') {
      return absl::StrCat("unexpected space at column ", Column(byte_pos));
    }
    // Show the whole UTF-8 character.
    size_t len = 1;
    while (byte_pos + len < text_.size() &&
           (static_cast<unsigned char>(text_[byte_pos + len]) & 0xC0) == 0x80) {
      ++len;
    }
    return absl::StrCat("unexpected character ",
                        QuoteForMessage(text_.substr(byte_pos, len)),
                        " at column ", Column(byte_pos));
  }

  void Fail(absl::string_view code, size_t byte_pos, std::string message) {
    issue_.code = std::string(code);
    issue_.column = Column(byte_pos);
    issue_.message = std::move(message);
  }

  // The end of the run of lowercase ASCII letters from `p`.
  size_t LowercaseRunEnd(size_t p) const {
    while (p < text_.size() && IsLower(text_[p])) ++p;
    return p;
  }

  // A comma met inside a '(' group: where it is, and the terms and the
  // group's items before it.
  struct Comma {
    size_t pos;
    size_t terms;
    size_t items;
  };

  // Checks the site mixture "(A,B,...)" of `group` (opened at byte
  // `open`, its commas from commas_[first_comma] on) and splits its site
  // equally among the members: each member is one element symbol with no
  // count, written once, and nothing else is in the group. The info
  // "site_mixture_equal_split" says so. False on error.
  bool CloseSiteMixture(size_t open, int group, size_t first_comma,
                        Items* inner) {
    const size_t members = commas_.size() - first_comma + 1;
    const size_t first_term = groups_[group].first_term;
    bool simple = static_cast<size_t>(group) + 1 == groups_.size() &&
                  terms_.size() - first_term == members &&
                  inner->size() == members;
    for (size_t k = 0; simple && k + first_comma < commas_.size(); ++k) {
      const Comma& comma = commas_[first_comma + k];
      simple = comma.terms - first_term == k + 1 && comma.items == k + 1;
    }
    for (size_t k = 0; simple && k < members; ++k) {
      const WrittenTerm& t = terms_[first_term + k];
      simple = t.count == Rational(1) && t.group == group;
      for (size_t j = 0; simple && j < k; ++j) {
        simple = terms_[first_term + j].element != t.element;
      }
    }
    commas_.resize(first_comma);
    if (!simple) {
      Fail(codes::kMalformedFormula, open,
           absl::StrCat("malformed site mixture at column ", Column(open),
                        ": write distinct element symbols without counts "
                        "between commas, as in (Fe,Ni)9S8"));
      return false;
    }
    const Rational share(1, static_cast<int64_t>(members));
    std::string names;
    for (size_t k = 0; k < members; ++k) {
      terms_[first_term + k].count = share;
      (*inner)[k].second = share;
      absl::StrAppend(&names, k == 0 ? "" : ", ",
                      terms_[first_term + k].element->symbol);
    }
    infos_.push_back(FormulaIssue{
        codes::kSiteMixtureEqualSplit, Column(open),
        absl::StrCat("the site mixture at column ", Column(open), " (", names,
                     ") is analysed as an equal split, ", share.ToString(),
                     " each; write the counts (Fe4.5Ni4.5S8) for another")});
    return true;
  }

  // After the closing bracket of `group` (opened at byte `open`, holding
  // `inner`): parses the count written after it and adds the group's
  // amounts to `items`. False on error.
  bool CloseGroup(int group, size_t open, const Items& inner, Items* items) {
    Rational count(1);
    if (!ParseCount(&count)) return false;
    groups_[group].count = count;
    if (!Multiply(groups_[group].first_term, group, count)) {
      Fail(codes::kCountTooLarge, open, "stoichiometry is too large");
      return false;
    }
    for (const auto& [element, n] : inner) {
      Rational total;
      if (!CheckedMultiply(n, count, &total)) {
        Fail(codes::kCountTooLarge, open, "stoichiometry is too large");
        return false;
      }
      items->emplace_back(element, total);
    }
    return true;
  }

  // Writes out the ligand abbreviation `a` at bytes [start, end) as its
  // unit's atoms. Alone in a written group ("(bpy)3") they are that
  // group's terms, as "(C10H8N2)3" would be; anywhere else ("[PtCl2en]",
  // "FeCp2") they form a group of their own, with the count written after
  // the abbreviation. False on error.
  bool ParseAbbreviation(const LigandAbbreviation& a, size_t start, size_t end,
                         int depth, Items* items) {
    bool alone = current_group_ >= 0 && groups_[current_group_].first_term ==
                                            static_cast<int>(terms_.size());
    if (alone && groups_[current_group_].bracket == '*') {  // "·2py"
      alone = end == text_.size() || SeparatorLength(end) > 0;
    } else if (alone) {
      alone = end < text_.size() && (text_[end] == ')' || text_[end] == ']');
    }
    pos_ = end;
    if (alone) {
      AddAbbreviationTerms(a, items);
      return true;
    }
    if (depth + 1 > kMaxFormulaDepth) {
      Fail(codes::kNestingTooDeep, start,
           absl::StrCat("groups nest deeper than ", kMaxFormulaDepth,
                        " at column ", Column(start)));
      return false;
    }
    const int group = static_cast<int>(groups_.size());
    const int first_term = static_cast<int>(terms_.size());
    groups_.push_back(WrittenGroup{'(', current_group_, first_term, first_term,
                                   Rational(1), Rational(1)});
    current_group_ = group;
    Items inner;
    AddAbbreviationTerms(a, &inner);
    current_group_ = groups_[group].parent;
    groups_[group].end_term = static_cast<int>(terms_.size());
    return CloseGroup(group, start, inner, items);
  }

  void AddAbbreviationTerms(const LigandAbbreviation& a, Items* items) {
    for (const auto& [element, n] : a.terms) {
      items->emplace_back(element, Rational(n));
      terms_.push_back(WrittenTerm{element, Rational(n), Rational(1),
                                   current_group_, part_});
    }
  }

  // Multiplies the written multipliers of the terms from `first_term` and
  // of the groups from `first_group` on by `count`: the count after a
  // closing bracket, or a part's leading multiplier. False on overflow.
  bool Multiply(int first_term, int first_group, const Rational& count) {
    if (count.num() == 1 && count.den() == 1) return true;
    for (size_t i = first_term; i < terms_.size(); ++i) {
      if (!CheckedMultiply(terms_[i].multiplier, count,
                           &terms_[i].multiplier)) {
        return false;
      }
    }
    for (size_t i = first_group; i < groups_.size(); ++i) {
      if (!CheckedMultiply(groups_[i].multiplier, count,
                           &groups_[i].multiplier)) {
        return false;
      }
    }
    return true;
  }

  // Skips the leading isomer prefixes at pos_ ("cis-", "trans-", "fac-",
  // "mer-", one or more) and polymorph prefixes ("γ-", "gamma-", "α-"),
  // with an info naming each kind.
  void SkipPrefixes() {
    static constexpr absl::string_view kIsomers[] = {"cis-", "trans-", "fac-",
                                                     "mer-"};
    // Greek letters, written or spelled, as phase names use them (γ-Fe2O3
    // maghemite, α-Al2O3 corundum, β-Ga2O3, κ-Al2O3).
    static constexpr absl::string_view kPolymorphs[] = {
        "α-",     "β-",       "γ-",    "δ-",     "ε-",     "ζ-",
        "η-",     "θ-",       "κ-",    "alpha-", "beta-",  "gamma-",
        "delta-", "epsilon-", "zeta-", "eta-",   "theta-", "kappa-"};
    const auto skip = [this](absl::Span<const absl::string_view> prefixes,
                             std::string* seen) {
      for (absl::string_view p : prefixes) {
        if (absl::StartsWith(text_.substr(pos_), p) &&
            pos_ + p.size() < text_.size()) {
          absl::StrAppend(seen, p);
          pos_ += p.size();
          return true;
        }
      }
      return false;
    };
    std::string isomer, polymorph;
    while (skip(kIsomers, &isomer) || skip(kPolymorphs, &polymorph)) {
    }
    if (!isomer.empty()) {
      infos_.push_back(FormulaIssue{
          codes::kIsomerPrefix, 1,
          absl::StrCat("the prefix '", isomer,
                       "' names a geometric isomer; the composition, states "
                       "and estimates do not depend on it")});
    }
    if (!polymorph.empty()) {
      infos_.push_back(FormulaIssue{
          codes::kPolymorphPrefix, 1,
          absl::StrCat("the prefix '", polymorph,
                       "' names a polymorph; the composition and states do "
                       "not depend on it, but magnetic order does, and the "
                       "estimates assume the usual structure of the "
                       "composition")});
    }
  }

  absl::Status Failed(FormulaIssue* error) {
    if (error != nullptr) *error = issue_;
    return absl::InvalidArgumentError(absl::StrCat(
        "formula ", QuoteForMessage(full_text_), ": ", issue_.message));
  }

  // The value of variable `name` written at `byte_pos`: the record's, or
  // 0 for δ and d (noted once), or an error for x, y and z.
  bool VariableValue(const std::string& name, size_t byte_pos, Rational* v) {
    for (const FormulaVariable& given : options_.variables) {
      if (given.name == name) {
        *v = given.value;
        return true;
      }
    }
    if (name == "d" || name == "\u03B4") {
      *v = Rational(0);
      for (const FormulaIssue& i : infos_) {
        if (i.code == codes::kNonstoichiometryAssumed &&
            absl::StrContains(i.message, absl::StrCat("'", name, "'"))) {
          return true;
        }
      }
      infos_.push_back(FormulaIssue{
          codes::kNonstoichiometryAssumed, Column(byte_pos),
          absl::StrCat("nonstoichiometry '", name, "' at column ",
                       Column(byte_pos),
                       " is analysed at 0; give its value in the record's "
                       "variables (e.g. ",
                       name, "=0.1) to analyse another")});
      return true;
    }
    Fail(codes::kVariableWithoutValue, byte_pos,
         absl::StrCat("variable '", name, "' at column ", Column(byte_pos),
                      " has no value; give it in the record's variables, "
                      "e.g. ",
                      name, "=0.3"));
    return false;
  }

  // A count with a variable at pos_, after `number` (when `had_number`):
  // "-δ", "+x", "-0.5x" after a number, or a bare "x". Sets `count` and
  // returns true, or false on error; leaves everything alone when there
  // is none.
  bool ParseVariableCount(size_t start, bool had_number, Rational* count) {
    size_t p = pos_;
    int sign = 1;
    Rational factor(1);
    if (had_number) {
      if (p >= text_.size() || (text_[p] != '+' && text_[p] != '-')) {
        return true;
      }
      sign = text_[p] == '-' ? -1 : 1;
      ++p;
      size_t q = p;
      while (q < text_.size() && (IsAsciiDigit(text_[q]) || text_[q] == '.')) {
        ++q;
      }
      if (q > p && !ParseDecimal(text_.substr(p, q - p), &factor)) return true;
      p = q;
    }
    const size_t var_pos = p;
    std::string name;
    const size_t len = VariableAt(text_.substr(p), &name);
    if (len == 0) return true;
    // "Cd", "Nd": a lower-case letter that continues an element symbol was
    // taken by the symbol before this is reached.
    Rational value;
    if (!VariableValue(name, var_pos, &value)) return false;
    const Rational base = had_number ? *count : Rational(0);
    const Rational result = base + Rational(sign) * factor * value;
    if (result.num() < 0) {
      Fail(codes::kMalformedFormula, start,
           absl::StrCat("count at column ", Column(start), " is negative (",
                        result.ToString(), ") with ", name, "=",
                        value.ToString()));
      return false;
    }
    *count = result;
    pos_ = var_pos + len;
    return true;
  }

  size_t SeparatorLength(size_t p) const {
    const absl::string_view rest = text_.substr(p);
    if (!rest.empty() && rest[0] == '*') return 1;
    if (rest.size() >= 2 && static_cast<unsigned char>(rest[0]) == 0xC2 &&
        static_cast<unsigned char>(rest[1]) == 0xB7) {
      return 2;  // U+00B7 middle dot.
    }
    if (rest.size() >= 3 && static_cast<unsigned char>(rest[0]) == 0xE2) {
      const unsigned char b1 = rest[1], b2 = rest[2];
      if (b1 == 0x80 && b2 == 0xA2) return 3;  // U+2022 bullet.
      if (b1 == 0x88 && b2 == 0x99) return 3;  // U+2219 bullet operator.
      if (b1 == 0x8B && b2 == 0x85) return 3;  // U+22C5 dot operator.
    }
    return 0;
  }

  // Parses a count at pos_ (ASCII integer, decimal or fraction, or subscript
  // digits).
  // Returns false on error. Leaves `count` untouched if there is none.
  // `warn_hydrate` is false for the leading multiplier of a part, where a
  // separator has already been written.
  bool ParseCount(Rational* count, bool warn_hydrate = true) {
    return ParsePlainCount(count, warn_hydrate) ||
           ParseAnyCount(count, warn_hydrate);
  }

  // The usual count, small and inline: ASCII digits, perhaps a '.' and up
  // to kMaxCountDecimals decimals, non-zero, within kMaxFormulaCount, with
  // no subscript digit, sign or hydrate warning after it. Parses it and
  // returns true, or leaves pos_ as it was and returns false, for
  // ParseAnyCount (which reads the same counts the same way).
  bool ParsePlainCount(Rational* count, bool warn_hydrate) {
    size_t pos = pos_;
    int64_t integer = 0;
    while (pos < text_.size() && IsAsciiDigit(text_[pos])) {
      if (pos - pos_ >= 7) return false;  // Maybe above kMaxFormulaCount.
      integer = integer * 10 + (text_[pos] - '0');
      ++pos;
    }
    if (pos == pos_ || integer > kMaxFormulaCount) return false;
    int64_t frac_num = 0, frac_den = 1;
    int decimals = 0;
    if (pos < text_.size()) {
      if (static_cast<unsigned char>(text_[pos]) >= 0x80) return false;
      if (text_[pos] == '.' && pos + 1 < text_.size() &&
          IsAsciiDigit(text_[pos + 1])) {
        ++pos;
        while (pos < text_.size() && IsAsciiDigit(text_[pos])) {
          if (decimals == kMaxCountDecimals) return false;
          frac_num = frac_num * 10 + (text_[pos] - '0');
          frac_den *= 10;
          ++decimals;
          ++pos;
        }
        if (warn_hydrate && text_.substr(pos, 3) == "H2O") return false;
      }
    }
    // A sign ("1-x") or a fraction bar ("1/3") is ParseAnyCount's.
    if (pos < text_.size() &&
        (text_[pos] == '+' || text_[pos] == '-' || text_[pos] == '/')) {
      return false;
    }
    const int64_t units = integer * frac_den + frac_num;
    if (units == 0) return false;
    *count = Rational::Decimal(units, decimals);
    pos_ = pos;
    return true;
  }

  bool ParseAnyCount(Rational* count, bool warn_hydrate) {
    const size_t start = pos_;
    int64_t integer = 0;
    int digits = 0;
    bool subscript = false;
    while (pos_ < text_.size()) {
      int value = 0;
      size_t used = 0;
      const char c = text_[pos_];
      if (IsAsciiDigit(c)) {  // The usual case, without the decoder.
        value = c - '0';
        used = 1;
      } else if (static_cast<unsigned char>(c) >= 0x80) {
        used = internal::DecodeDigit(text_.substr(pos_),
                                     internal::DigitForms::kAsciiOrSubscript,
                                     &value);
      }
      if (used == 0) break;
      if (used > 1) subscript = true;
      if (integer <= kMaxFormulaCount) integer = integer * 10 + value;
      ++digits;
      pos_ += used;
    }
    if (digits == 0) {
      // A bare variable ("(...)x") needs a lowercase or non-ASCII letter;
      // "(NH3)3dien" is a ligand abbreviation, not the variable d.
      const bool letter = pos_ < text_.size() &&
                          (IsLower(text_[pos_]) ||
                           static_cast<unsigned char>(text_[pos_]) >= 0x80);
      if (letter && IsLower(text_[pos_]) &&
          FindLigandAbbreviation(
              text_.substr(pos_, LowercaseRunEnd(pos_) - pos_)) != nullptr) {
        return true;
      }
      return !letter || ParseVariableCount(start, false, count);
    }
    int64_t frac_num = 0, frac_den = 1;
    int decimals = 0;
    if (!subscript && pos_ < text_.size() && text_[pos_] == '.' &&
        pos_ + 1 < text_.size() && IsAsciiDigit(text_[pos_ + 1])) {
      const size_t dot = pos_;
      ++pos_;
      while (pos_ < text_.size() && IsAsciiDigit(text_[pos_])) {
        if (decimals < kMaxCountDecimals) {
          frac_num = frac_num * 10 + (text_[pos_] - '0');
          frac_den *= 10;
        }
        ++decimals;
        ++pos_;
      }
      if (decimals > kMaxCountDecimals) {
        Fail(codes::kCountTooLarge, start,
             absl::StrCat("count at column ", Column(start), " has more than ",
                          kMaxCountDecimals, " decimals"));
        return false;
      }
      if (warn_hydrate && text_.substr(pos_, 3) == "H2O") {
        warnings_.push_back(FormulaIssue{
            codes::kPossibleHydrateTypo, Column(dot),
            absl::StrCat("'.' at column ", Column(dot),
                         " makes a decimal count followed by H2O; if a "
                         "hydrate was meant, write '·' or '*' instead")});
      }
    }
    // "Ni1/3": a fraction, as battery and alloy records write their site
    // shares (LiNi1/3Mn1/3Co1/3O2).
    int64_t fraction_den = 1;
    if (!subscript && decimals == 0 && pos_ + 1 < text_.size() &&
        text_[pos_] == '/' && IsAsciiDigit(text_[pos_ + 1])) {
      const size_t slash = pos_;
      ++pos_;
      int64_t den = 0;
      while (pos_ < text_.size() && IsAsciiDigit(text_[pos_])) {
        if (den <= kMaxFractionDenominator)
          den = den * 10 + (text_[pos_] - '0');
        ++pos_;
      }
      if (den == 0) {
        Fail(codes::kMalformedFormula, slash,
             absl::StrCat("fraction bar at column ", Column(slash),
                          " divides by zero"));
        return false;
      }
      if (den > kMaxFractionDenominator) {
        Fail(
            codes::kCountTooLarge, slash,
            absl::StrCat("fraction bar at column ", Column(slash),
                         " has a denominator above ", kMaxFractionDenominator));
        return false;
      }
      fraction_den = den;
    }
    if (integer > kMaxFormulaCount) {
      Fail(codes::kCountTooLarge, start,
           absl::StrCat("count at column ", Column(start), " exceeds ",
                        kMaxFormulaCount));
      return false;
    }
    // At most kMaxCountDecimals decimals here (more failed above); a
    // fraction has none.
    *count = fraction_den > 1
                 ? Rational(integer, fraction_den)
                 : Rational::Decimal(integer * frac_den + frac_num, decimals);
    if (count->IsZero()) {
      Fail(codes::kMalformedFormula, start,
           absl::StrCat("count at column ", Column(start), " is zero"));
      return false;
    }
    // A variable after the number needs a sign: "1-x", "7-δ".
    const bool sign =
        pos_ < text_.size() && (text_[pos_] == '+' || text_[pos_] == '-');
    return !sign || ParseVariableCount(start, true, count);
  }

  // Parses items until end, a separator, or a closing bracket. A closing
  // bracket that matches `closer` is left for the caller.
  bool ParseSequence(int depth, char closer, Items* items) {
    while (pos_ < text_.size()) {
      const char c = text_[pos_];
      if (IsUpper(c)) {
        const size_t start = pos_;
        // "OAc", "Cp*": joined abbreviations go before symbols.
        if (joined_.first[static_cast<unsigned char>(c) & 127] &&
            start + 1 < text_.size() &&
            joined_
                .second[static_cast<unsigned char>(text_[start + 1]) & 127]) {
          const LigandAbbreviation* found = nullptr;
          for (const LigandAbbreviation* a : joined_.list) {
            // Not when a lower-case letter follows: its capital starts an
            // element symbol there (BAs is boron arsenide, not BA and s).
            const size_t next = start + a->abbreviation.size();
            if (absl::StartsWith(text_.substr(start), a->abbreviation) &&
                !(next < text_.size() && IsLower(text_[next]))) {
              found = a;
              break;
            }
          }
          if (found != nullptr) {
            if (!ParseAbbreviation(*found, start,
                                   start + found->abbreviation.size(), depth,
                                   items)) {
              return false;
            }
            continue;
          }
        }
        size_t end = pos_ + 1;
        while (end < text_.size() && IsLower(text_[end]) && end - start < 3) {
          ++end;
        }
        if (end < text_.size() && IsLower(text_[end])) {
          while (end < text_.size() && IsLower(text_[end])) ++end;
        }
        absl::string_view symbol = text_.substr(start, end - start);
        const Element* element = FindElementBySymbol(symbol);
        // "Cy" is cyclohexyl, not C with count y.
        if (element == nullptr && symbol.size() >= 2 &&
            FindLigandAbbreviation(symbol) == nullptr) {
          std::string variable;
          if (VariableAt(symbol.substr(symbol.size() - 1), &variable) == 1 &&
              FindElementBySymbol(symbol.substr(0, symbol.size() - 1)) !=
                  nullptr) {
            // "Srx": Sr with count x.
            symbol.remove_suffix(1);
            end -= 1;
            element = FindElementBySymbol(symbol);
          }
        }
        if (element == nullptr && (symbol == "D" || symbol == "T")) {
          element = FindElementBySymbol("H");  // Deuterium, tritium.
        }
        // "Nien3", "Ptpy2": a d- or f-block metal with an abbreviation
        // written straight after it, the two-letter symbol first. Other
        // elements stay unknown words ("Bipy" is not Bi with py).
        for (int n = 2; element == nullptr && n >= 1; --n) {
          if (symbol.size() <= static_cast<size_t>(n)) continue;
          const Element* metal = FindElementBySymbol(symbol.substr(0, n));
          if (metal != nullptr &&
              (metal->block == Block::kD || metal->block == Block::kF) &&
              FindLigandAbbreviation(symbol.substr(n)) != nullptr &&
              FindLigandAbbreviation(symbol) == nullptr) {
            symbol = symbol.substr(0, n);
            end = start + n;
            element = metal;
          }
        }
        if (element == nullptr) {
          // "Cp": a capitalised abbreviation, never an element symbol.
          if (const LigandAbbreviation* a = FindLigandAbbreviation(symbol)) {
            if (!ParseAbbreviation(*a, start, end, depth, items)) return false;
            continue;
          }
          // "Bipy", "Phen": an abbreviation is written in lower case.
          std::string lower(symbol);
          lower[0] = static_cast<char>(lower[0] - 'A' + 'a');
          Fail(codes::kUnknownElement, start,
               absl::StrCat("unknown element ", QuoteForMessage(symbol),
                            " at column ", Column(start),
                            FindLigandAbbreviation(lower) == nullptr
                                ? ""
                                : absl::StrCat(" (ligand abbreviations are "
                                               "case-sensitive: did you mean '",
                                               lower, "'?)")));
          return false;
        }
        pos_ = end;
        Rational count(1);
        if (!ParseCount(&count)) return false;
        items->emplace_back(element, count);
        terms_.push_back(
            WrittenTerm{element, count, Rational(1), current_group_, part_});
        continue;
      }
      if (c == '(' || c == '[') {
        const size_t open = pos_;
        const char want = c == '(' ? ')' : ']';
        if (depth + 1 > kMaxFormulaDepth) {
          Fail(codes::kNestingTooDeep, open,
               absl::StrCat("groups nest deeper than ", kMaxFormulaDepth,
                            " at column ", Column(open)));
          return false;
        }
        ++pos_;
        Items inner;
        const int group = static_cast<int>(groups_.size());
        const int first_term = static_cast<int>(terms_.size());
        groups_.push_back(WrittenGroup{c, current_group_, first_term,
                                       first_term, Rational(1), Rational(1)});
        current_group_ = group;
        const size_t first_comma = commas_.size();
        if (!ParseSequence(depth + 1, want, &inner)) return false;
        current_group_ = groups_[group].parent;
        groups_[group].end_term = static_cast<int>(terms_.size());
        if (commas_.size() > first_comma &&
            !CloseSiteMixture(open, group, first_comma, &inner)) {
          return false;
        }
        if (pos_ >= text_.size() || text_[pos_] != want) {
          Fail(codes::kMalformedFormula, open,
               absl::StrCat("'", std::string(1, c), "' at column ",
                            Column(open), " is never closed"));
          return false;
        }
        if (inner.empty()) {
          Fail(codes::kMalformedFormula, open,
               absl::StrCat("empty group at column ", Column(open)));
          return false;
        }
        ++pos_;
        if (!CloseGroup(group, open, inner, items)) return false;
        continue;
      }
      if (c == ')' || c == ']') {
        if (c == closer) return true;
        if (closer != '\0') {
          Fail(codes::kMalformedFormula, pos_,
               absl::StrCat("'", std::string(1, c), "' at column ",
                            Column(pos_), " does not match the open '",
                            std::string(1, closer == ')' ? '(' : '['), "'"));
          return false;
        }
        return true;  // Unmatched at top level: the caller reports it.
      }
      if (c == ',') {
        // "(Fe,Ni)9S8": members of a site mixture, checked when the group
        // closes (CloseSiteMixture).
        if (closer != ')') {
          Fail(codes::kMalformedFormula, pos_,
               absl::StrCat("',' at column ", Column(pos_),
                            " outside a site mixture; a comma separates the "
                            "elements sharing a site inside parentheses, "
                            "as in (Fe,Ni)9S8"));
          return false;
        }
        commas_.push_back({pos_, terms_.size(), items->size()});
        ++pos_;
        continue;
      }
      if (SeparatorLength(pos_) > 0) {
        if (closer != '\0') {
          Fail(codes::kMalformedFormula, pos_,
               absl::StrCat("separator at column ", Column(pos_),
                            " inside a group"));
          return false;
        }
        return true;
      }
      if (IsLower(c)) {
        const size_t start = pos_;
        const size_t end = LowercaseRunEnd(start);
        const absl::string_view word = text_.substr(start, end - start);
        if (const LigandAbbreviation* a = FindLigandAbbreviation(word)) {
          if (!ParseAbbreviation(*a, start, end, depth, items)) return false;
          continue;
        }
        // Suggest only real symbols: "fe" -> "Fe", "o" -> "O"; never "E".
        std::string suggestion(1, static_cast<char>(c - 'a' + 'A'));
        if (pos_ + 1 < text_.size() && IsLower(text_[pos_ + 1]) &&
            FindElementBySymbol(suggestion + text_[pos_ + 1]) != nullptr) {
          suggestion += text_[pos_ + 1];
        } else if (FindElementBySymbol(suggestion) == nullptr) {
          suggestion.clear();
        }
        // A word that is not a miscased symbol ("fe", "o") was meant as an
        // abbreviation: "bpz".
        if (word.size() > 1 && word.size() != suggestion.size()) {
          Fail(codes::kMalformedFormula, start,
               absl::StrCat("unknown ligand abbreviation ",
                            QuoteForMessage(word), " at column ", Column(start),
                            " (known: ", KnownAbbreviations(),
                            "; element symbols start with a capital)"));
          return false;
        }
        Fail(codes::kMalformedFormula, pos_,
             absl::StrCat(
                 "lowercase '", std::string(1, c), "' at column ", Column(pos_),
                 " does not start an element symbol (symbols start "
                 "with a capital",
                 suggestion.empty()
                     ? std::string(")")
                     : absl::StrCat(": did you mean '", suggestion, "'?)")));
        return false;
      }
      if (c == '.' && pos_ + 1 < text_.size() && IsUpper(text_[pos_ + 1])) {
        // "SO4.H2O": a period for the hydrate dot.
        Fail(codes::kMalformedFormula, pos_,
             absl::StrCat("'.' at column ", Column(pos_),
                          " is a decimal point, not a separator; for a "
                          "hydrate write '\u00B7' or '*' instead"));
        return false;
      }
      if (IsAsciiDigit(c) || c == '.') {
        Fail(codes::kMalformedFormula, pos_,
             absl::StrCat("misplaced number at column ", Column(pos_),
                          Near(pos_)));
        return false;
      }
      Fail(codes::kMalformedFormula, pos_, UnexpectedMessage(pos_));
      return false;
    }
    return true;
  }

  absl::string_view text_;       // Without the charge suffix.
  absl::string_view full_text_;  // As given, for messages.
  const FormulaOptions& options_;
  const JoinedAbbreviations& joined_ = JoinedAbbreviationTable();
  std::vector<FormulaIssue> infos_;
  std::vector<Comma> commas_;  // Of the site mixtures being parsed.
  size_t pos_ = 0;
  int part_ = 0;            // Adduct part being parsed.
  int current_group_ = -1;  // Innermost open group, or -1.
  std::vector<WrittenTerm> terms_;
  std::vector<WrittenGroup> groups_;
  FormulaIssue issue_;
  std::vector<FormulaIssue> warnings_;
};

}  // namespace

void RecycleFormula(Formula&& formula) {
  FormulaStorage& storage = ThreadFormulaStorage();
  formula.amounts.clear();
  formula.terms.clear();
  formula.groups.clear();
  storage.amounts.swap(formula.amounts);
  storage.terms.swap(formula.terms);
  storage.groups.swap(formula.groups);
}

Rational Formula::TotalAtoms() const {
  Rational total(0);
  for (const ElementAmount& a : amounts) total = total + a.count;
  return total;
}

absl::StatusOr<Formula> ParseFormula(absl::string_view text,
                                     const FormulaOptions& options,
                                     FormulaIssue* error) {
  if (text.size() > kMaxFormulaLength) {
    FormulaIssue issue{
        codes::kFormulaTooLong, 0,
        absl::StrCat("formula is ", text.size(),
                     " bytes long, above the limit of ", kMaxFormulaLength)};
    if (error != nullptr) *error = issue;
    return absl::InvalidArgumentError(issue.message);
  }
  return FormulaParser(text, options).Parse(error);
}

absl::StatusOr<Formula> ParseFormula(absl::string_view text,
                                     FormulaIssue* error) {
  static const FormulaOptions* const kNone = new FormulaOptions;
  return ParseFormula(text, *kNone, error);
}

absl::Span<const LigandAbbreviation> LigandAbbreviations() {
  return AbbreviationTable();
}

const LigandAbbreviation* FindLigandAbbreviation(
    absl::string_view abbreviation) {
  for (const LigandAbbreviation& a : AbbreviationTable()) {
    if (a.abbreviation == abbreviation) return &a;
  }
  return nullptr;
}

absl::StatusOr<std::vector<FormulaVariable>> ParseFormulaVariables(
    absl::string_view text) {
  std::vector<FormulaVariable> out;
  for (absl::string_view part : absl::StrSplit(text, absl::ByAnyChar(",;"))) {
    part = absl::StripAsciiWhitespace(part);
    if (part.empty()) continue;
    const size_t eq = part.find('=');
    FormulaVariable v;
    std::string name;
    const absl::string_view key =
        eq == absl::string_view::npos
            ? part
            : absl::StripAsciiWhitespace(part.substr(0, eq));
    if (eq == absl::string_view::npos || VariableAt(key, &name) != key.size() ||
        key.empty()) {
      return absl::InvalidArgumentError(absl::StrCat(
          "variables: ", QuoteForMessage(part),
          " is not NAME=VALUE with NAME one of x, y, z, d, \u03B4"));
    }
    v.name = name;
    if (!ParseDecimal(absl::StripAsciiWhitespace(part.substr(eq + 1)),
                      &v.value)) {
      return absl::InvalidArgumentError(
          absl::StrCat("variables: the value of ", name, " in ",
                       QuoteForMessage(part), " is not a decimal number"));
    }
    for (const FormulaVariable& seen : out) {
      if (seen.name == name) {
        return absl::InvalidArgumentError(
            absl::StrCat("variables: ", name, " is given twice"));
      }
    }
    out.push_back(std::move(v));
  }
  return out;
}

}  // namespace shellwright
