// Tests that clients/cli/fast_json.h writes strings and doubles exactly as
// the protobuf JSON printer does (with the CLI's options), for every
// character class that needs escaping and doubles of every shape, and
// doubles as printf's %.15g-else-%.17g rule gives them.

#include "clients/cli/fast_json.h"

#include <cmath>
#include <cstdlib>
#include <limits>
#include <random>
#include <string>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "clients/cli/atom_format.h"
#include "gtest/gtest.h"
#include "shellwright/v1/electron_structure.pb.h"

namespace shellwright::cli {
namespace {

std::string JsonString(absl::string_view s) {
  std::string out(JsonStringBound(s.size()), '\0');
  out.resize(WriteJsonString(s, &out[0]) - out.data());
  return out;
}

std::string FastDouble(double v) {
  char buf[kJsonDoubleMax];
  return std::string(buf, WriteJsonDouble(v, buf));
}

// What the protobuf printer writes for a Diagnostic whose severity is `s`,
// and what the same object is with `s` written by WriteJsonString.
void ExpectStringMatchesPrinter(const std::string& s) {
  v1::Diagnostic d;
  d.set_severity(s);
  EXPECT_EQ(absl::StrCat("{\"severity\":", JsonString(s),
                         ",\"code\":\"\",\"message\":\"\",\"column\":0}"),
            ToJson(d, /*pretty=*/false));
}

// Likewise for a double, as an OxidationAssignment's score.
void ExpectDoubleMatchesPrinter(double v) {
  v1::OxidationAssignment a;
  a.set_score(v);
  EXPECT_EQ(absl::StrCat("{\"oxidation_states\":[],\"score\":", FastDouble(v),
                         ",\"uncommon_states\":0,"
                         "\"electronegativity_inconsistencies\":0}"),
            ToJson(a, /*pretty=*/false))
      << absl::StrFormat("%.17g", v);
}

// The protobuf printer's rule for doubles, restated with printf: %.15g if
// it reads back as the same value, else %.17g.
std::string PrintfRule(double v) {
  std::string text = absl::StrFormat("%.15g", v);
  if (std::strtod(text.c_str(), nullptr) != v) {
    text = absl::StrFormat("%.17g", v);
  }
  return text;
}

TEST(FastJson, DoublesFollowThePrintfRuleAcrossTheExactRange) {
  std::mt19937_64 rng(2026);
  std::uniform_real_distribution<double> mantissa(1, 10);
  for (int i = 0; i < 300000; ++i) {
    // Every decade of the exact path (1e-4 to 1e15) and a little beyond,
    // with 1 to 17 significant digits.
    const int decade = static_cast<int>(rng() % 21) - 5;
    double v = mantissa(rng) * std::pow(10.0, decade);
    const int digits = 1 + static_cast<int>(rng() % 17);
    v = std::stod(absl::StrFormat("%.*g", digits, v));
    if (rng() % 2) v = -v;
    ASSERT_EQ(FastDouble(v), PrintfRule(v)) << absl::StrFormat("%.17g", v);
  }
  // Around powers of ten and the range ends, where the decimal exponent
  // and the rounding can cross over.
  for (int e = -5; e <= 16; ++e) {
    const double p = std::pow(10.0, e);
    double v = p;
    for (int step = 0; step < 40; ++step) v = std::nextafter(v, 0.0);
    for (int step = 0; step < 80; ++step) {
      ASSERT_EQ(FastDouble(v), PrintfRule(v)) << absl::StrFormat("%.17g", v);
      v = std::nextafter(v, 1e300);
    }
  }
  for (double v :
       {0.99999999999999994, 9.9999999999999995e-5, 1e-4, 999999999999999.88,
        0.5, 0.25, 0.125, 2.5e-4, 1.0000000000000002, 0.30000000000000004}) {
    EXPECT_EQ(FastDouble(v), PrintfRule(v)) << absl::StrFormat("%.17g", v);
  }
}

TEST(FastJson, ShortDecimalsAndTheirNeighboursFollowThePrintfRule) {
  // Decimals of up to six places (the shape of counts and most figures),
  // and the doubles next to them, which are not such decimals.
  std::mt19937_64 rng(11);
  for (int i = 0; i < 200000; ++i) {
    const int places = 1 + static_cast<int>(rng() % 6);
    const int64_t n = static_cast<int64_t>(rng() % 1000000000000ull);
    double v = static_cast<double>(n) / std::pow(10.0, places);
    if (rng() % 2) v = -v;
    ASSERT_EQ(FastDouble(v), PrintfRule(v)) << absl::StrFormat("%.17g", v);
    const double up = std::nextafter(v, 1e300);
    ASSERT_EQ(FastDouble(up), PrintfRule(up)) << absl::StrFormat("%.17g", up);
    const double down = std::nextafter(v, -1e300);
    ASSERT_EQ(FastDouble(down), PrintfRule(down))
        << absl::StrFormat("%.17g", down);
  }
}

TEST(FastJson, StringsMatchTheProtobufPrinterWhereverTheEscapeFalls) {
  // Plain text is skipped eight bytes at a time: each character that
  // needs an escape (and neighbours of those that do not), at every
  // offset of a longer string.
  for (const char* special :
       {"\"", "\\", "\n", "\x01", "\x1f", "\x7f", "<", ">", "=", ";", "?",
        "\u2028", "\u2029", "\xe2\x80\xa7", "\xc2\xb7", " "}) {
    for (int offset = 0; offset < 20; ++offset) {
      std::string s(offset, 'x');
      s += special;
      s += "abcdefghijklmnopq";
      ExpectStringMatchesPrinter(s);
    }
  }
}

TEST(FastJson, StringsMatchTheProtobufPrinterOnEveryCharacterClass) {
  std::string all;
  for (int c = 1; c < 128; ++c) all.push_back(static_cast<char>(c));
  ExpectStringMatchesPrinter(all);
  for (const char* s : {"", "Fe<2>O&3", "·₂é", "\u2028\u2029", "\xe2\x80\xa7",
                        "a\"b\\c", "\x7f\x01\x1f", "CuSO4·5H2O"}) {
    ExpectStringMatchesPrinter(s);
  }
}

TEST(FastJson, DoublesMatchTheProtobufPrinterOnEveryShape) {
  std::mt19937_64 rng(7);
  std::uniform_real_distribution<double> unit(0, 1);
  const double fixed[] = {
      0, 0.1, 1.0 / 3, 2.5, 1e21, 1e-7, 123456789012345678.0, -0.0, 5e-324,
      1.7976931348623157e308, 7.9372539331937721, 4.898979485566356,
      // Around the switch between fixed and exponent layout, and 15 vs
      // 16-17 significant digits.
      1e-5, 0.0001, 0.00012345, 5.5e-5, 1e14 + 0.5, 999999999999999.9, 1e15,
      1e16, 123456789012345.6, 0.1 + 0.2, 2.2250738585072014e-308, 1.0 / 7,
      std::numeric_limits<double>::quiet_NaN(),
      std::numeric_limits<double>::infinity()};
  for (double v : fixed) {
    ExpectDoubleMatchesPrinter(v);
    ExpectDoubleMatchesPrinter(-v);
  }
  for (int i = 0; i < 20000; ++i) {
    ExpectDoubleMatchesPrinter(
        unit(rng) * std::pow(10.0, static_cast<int>(rng() % 40) - 20));
  }
  // Short decimals m / 10^k, the shape of most stoichiometric counts.
  for (int i = 0; i < 20000; ++i) {
    const int k = 1 + static_cast<int>(rng() % 8);
    const int64_t m = static_cast<int64_t>(rng() % 2000000000000ull);
    ExpectDoubleMatchesPrinter(static_cast<double>(m) / std::pow(10.0, k) *
                               (rng() % 2 ? 1 : -1));
  }
}

}  // namespace
}  // namespace shellwright::cli
