// Tests that clients/cli/fast_json.h prints exactly what the protobuf JSON
// printer prints with the CLI's options, for every field kind and for
// every character class that needs escaping.

#include "clients/cli/fast_json.h"

#include <cmath>
#include <cstdlib>
#include <random>
#include <string>

#include "absl/strings/str_format.h"
#include "clients/cli/atom_format.h"
#include "gtest/gtest.h"
#include "server/convert.h"
#include "shellwright/v1/electron_structure.pb.h"

namespace shellwright::cli {
namespace {

std::string Fast(const google::protobuf::Message& m) {
  std::string out;
  AppendCompactJson(m, &out);
  return out;
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

std::string FastDouble(double v) {
  std::string out;
  AppendJsonDouble(v, &out);
  return out;
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

TEST(FastJson, MatchesTheProtobufPrinterOnAllAsciiAndSpecialCharacters) {
  v1::RecordReport r;
  std::string s;
  for (int c = 1; c < 128; ++c) s.push_back(static_cast<char>(c));
  s += "·₂é\u2028\u2029\xe2\x80\xa7";
  r.set_id(s);
  r.set_formula("Fe<2>O&3");
  EXPECT_EQ(Fast(r), ToJson(r, /*pretty=*/false));
}

TEST(FastJson, MatchesOnDoublesOfEveryShape) {
  std::mt19937_64 rng(7);
  std::uniform_real_distribution<double> unit(0, 1);
  const double fixed[] = {
      0, 0.1, 1.0 / 3, 2.5, 1e21, 1e-7, 123456789012345678.0, -0.0, 5e-324,
      1.7976931348623157e308, 7.9372539331937721, 4.898979485566356,
      // Around the switch between fixed and exponent
      // layout, and 15 vs 16-17 significant digits.
      1e-5, 0.0001, 0.00012345, 5.5e-5, 1e14 + 0.5, 999999999999999.9, 1e15,
      1e16, 123456789012345.6, 0.1 + 0.2, 2.2250738585072014e-308, 1.0 / 7};
  for (double v : fixed) {
    v1::RecordReport r;
    r.set_score(v);
    r.set_curie_constant(-v);
    EXPECT_EQ(Fast(r), ToJson(r, false)) << v;
  }
  for (int i = 0; i < 20000; ++i) {
    v1::RecordReport r;
    r.set_score(unit(rng) * std::pow(10.0, static_cast<int>(rng() % 40) - 20));
    EXPECT_EQ(Fast(r), ToJson(r, false));
  }
  // Short decimals m / 10^k, the shape of most stoichiometric counts, on
  // both sides of the printer's fast path (10^-4 and 10^9).
  for (int i = 0; i < 20000; ++i) {
    v1::RecordReport r;
    const int k = 1 + static_cast<int>(rng() % 8);
    const int64_t m = static_cast<int64_t>(rng() % 2000000000000ull);
    r.set_score(static_cast<double>(m) / std::pow(10.0, k) *
                (rng() % 2 ? 1 : -1));
    r.set_curie_constant(static_cast<double>(rng() % 100000) /
                         std::pow(10.0, 1 + static_cast<int>(rng() % 9)));
    EXPECT_EQ(Fast(r), ToJson(r, false))
        << r.score() << " " << r.curie_constant();
  }
}

TEST(FastJson, MatchesOnRealReportsAndDescriptions) {
  for (const char* formula :
       {"Fe3O4", "La0.7Sr0.3MnO3", "CuSO4·5H2O", "Fe2O3)", "NaF2", "AlCoCrFeNi",
        "K3[Fe(CN)6]", "Li0.5CoO2", "Gd2O3", "Pb3O4"}) {
    v1::CompositionRecord record;
    record.set_id(std::string("id-") + formula);
    record.set_formula(formula);
    record.set_max_alternatives(2);
    record.set_measured_moment(3.3);
    v1::RecordReport report;
    AnalyzeRecordToReport(record, &report);
    EXPECT_EQ(Fast(report), ToJson(report, false)) << formula;
  }
  // Messages with oneofs, proto3 optional fields, enums and nested
  // messages.
  v1::DescribeAtomsRequest request;
  request.add_requests()->set_spec("Gd3+");
  request.add_requests()->set_atomic_number(26);
  request.mutable_requests(1)->set_charge(0);
  request.mutable_requests(1)->set_geometry(v1::GEOMETRY_OCTAHEDRAL);
  request.add_requests()->set_spec("Xx");
  EXPECT_EQ(Fast(request), ToJson(request, false));
  v1::DescribeAtomsResponse response;
  ASSERT_TRUE(DescribeAtomsMessage(request, &response).ok());
  EXPECT_EQ(Fast(response), ToJson(response, false));
  v1::ListElementsResponse elements;
  ListElementsMessage(&elements);
  EXPECT_EQ(Fast(elements), ToJson(elements, false));
}

}  // namespace
}  // namespace shellwright::cli
