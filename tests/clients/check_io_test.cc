// Tests for clients/cli/check_io.h: formats from names and extensions,
// opening inputs (the CSV header first), parsing lines, and checked
// writes.

#include "clients/cli/check_io.h"

#include <signal.h>
#include <unistd.h>

#include <chrono>
#include <filesystem>
#include <string>
#include <thread>

#include "gmock/gmock.h"
#include "gtest/gtest.h"
#include "tests/testing/temp_dir.h"
#include "util/stop_signals.h"

namespace shellwright::cli {
namespace {

using ::testing::HasSubstr;

TEST(CheckIo, FormatsComeFromTheFlagOrTheExtension) {
  EXPECT_EQ(*InputFormat("a.csv", RecordFormat::kAuto), RecordFormat::kCsv);
  EXPECT_EQ(*InputFormat("a.CSV", RecordFormat::kAuto), RecordFormat::kCsv);
  EXPECT_EQ(*InputFormat("a.ndjson", RecordFormat::kAuto),
            RecordFormat::kJsonl);
  EXPECT_EQ(*InputFormat("a.txt", RecordFormat::kCsv), RecordFormat::kCsv);
  absl::StatusOr<RecordFormat> unknown = InputFormat("-", RecordFormat::kAuto);
  EXPECT_EQ(unknown.status().code(), absl::StatusCode::kInvalidArgument);
  EXPECT_THAT(std::string(unknown.status().message()), HasSubstr("--format"));
  EXPECT_EQ(*OutputFormat("out.csv", RecordFormat::kAuto), RecordFormat::kCsv);
  EXPECT_EQ(*OutputFormat("-", RecordFormat::kAuto), RecordFormat::kJsonl);
  EXPECT_EQ(*OutputFormat("out.csv", RecordFormat::kJsonl),
            RecordFormat::kJsonl);
  EXPECT_EQ(*OutputFormat("out.xlsx", RecordFormat::kCsv), RecordFormat::kCsv);
}

TEST(CheckIo, RegressionUnknownOutputExtensionIsNotWrittenAsJsonl) {
  // Issue 16: `--out reports.xlsx` silently wrote JSONL under that name.
  for (const char* path : {"reports.xlsx", "reports.tsv", "reports"}) {
    absl::StatusOr<RecordFormat> f = OutputFormat(path, RecordFormat::kAuto);
    EXPECT_EQ(f.status().code(), absl::StatusCode::kInvalidArgument) << path;
    EXPECT_THAT(std::string(f.status().message()), HasSubstr("--out-format"));
    EXPECT_THAT(std::string(f.status().message()), HasSubstr(path));
  }
}

TEST(CheckIo, InputReadsTheCsvHeaderFirst) {
  testing::TempDir dir;
  EXPECT_EQ(RecordInput::Open(dir.File("absent.csv"), RecordFormat::kAuto)
                .status()
                .code(),
            absl::StatusCode::kNotFound);
  absl::StatusOr<std::unique_ptr<RecordInput>> no_formula = RecordInput::Open(
      dir.Write("no_formula.csv", "id,charge\na,1\n"), RecordFormat::kAuto);
  EXPECT_EQ(no_formula.status().code(), absl::StatusCode::kInvalidArgument);
  EXPECT_THAT(std::string(no_formula.status().message()), HasSubstr("formula"));
  EXPECT_THAT(std::string(RecordInput::Open(dir.Write("empty.csv", "\n\n"),
                                            RecordFormat::kAuto)
                              .status()
                              .message()),
              HasSubstr("no header"));

  // Lines after the header keep their physical row numbers.
  absl::StatusOr<std::unique_ptr<RecordInput>> input =
      RecordInput::Open(dir.Write("ok.csv", "\nid,formula\na,NaCl\n\nb,MgO\n"),
                        RecordFormat::kAuto);
  ASSERT_TRUE(input.ok()) << input.status();
  EXPECT_EQ((*input)->format(), RecordFormat::kCsv);
  EXPECT_GT((*input)->size(), 0);
  RecordParser parser(**input, /*default_alternatives=*/3);
  std::string line;
  int row = 0;
  bool too_long = false;
  std::vector<ParsedLine> records;
  while ((*input)->NextLine(&line, &row, &too_long)) {
    if (!line.empty()) records.push_back(parser.Parse(line, row, too_long));
  }
  EXPECT_TRUE((*input)->status().ok());
  ASSERT_EQ(records.size(), 2u);
  EXPECT_EQ(records[0].record.formula(), "NaCl");
  EXPECT_EQ(records[0].record.row(), 3);
  EXPECT_EQ(records[1].record.id(), "b");
  EXPECT_EQ(records[1].record.row(), 5);
  EXPECT_EQ(records[1].record.max_alternatives(), 3);
}

TEST(CheckIo, ParserReadsJsonlAndFlagsCutLines) {
  testing::TempDir dir;
  absl::StatusOr<std::unique_ptr<RecordInput>> input =
      RecordInput::Open(dir.Write("in.jsonl", ""), RecordFormat::kAuto);
  ASSERT_TRUE(input.ok()) << input.status();
  RecordParser parser(**input, 0);
  ParsedLine good = parser.Parse(
      R"({"id":"j","formula":"KBr","max_alternatives":2})", 1, false);
  EXPECT_TRUE(good.error.empty()) << good.error;
  EXPECT_EQ(good.record.max_alternatives(), 2);  // Its own, not the default.
  ParsedLine cut = parser.Parse(R"({"id":"j","formula":"KBr"})", 2, true);
  EXPECT_THAT(cut.error, HasSubstr("longer than"));
  EXPECT_FALSE(parser.Parse("not json", 3, false).error.empty());
}

TEST(CheckIo, ParsingIntoAUsedLineKeepsNothingOfTheLineBefore) {
  // check's workers parse each batch into the lines of the batch before.
  testing::TempDir dir;
  absl::StatusOr<std::unique_ptr<RecordInput>> input = RecordInput::Open(
      dir.Write("in.csv",
                "id,formula,charge,geometry,measured_moment,Formla\n"),
      RecordFormat::kAuto);
  ASSERT_TRUE(input.ok()) << input.status();
  RecordParser parser(**input, /*default_alternatives=*/1);
  ParsedLine line;
  parser.Parse("full,FeO,1,octahedral,4.9,x", 2, false, &line);
  ASSERT_TRUE(line.error.empty()) << line.error;
  ASSERT_EQ(line.record.geometry(), "octahedral");
  ASSERT_TRUE(line.record.has_measured_moment());

  parser.Parse("bare,MgO,,,,", 3, false, &line);
  EXPECT_TRUE(line.error.empty()) << line.error;
  EXPECT_EQ(line.record.id(), "bare");
  EXPECT_EQ(line.record.formula(), "MgO");
  EXPECT_EQ(line.record.row(), 3);
  EXPECT_EQ(line.record.charge(), 0);
  EXPECT_EQ(line.record.geometry(), "");
  EXPECT_FALSE(line.record.has_measured_moment());
  EXPECT_EQ(line.record.max_alternatives(), 1);

  parser.Parse("broken,\"MgO,,,,", 4, false, &line);
  EXPECT_THAT(line.error, HasSubstr("quote"));
  parser.Parse("again,NaCl,,,,", 5, false, &line);
  EXPECT_TRUE(line.error.empty()) << line.error;
  EXPECT_EQ(line.record.formula(), "NaCl");
  // The by-value form reads the same.
  EXPECT_EQ(parser.Parse("again,NaCl,,,,", 5, false).record.SerializeAsString(),
            line.record.SerializeAsString());
}

TEST(CheckIo, RegressionJsonTypeErrorsNameTheFieldInPlainWords) {
  // Issue 16: {"id":9} gave "invalid value 9 for type TYPE_STRING" and
  // [1,2] "Root element must be a message."
  ParsedLine id = ParseJsonLine(R"({"id":9,"formula":"MgO"})", 1);
  EXPECT_EQ(id.error,
            "field 'id' must be text in double quotes, but holds a "
            "number 9");
  ParsedLine list = ParseJsonLine("[1,2]", 2);
  EXPECT_THAT(list.error, HasSubstr("one JSON object per line"));
  EXPECT_THAT(list.error, HasSubstr("holds a list"));
  ParsedLine charge =
      ParseJsonLine(R"({"id":"c","formula":"MgO","charge":1.5})", 3);
  EXPECT_THAT(charge.error, HasSubstr("field 'charge' must be a whole number"));
  EXPECT_EQ(charge.record.id(), "c");  // Kept, to match report and record.
  ParsedLine moment =
      ParseJsonLine(R"({"id":"m","formula":"MgO","measured_moment":"x"})", 4);
  EXPECT_THAT(moment.error,
              HasSubstr("field 'measured_moment' must be a number"));
  // Numbers in quotes are what protobuf's JSON form allows for numbers.
  ParsedLine quoted =
      ParseJsonLine(R"({"id":"q","formula":"MgO","charge":"2"})", 5);
  EXPECT_TRUE(quoted.error.empty()) << quoted.error;
}

TEST(CheckIo, RegressionUnknownKeysWarnWithDidYouMean) {
  // Issue 16: {"id":"j8","Formula":"MgO"} was silently read as a record
  // without a formula.
  ParsedLine p = ParseJsonLine(R"({"id":"j8","Formula":"MgO","note":"x"})", 1);
  EXPECT_TRUE(p.error.empty()) << p.error;
  ASSERT_EQ(p.warnings.size(), 2u);
  EXPECT_EQ(p.warnings[0].code, "unknown_field");
  EXPECT_THAT(p.warnings[0].message, HasSubstr("'Formula'"));
  EXPECT_THAT(p.warnings[0].message, HasSubstr("did you mean 'formula'?"));
  EXPECT_THAT(p.warnings[1].message, HasSubstr("'note'"));
  EXPECT_THAT(p.warnings[1].message, ::testing::Not(HasSubstr("did you mean")));
  // The JSON names protobuf accepts are fields, not unknown keys.
  EXPECT_TRUE(
      ParseJsonLine(R"({"id":"a","formula":"NaCl","declaredStates":"Na:1"})", 2)
          .warnings.empty());
  EXPECT_EQ(NearestRecordField("Measured Moment"), "measured_moment");
  EXPECT_EQ(NearestRecordField("formla"), "formula");
  EXPECT_EQ(NearestRecordField("colour"), "");
}

TEST(CheckIo, UnknownCsvColumnsAreListedOnce) {
  CsvRecordReader reader;
  ASSERT_TRUE(reader.ReadHeader("id,Formla,formula,notes").ok());
  ASSERT_EQ(reader.unknown_columns().size(), 2u);
  EXPECT_THAT(reader.unknown_columns()[0],
              HasSubstr("'Formla' is not a record field"));
  EXPECT_THAT(reader.unknown_columns()[0], HasSubstr("did you mean 'formula'"));
  EXPECT_THAT(reader.unknown_columns()[1], HasSubstr("'notes'"));
}

TEST(CheckIo, OutputWritesEveryByteAndReportsFailures) {
  testing::TempDir dir;
  absl::StatusOr<std::unique_ptr<ReportOutput>> out =
      ReportOutput::Open(dir.File("out.jsonl"));
  ASSERT_TRUE(out.ok()) << out.status();
  const std::string text(1 << 20, 'x');
  EXPECT_TRUE((*out)->Write(text).ok());
  EXPECT_TRUE((*out)->Write("\n").ok());
  EXPECT_TRUE((*out)->Close().ok());
  EXPECT_EQ(testing::ReadFile(dir.File("out.jsonl")), text + "\n");
  EXPECT_FALSE((*out)->Close().ok());  // Once only.

  EXPECT_FALSE(ReportOutput::Open(dir.File("no/such/dir/out.csv")).ok());
  // A full device: the write fails, naming the output.
  absl::StatusOr<std::unique_ptr<ReportOutput>> full =
      ReportOutput::Open("/dev/full");
  if (full.ok()) {
    absl::Status s = (*full)->Write("report\n");
    EXPECT_FALSE(s.ok());
    EXPECT_THAT(std::string(s.message()), HasSubstr("/dev/full"));
  }
}

TEST(CheckIo, OutputIsInPlaceOnlyAfterClose) {
  testing::TempDir dir;
  const std::string path = dir.Write("out.jsonl", "previous\n");
  absl::StatusOr<std::unique_ptr<ReportOutput>> out = ReportOutput::Open(path);
  ASSERT_TRUE(out.ok()) << out.status();
  ASSERT_TRUE((*out)->Write("new\n").ok());
  EXPECT_EQ(testing::ReadFile(path), "previous\n") << "not before Close()";
  ASSERT_TRUE((*out)->Close().ok());
  EXPECT_EQ(testing::ReadFile(path), "new\n");

  // Abandoned (a failure or a stop): the file stays as it was, and the
  // temporary goes.
  out = ReportOutput::Open(path);
  ASSERT_TRUE(out.ok()) << out.status();
  ASSERT_TRUE((*out)->Write("partial").ok());
  (*out)->Abandon();
  EXPECT_EQ(testing::ReadFile(path), "new\n");
  int files = 0;
  for (const auto& e : std::filesystem::directory_iterator(dir.path())) {
    EXPECT_EQ(e.path().filename(), "out.jsonl");
    ++files;
  }
  EXPECT_EQ(files, 1);
}

// A stop while a read waits: the input ends there, and the line not yet
// ended by "\n" is dropped rather than returned in part.
TEST(CheckIo, StopEndsAWaitingReadAndDropsThePartialLine) {
  int fds[2];
  ASSERT_EQ(pipe(fds), 0);
  std::unique_ptr<StopSignals> stop = StopSignals::WithoutHandlers();
  ASSERT_NE(stop, nullptr);
  const std::string text = "first\nsecond, unfinished";
  ASSERT_EQ(write(fds[1], text.data(), text.size()),
            static_cast<ssize_t>(text.size()));
  LineSource lines(fds[0], stop->fd());
  std::string line;
  int row = 0;
  bool too_long = false;
  EXPECT_TRUE(lines.Ready());
  ASSERT_TRUE(lines.Next(&line, &row, &too_long));
  EXPECT_EQ(line, "first");
  EXPECT_FALSE(lines.Ready()) << "only part of a line is there";
  std::thread stopper([&] {
    std::this_thread::sleep_for(std::chrono::milliseconds(50));
    stop->Request(SIGINT);
  });
  EXPECT_FALSE(lines.Next(&line, &row, &too_long));  // Waits, then stops.
  stopper.join();
  EXPECT_TRUE(lines.stopped());
  EXPECT_FALSE(lines.bad());
  close(fds[0]);
  close(fds[1]);
}

}  // namespace
}  // namespace shellwright::cli
