// LS-coupling term symbols (2S+1)L_J with parity, and Hund's rules.
//
// A TermSymbol stores doubled quantum numbers (2S, 2J) so that half-integers
// are exact. HundGroundTerm() applies Hund's rules to the open subshells of
// a configuration: maximum S, then maximum L for that S, then J = |L - S|
// when the open subshells together are less than half full and J = L + S
// when more than half full (J = |L - S| at exactly half, where L is usually
// 0 so that J = S).
//
// Example:
//
//   auto fe = shellwright::Configuration::Parse("[Ar] 3d6 4s2");
//   shellwright::TermSymbol t = shellwright::HundGroundTerm(*fe);
//   t.ToAscii();    // "5D4"
//   t.ToUnicode();  // "⁵D₄"
//   shellwright::TermSymbol::Parse("2Po1/2")->two_j;  // 1
//
// Thread safety: value types and pure functions.

#ifndef SHELLWRIGHT_ENGINE_TERM_SYMBOL_H_
#define SHELLWRIGHT_ENGINE_TERM_SYMBOL_H_

#include <string>

#include "absl/status/statusor.h"
#include "absl/strings/string_view.h"
#include "engine/configuration.h"
#include "util/enum_names.h"

namespace shellwright {

// Letters for total orbital angular momentum L = 0, 1, 2, ...: S P D F G H I
// K L M N O Q R T U V (J is skipped, and S and P are not reused).
inline constexpr absl::string_view kTermLetters = "SPDFGHIKLMNOQRTUV";

enum class Parity { kEven, kOdd };

template <>
struct EnumNames<Parity> {
  static constexpr absl::string_view kWhat = "parity";
  static constexpr NamedValue<Parity> kNames[] = {{Parity::kEven, "even"},
                                                  {Parity::kOdd, "odd"}};
};

struct TermSymbol {
  int two_s = 0;  // 2S: 0 for a singlet, 1 for a doublet, ...
  int l = 0;      // Total orbital angular momentum L, >= 0.
  int two_j = 0;  // 2J, with |2L - 2S| <= 2J <= 2L + 2S.
  Parity parity = Parity::kEven;

  int Multiplicity() const { return two_s + 1; }

  // "5D4", "2Po1/2", "9Do2": multiplicity, L letter, 'o' for odd parity, J.
  // L beyond the letter table is written "(L=17)".
  std::string ToAscii() const;

  // The same with superscript multiplicity, a superscript ring for odd
  // parity and subscript J: "⁵D₄", "²P°₁/₂".
  std::string ToUnicode() const;

  // Parses the ASCII form. INVALID_ARGUMENT when malformed or when J is not
  // reachable from S and L.
  static absl::StatusOr<TermSymbol> Parse(absl::string_view text);

  bool operator==(const TermSymbol& o) const {
    return two_s == o.two_s && l == o.l && two_j == o.two_j &&
           parity == o.parity;
  }
  bool operator!=(const TermSymbol& o) const { return !(*this == o); }
};

// Hund's-rules term of a single subshell of orbital quantum number `l`
// holding `electrons` electrons (J per the less/more than half-full rule).
// REQUIRES: 0 <= electrons <= 2(2l+1).
TermSymbol HundSubshellTerm(int l, int electrons);

// Hund's-rules ground term of a whole configuration, combining all open
// subshells as described above. Parity is that of Σl over all electrons.
// A closed-shell configuration gives 1S0.
TermSymbol HundGroundTerm(const Configuration& configuration);

// Parity of a configuration: odd when Σl over all electrons is odd.
Parity ConfigurationParity(const Configuration& configuration);

}  // namespace shellwright

#endif  // SHELLWRIGHT_ENGINE_TERM_SYMBOL_H_
