// Tests for api/report_mask.h: the fields a mask may name are the
// RecordReport's own, read from the report walk; every field can be asked
// for alone and comes exactly as in the full report while the others stay
// at their defaults; a path that names no field is an error naming it.

#include "api/report_mask.h"

#include <string>
#include <vector>

#include "api/records.h"
#include "gmock/gmock.h"
#include "google/protobuf/descriptor.h"
#include "google/protobuf/util/message_differencer.h"
#include "gtest/gtest.h"

namespace shellwright {
namespace {

using ::google::protobuf::FieldDescriptor;
using ::testing::ElementsAre;
using ::testing::HasSubstr;

// Records whose full reports, between them, give every field a value
// other than its default (checked below, so that the tests can fail):
// magnetite with an alternative and a measured moment; a cyanide complex
// (a unit). The checks compare masked with full reports, not with outside
// values.
std::vector<v1::CompositionRecord> Records() {
  std::vector<v1::CompositionRecord> records(3);
  records[0].set_id("magnetite");
  records[0].set_row(7);
  records[0].set_formula("Fe3O4");
  records[0].set_measured_moment(9.1);
  records[0].set_max_alternatives(2);
  records[1].set_id("ferrocyanide");
  records[1].set_row(8);
  records[1].set_formula("K4[Fe(CN)6]");
  // A metallic phase: the moment model's fields.
  records[2].set_id("heusler");
  records[2].set_row(9);
  records[2].set_formula("Co2MnAl");
  return records;
}

bool IsSet(const v1::RecordReport& report, const FieldDescriptor* f) {
  const auto* reflection = report.GetReflection();
  return f->is_repeated() ? reflection->FieldSize(report, f) > 0
                          : reflection->HasField(report, f);
}

TEST(ReportMask, FieldNamesAreTheRecordReportFieldsInDeclarationOrder) {
  const google::protobuf::Descriptor* d = v1::RecordReport::descriptor();
  std::vector<std::string> declared;
  for (int i = 0; i < d->field_count(); ++i) {
    declared.push_back(d->field(i)->name());
  }
  EXPECT_EQ(ReportMask::FieldNames(), declared);
}

TEST(ReportMask, EmptyMaskIsEveryField) {
  absl::StatusOr<ReportMask> mask =
      ReportMask::FromFieldMask(google::protobuf::FieldMask());
  ASSERT_TRUE(mask.ok()) << mask.status();
  EXPECT_TRUE(mask->all());
  EXPECT_TRUE(mask->Paths().empty());
  EXPECT_TRUE(ReportMask().all());
  for (const std::string& name : ReportMask::FieldNames()) {
    EXPECT_TRUE(mask->Has(name)) << name;
  }
}

TEST(ReportMask, EveryFieldAloneComesAsInTheFullReport) {
  std::vector<v1::RecordReport> full;
  for (const v1::CompositionRecord& record : Records()) {
    AnalyzeRecord(record, &full.emplace_back());
  }
  const google::protobuf::Descriptor* d = v1::RecordReport::descriptor();
  for (const std::string& name : ReportMask::FieldNames()) {
    SCOPED_TRACE(name);
    const FieldDescriptor* field = d->FindFieldByName(name);
    ASSERT_NE(field, nullptr);
    google::protobuf::FieldMask paths;
    paths.add_paths(name);
    absl::StatusOr<ReportMask> mask = ReportMask::FromFieldMask(paths);
    ASSERT_TRUE(mask.ok()) << mask.status();
    EXPECT_FALSE(mask->all());
    EXPECT_THAT(mask->Paths(), ElementsAre(name));
    bool ever_set = false;
    for (size_t i = 0; i < full.size(); ++i) {
      v1::RecordReport masked;
      AnalyzeRecord(Records()[i], &masked, *mask);
      // The full report with every other field cleared.
      v1::RecordReport expected = full[i];
      for (int f = 0; f < d->field_count(); ++f) {
        if (d->field(f) != field) {
          expected.GetReflection()->ClearField(&expected, d->field(f));
        }
      }
      EXPECT_TRUE(
          google::protobuf::util::MessageDifferencer::Equals(masked, expected))
          << masked.DebugString() << "\nexpected:\n"
          << expected.DebugString();
      ever_set |= IsSet(full[i], field);
    }
    EXPECT_TRUE(ever_set) << "no test record gives " << name << " a value";
  }
}

TEST(ReportMask, SeveralFieldsAndRepeatsAndWith) {
  absl::StatusOr<ReportMask> mask =
      ReportMask::FromPaths({"diagnostics", "valid", "valid"});
  ASSERT_TRUE(mask.ok()) << mask.status();
  // In the walk's order, whatever the order asked in.
  EXPECT_THAT(mask->Paths(), ElementsAre("valid", "diagnostics"));
  EXPECT_FALSE(mask->Has("ions"));
  EXPECT_FALSE(mask->Has("no_such_field"));
  EXPECT_THAT(mask->With("id").Paths(),
              ElementsAre("id", "valid", "diagnostics"));
  google::protobuf::FieldMask out;
  mask->ToFieldMask(&out);
  EXPECT_THAT(out.paths(), ElementsAre("valid", "diagnostics"));
  // Naming every field is the same as naming none.
  absl::StatusOr<ReportMask> every =
      ReportMask::FromPaths(absl::MakeConstSpan(ReportMask::FieldNames()));
  ASSERT_TRUE(every.ok());
  EXPECT_TRUE(every->all());
}

TEST(ReportMask, FromListTrimsBlanksAndRefusesEmptyNames) {
  absl::StatusOr<ReportMask> mask = ReportMask::FromList(" valid , ions");
  ASSERT_TRUE(mask.ok()) << mask.status();
  EXPECT_THAT(mask->Paths(), ElementsAre("valid", "ions"));
  for (const char* bad : {"", "valid,", "valid,,ions"}) {
    absl::StatusOr<ReportMask> refused = ReportMask::FromList(bad);
    ASSERT_FALSE(refused.ok()) << bad;
    EXPECT_THAT(refused.status().message(),
                HasSubstr("report_mask: an empty field name"));
  }
  EXPECT_THAT(ReportMask::FromList("valid,nope").status().message(),
              HasSubstr("'nope'"));
}

TEST(ReportMask, UnknownPathIsInvalidArgumentNamingIt) {
  for (const char* bad : {"validity", "ions.moment", "", "Valid"}) {
    SCOPED_TRACE(bad);
    absl::StatusOr<ReportMask> mask = ReportMask::FromPaths({"valid", bad});
    ASSERT_FALSE(mask.ok());
    EXPECT_EQ(mask.status().code(), absl::StatusCode::kInvalidArgument);
    EXPECT_THAT(mask.status().message(), HasSubstr("report_mask: "));
    EXPECT_THAT(mask.status().message(),
                HasSubstr(std::string("'") + bad + "'"));
    // The message lists the fields there are.
    EXPECT_THAT(mask.status().message(),
                HasSubstr("valence_electron_concentration"));
  }
}

}  // namespace
}  // namespace shellwright
