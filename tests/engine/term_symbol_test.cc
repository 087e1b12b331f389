// Tests for engine/term_symbol.h: Hund's-rules subshell terms checked against
// an independent microstate enumeration, ASCII/Unicode formatting and
// parsing of term symbols, and the ground levels that DescribeAtom() reports
// for the neutral atoms Z = 1..103.

#include "engine/term_symbol.h"

#include <algorithm>
#include <cstdlib>
#include <map>
#include <ostream>
#include <string>
#include <utility>
#include <vector>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "absl/strings/str_cat.h"
#include "engine/atom.h"
#include "gmock/gmock.h"
#include "gtest/gtest.h"
#include "tests/engine/reference_ground_levels.h"
#include "tests/testing/engine_test_util.h"

namespace shellwright {
namespace {

using ::shellwright::testing::Describe;
using ::shellwright::testing::kReferenceGroundLevels;
using ::shellwright::testing::ParseOrFail;
using ::shellwright::testing::ReferenceGroundLevel;
using ::testing::Contains;
using ::testing::HasSubstr;
using ::testing::UnorderedElementsAreArray;

// ---------------------------------------------------------------------------
// Independent microstate enumeration.
// ---------------------------------------------------------------------------

// An LS term, with doubled S so that half-integers are exact.
struct LsTerm {
  int two_s;
  int l;
  bool operator==(const LsTerm& o) const {
    return two_s == o.two_s && l == o.l;
  }
  bool operator<(const LsTerm& o) const {
    return std::make_pair(two_s, l) < std::make_pair(o.two_s, o.l);
  }
};

void PrintTo(const LsTerm& t, std::ostream* os) {
  *os << (t.two_s + 1) << "L=" << t.l;
}

// Number of microstates (M_L, 2M_S) of l^n, counted by choosing `n` of the
// 2(2l+1) spin-orbitals (m_l, m_s). Also returns the microstate total.
std::map<std::pair<int, int>, int> MicrostateTable(int l, int n, int* total) {
  const int spin_orbitals = 2 * (2 * l + 1);
  std::map<std::pair<int, int>, int> table;
  *total = 0;
  for (unsigned mask = 0; mask < (1u << spin_orbitals); ++mask) {
    if (__builtin_popcount(mask) != n) continue;
    int ml = 0;
    int two_ms = 0;
    for (int i = 0; i < spin_orbitals; ++i) {
      if ((mask >> i) & 1u) {
        ml += l - i / 2;                  // m_l = l, l-1, ..., -l
        two_ms += (i % 2 == 0) ? 1 : -1;  // m_s = +1/2 or -1/2
      }
    }
    ++table[{ml, two_ms}];
    ++*total;
  }
  return table;
}

// All LS terms of l^n by the standard peeling algorithm: take the largest
// M_L present, then the largest M_S at that M_L; that is a term (L, S);
// remove one microstate from every (M_L, M_S) with |M_L| <= L, |M_S| <= S;
// repeat until the table is empty.
std::vector<LsTerm> DeriveTerms(int l, int n, int* microstates) {
  std::map<std::pair<int, int>, int> table = MicrostateTable(l, n, microstates);
  std::vector<LsTerm> terms;
  while (true) {
    bool found = false;
    int best_ml = 0;
    int best_two_ms = 0;
    for (const auto& [key, count] : table) {
      if (count <= 0) continue;
      const auto [ml, two_ms] = key;
      if (!found || ml > best_ml || (ml == best_ml && two_ms > best_two_ms)) {
        found = true;
        best_ml = ml;
        best_two_ms = two_ms;
      }
    }
    if (!found) break;
    const LsTerm term{best_two_ms, best_ml};
    for (int ml = -term.l; ml <= term.l; ++ml) {
      for (int two_ms = -term.two_s; two_ms <= term.two_s; two_ms += 2) {
        int& count = table[{ml, two_ms}];
        // A negative count would mean the peeling went wrong.
        EXPECT_GT(count, 0)
            << "l=" << l << " n=" << n << " ML=" << ml << " 2MS=" << two_ms;
        --count;
      }
    }
    terms.push_back(term);
  }
  return terms;
}

int Binomial(int n, int k) {
  long long r = 1;
  for (int i = 1; i <= k; ++i) r = r * (n - k + i) / i;
  return static_cast<int>(r);
}

std::vector<LsTerm> Terms(const std::vector<std::string>& labels) {
  std::vector<LsTerm> out;
  for (const std::string& label : labels) {
    const int multiplicity = label[0] - '0';
    const int l = static_cast<int>(kTermLetters.find(label[1]));
    out.push_back(LsTerm{multiplicity - 1, l});
  }
  return out;
}

// The enumerator itself, checked against textbook term lists (standard LS
// term tables, e.g. Condon & Shortley, The Theory of Atomic Spectra, from
// memory).
TEST(MicrostateEnumeration, MatchesTextbookTermLists) {
  int microstates = 0;
  EXPECT_THAT(DeriveTerms(1, 2, &microstates),
              UnorderedElementsAreArray(Terms({"1S", "1D", "3P"})));
  EXPECT_EQ(microstates, 15);
  EXPECT_THAT(DeriveTerms(1, 3, &microstates),
              UnorderedElementsAreArray(Terms({"2P", "2D", "4S"})));
  EXPECT_EQ(microstates, 20);
  EXPECT_THAT(DeriveTerms(2, 2, &microstates),
              UnorderedElementsAreArray(Terms({"1S", "1D", "1G", "3P", "3F"})));
  EXPECT_EQ(microstates, 45);
  EXPECT_THAT(DeriveTerms(2, 3, &microstates),
              UnorderedElementsAreArray(
                  Terms({"2P", "2D", "2D", "2F", "2G", "2H", "4P", "4F"})));
  EXPECT_EQ(microstates, 120);
  EXPECT_THAT(DeriveTerms(3, 2, &microstates),
              UnorderedElementsAreArray(
                  Terms({"1S", "1D", "1G", "1I", "3P", "3F", "3H"})));
  EXPECT_EQ(microstates, 91);
}

struct SubshellCase {
  int l;
  int electrons;
};

std::string CaseName(const ::testing::TestParamInfo<SubshellCase>& info) {
  return absl::StrCat(std::string(1, "spdf"[info.param.l]),
                      info.param.electrons);
}

std::vector<SubshellCase> AllPdfCases() {
  std::vector<SubshellCase> cases;
  for (int l = 1; l <= 3; ++l) {
    for (int n = 0; n <= 2 * (2 * l + 1); ++n) cases.push_back({l, n});
  }
  return cases;
}

class HundSubshellTermTest : public ::testing::TestWithParam<SubshellCase> {};

TEST_P(HundSubshellTermTest, AgreesWithMicrostateEnumeration) {
  const int l = GetParam().l;
  const int n = GetParam().electrons;
  const int capacity = 2 * (2 * l + 1);

  int microstates = 0;
  const std::vector<LsTerm> terms = DeriveTerms(l, n, &microstates);
  ASSERT_FALSE(terms.empty());
  EXPECT_EQ(microstates, Binomial(capacity, n));
  // The terms must account for every microstate exactly once.
  int accounted = 0;
  for (const LsTerm& t : terms) accounted += (t.two_s + 1) * (2 * t.l + 1);
  EXPECT_EQ(accounted, microstates);

  // Hund's first two rules: highest S, then highest L for that S.
  const LsTerm expected = *std::max_element(terms.begin(), terms.end());

  const TermSymbol hund = HundSubshellTerm(l, n);
  EXPECT_EQ(hund.two_s, expected.two_s);
  EXPECT_EQ(hund.l, expected.l);
  EXPECT_THAT(terms, Contains(LsTerm{hund.two_s, hund.l}));

  // Hund's third rule: J = |L - S| below half full, L + S above half full.
  // At exactly half full L = 0, so either gives J = S.
  const int two_l = 2 * expected.l;
  int expected_two_j;
  if (2 * n < capacity) {
    expected_two_j = std::abs(two_l - expected.two_s);
  } else if (2 * n > capacity) {
    expected_two_j = two_l + expected.two_s;
  } else {
    EXPECT_EQ(expected.l, 0) << "half-full subshell ground term has L = 0";
    expected_two_j = expected.two_s;
  }
  EXPECT_EQ(hund.two_j, expected_two_j);

  // Parity of l^n is (-1)^(l n).
  EXPECT_EQ(hund.parity, (l * n) % 2 == 0 ? Parity::kEven : Parity::kOdd);
}

INSTANTIATE_TEST_SUITE_P(AllPdfOccupancies, HundSubshellTermTest,
                         ::testing::ValuesIn(AllPdfCases()), CaseName);

// Empty and full subshells give 1S0, for s as well.
TEST(HundSubshellTerm, EmptyAndFullAreSinglets) {
  for (int l = 0; l <= 3; ++l) {
    for (int n : {0, 2 * (2 * l + 1)}) {
      const TermSymbol t = HundSubshellTerm(l, n);
      EXPECT_EQ(t.ToAscii(), "1S0") << "l=" << l << " n=" << n;
    }
  }
  EXPECT_EQ(HundSubshellTerm(0, 1).ToAscii(), "2S1/2");
}

// ---------------------------------------------------------------------------
// Formatting and parsing.
// ---------------------------------------------------------------------------

struct FormatCase {
  const char* ascii;
  const char* unicode;
  int two_s;
  int l;
  int two_j;
  Parity parity;
};

// The expected Unicode forms follow the convention written in
// term_symbol.h: superscript multiplicity, a ring for odd parity, subscript
// J (common practice, no source).
constexpr FormatCase kFormatCases[] = {
    {"5D4", "⁵D₄", 4, 2, 8, Parity::kEven},
    {"2Po1/2", "²P°₁/₂", 1, 1, 1, Parity::kOdd},
    {"9Do2", "⁹D°₂", 8, 2, 4, Parity::kOdd},
    {"8So7/2", "⁸S°₇/₂", 7, 0, 7, Parity::kOdd},
    {"1S0", "¹S₀", 0, 0, 0, Parity::kEven},
};

TEST(TermSymbolFormat, ParseToAsciiToUnicodeRoundTrip) {
  for (const FormatCase& c : kFormatCases) {
    SCOPED_TRACE(c.ascii);
    absl::StatusOr<TermSymbol> t = TermSymbol::Parse(c.ascii);
    ASSERT_TRUE(t.ok()) << t.status();
    EXPECT_EQ(t->two_s, c.two_s);
    EXPECT_EQ(t->l, c.l);
    EXPECT_EQ(t->two_j, c.two_j);
    EXPECT_EQ(t->parity, c.parity);
    EXPECT_EQ(t->Multiplicity(), c.two_s + 1);
    EXPECT_EQ(t->ToAscii(), c.ascii);
    EXPECT_EQ(t->ToUnicode(), c.unicode);

    absl::StatusOr<TermSymbol> again = TermSymbol::Parse(t->ToAscii());
    ASSERT_TRUE(again.ok()) << again.status();
    EXPECT_EQ(*again, *t);
  }
}

TEST(TermSymbolFormat, ConstructedTermFormats) {
  TermSymbol t;
  t.two_s = 4;  // quintet
  t.l = 8;      // L
  t.two_j = 12;
  t.parity = Parity::kOdd;
  EXPECT_EQ(t.ToAscii(), "5Lo6");  // U ground level, NIST ASD, from memory
  EXPECT_EQ(t.ToUnicode(), "⁵L°₆");
}

TEST(TermSymbolParse, RejectsMalformedOrImpossibleTerms) {
  for (const char* bad : {
           "5D9",     // J above L + S = 4
           "2P1",     // integer J with half-integer S
           "xD4",     // no multiplicity
           "",        // empty
           "5J4",     // J is not an L letter
           "3P",      // missing J
           "2P3/2x",  // trailing text
           "2P2/2",   // n/2 with even n
           "0S0",     // multiplicity 0
           "3Pe1",    // 'e' is not a parity marker
       }) {
    SCOPED_TRACE(bad);
    absl::StatusOr<TermSymbol> t = TermSymbol::Parse(bad);
    EXPECT_FALSE(t.ok());
    EXPECT_EQ(t.status().code(), absl::StatusCode::kInvalidArgument);
    EXPECT_FALSE(t.status().message().empty());
  }
}

TEST(TermSymbolParse, HostileInputDoesNotCrash) {
  const std::string long_text(10000, '9');
  EXPECT_FALSE(TermSymbol::Parse(long_text).ok());
  const std::string with_nul(
      "2P\0"
      "1/2",
      6);
  EXPECT_FALSE(TermSymbol::Parse(with_nul).ok());
  EXPECT_FALSE(TermSymbol::Parse("\xff\xfe").ok());
}

// A long digit run overflowed int while it was read (undefined behaviour,
// found by UBSan under tests/fuzz/term_symbol_fuzzer). Now the run is
// refused by length, before any arithmetic can overflow.
TEST(TermSymbolParse, LongDigitRunsAreRefusedWithoutSignedOverflow) {
  for (const char* text : {"99999999999999999999S0", "1S99999999999999999999",
                           "2P99999999999/2", "12345D4"}) {
    absl::StatusOr<TermSymbol> t = TermSymbol::Parse(text);
    ASSERT_FALSE(t.ok()) << text;
    EXPECT_EQ(t.status().code(), absl::StatusCode::kInvalidArgument);
    EXPECT_THAT(t.status().message(), HasSubstr("more than 4 digits")) << text;
  }
  // Four digits still read: 2S+1 = 1001 with L = 0 and J = S = 500.
  absl::StatusOr<TermSymbol> wide = TermSymbol::Parse("1001S500");
  ASSERT_TRUE(wide.ok()) << wide.status();
  EXPECT_EQ(wide->two_s, 1000);
  EXPECT_EQ(wide->two_j, 1000);
}

// ---------------------------------------------------------------------------
// HundGroundTerm on whole configurations.
// ---------------------------------------------------------------------------

// Hand-applied Hund's rules (the recipe in term_symbol.h) on configurations
// whose NIST ground levels are also in reference_ground_levels.h.
TEST(HundGroundTerm, CombinesOpenSubshells) {
  // Fe [Ar] 3d6 4s2: 5D4 (NIST ASD ground levels, from memory).
  EXPECT_EQ(HundGroundTerm(ParseOrFail("[Ar] 3d6 4s2")).ToAscii(), "5D4");
  // Cr [Ar] 3d5 4s1: S = 3, L = 0: 7S3 (NIST ASD ground levels, from
  // memory).
  EXPECT_EQ(HundGroundTerm(ParseOrFail("[Ar] 3d5 4s1")).ToAscii(), "7S3");
  // Gd [Xe] 4f7 5d1 6s2: S = 4, L = 2, 8 of 24 open places: J = 2, odd:
  // 9Do2 (NIST ASD ground levels, from memory).
  EXPECT_EQ(HundGroundTerm(ParseOrFail("[Xe] 4f7 5d1 6s2")).ToAscii(), "9Do2");
  // Closed shells give 1S0.
  EXPECT_EQ(HundGroundTerm(ParseOrFail("[Kr]")).ToAscii(), "1S0");
  EXPECT_EQ(HundGroundTerm(Configuration()).ToAscii(), "1S0");
}

TEST(ConfigurationParity, FollowsSumOfL) {
  EXPECT_EQ(ConfigurationParity(ParseOrFail("1s2 2s2 2p1")), Parity::kOdd);
  EXPECT_EQ(ConfigurationParity(ParseOrFail("1s2 2s2 2p2")), Parity::kEven);
  // 4f1 5d1: l sum 5 outside closed shells, odd.
  EXPECT_EQ(ConfigurationParity(ParseOrFail("[Xe] 4f1 5d1 6s2")), Parity::kOdd);
}

// ---------------------------------------------------------------------------
// Ground levels of the neutral atoms.
// ---------------------------------------------------------------------------

TEST(GroundLevels, AllNeutralAtomsMatchReference) {
  // kReferenceGroundLevels: NIST ASD ground levels, from memory.
  for (const ReferenceGroundLevel& row : kReferenceGroundLevels) {
    SCOPED_TRACE(absl::StrCat(row.atomic_number, " ", row.symbol, " (",
                              row.source, ")"));
    AtomDescriptionPtr d = Describe(row.symbol);
    ASSERT_NE(d, nullptr);
    EXPECT_EQ(d->element->atomic_number, row.atomic_number);
    EXPECT_EQ(d->term.ToAscii(), row.level);
    // The level also parses back to the same term.
    absl::StatusOr<TermSymbol> parsed = TermSymbol::Parse(row.level);
    ASSERT_TRUE(parsed.ok()) << parsed.status();
    EXPECT_EQ(d->term, *parsed);
    // A Hund prediction is reported only when it differs from the level.
    if (d->hund_term.has_value()) {
      EXPECT_NE(*d->hund_term, d->term);
      EXPECT_FALSE(d->term_source.empty());
    }
  }
}

TEST(GroundLevels, CeriumDepartsFromHund) {
  AtomDescriptionPtr ce = Describe("Ce");
  ASSERT_NE(ce, nullptr);
  // NIST ASD ground levels, from memory (kReferenceGroundLevels).
  EXPECT_EQ(ce->term.ToAscii(), "1Go4");
  // Hund's rules on [Xe] 4f1 5d1 6s2, by hand: S = 1, L = 3 + 2 = 5,
  // 2 of 24 open places (less than half) so J = |L - S| = 4, l sum 5 odd.
  ASSERT_TRUE(ce->hund_term.has_value());
  EXPECT_EQ(ce->hund_term->ToAscii(), "3Ho4");
  EXPECT_EQ(ce->hund_term->ToUnicode(), "³H°₄");
  EXPECT_FALSE(ce->notes.empty());
}

TEST(GroundLevels, ParityMatchesConfiguration) {
  for (const ReferenceGroundLevel& row : kReferenceGroundLevels) {
    SCOPED_TRACE(row.symbol);
    AtomDescriptionPtr d = Describe(row.symbol);
    ASSERT_NE(d, nullptr);
    EXPECT_EQ(d->term.parity, ConfigurationParity(d->configuration));
  }
}

}  // namespace
}  // namespace shellwright
