// Tests for api/records.h: every record gets exactly one report, with its
// id echoed, through the composition engine; the record translation; and
// the report for a line that is not a record.

#include "api/records.h"

#include <string>

#include "gmock/gmock.h"
#include "gtest/gtest.h"
#include "tests/testing/utf8_check.h"

namespace shellwright {
namespace {

using ::testing::HasSubstr;

TEST(Records, EchoesIdAndAnalyses) {
  v1::CompositionRecord record;
  record.set_id("sample-7");
  record.set_formula("LiFePO4");
  record.set_row(12);
  v1::RecordReport report;
  AnalyzeRecord(record, &report);
  EXPECT_EQ(report.id(), "sample-7");
  EXPECT_EQ(report.row(), 12);
  EXPECT_TRUE(report.valid());
  EXPECT_EQ(report.formula(), "LiFePO4");
  EXPECT_EQ(report.composition_kind(), "ionic");
  // Li+ Fe2+ P5+ O2- (Greenwood and Earnshaw, from memory).
  ASSERT_EQ(report.oxidation_states_size(), 4);
  EXPECT_EQ(report.oxidation_states(1).element(), "Fe");
  EXPECT_EQ(report.oxidation_states(1).state(), 2);
  EXPECT_EQ(report.oxidation_states(1).count_exact(), "1");
}

TEST(Records, ClearsThePreviousReport) {
  v1::RecordReport report;
  report.set_id("stale");
  report.set_valid(true);
  AnalyzeRecord(v1::CompositionRecord(), &report);
  EXPECT_EQ(report.id(), "");
  EXPECT_FALSE(report.valid());  // An empty formula is an error.
  ASSERT_GE(report.diagnostics_size(), 1);
  EXPECT_EQ(report.diagnostics(0).code(), codes::kEmptyFormula);
  EXPECT_EQ(report.diagnostics(0).severity(), "error");
}

TEST(Records, EchoesIdsBytewise) {
  v1::CompositionRecord record;
  record.set_id(std::string("a\0b", 3));
  record.set_formula("NaCl");
  v1::RecordReport report;
  AnalyzeRecord(record, &report);
  EXPECT_EQ(report.id(), std::string("a\0b", 3));
}

TEST(Records, TranslationKeepsUnsetFieldsUnsetAndClampsAlternatives) {
  v1::CompositionRecord record;
  record.set_formula("Fe3O4");
  CompositionInput unset = CompositionInputFromProto(record);
  EXPECT_FALSE(unset.net_charge.has_value());
  EXPECT_FALSE(unset.measured_moment.has_value());
  EXPECT_FALSE(unset.moment_tolerance.has_value());
  EXPECT_EQ(unset.max_alternatives, 0);
  record.set_charge(0);
  record.set_measured_moment(0);
  record.set_max_alternatives(99);
  CompositionInput set = CompositionInputFromProto(record);
  EXPECT_EQ(set.net_charge, 0);
  EXPECT_EQ(set.measured_moment, 0.0);
  EXPECT_EQ(set.max_alternatives, kMaxAlternatives);
  record.set_max_alternatives(-3);
  EXPECT_EQ(CompositionInputFromProto(record).max_alternatives, 0);
}

TEST(Records, ReportWithoutAnAssignmentSetsOnlyTheVerdict) {
  v1::CompositionRecord record;
  record.set_id("r");
  record.set_formula("NaF2");
  v1::RecordReport report;
  AnalyzeRecord(record, &report);
  EXPECT_FALSE(report.valid());
  EXPECT_EQ(report.composition_kind(), "");
  EXPECT_EQ(report.oxidation_states_size(), 0);
  EXPECT_EQ(report.ions_size(), 0);
  EXPECT_EQ(report.diagnostics(0).code(), codes::kChargeNotBalanced);
}

TEST(Records, EchoedFormulaIsCutAtACharacterBoundary) {
  // The formula limit falls inside the two-byte '·'.
  v1::CompositionRecord record;
  record.set_formula(std::string(kMaxFormulaLength - 1, 'C') + "\xc2\xb7H2O");
  EXPECT_EQ(EchoedFormula(record), std::string(kMaxFormulaLength - 1, 'C'));
  v1::RecordReport report;
  AnalyzeRecord(record, &report);
  EXPECT_TRUE(testing::IsWellFormedUtf8(report.formula()));
}

TEST(Records, MalformedLineReportNamesTheRowAndProblem) {
  v1::CompositionRecord partial;
  partial.set_row(17);
  partial.set_id("s-17");
  partial.set_formula("Fe2O3");
  v1::RecordReport report;
  report.set_score(5);  // Cleared.
  MalformedRecordReport(partial, "line has 3 fields, the header 5", &report);
  EXPECT_EQ(report.id(), "s-17");
  EXPECT_EQ(report.row(), 17);
  EXPECT_EQ(report.formula(), "Fe2O3");
  EXPECT_FALSE(report.valid());
  EXPECT_EQ(report.score(), 0);
  ASSERT_EQ(report.diagnostics_size(), 1);
  EXPECT_EQ(report.diagnostics(0).severity(), "error");
  EXPECT_EQ(report.diagnostics(0).code(), codes::kMalformedRecord);
  EXPECT_EQ(report.diagnostics(0).message(),
            "row 17: line has 3 fields, the header 5");
}

TEST(Records, MalformedLineReportCutsAtCharacterBoundaries) {
  // Regression: the echoed formula of a malformed line was cut at 1024
  // bytes with substr, which could split a character and make the report
  // invalid UTF-8.
  v1::CompositionRecord partial;
  partial.set_formula(std::string(kMaxFormulaLength - 1, 'O') + "é");
  partial.set_id(std::string(kMaxRecordIdLength - 1, 'i') + "é");
  v1::RecordReport report;
  MalformedRecordReport(partial, "broken", &report);
  EXPECT_EQ(report.formula(), std::string(kMaxFormulaLength - 1, 'O'));
  EXPECT_EQ(report.id(), std::string(kMaxRecordIdLength - 1, 'i'));
  EXPECT_THAT(report.diagnostics(0).message(), HasSubstr("broken"));
}

// States and ions with the same key are built once per thread and copied
// (api/records.cc): each copy must carry its own record's counts.
TEST(Records, RegressionKeptStatesAndIonsCarryTheirOwnCounts) {
  v1::RecordReport first, second, again;
  v1::CompositionRecord record;
  record.set_formula("Fe2O3");
  AnalyzeRecord(record, &first);
  record.set_formula("FeO1.5");
  AnalyzeRecord(record, &second);
  record.set_formula("Fe2O3");
  AnalyzeRecord(record, &again);
  // Fe(III) oxide either way (Greenwood and Earnshaw, from memory).
  ASSERT_EQ(first.oxidation_states_size(), 2);
  ASSERT_EQ(second.oxidation_states_size(), 2);
  EXPECT_EQ(first.oxidation_states(0).count_exact(), "2");
  EXPECT_EQ(second.oxidation_states(0).count_exact(), "1");
  EXPECT_EQ(second.oxidation_states(1).count_exact(), "3/2");
  EXPECT_EQ(second.oxidation_states(1).count(), 1.5);
  ASSERT_EQ(first.ions_size(), second.ions_size());
  ASSERT_GE(first.ions_size(), 1);
  EXPECT_EQ(first.ions(0).count(), 2);
  EXPECT_EQ(second.ions(0).count(), 1);
  EXPECT_EQ(first.ions(0).species(), second.ions(0).species());
  EXPECT_EQ(first.SerializeAsString(), again.SerializeAsString());
}

// An ion whose d count has one spin state in its geometry gets no spin
// state label: Zn2+ (d10), Ti4+ (d0) and Cr3+ (octahedral d3), while
// low-spin Co3+ in LaCoO3 keeps "low" (Greenwood and Earnshaw, Chemistry of
// the Elements, from memory).
TEST(Records, SpinStateOnlyWhereTheDCountHasAChoice) {
  const struct {
    const char* formula;
    const char* species;
    const char* spin_state;
  } kCases[] = {{"ZnO", "Zn2+", ""},
                {"TiO2", "Ti4+", ""},
                {"Cr2O3", "Cr3+", ""},
                {"LaCoO3", "Co3+", "low"}};
  for (const auto& c : kCases) {
    v1::CompositionRecord record;
    record.set_formula(c.formula);
    v1::RecordReport report;
    AnalyzeRecord(record, &report);
    bool seen = false;
    for (const v1::IonReport& ion : report.ions()) {
      if (ion.species() != c.species) continue;
      seen = true;
      EXPECT_EQ(ion.spin_state(), c.spin_state) << c.formula;
      EXPECT_EQ(ion.geometry(), "octahedral") << c.formula;
    }
    EXPECT_TRUE(seen) << c.formula;
  }
}

}  // namespace
}  // namespace shellwright
