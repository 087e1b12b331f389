// Tests for server/records.cc: every record gets exactly one report, with
// its id echoed, through the composition engine.

#include "server/records.h"

#include "gtest/gtest.h"

namespace shellwright {
namespace {

TEST(Records, EchoesIdAndAnalyses) {
  v1::CompositionRecord record;
  record.set_id("sample-7");
  record.set_formula("LiFePO4");
  v1::RecordReport report;
  AnalyzeRecordMessage(record, &report);
  EXPECT_EQ(report.id(), "sample-7");
  EXPECT_TRUE(report.valid());
  EXPECT_EQ(report.formula(), "LiFePO4");
}

TEST(Records, ClearsThePreviousReport) {
  v1::RecordReport report;
  report.set_id("stale");
  report.set_valid(true);
  AnalyzeRecordMessage(v1::CompositionRecord(), &report);
  EXPECT_EQ(report.id(), "");
  EXPECT_FALSE(report.valid());  // An empty formula is an error.
  ASSERT_GE(report.diagnostics_size(), 1);
  EXPECT_EQ(report.diagnostics(0).code(), "empty_formula");
}

TEST(Records, EchoesIdsBytewise) {
  v1::CompositionRecord record;
  record.set_id(std::string("a\0b", 3));
  record.set_formula("NaCl");
  v1::RecordReport report;
  AnalyzeRecordMessage(record, &report);
  EXPECT_EQ(report.id(), std::string("a\0b", 3));
}

}  // namespace
}  // namespace shellwright
