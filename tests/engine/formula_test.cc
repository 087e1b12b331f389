// Tests for engine/formula.h: stoichiometry, hydrates, warnings, the error
// catalogue and robustness against arbitrary input.
//
// Expected counts are worked out by hand from the formulas themselves; the
// formulas are standard textbook compounds (common practice, no source)
// unless a comment says otherwise.

#include "engine/formula.h"

#include <cstdint>
#include <iterator>
#include <ostream>
#include <random>
#include <string>
#include <utility>
#include <vector>

#include "absl/status/status.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_split.h"
#include "engine/rational.h"
#include "gmock/gmock.h"
#include "gtest/gtest.h"
#include "tests/testing/utf8_check.h"

namespace shellwright {

// Rational has no operator<<; print it in gtest messages. Declared here,
// outside the unnamed namespace, so that argument-dependent lookup finds it.
void PrintTo(const Rational& r, std::ostream* os) { *os << r.ToString(); }
void PrintTo(const FormulaIssue& issue, std::ostream* os) {
  *os << "{" << issue.code << ", column " << issue.column << ", \""
      << issue.message << "\"}";
}

namespace {

using ::testing::ElementsAre;
using ::testing::ElementsAreArray;
using ::testing::HasSubstr;
using ::testing::IsEmpty;
using ::testing::Pair;

// (symbol, count) pairs in the formula's order, for readable matchers.
using Counts = std::vector<std::pair<std::string, Rational>>;

Counts CountsOf(const Formula& f) {
  Counts out;
  for (const ElementAmount& a : f.amounts) {
    out.emplace_back(a.element == nullptr ? std::string("<null>")
                                          : std::string(a.element->symbol),
                     a.count);
  }
  return out;
}

// Parses `text`; fails the current test on error.
Formula ParseOrFail(absl::string_view text) {
  FormulaIssue issue;
  absl::StatusOr<Formula> f = ParseFormula(text, &issue);
  EXPECT_TRUE(f.ok()) << text << ": " << f.status() << " (code " << issue.code
                      << ", column " << issue.column << ")";
  return f.ok() ? *f : Formula();
}

Counts Parse(absl::string_view text) { return CountsOf(ParseOrFail(text)); }

// Number of characters (code points) in valid UTF-8 text.
int CharCount(absl::string_view s) {
  int n = 0;
  for (char c : s) {
    if ((static_cast<unsigned char>(c) & 0xC0) != 0x80) ++n;
  }
  return n;
}

// ---------------------------------------------------------------------------
// Simple formulas.

TEST(Formula, SodiumChloride) {
  EXPECT_THAT(Parse("NaCl"),
              ElementsAre(Pair("Na", Rational(1)), Pair("Cl", Rational(1))));
}

// A formula parsed into the storage of one handed back (RecycleFormula)
// holds only its own terms, amounts and groups: nothing of the last one.
TEST(Formula, RecycledStorageHoldsNothingOfTheLastFormula) {
  absl::StatusOr<Formula> first = ParseFormula("K4[Fe(CN)6]·3H2O");
  ASSERT_TRUE(first.ok());
  ASSERT_EQ(first->groups.size(), 3u);
  RecycleFormula(*std::move(first));
  absl::StatusOr<Formula> second = ParseFormula("NaCl");
  ASSERT_TRUE(second.ok());
  EXPECT_EQ(second->amounts.size(), 2u);
  EXPECT_EQ(second->terms.size(), 2u);
  EXPECT_TRUE(second->groups.empty());
  RecycleFormula(*std::move(second));
  absl::StatusOr<Formula> third = ParseFormula("K4[Fe(CN)6]");
  ASSERT_TRUE(third.ok());
  absl::StatusOr<Formula> fresh = ParseFormula("K4[Fe(CN)6]");
  ASSERT_TRUE(fresh.ok());
  ASSERT_EQ(third->amounts.size(), fresh->amounts.size());
  for (size_t i = 0; i < fresh->amounts.size(); ++i) {
    EXPECT_EQ(third->amounts[i].element, fresh->amounts[i].element);
    EXPECT_EQ(third->amounts[i].count, fresh->amounts[i].count);
  }
  ASSERT_EQ(third->terms.size(), fresh->terms.size());
  ASSERT_EQ(third->groups.size(), fresh->groups.size());
  for (size_t i = 0; i < fresh->groups.size(); ++i) {
    EXPECT_EQ(third->groups[i].first_term, fresh->groups[i].first_term);
    EXPECT_EQ(third->groups[i].end_term, fresh->groups[i].end_term);
  }
}

TEST(Formula, IronOxideCountsInOrderOfAppearance) {
  EXPECT_THAT(Parse("Fe2O3"),
              ElementsAre(Pair("Fe", Rational(2)), Pair("O", Rational(3))));
  // Order follows the text, not the periodic table or the alphabet.
  EXPECT_THAT(Parse("O3Fe2"),
              ElementsAre(Pair("O", Rational(3)), Pair("Fe", Rational(2))));
}

TEST(Formula, LithiumIronPhosphate) {
  EXPECT_THAT(Parse("LiFePO4"),
              ElementsAre(Pair("Li", Rational(1)), Pair("Fe", Rational(1)),
                          Pair("P", Rational(1)), Pair("O", Rational(4))));
}

TEST(Formula, CapitalisationSeparatesSymbols) {
  // "Co" is cobalt; "CO" is carbon and oxygen (see element.h).
  EXPECT_THAT(Parse("Co"), ElementsAre(Pair("Co", Rational(1))));
  EXPECT_THAT(Parse("CO"),
              ElementsAre(Pair("C", Rational(1)), Pair("O", Rational(1))));
  EXPECT_THAT(Parse("NO2"),
              ElementsAre(Pair("N", Rational(1)), Pair("O", Rational(2))));
  EXPECT_THAT(Parse("SnS2"),
              ElementsAre(Pair("Sn", Rational(1)), Pair("S", Rational(2))));
}

TEST(Formula, FractionalPerovskiteIsExact) {
  // La0.7Sr0.3MnO3, a common manganite composition (common practice, no
  // source).
  const Formula f = ParseOrFail("La0.7Sr0.3MnO3");
  EXPECT_THAT(
      CountsOf(f),
      ElementsAre(Pair("La", Rational(7, 10)), Pair("Sr", Rational(3, 10)),
                  Pair("Mn", Rational(1)), Pair("O", Rational(3))));
  ASSERT_FALSE(f.amounts.empty());
  EXPECT_EQ(f.amounts[0].count.num(), 7);
  EXPECT_EQ(f.amounts[0].count.den(), 10);
  EXPECT_EQ(f.amounts[0].count.ToString(), "7/10");
  EXPECT_THAT(f.warnings, IsEmpty());
}

TEST(Formula, HalfDelithiatedCobaltOxide) {
  EXPECT_THAT(Parse("Li0.5CoO2"),
              ElementsAre(Pair("Li", Rational(1, 2)), Pair("Co", Rational(1)),
                          Pair("O", Rational(2))));
}

TEST(Formula, DecimalLimitsAreInclusive) {
  // kMaxFormulaCount and kMaxCountDecimals themselves are accepted.
  EXPECT_THAT(Parse("Fe1000000"), ElementsAre(Pair("Fe", Rational(1000000))));
  EXPECT_THAT(Parse("Fe0.000001"),
              ElementsAre(Pair("Fe", Rational(1, 1000000))));
  EXPECT_THAT(Parse("Fe1.125"), ElementsAre(Pair("Fe", Rational(9, 8))));
}

TEST(Formula, CountsAreExactDecimalsWhateverTheirDigits) {
  // Integer parts up to kMaxFormulaCount with up to kMaxCountDecimals
  // decimals, leading zeros included (the parser reads the usual count on
  // a short path and the rest on the general one: both must agree).
  std::mt19937 rng(11);
  std::uniform_int_distribution<int64_t> integer(0, 1000000);
  std::uniform_int_distribution<int> decimals(0, 6), zeros(0, 2);
  for (int i = 0; i < 3000; ++i) {
    const int64_t whole = i < 20 ? i : integer(rng);
    const int d = decimals(rng);
    int64_t power = 1;
    for (int k = 0; k < d; ++k) power *= 10;
    const int64_t fraction =
        std::uniform_int_distribution<int64_t>(0, power - 1)(rng);
    if (whole == 0 && fraction == 0) continue;  // A zero count: an error.
    std::string digits = d > 0 ? std::to_string(fraction) : "";
    digits.insert(0, static_cast<size_t>(d) - digits.size(), '0');
    const std::string text =
        absl::StrCat("Fe", std::string(zeros(rng), '0'), whole,
                     d > 0 ? "." : "", d > 0 ? digits : "", "O");
    EXPECT_THAT(
        Parse(text),
        ElementsAre(Pair("Fe", Rational(whole * power + fraction, power)),
                    Pair("O", Rational(1))))
        << text;
  }
  // An ASCII digit followed by a subscript one reads on: Fe12.
  EXPECT_THAT(Parse("Fe1₂O"),
              ElementsAre(Pair("Fe", Rational(12)), Pair("O", Rational(1))));
}

TEST(Formula, UnicodeSubscriptsMatchAsciiDigits) {
  EXPECT_THAT(Parse("Fe₂O₃"),
              ElementsAre(Pair("Fe", Rational(2)), Pair("O", Rational(3))));
  // Multi-digit subscripts: sucrose C12H22O11.
  EXPECT_THAT(Parse("C₁₂H₂₂O₁₁"),
              ElementsAre(Pair("C", Rational(12)), Pair("H", Rational(22)),
                          Pair("O", Rational(11))));
}

TEST(Formula, NestedGroupsMultiply) {
  // Calcium phosphate: (PO4)2 gives P 2, O 8.
  EXPECT_THAT(Parse("Ca3(PO4)2"),
              ElementsAre(Pair("Ca", Rational(3)), Pair("P", Rational(2)),
                          Pair("O", Rational(8))));
  // Potassium ferricyanide: (CN)6 inside [..] gives C 6, N 6.
  EXPECT_THAT(Parse("K3[Fe(CN)6]"),
              ElementsAre(Pair("K", Rational(3)), Pair("Fe", Rational(1)),
                          Pair("C", Rational(6)), Pair("N", Rational(6))));
  // Counts compose through several levels: ((OH)2)3 gives O 6, H 6.
  EXPECT_THAT(Parse("Al((OH)2)3"),
              ElementsAre(Pair("Al", Rational(1)), Pair("O", Rational(6)),
                          Pair("H", Rational(6))));
  // A group without a count counts once.
  EXPECT_THAT(Parse("(NH4)Cl"),
              ElementsAre(Pair("N", Rational(1)), Pair("H", Rational(4)),
                          Pair("Cl", Rational(1))));
}

TEST(Formula, MohrSalt) {
  // Ammonium iron(II) sulfate hexahydrate: N 2, H 8 + 12 = 20,
  // Fe 1, S 2, O 8 + 6 = 14.
  EXPECT_THAT(Parse("(NH4)2Fe(SO4)2·6H2O"),
              ElementsAre(Pair("N", Rational(2)), Pair("H", Rational(20)),
                          Pair("Fe", Rational(1)), Pair("S", Rational(2)),
                          Pair("O", Rational(14))));
}

TEST(Formula, HydrateSeparators) {
  // Copper(II) sulfate pentahydrate: O 4 + 5 = 9, H 10.
  const Counts copper = {{"Cu", Rational(1)},
                         {"S", Rational(1)},
                         {"O", Rational(9)},
                         {"H", Rational(10)}};
  EXPECT_THAT(Parse("CuSO4·5H2O"), ElementsAreArray(copper));  // U+00B7
  EXPECT_THAT(Parse("CuSO4•5H2O"), ElementsAreArray(copper));  // U+2022
  EXPECT_THAT(Parse("CuSO4*5H2O"), ElementsAreArray(copper));
  // Nickel(II) sulfate hexahydrate: O 4 + 6 = 10, H 12.
  EXPECT_THAT(Parse("NiSO4*6H2O"),
              ElementsAre(Pair("Ni", Rational(1)), Pair("S", Rational(1)),
                          Pair("O", Rational(10)), Pair("H", Rational(12))));
}

TEST(Formula, FractionalCounts) {
  // The layered cathode NMC111 as battery records write it: thirds.
  const Counts nmc = {{"Li", Rational(1)},
                      {"Ni", Rational(1, 3)},
                      {"Mn", Rational(1, 3)},
                      {"Co", Rational(1, 3)},
                      {"O", Rational(2)}};
  EXPECT_THAT(Parse("LiNi1/3Mn1/3Co1/3O2"), ElementsAreArray(nmc));
  EXPECT_THAT(Parse("Li(Ni1/3Mn1/3Co1/3)O2"), ElementsAreArray(nmc));
  // A fraction above one, and one on a group.
  EXPECT_THAT(Parse("Fe8/3O4"),
              ElementsAre(Pair("Fe", Rational(8, 3)), Pair("O", Rational(4))));
  EXPECT_THAT(Parse("(Fe2O3)1/2"),
              ElementsAre(Pair("Fe", Rational(1)), Pair("O", Rational(3, 2))));
}

TEST(Formula, LeadingMultipliersOnLaterParts) {
  // Washing soda Na2CO3·10H2O: a multi-digit multiplier.
  EXPECT_THAT(Parse("Na2CO3·10H2O"),
              ElementsAre(Pair("Na", Rational(2)), Pair("C", Rational(1)),
                          Pair("O", Rational(13)), Pair("H", Rational(20))));
  // Plaster of Paris CaSO4·0.5H2O: a decimal multiplier, O 4 + 1/2.
  EXPECT_THAT(Parse("CaSO4·0.5H2O"),
              ElementsAre(Pair("Ca", Rational(1)), Pair("S", Rational(1)),
                          Pair("O", Rational(9, 2)), Pair("H", Rational(1))));
  // A multiplier scales a whole part, groups included.
  EXPECT_THAT(Parse("KCl·2Mg(OH)2"),
              ElementsAre(Pair("K", Rational(1)), Pair("Cl", Rational(1)),
                          Pair("Mg", Rational(2)), Pair("O", Rational(4)),
                          Pair("H", Rational(4))));
  // Three parts; the multiplier applies only to its own part.
  EXPECT_THAT(Parse("NaCl·2H2O·NH3"),
              ElementsAre(Pair("Na", Rational(1)), Pair("Cl", Rational(1)),
                          Pair("H", Rational(7)), Pair("O", Rational(2)),
                          Pair("N", Rational(1))));
}

TEST(Formula, LeadingMultiplierOnFirstPart) {
  // 3CdSO4·8H2O, cadmium sulfate octahydrate as usually written: Cd 3,
  // S 3, O 12 + 8 = 20, H 16.
  EXPECT_THAT(Parse("3CdSO4·8H2O"),
              ElementsAre(Pair("Cd", Rational(3)), Pair("S", Rational(3)),
                          Pair("O", Rational(20)), Pair("H", Rational(16))));
}

TEST(Formula, RepeatedElementsMerge) {
  // Acetic acid CH3COOH: C 2, H 4, O 2, kept at first appearance.
  EXPECT_THAT(Parse("CH3COOH"),
              ElementsAre(Pair("C", Rational(2)), Pair("H", Rational(4)),
                          Pair("O", Rational(2))));
  // Merging works across groups and parts too.
  EXPECT_THAT(Parse("Fe(OH)3·FeO"),
              ElementsAre(Pair("Fe", Rational(2)), Pair("O", Rational(4)),
                          Pair("H", Rational(3))));
  // And sums fractions exactly: 0.1 + 0.2 = 3/10.
  EXPECT_THAT(Parse("Fe0.1OFe0.2"),
              ElementsAre(Pair("Fe", Rational(3, 10)), Pair("O", Rational(1))));
}

TEST(Formula, HighEntropyOxide) {
  // Rock-salt (Mg,Co,Ni,Cu,Zn)O with equimolar cations (Rost et al., Nat.
  // Commun. 6, 8485 (2015)).
  const Formula f = ParseOrFail("(Mg0.2Co0.2Ni0.2Cu0.2Zn0.2)O");
  EXPECT_THAT(
      CountsOf(f),
      ElementsAre(Pair("Mg", Rational(1, 5)), Pair("Co", Rational(1, 5)),
                  Pair("Ni", Rational(1, 5)), Pair("Cu", Rational(1, 5)),
                  Pair("Zn", Rational(1, 5)), Pair("O", Rational(1))));
  EXPECT_EQ(f.TotalAtoms(), Rational(2));
}

TEST(Formula, TotalAtoms) {
  EXPECT_EQ(ParseOrFail("Fe2O3").TotalAtoms(), Rational(5));
  EXPECT_EQ(ParseOrFail("La0.7Sr0.3MnO3").TotalAtoms(), Rational(5));
  EXPECT_EQ(ParseOrFail("Li0.5CoO2").TotalAtoms(), Rational(7, 2));
  EXPECT_EQ(ParseOrFail("K3[Fe(CN)6]").TotalAtoms(), Rational(16));
  // (NH4)2 10 + Fe 1 + (SO4)2 10 + 6H2O 18 = 39.
  EXPECT_EQ(ParseOrFail("(NH4)2Fe(SO4)2·6H2O").TotalAtoms(), Rational(39));
  EXPECT_EQ(Formula().TotalAtoms(), Rational(0));
}

// ---------------------------------------------------------------------------
// Warnings.

TEST(Formula, DotBeforeWaterWarnsOfHydrateTypo) {
  const Formula f = ParseOrFail("CuSO4.5H2O");
  // Parsed as written: O4.5 then H2O, so O 9/2 + 1 = 11/2.
  EXPECT_THAT(CountsOf(f),
              ElementsAre(Pair("Cu", Rational(1)), Pair("S", Rational(1)),
                          Pair("O", Rational(11, 2)), Pair("H", Rational(2))));
  ASSERT_EQ(f.warnings.size(), 1u);
  EXPECT_EQ(f.warnings[0].code, "possible_hydrate_typo");
  EXPECT_EQ(f.warnings[0].column, 6);  // The '.'.
  EXPECT_FALSE(f.warnings[0].message.empty());
  EXPECT_TRUE(testing::IsWellFormedUtf8(f.warnings[0].message));
}

TEST(Formula, OrdinaryDecimalsDoNotWarn) {
  EXPECT_THAT(ParseOrFail("La0.7Sr0.3MnO3").warnings, IsEmpty());
  EXPECT_THAT(ParseOrFail("Li0.5CoO2").warnings, IsEmpty());
  // A real hydrate separator is no typo.
  EXPECT_THAT(ParseOrFail("CuSO4·5H2O").warnings, IsEmpty());
  EXPECT_THAT(ParseOrFail("Fe2O3").warnings, IsEmpty());
}

TEST(Formula, DecimalHydrateMultiplierDoesNotWarn) {
  // In CaSO4·0.5H2O the author already wrote '·'; the decimal is the
  // hydrate multiplier, so reading the '.' as a mistyped '·' makes no sense.
  EXPECT_THAT(ParseOrFail("CaSO4·0.5H2O").warnings, IsEmpty());
  EXPECT_THAT(ParseOrFail("CaSO4*1.5H2O").warnings, IsEmpty());
}

// ---------------------------------------------------------------------------
// Errors.

// Sentinel: the error is not tied to one column, so any is accepted.
constexpr int kAnyColumn = -1;

struct BadCase {
  std::string text;
  const char* code;
  int column;
  int alt_column = kAnyColumn;  // A second acceptable column, if any.
};

std::vector<BadCase> BadCases() {
  std::string deep;
  for (int i = 0; i < kMaxFormulaDepth + 1; ++i) deep += "(";
  deep += "H";
  for (int i = 0; i < kMaxFormulaDepth + 1; ++i) deep += ")";
  std::string too_long;
  while (too_long.size() < 2000) too_long += "H2O";
  too_long.resize(2000);

  return {
      {"", "empty_formula", 0},  // Not positional: column 0 (formula.h).
      {"Fe2O3)", "malformed_formula", 6},
      {"Fe2O3]", "malformed_formula", 6},
      {"Ca3(PO4", "malformed_formula", 4},  // The unclosed '('.
      {"H2O(", "malformed_formula", 4},
      {"K3[Fe(CN)6", "malformed_formula", 3},  // The unclosed '['.
      {"(Fe]", "malformed_formula", 4},        // ']' cannot close '('.
      {"[Fe)", "malformed_formula", 4},
      {"()", "malformed_formula", 1, 2},  // Empty group.
      {"Fe2o3", "malformed_formula", 4},
      {"Fe2O3!", "malformed_formula", 6},
      {"Fe2 O3", "malformed_formula", 4},
      {"Fe-2O", "malformed_formula", 3},  // "Fe-2" alone is Fe with -2.
      {"La1-xSrx", "variable_without_value", 5},
      {"Fe1-xO", "variable_without_value", 5},
      {"Fe0", "malformed_formula", 3},        // Zero count.
      {"Fe₀", "malformed_formula", 3},        // Zero subscript.
      {"Fe0.0", "malformed_formula", 3},      // Zero decimal count.
      {"Fe(OH)0", "malformed_formula", 7},    // Zero group count.
      {"Fe.5", "malformed_formula", 3},       // No digit before '.'.
      {"·H2O", "malformed_formula", 1},       // Nothing before '·'.
      {"CuSO4·", "malformed_formula", 6, 7},  // Nothing after '·'.
      {"CuSO4*", "malformed_formula", 6, 7},
      {"Fe2O3··H2O", "malformed_formula", 7},  // Empty part.
      {"2", "malformed_formula", 1, 2},        // A multiplier alone: not empty.
      {"2·H2O", "malformed_formula", 1, 2},
      {"H2O·2", "malformed_formula", 5, 6},
      {"Xx2O3", "unknown_element", 1},
      {"Ee", "unknown_element", 1},
      {"Uuo", "unknown_element", 1},  // Not accepted (formula.h).
      {"NaClXx", "unknown_element", 5},
      {"Fe1.1234567", "count_too_large", 3},   // 7 decimals.
      {"Fe1/0O", "malformed_formula", 4},      // Divides by zero.
      {"Fe0/3O", "malformed_formula", 3},      // Zero fraction.
      {"Fe1/3000000O", "count_too_large", 4},  // Denominator too large.
      {"Fe1/O", "malformed_formula", 4},       // No denominator.
      {"Fe10000000", "count_too_large", 3},
      {"Fe1000001", "count_too_large", 3},
      {"CuSO4·10000000H2O", "count_too_large", 7},
      {deep, "nesting_too_deep", kMaxFormulaDepth + 1},
      {too_long, "formula_too_long", 0, kMaxFormulaLength + 1},
      // Columns count characters, not bytes: '₂' and '₃' are 3 bytes each.
      {"Fe₂O₃)", "malformed_formula", 6},
      {"CuSO4·5H2O)", "malformed_formula", 11},
      {"Fe\xff", "malformed_formula", 3},
      {"\xc3", "malformed_formula", 1},  // Truncated UTF-8 sequence.
  };
}

TEST(Formula, MalformedCatalogue) {
  const std::vector<BadCase> cases = BadCases();
  ASSERT_GE(cases.size(), 20u);
  for (const BadCase& c : cases) {
    SCOPED_TRACE(absl::StrCat("input \"", c.text.substr(0, 40), "\""));
    FormulaIssue issue;
    absl::StatusOr<Formula> f = ParseFormula(c.text, &issue);
    ASSERT_FALSE(f.ok()) << "parsed to " << f->amounts.size() << " elements";
    EXPECT_EQ(f.status().code(), absl::StatusCode::kInvalidArgument);
    EXPECT_EQ(issue.code, c.code);
    if (c.column != kAnyColumn) {
      if (c.alt_column == kAnyColumn) {
        EXPECT_EQ(issue.column, c.column);
      } else {
        EXPECT_THAT(issue.column, ::testing::AnyOf(c.column, c.alt_column));
      }
    }
    EXPECT_FALSE(issue.message.empty());
    EXPECT_TRUE(testing::IsWellFormedUtf8(issue.message)) << issue.message;
    EXPECT_TRUE(testing::IsWellFormedUtf8(f.status().message()))
        << f.status().message();
    EXPECT_THAT(std::string(f.status().message()), HasSubstr(issue.message));
    if (issue.column > 0) {
      EXPECT_THAT(issue.message,
                  HasSubstr(absl::StrCat("column ", issue.column)));
    }
  }
}

TEST(Formula, ErrorMessageNamesColumnAndText) {
  FormulaIssue issue;
  absl::StatusOr<Formula> f = ParseFormula("Fe2O3)", &issue);
  ASSERT_FALSE(f.ok());
  EXPECT_THAT(issue.message, HasSubstr("column 6"));
  EXPECT_THAT(issue.message, HasSubstr(")"));
  EXPECT_THAT(f.status().message(), HasSubstr("column 6"));

  ASSERT_FALSE(ParseFormula("Xx2O3", &issue).ok());
  EXPECT_THAT(issue.message, HasSubstr("column 1"));
  EXPECT_THAT(issue.message, HasSubstr("Xx"));
}

TEST(Formula, NestingAtTheLimitIsAccepted) {
  std::string text;
  for (int i = 0; i < kMaxFormulaDepth; ++i) text += "(";
  text += "H";
  for (int i = 0; i < kMaxFormulaDepth; ++i) text += ")";
  EXPECT_THAT(Parse(text), ElementsAre(Pair("H", Rational(1))));
}

TEST(Formula, LengthAtTheLimitIsAccepted) {
  // 341 copies of "H2O" plus "H" is exactly kMaxFormulaLength bytes:
  // H 2 * 341 + 1 = 683, O 341.
  std::string text;
  for (int i = 0; i < 341; ++i) text += "H2O";
  text += "H";
  ASSERT_EQ(text.size(), kMaxFormulaLength);
  EXPECT_THAT(Parse(text),
              ElementsAre(Pair("H", Rational(683)), Pair("O", Rational(341))));
  FormulaIssue issue;
  EXPECT_FALSE(ParseFormula(text + "H", &issue).ok());
  EXPECT_EQ(issue.code, "formula_too_long");
}

TEST(Formula, NullIssuePointerIsAllowed) {
  absl::StatusOr<Formula> f = ParseFormula("Fe2O3)");
  ASSERT_FALSE(f.ok());
  EXPECT_EQ(f.status().code(), absl::StatusCode::kInvalidArgument);
  EXPECT_TRUE(ParseFormula("Fe2O3").ok());
}

TEST(Formula, ProductOfNestedCountsDoesNotOverflow) {
  // Each count is within kMaxFormulaCount, but the product 10^24 exceeds
  // int64. The parser must reject it rather than return a wrapped count.
  const std::string big = "(((H1000000)1000000)1000000)1000000";
  FormulaIssue issue;
  absl::StatusOr<Formula> f = ParseFormula(big, &issue);
  EXPECT_FALSE(f.ok()) << "H = " << f->amounts[0].count.ToString();
  if (!f.ok()) {
    EXPECT_EQ(issue.code, "count_too_large");
  }

  // Likewise denominators: (10^-6)^4 needs 10^24 below the line.
  const std::string tiny = "(((H0.000001)0.000001)0.000001)0.000001";
  f = ParseFormula(tiny, &issue);
  EXPECT_FALSE(f.ok()) << "H = " << f->amounts[0].count.ToString();
  if (!f.ok()) {
    EXPECT_EQ(issue.code, "count_too_large");
  }
}

TEST(Formula, ParsedCountsNeverWrap) {
  // Whatever the parser accepts must be exact. Summing many large counts of
  // one element stays far below int64 only if the parser bounds it.
  std::string text;
  for (int i = 0; i < 50; ++i) text += "(H1000000)1000000";
  ASSERT_LE(text.size(), kMaxFormulaLength);
  FormulaIssue issue;
  absl::StatusOr<Formula> f = ParseFormula(text, &issue);
  if (f.ok()) {
    ASSERT_EQ(f->amounts.size(), 1u);
    // 50 * 10^12.
    EXPECT_EQ(f->amounts[0].count, Rational(50000000000000));
  } else {
    EXPECT_EQ(issue.code, "count_too_large");
  }
}

// ---------------------------------------------------------------------------
// Robustness.

TEST(Formula, RandomInputNeverCrashes) {
  // clang-format off
  const std::vector<std::string> alphabet = {
      // Letters of element symbols (and "X", "x" for unknown ones).
      "H", "C", "N", "O", "F", "e", "a", "l", "u", "o", "i", "n", "r", "s",
      "S", "P", "K", "L", "M", "Z", "X", "x",
      // Counts.
      "0", "1", "2", "3", "4", "5", "6", "7", "8", "9", "₂", "₃", "₀",
      // Structure.
      "(", ")", "[", "]", "·", "•", "*", ".",
      // Junk, including invalid and truncated UTF-8.
      " ", "!", "-", "\xff", "\x80", "\xc3", "\xe2\x82",
  };
  // clang-format on
  std::mt19937 rng(20240611);
  std::uniform_int_distribution<int> length_dist(0, 40);
  std::uniform_int_distribution<size_t> pick(0, alphabet.size() - 1);
  int successes = 0;
  for (int iter = 0; iter < 20000; ++iter) {
    std::string text;
    const int length = length_dist(rng);
    for (int i = 0; i < length; ++i) text += alphabet[pick(rng)];
    FormulaIssue issue;
    absl::StatusOr<Formula> f = ParseFormula(text, &issue);
    if (f.ok()) {
      ++successes;
      ASSERT_FALSE(f->amounts.empty()) << text;
      for (const ElementAmount& a : f->amounts) {
        ASSERT_NE(a.element, nullptr) << text;
        ASSERT_TRUE(Rational(0) < a.count)
            << text << ": " << a.count.ToString();
      }
    } else {
      ASSERT_FALSE(issue.code.empty()) << text;
      ASSERT_FALSE(issue.message.empty()) << text;
      ASSERT_TRUE(testing::IsWellFormedUtf8(issue.message)) << text;
      const int limit = testing::IsWellFormedUtf8(text)
                            ? CharCount(text) + 1
                            : static_cast<int>(text.size()) + 1;
      ASSERT_GE(issue.column, 0) << text;
      ASSERT_LE(issue.column, limit) << text << ": " << issue.message;
    }
  }
  // Sanity: the alphabet is rich enough that some inputs parse.
  EXPECT_GT(successes, 0);
}

}  // namespace
}  // namespace shellwright

