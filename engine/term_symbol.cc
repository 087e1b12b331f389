#include "engine/term_symbol.h"

#include <cstdlib>

#include "absl/strings/str_cat.h"
#include "engine/internal/text.h"

namespace shellwright {
namespace {

constexpr const char* kSuperscriptDigits[] = {"⁰", "¹", "²", "³", "⁴",
                                              "⁵", "⁶", "⁷", "⁸", "⁹"};
constexpr const char* kSubscriptDigits[] = {"₀", "₁", "₂", "₃", "₄",
                                            "₅", "₆", "₇", "₈", "₉"};

std::string MapDigits(int value, const char* const* table) {
  std::string digits = std::to_string(value);
  std::string out;
  for (char c : digits) out += table[c - '0'];
  return out;
}

std::string LetterFor(int l) {
  if (l >= 0 && l < static_cast<int>(kTermLetters.size())) {
    return std::string(1, kTermLetters[l]);
  }
  return absl::StrCat("(L=", l, ")");
}

// Maximum total M_L when `electrons` electrons fill the orbitals of one
// subshell by Hund's first rule: spin-up electrons take m_l = l, l-1, ...
// first, then the spin-down ones do the same.
int HundSubshellL(int l, int electrons) {
  const int orbitals = 2 * l + 1;
  auto sum_top = [l](int k) {  // Σ_{i=0}^{k-1} (l - i)
    return k * l - k * (k - 1) / 2;
  };
  if (electrons <= orbitals) return sum_top(electrons);
  return sum_top(electrons - orbitals);  // The full spin-up set sums to 0.
}

// Most digits read for the multiplicity or J: real terms need one or two,
// and the cap keeps every product below int overflow.
constexpr size_t kMaxTermDigits = 4;

// Reads the decimal digits at text[*i...] into `value`, advancing *i past
// them. False when there are more than kMaxTermDigits of them.
bool ReadTermNumber(absl::string_view text, size_t* i, int* value) {
  const size_t start = *i;
  *value = 0;
  while (*i < text.size() && text[*i] >= '0' && text[*i] <= '9') {
    if (*i - start == kMaxTermDigits) return false;
    *value = *value * 10 + (text[*i] - '0');
    ++*i;
  }
  return true;
}

absl::Status TermError(absl::string_view text, absl::string_view problem) {
  return absl::InvalidArgumentError(absl::StrCat(
      "term symbol ", internal::QuoteForMessage(text), ": ", problem));
}

}  // namespace

std::string TermSymbol::ToAscii() const {
  std::string out = absl::StrCat(Multiplicity(), LetterFor(l));
  if (parity == Parity::kOdd) out.push_back('o');
  if (two_j % 2 == 0) {
    absl::StrAppend(&out, two_j / 2);
  } else {
    absl::StrAppend(&out, two_j, "/2");
  }
  return out;
}

std::string TermSymbol::ToUnicode() const {
  std::string out = MapDigits(Multiplicity(), kSuperscriptDigits);
  out += LetterFor(l);
  if (parity == Parity::kOdd) out += "°";
  if (two_j % 2 == 0) {
    out += MapDigits(two_j / 2, kSubscriptDigits);
  } else {
    out += MapDigits(two_j, kSubscriptDigits);
    out += "/";
    out += kSubscriptDigits[2];
  }
  return out;
}

absl::StatusOr<TermSymbol> TermSymbol::Parse(absl::string_view text) {
  if (text.size() > 32) return TermError(text, "too long");
  size_t i = 0;
  int multiplicity = 0;
  if (!ReadTermNumber(text, &i, &multiplicity)) {
    return TermError(text, absl::StrCat("the multiplicity has more than ",
                                        kMaxTermDigits, " digits"));
  }
  if (i == 0 || multiplicity < 1) {
    return TermError(text, "expected the multiplicity 2S+1 first");
  }
  if (i == text.size()) return TermError(text, "missing the L letter");
  const size_t letter = kTermLetters.find(text[i]);
  if (letter == absl::string_view::npos) {
    return TermError(
        text, absl::StrCat("unknown L letter '", std::string(1, text[i]), "'"));
  }
  ++i;
  TermSymbol t;
  t.two_s = multiplicity - 1;
  t.l = static_cast<int>(letter);
  if (i < text.size() && text[i] == 'o') {
    t.parity = Parity::kOdd;
    ++i;
  }
  int j_numerator = 0;
  const size_t j_start = i;
  if (!ReadTermNumber(text, &i, &j_numerator)) {
    return TermError(
        text, absl::StrCat("J has more than ", kMaxTermDigits, " digits"));
  }
  if (i == j_start) return TermError(text, "missing J");
  if (i == text.size()) {
    t.two_j = 2 * j_numerator;
  } else if (text.substr(i) == "/2") {
    t.two_j = j_numerator;
    if (t.two_j % 2 == 0) {
      return TermError(text, "J written as n/2 must have odd n");
    }
  } else {
    return TermError(text, "J must be an integer or n/2");
  }
  if ((t.two_j - t.two_s) % 2 != 0) {
    return TermError(text, "J must be half-integer exactly when S is");
  }
  if (t.two_j < std::abs(2 * t.l - t.two_s) || t.two_j > 2 * t.l + t.two_s) {
    return TermError(text, "J lies outside |L-S|..L+S");
  }
  return t;
}

TermSymbol HundSubshellTerm(int l, int electrons) {
  TermSymbol t;
  t.two_s = HundUnpairedElectrons(l, electrons);
  t.l = HundSubshellL(l, electrons);
  const int capacity = 2 * (2 * l + 1);
  t.two_j = 2 * electrons > capacity ? 2 * t.l + t.two_s
                                     : std::abs(2 * t.l - t.two_s);
  t.parity = (l * electrons) % 2 == 0 ? Parity::kEven : Parity::kOdd;
  return t;
}

Parity ConfigurationParity(const Configuration& configuration) {
  int sum_l = 0;
  for (Subshell s : configuration.OccupiedSubshells()) {
    sum_l += s.l * configuration.occupancy(s);
  }
  return sum_l % 2 == 0 ? Parity::kEven : Parity::kOdd;
}

TermSymbol HundGroundTerm(const Configuration& configuration) {
  TermSymbol t;
  int open_electrons = 0;
  int open_capacity = 0;
  for (Subshell s : configuration.OpenSubshells()) {
    const int e = configuration.occupancy(s);
    t.two_s += HundUnpairedElectrons(s.l, e);
    t.l += HundSubshellL(s.l, e);
    open_electrons += e;
    open_capacity += s.Capacity();
  }
  t.two_j = 2 * open_electrons > open_capacity ? 2 * t.l + t.two_s
                                               : std::abs(2 * t.l - t.two_s);
  t.parity = ConfigurationParity(configuration);
  return t;
}

}  // namespace shellwright
