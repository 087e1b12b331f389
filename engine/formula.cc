#include "engine/formula.h"

#include <array>
#include <utility>

#include "absl/container/inlined_vector.h"
#include "absl/strings/str_cat.h"
#include "engine/diagnostic_codes.h"
#include "engine/internal/text.h"

namespace shellwright {
namespace {

using internal::QuoteForMessage;

// Amounts beyond this (numerator or denominator) are rejected so that the
// exact arithmetic downstream can never overflow.
constexpr int64_t kMaxExactMagnitude = 1000000000000;  // 1e12

// Inline storage: typical formulas and groups hold a handful of items, and
// parsing should not allocate for them.
using Items = absl::InlinedVector<std::pair<const Element*, Rational>, 8>;

bool CheckedMultiply(const Rational& a, const Rational& b, Rational* out) {
  // Fast paths: most counts are multiplied by 1 or are small integers.
  if (b.num() == 1 && b.den() == 1) {
    *out = a;
    return true;
  }
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

class FormulaParser {
 public:
  explicit FormulaParser(absl::string_view text) : text_(text) {}

  absl::StatusOr<Formula> Parse(FormulaIssue* error) {
    Formula formula;
    std::array<int, kMaxAtomicNumber + 1> slot;
    slot.fill(-1);
    while (true) {
      const size_t part_start = pos_;
      Rational multiplier(1);
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
      formula.amounts.reserve(formula.amounts.size() + items.size());
      for (auto& [element, count] : items) {
        Rational total;
        if (!CheckedMultiply(count, multiplier, &total)) {
          Fail(codes::kCountTooLarge, part_start, "stoichiometry is too large");
          return Failed(error);
        }
        int& s = slot[element->atomic_number];
        if (s < 0) {
          s = static_cast<int>(formula.amounts.size());
          formula.amounts.push_back({element, total});
        } else {
          formula.amounts[s].count = formula.amounts[s].count + total;
          if (formula.amounts[s].count.num() > kMaxExactMagnitude ||
              formula.amounts[s].count.den() > kMaxExactMagnitude) {
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
    formula.warnings = std::move(warnings_);
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

  absl::Status Failed(FormulaIssue* error) {
    if (error != nullptr) *error = issue_;
    return absl::InvalidArgumentError(
        absl::StrCat("formula ", QuoteForMessage(text_), ": ", issue_.message));
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

  // Parses a count at pos_ (ASCII integer or decimal, or subscript digits).
  // Returns false on error. Leaves `count` untouched if there is none.
  // `warn_hydrate` is false for the leading multiplier of a part, where a
  // separator has already been written.
  bool ParseCount(Rational* count, bool warn_hydrate = true) {
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
    if (digits == 0) return true;
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
    if (integer > kMaxFormulaCount) {
      Fail(codes::kCountTooLarge, start,
           absl::StrCat("count at column ", Column(start), " exceeds ",
                        kMaxFormulaCount));
      return false;
    }
    *count = Rational(integer * frac_den + frac_num, frac_den);
    if (count->IsZero()) {
      Fail(codes::kMalformedFormula, start,
           absl::StrCat("count at column ", Column(start), " is zero"));
      return false;
    }
    return true;
  }

  // Parses items until end, a separator, or a closing bracket. A closing
  // bracket that matches `closer` is left for the caller.
  bool ParseSequence(int depth, char closer, Items* items) {
    while (pos_ < text_.size()) {
      const char c = text_[pos_];
      if (IsUpper(c)) {
        const size_t start = pos_;
        size_t end = pos_ + 1;
        while (end < text_.size() && IsLower(text_[end]) && end - start < 3) {
          ++end;
        }
        if (end < text_.size() && IsLower(text_[end])) {
          while (end < text_.size() && IsLower(text_[end])) ++end;
        }
        const absl::string_view symbol = text_.substr(start, end - start);
        const Element* element = FindElementBySymbol(symbol);
        if (element == nullptr) {
          Fail(codes::kUnknownElement, start,
               absl::StrCat("unknown element ", QuoteForMessage(symbol),
                            " at column ", Column(start)));
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
        if (!ParseSequence(depth + 1, want, &inner)) return false;
        current_group_ = groups_[group].parent;
        groups_[group].end_term = static_cast<int>(terms_.size());
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
        Rational count(1);
        if (!ParseCount(&count)) return false;
        groups_[group].count = count;
        if (!Multiply(first_term, group, count)) {
          Fail(codes::kCountTooLarge, open, "stoichiometry is too large");
          return false;
        }
        for (auto& [element, n] : inner) {
          Rational total;
          if (!CheckedMultiply(n, count, &total)) {
            Fail(codes::kCountTooLarge, open, "stoichiometry is too large");
            return false;
          }
          items->emplace_back(element, total);
        }
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
        std::string upper(1, static_cast<char>(c - 'a' + 'A'));
        Fail(codes::kMalformedFormula, pos_,
             absl::StrCat("lowercase '", std::string(1, c), "' at column ",
                          Column(pos_),
                          " does not start an element symbol (symbols start "
                          "with a capital: did you mean '",
                          upper, "'?)"));
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

  absl::string_view text_;
  size_t pos_ = 0;
  int part_ = 0;            // Adduct part being parsed.
  int current_group_ = -1;  // Innermost open group, or -1.
  std::vector<WrittenTerm> terms_;
  std::vector<WrittenGroup> groups_;
  FormulaIssue issue_;
  std::vector<FormulaIssue> warnings_;
};

}  // namespace

Rational Formula::TotalAtoms() const {
  Rational total(0);
  for (const ElementAmount& a : amounts) total = total + a.count;
  return total;
}

absl::StatusOr<Formula> ParseFormula(absl::string_view text,
                                     FormulaIssue* error) {
  if (text.size() > kMaxFormulaLength) {
    FormulaIssue issue{
        codes::kFormulaTooLong, 0,
        absl::StrCat("formula is ", text.size(),
                     " bytes long, above the limit of ", kMaxFormulaLength)};
    if (error != nullptr) *error = issue;
    return absl::InvalidArgumentError(issue.message);
  }
  return FormulaParser(text).Parse(error);
}

}  // namespace shellwright