namespace shellwright {
namespace {

TEST(FormulaWrittenTest, GroupsAndTermsKeepTheWrittenStructure) {
  absl::StatusOr<Formula> f = ParseFormula("K4[Fe(CN)6]");
  ASSERT_TRUE(f.ok()) << f.status();
  ASSERT_EQ(f->terms.size(), 4u);
  ASSERT_EQ(f->groups.size(), 2u);
  EXPECT_EQ(f->groups[0].bracket, '[');
  EXPECT_EQ(f->groups[0].first_term, 1);
  EXPECT_EQ(f->groups[0].end_term, 4);
  EXPECT_EQ(f->groups[1].bracket, '(');
  EXPECT_EQ(f->groups[1].parent, 0);
  EXPECT_EQ(f->groups[1].count, Rational(6));
  EXPECT_EQ(f->groups[1].multiplier, Rational(6));
  EXPECT_EQ(f->terms[2].element->symbol, "C");
  EXPECT_EQ(f->terms[2].group, 1);
  EXPECT_EQ(f->terms[2].multiplier, Rational(6));
  EXPECT_EQ(f->terms[0].count, Rational(4));
  EXPECT_EQ(f->terms[0].group, -1);
}

TEST(FormulaWrittenTest, NestedCountsMultiplyAndPartsAreGroups) {
  absl::StatusOr<Formula> f = ParseFormula("Ca3(PO4)2·2(H2O)3");
  ASSERT_TRUE(f.ok()) << f.status();
  ASSERT_EQ(f->groups.size(), 3u);
  EXPECT_EQ(f->groups[0].multiplier, Rational(2));  // (PO4)2
  EXPECT_EQ(f->groups[1].bracket, '*');             // ·2(H2O)3
  EXPECT_EQ(f->groups[1].count, Rational(2));
  EXPECT_EQ(f->groups[2].parent, 1);
  EXPECT_EQ(f->groups[2].multiplier, Rational(6));
  EXPECT_EQ(f->terms.back().element->symbol, "O");
  EXPECT_EQ(f->terms.back().multiplier, Rational(6));
  EXPECT_EQ(f->terms.back().part, 1);
}

}  // namespace
}  // namespace shellwright

