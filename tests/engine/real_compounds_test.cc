// Real compounds against their published states, units, unpaired electrons,
// spin states and measured moments: tests/engine/data/real_compounds.tsv,
// whose every row names its source. One test per row, so that a failure
// names the compound.

#include <fstream>
#include <map>
#include <ostream>
#include <string>
#include <vector>

#include "absl/strings/numbers.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_split.h"
#include "engine/composition.h"
#include "engine/units.h"
#include "gtest/gtest.h"
#include "tests/testing/subprocess.h"

namespace shellwright {
namespace {

struct Row {
  int line = 0;
  std::string formula, states, units, unpaired, spin, moment, source;
};

std::vector<Row> ReadRows() {
  std::ifstream in(testing::SourcePath("tests/engine/data/real_compounds.tsv"));
  std::vector<Row> rows;
  std::string text;
  bool header = true;
  int line = 0;
  while (std::getline(in, text)) {
    ++line;
    if (text.empty() || text[0] == '#') continue;
    if (header) {
      header = false;
      continue;
    }
    std::vector<std::string> f = absl::StrSplit(text, '\t');
    if (f.size() != 7) {
      ADD_FAILURE() << "line " << line << ": expected 7 fields";
      continue;
    }
    rows.push_back({line, f[0], f[1], f[2], f[3], f[4], f[5], f[6]});
  }
  return rows;
}

// "-1/2" or "+3".
Rational ParseRational(absl::string_view s) {
  if (!s.empty() && s[0] == '+') s.remove_prefix(1);
  int64_t num = 0, den = 1;
  const size_t slash = s.find('/');
  EXPECT_TRUE(absl::SimpleAtoi(s.substr(0, slash), &num)) << s;
  if (slash != absl::string_view::npos) {
    EXPECT_TRUE(absl::SimpleAtoi(s.substr(slash + 1), &den)) << s;
  }
  return Rational(num, den);
}

// Total oxidation state (state x count) and atoms per element: the
// average state compares positional and averaged writings alike.
struct Totals {
  Rational charge;
  Rational atoms;
};

std::map<std::string, Totals> ExpectedTotals(const std::string& states) {
  std::map<std::string, Totals> out;
  for (absl::string_view item : absl::StrSplit(states, ';')) {
    std::vector<absl::string_view> p = absl::StrSplit(item, ':');
    if (p.size() != 3) {
      ADD_FAILURE() << "bad state item " << item;
      continue;
    }
    Totals& t = out[std::string(p[0])];
    const Rational count = ParseRational(p[2]);
    t.charge = t.charge + ParseRational(p[1]) * count;
    t.atoms = t.atoms + count;
  }
  return out;
}

// Names a row in test output.
void PrintTo(const Row& row, std::ostream* os) {
  *os << row.formula << " (line " << row.line << ")";
}

class RealCompound : public ::testing::TestWithParam<Row> {};

TEST_P(RealCompound, MatchesItsSource) {
  const Row& row = GetParam();
  SCOPED_TRACE(absl::StrCat(row.formula, " (real_compounds.tsv line ", row.line,
                            "; ", row.source, ")"));
  CompositionInput in;
  in.formula = row.formula;
  if (row.moment != "-") {
    double m = 0;
    ASSERT_TRUE(absl::SimpleAtod(row.moment, &m));
    in.measured_moment = m;
  }
  const CompositionReport r = AnalyzeComposition(in);
  std::string diagnostics;
  for (const Diagnostic& d : r.diagnostics) {
    absl::StrAppend(&diagnostics, d.code, ": ", d.message, "; ");
  }
  ASSERT_TRUE(r.valid) << diagnostics;
  ASSERT_TRUE(r.assignment.has_value());

  // Average state of each element.
  std::map<std::string, Totals> got;
  for (const AssignedState& s : r.assignment->states) {
    Totals& t = got[std::string(s.element->symbol)];
    t.charge = t.charge + Rational(s.state) * s.count;
    t.atoms = t.atoms + s.count;
  }
  const std::map<std::string, Totals> want = ExpectedTotals(row.states);
  EXPECT_EQ(got.size(), want.size());
  for (const auto& [symbol, w] : want) {
    const auto it = got.find(symbol);
    ASSERT_NE(it, got.end()) << symbol;
    EXPECT_EQ(it->second.atoms, w.atoms) << symbol;
    EXPECT_EQ(it->second.charge, w.charge)
        << symbol << " total state " << it->second.charge.ToString()
        << ", expected " << w.charge.ToString();
  }

  // Units with their counts.
  std::map<std::string, Rational> units_got, units_want;
  for (const AssignedUnit& u : r.assignment->units) {
    units_got[u.unit->name] = units_got[u.unit->name] + u.count;
  }
  if (row.units != "-") {
    for (absl::string_view item : absl::StrSplit(row.units, ';')) {
      const size_t colon = item.rfind(':');
      units_want[std::string(item.substr(0, colon))] =
          ParseRational(item.substr(colon + 1));
    }
  }
  EXPECT_EQ(units_got, units_want);

  // Unpaired electrons per formula unit.
  double unpaired = 0;
  ASSERT_TRUE(absl::SimpleAtod(row.unpaired, &unpaired));
  EXPECT_DOUBLE_EQ(r.unpaired_per_formula_unit, unpaired);

  // Spin state of each d ion with a choice.
  if (row.spin != "-") {
    for (absl::string_view item : absl::StrSplit(row.spin, ';')) {
      std::vector<absl::string_view> p = absl::StrSplit(item, ':');
      ASSERT_EQ(p.size(), 2u) << item;
      const size_t sign = p[0].find_first_of("+-");
      const std::string symbol(p[0].substr(0, sign));
      int state = 0;
      ASSERT_TRUE(absl::SimpleAtoi(p[0].substr(sign), &state)) << item;
      bool found = false;
      for (const IonAnnotation& ion : r.ions) {
        if (ion.element->symbol != symbol || ion.state != state) continue;
        found = true;
        ASSERT_TRUE(ion.description->ligand_field.has_value()) << item;
        EXPECT_EQ(Name(ion.description->ligand_field->splitting.spin_state),
                  p[1])
            << item;
      }
      EXPECT_TRUE(found) << item;
    }
  }

  // The measured moment within the reported range (checked by the
  // report itself: no moment_out_of_range).
  if (row.moment != "-") {
    for (const Diagnostic& d : r.diagnostics) {
      EXPECT_NE(d.code, "moment_out_of_range") << d.message;
    }
  }
}

std::string RowName(const ::testing::TestParamInfo<Row>& info) {
  std::string name = absl::StrCat("line", info.param.line, "_");
  for (char c : info.param.formula) {
    if ((c >= 'A' && c <= 'Z') || (c >= 'a' && c <= 'z') ||
        (c >= '0' && c <= '9')) {
      name += c;
    }
  }
  return name;
}

INSTANTIATE_TEST_SUITE_P(Table, RealCompound, ::testing::ValuesIn(ReadRows()),
                         RowName);

TEST(RealCompounds, TableCoversTheClasses) {
  const std::vector<Row> rows = ReadRows();
  EXPECT_GE(rows.size(), 60u);
  std::map<std::string, int> units;
  for (const Row& row : rows) {
    if (row.units == "-") continue;
    for (absl::string_view item : absl::StrSplit(row.units, ';')) {
      ++units[std::string(item.substr(0, item.rfind(':')))];
    }
  }
  for (const char* name : {"peroxide",
                           "superoxide",
                           "ozonide",
                           "disulfide",
                           "acetylide",
                           "dimercury(2+)",
                           "azide",
                           "cyanide",
                           "thiocyanate",
                           "ammonium",
                           "methylammonium",
                           "cyclopentadienide",
                           "hydroxide",
                           "nitrate",
                           "sulfate",
                           "carbonate",
                           "phosphate",
                           "acetate",
                           "oxalate",
                           "tetrafluoroborate",
                           "hexafluorophosphate",
                           "tetrahydroborate",
                           "water",
                           "ammonia",
                           "carbon monoxide",
                           "ethylenediamine",
                           "diethylenetriamine",
                           "2,2':6',2''-terpyridine",
                           "glycinate",
                           "ethylenediaminetetraacetate"}) {
    EXPECT_GT(units[name], 0) << name;
  }
}

}  // namespace
}  // namespace shellwright