namespace shellwright {
namespace {

using ::testing::HasSubstr;

// Issue 16: notations that composition records use every day.
TEST(FormulaNotations, ChargeSuffixesSetTheCharge) {
  const struct {
    const char* text;
    int charge;
    const char* amounts;  // symbol:count, in order.
  } kCases[] = {
      {"NH4+", 1, "N:1 H:4"},  // The 4 is H's count.
      {"OH-", -1, "O:1 H:1"},
      {"[Fe(H2O)6]2+", 2, "Fe:1 H:12 O:6"},
      {"SO4^2-", -2, "S:1 O:4"},
      {"SO₄²⁻", -2, "S:1 O:4"},
      {"Fe³⁺", 3, "Fe:1"},
      {"Fe3+", 3, "Fe:1"},  // A lone symbol: as `atom` reads it.
      {"Fe+3", 3, "Fe:1"},
      {"PO4^3-", -3, "P:1 O:4"},
  };
  for (const auto& c : kCases) {
    SCOPED_TRACE(c.text);
    absl::StatusOr<Formula> f = ParseFormula(c.text);
    ASSERT_TRUE(f.ok()) << f.status();
    ASSERT_TRUE(f->charge.has_value());
    EXPECT_EQ(*f->charge, c.charge);
    std::string amounts;
    for (const ElementAmount& a : f->amounts) {
      absl::StrAppend(&amounts, amounts.empty() ? "" : " ", a.element->symbol,
                      ":", a.count.ToString());
    }
    EXPECT_EQ(amounts, c.amounts);
  }
  EXPECT_FALSE(ParseFormula("Fe2O3")->charge.has_value());
}

TEST(FormulaNotations, NonstoichiometryTakesDeltaAsZeroWithAnInfo) {
  absl::StatusOr<Formula> f = ParseFormula("YBa2Cu3O7-δ");
  ASSERT_TRUE(f.ok()) << f.status();
  EXPECT_EQ(f->amounts.back().count, Rational(7));
  ASSERT_EQ(f->infos.size(), 1u);
  EXPECT_EQ(f->infos[0].code, "nonstoichiometry_assumed");
  FormulaOptions options;
  options.variables = *ParseFormulaVariables("δ=0.5");
  absl::StatusOr<Formula> given = ParseFormula("YBa2Cu3O7-δ", options);
  ASSERT_TRUE(given.ok()) << given.status();
  EXPECT_EQ(given->amounts.back().count, Rational(13, 2));
  EXPECT_TRUE(given->infos.empty());
  // "d" is the same variable in ASCII.
  EXPECT_EQ(ParseFormula("Fe1-dO")->amounts[0].count, Rational(1));
}

// Mineral formulas write a shared site as "(Fe,Ni)": pentlandite
// (Fe,Ni)9S8 and olivine (Mg,Fe)2SiO4 (Vaughan and Craig, Mineral
// Chemistry of Metal Sulfides (1978); Deer, Howie and Zussman, Rock-Forming
// Minerals; from memory). The parser reads an equal split of the site and
// says so; anything else with a comma stays malformed.
TEST(FormulaNotations, SiteMixturesSplitTheSiteEquallyWithAnInfo) {
  const struct {
    const char* text;
    const char* amounts;
  } kCases[] = {
      {"(Fe,Ni)9S8", "Fe:9/2 Ni:9/2 S:8"},
      {"(Mg,Fe)2SiO4", "Mg:1 Fe:1 Si:1 O:4"},
      {"(Zn,Fe)S", "Zn:1/2 Fe:1/2 S:1"},
      {"Ca(Mg,Fe,Mn)Si2O6", "Ca:1 Mg:1/3 Fe:1/3 Mn:1/3 Si:2 O:6"},
      {"(Fe,Ni)8FeS8", "Fe:5 Ni:4 S:8"},
  };
  for (const auto& c : kCases) {
    SCOPED_TRACE(c.text);
    absl::StatusOr<Formula> f = ParseFormula(c.text);
    ASSERT_TRUE(f.ok()) << f.status();
    std::string amounts;
    for (const ElementAmount& a : f->amounts) {
      absl::StrAppend(&amounts, amounts.empty() ? "" : " ", a.element->symbol,
                      ":", a.count.ToString());
    }
    EXPECT_EQ(amounts, c.amounts);
    ASSERT_EQ(f->infos.size(), 1u);
    EXPECT_EQ(f->infos[0].code, "site_mixture_equal_split");
    EXPECT_THAT(f->infos[0].message, HasSubstr("equal split"));
  }
  for (const char* bad :
       {"(Fe,Fe)S", "(Fe2,Ni)S", "Fe,NiS", "(Fe,)S", "(,Fe)S", "(FeNi,Co)S",
        "[Fe,Ni]S", "(Fe,(Ni)2)S", "(Fe,Ni),S"}) {
    SCOPED_TRACE(bad);
    FormulaIssue issue;
    absl::StatusOr<Formula> f = ParseFormula(bad, &issue);
    EXPECT_FALSE(f.ok());
    EXPECT_EQ(issue.code, "malformed_formula");
    EXPECT_THAT(issue.message, HasSubstr("(Fe,Ni)9S8"));
  }
}

TEST(FormulaNotations, NamedVariablesNeedValues) {
  FormulaIssue issue;
  EXPECT_FALSE(ParseFormula("La1-xSrxMnO3", &issue).ok());
  EXPECT_EQ(issue.code, "variable_without_value");
  EXPECT_THAT(issue.message, HasSubstr("x=0.3"));
  FormulaOptions options;
  options.variables = *ParseFormulaVariables("x=0.3");
  absl::StatusOr<Formula> f = ParseFormula("La1-xSrxMnO3", options);
  ASSERT_TRUE(f.ok()) << f.status();
  EXPECT_EQ(f->amounts[0].count, Rational(7, 10));  // La
  EXPECT_EQ(f->amounts[1].count, Rational(3, 10));  // Sr
  options.variables = *ParseFormulaVariables("x = 0.1; y=2");
  absl::StatusOr<Formula> spinel = ParseFormula("Li1+xMn2-xO4", options);
  ASSERT_TRUE(spinel.ok()) << spinel.status();
  EXPECT_EQ(spinel->amounts[0].count, Rational(11, 10));
  EXPECT_EQ(spinel->amounts[1].count, Rational(19, 10));
  // A number times a variable.
  options.variables = *ParseFormulaVariables("x=0.2");
  EXPECT_EQ(ParseFormula("Fe1-0.5xO", options)->amounts[0].count,
            Rational(9, 10));
  // Negative counts are refused.
  options.variables = *ParseFormulaVariables("x=1.5");
  EXPECT_FALSE(ParseFormula("La1-xSrxMnO3", options, &issue).ok());
  EXPECT_THAT(issue.message, HasSubstr("negative"));
  // Malformed variables.
  for (const char* bad : {"x", "q=1", "x=abc", "x=1,x=2"}) {
    EXPECT_FALSE(ParseFormulaVariables(bad).ok()) << bad;
  }
}

TEST(FormulaNotations, UnknownHydrationIsLeftOutWithAnInfo) {
  absl::StatusOr<Formula> f = ParseFormula("CuSO4·nH2O");
  ASSERT_TRUE(f.ok()) << f.status();
  ASSERT_EQ(f->amounts.size(), 3u);  // Cu, S, O: no water.
  EXPECT_EQ(f->amounts[2].count, Rational(4));
  ASSERT_EQ(f->infos.size(), 1u);
  EXPECT_EQ(f->infos[0].code, "unknown_hydration");
}

TEST(FormulaNotations, DeuteriumAndTritiumAreHydrogen) {
  absl::StatusOr<Formula> f = ParseFormula("D2O");
  ASSERT_TRUE(f.ok()) << f.status();
  EXPECT_EQ(f->amounts[0].element->symbol, "H");
  EXPECT_EQ(f->amounts[0].count, Rational(2));
  EXPECT_EQ(ParseFormula("T2O")->amounts[0].element->symbol, "H");
  // Two-letter symbols still win: Dy, Tb, Ti.
  EXPECT_EQ(ParseFormula("Dy2O3")->amounts[0].element->symbol, "Dy");
  EXPECT_EQ(ParseFormula("TiO2")->amounts[0].element->symbol, "Ti");
}

TEST(FormulaNotations, RegressionDidYouMeanSuggestsRealSymbolsOnly) {
  // Issue 16: "Fe1e6O" suggested 'E', which is not an element.
  FormulaIssue issue;
  EXPECT_FALSE(ParseFormula("Fe1e6O", &issue).ok());
  EXPECT_THAT(issue.message, ::testing::Not(HasSubstr("did you mean")));
  EXPECT_FALSE(ParseFormula("feO", &issue).ok());
  EXPECT_THAT(issue.message, HasSubstr("did you mean 'Fe'?"));
  EXPECT_FALSE(ParseFormula("o2", &issue).ok());
  EXPECT_THAT(issue.message, HasSubstr("did you mean 'O'?"));
}

// Ligand abbreviations (data/ligand_abbreviations.tsv). The written-out
// formulas are the ligands' molecular formulas (IUPAC Nomenclature of
// Inorganic Chemistry, Recommendations 2005, Table VII, from memory; the
// formulas worked out by hand from the structures).
struct AbbreviationCase {
  const char* abbreviation;
  const char* written_out;
};
constexpr AbbreviationCase kAbbreviations[] = {
    {"acac", "C5H7O2"},
    {"bpy", "C10H8N2"},
    {"bipy", "C10H8N2"},
    {"Cp", "C5H5"},
    {"dien", "C4H13N3"},
    {"edta", "C10H12N2O8"},
    {"en", "C2H8N2"},
    {"gly", "C2H4NO2"},
    {"ox", "C2O4"},
    {"phen", "C12H8N2"},
    {"py", "C5H5N"},
    {"pz", "C4H4N2"},
    {"terpy", "C15H11N3"},
    {"tpy", "C15H11N3"},
    // Organic fragments and joined forms (Elschenbroich, Organometallics,
    // 3rd ed., from memory; formulas worked out from the structures).
    {"Me", "CH3"},
    {"Et", "C2H5"},
    {"Bu", "C4H9"},
    {"Ph", "C6H5"},
    {"Cy", "C6H11"},
    {"dppe", "C26H24P2"},
    {"OAc", "CH3COO"},
    {"Cp*", "C10H15"},
    // Solvent ligands, tren, cod, dimethylglyoximate(1-) and
    // 2-phenylpyridinate(1-) (IUPAC Red Book 2005, Table VII, from memory;
    // formulas worked out from the structures: dmso (CH3)2SO,
    // dmf HCON(CH3)2, thf (CH2)4O, tren N(CH2CH2NH2)3, cod C8H12, dmg
    // CH3C(NOH)C(NO)CH3, ppy C6H4-C5H4N).
    {"dmso", "C2H6SO"},
    {"dmf", "C3H7NO"},
    {"thf", "C4H8O"},
    {"tren", "C6H18N4"},
    {"cod", "C8H12"},
    {"dmg", "C4H7N2O2"},
    {"Hdmg", "C4H7N2O2"},
    {"ppy", "C11H8N"},
    // Macrocycles and cot (IUPAC Red Book 2005, Table VII, from memory;
    // the capitalised TPP, OEP and Pc are common practice).
    {"tpp", "C44H28N4"},
    {"TPP", "C44H28N4"},
    {"oep", "C36H44N4"},
    {"OEP", "C36H44N4"},
    {"pc", "C32H16N8"},
    {"Pc", "C32H16N8"},
    {"salen", "C16H14N2O2"},
    {"cyclam", "C10H24N4"},
    {"cyclen", "C8H20N4"},
    {"tacn", "C6H15N3"},
    {"cot", "C8H8"},
    // Halide-perovskite cations (Saparov and Mitzi, Chem. Rev. 116 (2016)
    // 4558, from memory) and electrolyte anions (Xu, Chem. Rev. 104 (2004)
    // 4303, from memory): common practice.
    {"MA", "CH3NH3"},
    {"FA", "NH2CHNH2"},
    {"PEA", "C6H5C2H4NH3"},
    {"TFSI", "C2F6NO4S2"},
    {"TFSA", "C2F6NO4S2"},
    {"FSI", "F2NO4S2"},
    {"OTf", "CF3SO3"},
};

// The amounts of `text` as "Sym=count" in formula order.
std::string AmountsText(absl::string_view text) {
  const Formula f = ParseOrFail(text);
  std::string out;
  for (const auto& [symbol, count] : CountsOf(f)) {
    absl::StrAppend(&out, symbol, "=", count.ToString(), " ");
  }
  return out;
}

TEST(FormulaAbbreviations, EveryAbbreviationIsItsLigandsAtoms) {
  ASSERT_EQ(LigandAbbreviations().size(), std::size(kAbbreviations));
  for (const AbbreviationCase& c : kAbbreviations) {
    SCOPED_TRACE(c.abbreviation);
    const LigandAbbreviation* a = FindLigandAbbreviation(c.abbreviation);
    ASSERT_NE(a, nullptr);
    EXPECT_EQ(a->formula, c.written_out);
    EXPECT_THAT(a->source, ::testing::Not(IsEmpty()));
    // Alone, in brackets with a count, and beside a metal in a complex.
    EXPECT_EQ(AmountsText(c.abbreviation), AmountsText(c.written_out));
    EXPECT_EQ(AmountsText(absl::StrCat("[Co(", c.abbreviation, ")2]Cl2")),
              AmountsText(absl::StrCat("[Co(", c.written_out, ")2]Cl2")));
    EXPECT_EQ(AmountsText(absl::StrCat("Fe(", c.abbreviation, ")3")),
              AmountsText(absl::StrCat("Fe(", c.written_out, ")3")));
  }
}

TEST(FormulaAbbreviations, CountsMultiplyThroughNestedGroups) {
  // [Fe(bpy)3]Cl2: C 3 x 10, H 3 x 8, N 3 x 2.
  EXPECT_THAT(CountsOf(ParseOrFail("[Fe(bpy)3]Cl2")),
              ElementsAre(Pair("Fe", Rational(1)), Pair("C", Rational(30)),
                          Pair("H", Rational(24)), Pair("N", Rational(6)),
                          Pair("Cl", Rational(2))));
  // K3[Fe(ox)3]: C 3 x 2, O 3 x 4.
  EXPECT_THAT(CountsOf(ParseOrFail("K3[Fe(ox)3]")),
              ElementsAre(Pair("K", Rational(3)), Pair("Fe", Rational(1)),
                          Pair("C", Rational(6)), Pair("O", Rational(12))));
  // Two complexes, each with two en.
  EXPECT_THAT(CountsOf(ParseOrFail("([Co(en)2]Cl2)2")),
              ElementsAre(Pair("Co", Rational(2)), Pair("C", Rational(8)),
                          Pair("H", Rational(32)), Pair("N", Rational(8)),
                          Pair("Cl", Rational(4))));
  // A bare abbreviation takes the count after it: FeCp2 is Fe(C5H5)2.
  EXPECT_THAT(CountsOf(ParseOrFail("FeCp2")),
              ElementsAre(Pair("Fe", Rational(1)), Pair("C", Rational(10)),
                          Pair("H", Rational(10))));
  // Mixed with written ligands and a metal written straight before it.
  EXPECT_EQ(AmountsText("[Co(NH3)4en]Cl3"),
            AmountsText("[Co(NH3)4(C2H8N2)]Cl3"));
  EXPECT_EQ(AmountsText("[Nien3]Cl2"), AmountsText("[Ni(C2H8N2)3]Cl2"));
  EXPECT_EQ(AmountsText("[PtCl2py2]"), AmountsText("[PtCl2(C5H5N)2]"));
  // "dien" after a group is the ligand, not the variable d.
  EXPECT_EQ(AmountsText("[Co(NH3)3dien]Cl3"),
            AmountsText("[Co(NH3)3(C4H13N3)]Cl3"));
  EXPECT_EQ(AmountsText("[Co(NH3)dien(NH3)2]Cl3"),
            AmountsText("[Co(NH3)(C4H13N3)(NH3)2]Cl3"));
}

TEST(FormulaAbbreviations, HydratesAndChargesAroundAbbreviations) {
  EXPECT_EQ(AmountsText("[Ni(en)3]Cl2·2H2O"),
            AmountsText("[Ni(C2H8N2)3]Cl2·2H2O"));
  EXPECT_EQ(AmountsText("K3[Fe(ox)3]*3H2O"), AmountsText("K3[Fe(C2O4)3]*3H2O"));
  // An adduct part that is one abbreviation: SnCl4·2py.
  EXPECT_EQ(AmountsText("SnCl4·2py"), AmountsText("SnCl4·2C5H5N"));
  const Formula ion = ParseOrFail("[Fe(phen)3]2+");
  EXPECT_EQ(ion.charge, 2);
  EXPECT_EQ(AmountsText("[Fe(phen)3]2+"), AmountsText("[Fe(C12H8N2)3]2+"));
}

TEST(FormulaAbbreviations, WrittenStructureMatchesTheWrittenOutFormula) {
  // "(bpy)3" is one group holding the ligand's terms, as "(C10H8N2)3".
  for (const char* pair :
       {"[Fe(bpy)3]Cl2|[Fe(C10H8N2)3]Cl2", "Fe(acac)3|Fe(C5H7O2)3",
        "FeCp2|Fe(C5H5)2", "SnCl4·2py|SnCl4·2C5H5N"}) {
    const std::vector<std::string> texts = absl::StrSplit(pair, '|');
    SCOPED_TRACE(pair);
    const Formula a = ParseOrFail(texts[0]);
    const Formula b = ParseOrFail(texts[1]);
    ASSERT_EQ(a.terms.size(), b.terms.size());
    for (size_t i = 0; i < a.terms.size(); ++i) {
      EXPECT_EQ(a.terms[i].element, b.terms[i].element) << i;
      EXPECT_EQ(a.terms[i].count, b.terms[i].count) << i;
      EXPECT_EQ(a.terms[i].multiplier, b.terms[i].multiplier) << i;
      EXPECT_EQ(a.terms[i].group, b.terms[i].group) << i;
    }
    ASSERT_EQ(a.groups.size(), b.groups.size());
    for (size_t g = 0; g < a.groups.size(); ++g) {
      EXPECT_EQ(a.groups[g].bracket, b.groups[g].bracket) << g;
      EXPECT_EQ(a.groups[g].first_term, b.groups[g].first_term) << g;
      EXPECT_EQ(a.groups[g].end_term, b.groups[g].end_term) << g;
      EXPECT_EQ(a.groups[g].multiplier, b.groups[g].multiplier) << g;
    }
  }
}

TEST(FormulaAbbreviations, ElementSymbolsKeepTheirMeaning) {
  // Capitalised words that are symbols never become abbreviations, and
  // abbreviations are case-sensitive.
  EXPECT_THAT(CountsOf(ParseOrFail("CoCl2")),
              ElementsAre(Pair("Co", Rational(1)), Pair("Cl", Rational(2))));
  for (const char* symbol : {"Cs", "Cu", "Po", "Pu", "Np", "Pd", "Pb", "Pt"}) {
    const Formula f = ParseOrFail(absl::StrCat(symbol, "2O"));
    ASSERT_EQ(f.amounts.size(), 2u) << symbol;
    EXPECT_EQ(f.amounts[0].element->symbol, symbol);
  }
  // "BPY" is boron, phosphorus and yttrium, as before.
  EXPECT_THAT(CountsOf(ParseOrFail("BPY")),
              ElementsAre(Pair("B", Rational(1)), Pair("P", Rational(1)),
                          Pair("Y", Rational(1))));
  FormulaIssue issue;
  EXPECT_FALSE(ParseFormula("Fe(cp)2", &issue).ok());
  EXPECT_EQ(issue.code, "malformed_formula");
  EXPECT_THAT(issue.message, HasSubstr("'cp'"));
  // A capitalised abbreviation is pointed to its written form.
  EXPECT_FALSE(ParseFormula("[Fe(Bpy)3]Cl2", &issue).ok());
  EXPECT_THAT(issue.message, HasSubstr("did you mean 'bpy'?"));
  // Only d- and f-block metals take an abbreviation written straight after
  // them: "Bipy" is not Bi with py.
  EXPECT_FALSE(ParseFormula("Bipy", &issue).ok());
  EXPECT_EQ(issue.code, "unknown_element");
  EXPECT_THAT(issue.message, HasSubstr("did you mean 'bipy'?"));
  // Variables still read as variables.
  FormulaOptions options;
  options.variables = {{"x", Rational(1, 2)}};
  absl::StatusOr<Formula> v = ParseFormula("Fe(py)x", options);
  ASSERT_TRUE(v.ok()) << v.status();
  EXPECT_EQ(v->amounts[1].count, Rational(5, 2));
}

TEST(FormulaAbbreviations, FragmentsMakePhosphinesAndJoinedFormsComeFirst) {
  // PPh3 is P(C6H5)3: one group holding P and the phenyl groups.
  EXPECT_EQ(AmountsText("RhCl(PPh3)3"), AmountsText("RhCl(P(C6H5)3)3"));
  EXPECT_EQ(AmountsText("NiCl2(PMe3)2"), AmountsText("NiCl2(P(CH3)3)2"));
  EXPECT_EQ(AmountsText("Ni(PEt3)2Cl2"), AmountsText("Ni(P(C2H5)3)2Cl2"));
  // "Cy" is cyclohexyl, not C with the variable y.
  EXPECT_EQ(AmountsText("Ni(PCy3)2Cl2"), AmountsText("Ni(P(C6H11)3)2Cl2"));
  EXPECT_EQ(AmountsText("Ni(P(OMe)3)4"), AmountsText("Ni(P(OCH3)3)4"));
  // "OAc" is acetate, not O with actinium; Ac alone stays actinium.
  EXPECT_EQ(AmountsText("Cu(OAc)2"), AmountsText("Cu(CH3COO)2"));
  EXPECT_EQ(AmountsText("NaOAc"), AmountsText("Na(CH3COO)"));
  EXPECT_THAT(CountsOf(ParseOrFail("Ac2O3")),
              ElementsAre(Pair("Ac", Rational(2)), Pair("O", Rational(3))));
  // "Cp*" is C5Me5, not Cp followed by an adduct part.
  EXPECT_EQ(AmountsText("Cp*2Fe"), AmountsText("(C10H15)2Fe"));
  EXPECT_EQ(AmountsText("[Cp*Fe(CO)2]2"), AmountsText("[(C10H15)Fe(CO)2]2"));
  EXPECT_EQ(AmountsText("FeCp2*2H2O"), AmountsText("Fe(C5H5)2·2H2O"));
  // "TPP" and "OEP" are the porphyrinates, not tritium (T, read as H)
  // with two P, or O before an unknown "EP"; T still reads as tritium
  // elsewhere.
  EXPECT_EQ(AmountsText("Fe(TPP)Cl"), AmountsText("Fe(C44H28N4)Cl"));
  EXPECT_EQ(AmountsText("Fe(tpp)Cl"), AmountsText("Fe(C44H28N4)Cl"));
  EXPECT_EQ(AmountsText("Ni(OEP)"), AmountsText("Ni(C36H44N4)"));
  EXPECT_THAT(CountsOf(ParseOrFail("P2T")),
              ElementsAre(Pair("P", Rational(2)), Pair("H", Rational(1))));
  // "Pc" after a metal symbol (CuPc) and in brackets are one group.
  EXPECT_EQ(AmountsText("CuPc"), AmountsText("Cu(C32H16N8)"));
  EXPECT_EQ(AmountsText("Cu(Pc)"), AmountsText("Cu(C32H16N8)"));
  EXPECT_EQ(AmountsText("H2Pc"), AmountsText("H2(C32H16N8)"));
  EXPECT_EQ(AmountsText("[Ni(cyclam)](ClO4)2"),
            AmountsText("[Ni(C10H24N4)](ClO4)2"));
  EXPECT_EQ(AmountsText("U(cot)2"), AmountsText("U(C8H8)2"));
  // The perovskite cations and electrolyte anions; a joined form followed
  // by a lower-case letter is not read, so BAs stays boron arsenide and
  // miscased BA and GA stay errors.
  EXPECT_EQ(AmountsText("MAPbI3"), AmountsText("(CH3NH3)PbI3"));
  EXPECT_EQ(AmountsText("MA0.5FA0.5PbI3"),
            AmountsText("(CH3NH3)0.5(NH2CHNH2)0.5PbI3"));
  EXPECT_EQ(AmountsText("(PEA)2PbI4"), AmountsText("(C6H5C2H4NH3)2PbI4"));
  EXPECT_EQ(AmountsText("LiTFSI"), AmountsText("Li(C2F6NO4S2)"));
  EXPECT_EQ(AmountsText("Sc(OTf)3"), AmountsText("Sc(CF3SO3)3"));
  EXPECT_THAT(CountsOf(ParseOrFail("BAs")),
              ElementsAre(Pair("B", Rational(1)), Pair("As", Rational(1))));
  EXPECT_FALSE(ParseFormula("BATiO3").ok());
  EXPECT_FALSE(ParseFormula("GAAs").ok());
}

TEST(FormulaNotations, IsomerPrefixesAreSetAsideWithAnInfo) {
  for (const char* pair : {"cis-[PtCl2(NH3)2]|[PtCl2(NH3)2]",
                           "trans-[CoCl2(en)2]Cl|[CoCl2(en)2]Cl",
                           "fac-[Co(NH3)3(NO2)3]|[Co(NH3)3(NO2)3]",
                           "mer-[RhCl3(py)3]|[RhCl3(py)3]"}) {
    const std::vector<std::string> texts = absl::StrSplit(pair, '|');
    SCOPED_TRACE(pair);
    const Formula f = ParseOrFail(texts[0]);
    EXPECT_EQ(AmountsText(texts[0]), AmountsText(texts[1]));
    ASSERT_EQ(f.infos.size(), 1u);
    EXPECT_EQ(f.infos[0].code, "isomer_prefix");
    EXPECT_THAT(f.infos[0].message,
                HasSubstr(texts[0].substr(0, texts[0].find('-') + 1)));
  }
  // Errors after a prefix keep their columns in the text as written.
  FormulaIssue issue;
  EXPECT_FALSE(ParseFormula("cis-[PtCl2(NH3)2", &issue).ok());
  EXPECT_EQ(issue.column, 5);
  // A prefix alone is no formula.
  EXPECT_FALSE(ParseFormula("cis-", &issue).ok());
}

TEST(FormulaNotations, PolymorphPrefixesAreSetAsideWithAnInfo) {
  // Phase names: maghemite γ-Fe2O3, corundum α-Al2O3, β-Ga2O3 (Greenwood
  // and Earnshaw, Chemistry of the Elements, 2nd ed., from memory).
  for (const char* pair :
       {"γ-Fe2O3|Fe2O3", "gamma-Fe2O3|Fe2O3", "α-Al2O3|Al2O3",
        "beta-Ga2O3|Ga2O3", "κ-Al2O3|Al2O3", "δ-Bi2O3|Bi2O3"}) {
    const std::vector<std::string> texts = absl::StrSplit(pair, '|');
    SCOPED_TRACE(pair);
    const Formula f = ParseOrFail(texts[0]);
    EXPECT_EQ(AmountsText(texts[0]), AmountsText(texts[1]));
    ASSERT_EQ(f.infos.size(), 1u);
    EXPECT_EQ(f.infos[0].code, "polymorph_prefix");
    EXPECT_THAT(f.infos[0].message,
                HasSubstr(texts[0].substr(0, texts[0].find('-') + 1)));
  }
  // Both kinds of prefix, each named once.
  const Formula both = ParseOrFail("trans-β-[CoCl2(en)2]Cl");
  ASSERT_EQ(both.infos.size(), 2u);
  EXPECT_EQ(both.infos[0].code, "isomer_prefix");
  EXPECT_EQ(both.infos[1].code, "polymorph_prefix");
  // A prefix alone is no formula; an unknown Greek letter is an error that
  // names its column; δ elsewhere is still the nonstoichiometry variable.
  FormulaIssue issue;
  EXPECT_FALSE(ParseFormula("γ-", &issue).ok());
  EXPECT_FALSE(ParseFormula("ω-Fe2O3", &issue).ok());
  EXPECT_EQ(issue.column, 1);
  EXPECT_EQ(AmountsText("YBa2Cu3O7-δ"), AmountsText("YBa2Cu3O7"));
}

TEST(FormulaAbbreviations, UnknownAbbreviationNamesItsTextAndColumn) {
  FormulaIssue issue;
  absl::StatusOr<Formula> f = ParseFormula("[Fe(bpz)3]Cl2", &issue);
  ASSERT_FALSE(f.ok());
  EXPECT_EQ(issue.code, "malformed_formula");
  EXPECT_EQ(issue.column, 5);
  EXPECT_THAT(issue.message,
              HasSubstr("unknown ligand abbreviation 'bpz' at column 5"));
  EXPECT_THAT(issue.message, HasSubstr("bpy"));  // The known ones listed.
  EXPECT_THAT(std::string(f.status().message()), HasSubstr("[Fe(bpz)3]Cl2"));
  EXPECT_FALSE(ParseFormula("[Co(NH3)5tmen]Cl3", &issue).ok());
  EXPECT_EQ(issue.column, 10);
  EXPECT_THAT(issue.message, HasSubstr("'tmen' at column 10"));
  // A miscased symbol keeps its hint.
  EXPECT_FALSE(ParseFormula("[Fe(en)3]cl2", &issue).ok());
  EXPECT_THAT(issue.message, HasSubstr("did you mean 'Cl'?"));
}

}  // namespace
}  // namespace shellwright
