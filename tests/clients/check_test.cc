// Tests for `shellwright check` (clients/cli/check.h, record_io.h): batch
// validation of CSV and JSONL record files, by running the real binary.

#include <fcntl.h>
#include <signal.h>
#include <stdlib.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

#include "gmock/gmock.h"
#include "google/protobuf/util/json_util.h"
#include "gtest/gtest.h"
#include "shellwright/v1/electron_structure.pb.h"
#include "tests/testing/subprocess.h"

namespace shellwright {
namespace {

using ::shellwright::testing::BinPath;
using ::shellwright::testing::ChildProcess;
using ::shellwright::testing::CommandResult;
using ::shellwright::testing::RunCommand;
using ::testing::ContainsRegex;
using ::testing::HasSubstr;
using ::testing::IsEmpty;
using ::testing::Not;
using ::testing::StartsWith;

constexpr char kHeader[] = "id,formula,charge,declared_states,measured_moment";

CommandResult Check(std::vector<std::string> args,
                    const std::string& stdin_text = "") {
  args.insert(args.begin(), {BinPath("clients/shellwright"), "check"});
  return RunCommand(args, stdin_text);
}

std::vector<std::string> SplitLines(const std::string& text) {
  std::vector<std::string> lines;
  std::istringstream in(text);
  std::string line;
  while (std::getline(in, line)) lines.push_back(line);
  return lines;
}

std::string ReadFile(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  std::ostringstream out;
  out << in.rdbuf();
  return out.str();
}

void WriteFile(const std::string& path, const std::string& content) {
  std::ofstream out(path, std::ios::binary | std::ios::trunc);
  out << content;
  ASSERT_TRUE(out.good()) << path;
}

bool HasErrorWithCode(const v1::RecordReport& r, const std::string& code) {
  for (const v1::Diagnostic& d : r.diagnostics()) {
    if (d.severity() == "error" && d.code() == code) return true;
  }
  return false;
}

bool HasDiagnostic(const v1::RecordReport& r, const std::string& severity,
                   const std::string& code) {
  for (const v1::Diagnostic& d : r.diagnostics()) {
    if (d.severity() == severity && d.code() == code) return true;
  }
  return false;
}

// Parses JSONL reports, one per line; checks on every report that `valid`
// is false exactly when a diagnostic has severity "error".
std::vector<v1::RecordReport> ParseReports(const std::string& jsonl) {
  std::vector<v1::RecordReport> reports;
  for (const std::string& line : SplitLines(jsonl)) {
    v1::RecordReport r;
    const auto status = google::protobuf::util::JsonStringToMessage(line, &r);
    EXPECT_TRUE(status.ok()) << status << ": " << line;
    bool has_error = false;
    for (const v1::Diagnostic& d : r.diagnostics()) {
      EXPECT_THAT(d.severity(), ::testing::AnyOf("error", "warning", "info"))
          << line;
      has_error = has_error || d.severity() == "error";
    }
    EXPECT_EQ(r.valid(), !has_error) << line;
    reports.push_back(std::move(r));
  }
  return reports;
}

// What one generated input row should produce.
struct ExpectedRow {
  int row = 0;
  std::string id;  // Expected echoed id; unchecked if !id_readable.
  bool id_readable = true;
  bool valid = true;
  std::string error_code;  // The expected error when !valid.
};

struct GeneratedCsv {
  std::string text;
  std::vector<ExpectedRow> rows;
};

// `n` data rows after the header, every tenth one broken in one of ten
// ways, deterministically.
GeneratedCsv GenerateCsv(int n) {
  struct Good {
    const char* formula;
    const char* charge;
    const char* declared;
    const char* moment;
  };
  static constexpr Good kGood[] = {
      {"NaCl", "", "", ""},
      {"Fe2O3", "", "", ""},
      {"Fe3O4", "", "", ""},
      {"MgO", "0", "", ""},
      {"Al2O3", "", "", ""},
      {"LiFePO4", "", "", ""},
      {"La0.7Sr0.3MnO3", "", "", ""},
      {"K3[Fe(CN)6]", "", "", ""},
      {"CuSO4·5H2O", "", "", ""},
      {"SO4", "-2", "", ""},
      {"Fe2O3", "", "Fe:3", "8.4"},
      {"\"BaTiO3\"", " 0 ", "", ""},  // Quoted field, padded number.
      {"Cr2O3", "", "", ""},
  };
  GeneratedCsv g;
  g.text = std::string(kHeader) + "\n";
  for (int k = 0; k < n; ++k) {
    ExpectedRow e;
    e.row = k + 2;  // The header is line 1.
    e.id = "r" + std::to_string(e.row);
    std::string line;
    if (k % 10 == 7) {
      e.valid = false;
      switch ((k / 10) % 10) {
        case 0:  // Unterminated quote after the id.
          line = e.id + ",\"Fe2O3,,,";
          e.error_code = "malformed_record";
          break;
        case 1:  // Too few fields.
          line = e.id + ",Fe2O3,,";
          e.error_code = "malformed_record";
          break;
        case 2:  // Too many fields.
          line = e.id + ",Fe2O3,,,,extra";
          e.error_code = "malformed_record";
          break;
        case 3:  // Non-numeric charge.
          line = e.id + ",Fe2O3,two,,";
          e.error_code = "malformed_record";
          break;
        case 4:  // Non-numeric measured moment.
          line = e.id + ",Fe2O3,,,8.4uB";
          e.error_code = "malformed_record";
          break;
        case 5:  // Stray quote inside an unquoted field.
          line = e.id + ",Fe\"2O3,,,";
          e.error_code = "malformed_record";
          break;
        case 6:  // Unterminated quote from the start: no readable id.
          line = "\"" + e.id + ",Fe2O3,,,";
          e.error_code = "malformed_record";
          e.id_readable = false;
          break;
        case 7:
          line = e.id + ",Fe2O3),,,";
          e.error_code = "malformed_formula";
          break;
        case 8:
          line = e.id + ",Xx2O3,,,";
          e.error_code = "unknown_element";
          break;
        case 9:
          line = e.id + ",NaF2,,,";
          e.error_code = "charge_not_balanced";
          break;
      }
    } else {
      const Good& good = kGood[k % (sizeof(kGood) / sizeof(kGood[0]))];
      std::string id_field = e.id;
      if (k % 17 == 3) {  // A quoted id with a comma and a quote in it.
        e.id += ",\"q\"";
        id_field = "\"" + e.id.substr(0, e.id.find('"')) + "\"\"q\"\"\"";
      }
      line = id_field + "," + good.formula + "," + good.charge + "," +
             good.declared + "," + good.moment;
    }
    g.text += line + "\n";
    g.rows.push_back(std::move(e));
  }
  return g;
}

class CheckTest : public ::testing::Test {
 protected:
  void SetUp() override {
    char tmpl[] = "/tmp/clients_check_test.XXXXXX";
    ASSERT_NE(mkdtemp(tmpl), nullptr);
    dir_ = tmpl;
  }
  void TearDown() override {
    std::error_code ec;
    std::filesystem::remove_all(dir_, ec);
  }
  std::string Path(const std::string& name) const { return dir_ + "/" + name; }

  std::string dir_;
};

TEST_F(CheckTest, TenThousandRowsWithBrokenOnesInOrder) {
  const GeneratedCsv g = GenerateCsv(10000);
  WriteFile(Path("in.csv"), g.text);
  CommandResult r =
      Check({Path("in.csv"), "--out", Path("out.jsonl"), "--jobs", "2"});
  EXPECT_EQ(r.exit_code, 1) << r.err;
  EXPECT_THAT(r.out, IsEmpty());
  EXPECT_THAT(r.err, HasSubstr("10000 rows"));
  EXPECT_THAT(r.err, HasSubstr("9000 valid, 1000 invalid"));
  EXPECT_THAT(r.err, ContainsRegex("malformed_record +700"));
  EXPECT_THAT(r.err, ContainsRegex("malformed_formula +100"));
  EXPECT_THAT(r.err, ContainsRegex("unknown_element +100"));
  EXPECT_THAT(r.err, ContainsRegex("charge_not_balanced +100"));

  const std::string out = ReadFile(Path("out.jsonl"));
  ASSERT_EQ(SplitLines(out).size(), 10000u);
  const std::vector<v1::RecordReport> reports = ParseReports(out);
  ASSERT_EQ(reports.size(), g.rows.size());
  // Reports at most a few bad rows, so a regression does not flood the log.
  int bad_rows = 0;
  int previous_row = 0;
  for (size_t i = 0; i < reports.size(); ++i) {
    const v1::RecordReport& report = reports[i];
    const ExpectedRow& e = g.rows[i];
    const bool ok = report.row() > previous_row && report.row() == e.row &&
                    (!e.id_readable || report.id() == e.id) &&
                    report.valid() == e.valid &&
                    (e.valid || HasErrorWithCode(report, e.error_code));
    previous_row = report.row();
    if (!ok && ++bad_rows <= 10) {
      ADD_FAILURE() << "output line " << i + 1 << ": expected row " << e.row
                    << " id '" << e.id << "'"
                    << (e.id_readable ? "" : " (unreadable)") << " valid "
                    << e.valid << " code '" << e.error_code
                    << "', got: " << report.ShortDebugString();
    }
  }
  EXPECT_EQ(bad_rows, 0);
}

TEST_F(CheckTest, AllValidInputExitsZero) {
  WriteFile(Path("good.csv"), std::string(kHeader) +
                                  "\n"
                                  "a,NaCl,,,\n"
                                  "b,Fe2O3,0,Fe:3,8.4\n"
                                  "\n"
                                  "c,\"K3[Fe(CN)6]\",,,\n");
  CommandResult r = Check({Path("good.csv"), "--out", Path("good.jsonl")});
  EXPECT_EQ(r.exit_code, 0) << r.err;
  EXPECT_THAT(r.err, HasSubstr("3 rows: 3 valid, 0 invalid"));
  const std::vector<v1::RecordReport> reports =
      ParseReports(ReadFile(Path("good.jsonl")));
  ASSERT_EQ(reports.size(), 3u);
  // Empty lines are skipped; rows stay physical line numbers.
  EXPECT_EQ(reports[0].row(), 2);
  EXPECT_EQ(reports[1].row(), 3);
  EXPECT_EQ(reports[2].row(), 5);
  EXPECT_EQ(reports[2].id(), "c");
  for (const v1::RecordReport& report : reports) EXPECT_TRUE(report.valid());
}

// Ligand abbreviations reach check's records: each abbreviated record
// gets the report of its written-out twin, apart from the formula text.
TEST_F(CheckTest, LigandAbbreviationsInRecords) {
  WriteFile(Path("ligands.csv"), std::string(kHeader) +
                                     "\n"
                                     "a,\"[Fe(bpy)3]Cl2\",,,\n"
                                     "b,\"[Fe(C10H8N2)3]Cl2\",,,\n"
                                     "c,\"K3[Fe(ox)3]\",,,\n"
                                     "d,\"K3[Fe(C2O4)3]\",,,\n"
                                     "e,\"[Fe(bpz)3]Cl2\",,,\n");
  CommandResult r =
      Check({Path("ligands.csv"), "--out", Path("ligands.jsonl")});
  EXPECT_EQ(r.exit_code, 1) << r.err;
  EXPECT_THAT(r.err, HasSubstr("5 rows: 4 valid, 1 invalid"));
  std::vector<v1::RecordReport> reports =
      ParseReports(ReadFile(Path("ligands.jsonl")));
  ASSERT_EQ(reports.size(), 5u);
  EXPECT_EQ(reports[0].formula(), "[Fe(bpy)3]Cl2");  // As the record wrote.
  for (int i : {0, 2}) {
    v1::RecordReport abbreviated = reports[i];
    v1::RecordReport written_out = reports[i + 1];
    EXPECT_TRUE(abbreviated.valid()) << abbreviated.id();
    for (v1::RecordReport* report : {&abbreviated, &written_out}) {
      report->clear_id();
      report->clear_row();
      report->clear_formula();
    }
    EXPECT_EQ(abbreviated.SerializeAsString(), written_out.SerializeAsString())
        << reports[i].id();
  }
  // [Fe(bpy)3]2+ low spin, diamagnetic; [Fe(ox)3]3- high spin, 5 unpaired
  // (Greenwood and Earnshaw, Chemistry of the Elements, 2nd ed., from
  // memory).
  EXPECT_EQ(reports[0].unpaired_per_formula_unit(), 0);
  EXPECT_EQ(reports[2].unpaired_per_formula_unit(), 5);
  EXPECT_FALSE(reports[4].valid());
  EXPECT_TRUE(HasErrorWithCode(reports[4], "malformed_formula"));
  EXPECT_THAT(reports[4].diagnostics(0).message(),
              HasSubstr("unknown ligand abbreviation 'bpz' at column 5"));
}

TEST_F(CheckTest, MissingInputFileIsUsageError) {
  CommandResult r =
      Check({Path("does_not_exist.csv"), "--out", Path("o.jsonl")});
  EXPECT_EQ(r.exit_code, 2) << r.err;
  EXPECT_THAT(r.err, HasSubstr("does_not_exist.csv"));
  EXPECT_THAT(r.out, IsEmpty());
}

TEST_F(CheckTest, CsvHeaderWithoutFormulaIsUsageError) {
  WriteFile(Path("noformula.csv"), "id,charge\na,0\n");
  CommandResult r = Check({Path("noformula.csv")});
  EXPECT_EQ(r.exit_code, 2) << r.err;
  EXPECT_THAT(r.err, HasSubstr("formula"));
  EXPECT_THAT(r.out, IsEmpty());
}

TEST_F(CheckTest, UnknownFormatIsUsageError) {
  WriteFile(Path("in.csv"), std::string(kHeader) + "\na,NaCl,,,\n");
  CommandResult r = Check({Path("in.csv"), "--format", "xml"});
  EXPECT_EQ(r.exit_code, 2) << r.err;
  EXPECT_THAT(r.out, IsEmpty());
  CommandResult o = Check({Path("in.csv"), "--out-format", "yaml"});
  EXPECT_EQ(o.exit_code, 2) << o.err;
  EXPECT_THAT(o.out, IsEmpty());
}

TEST_F(CheckTest, UnknownExtensionNeedsFormat) {
  WriteFile(Path("in.txt"), std::string(kHeader) + "\na,NaCl,,,\n");
  CommandResult r = Check({Path("in.txt")});
  EXPECT_EQ(r.exit_code, 2) << r.err;
  EXPECT_THAT(r.err, HasSubstr("--format"));
  EXPECT_THAT(r.out, IsEmpty());
  CommandResult ok = Check({Path("in.txt"), "--format", "csv"});
  EXPECT_EQ(ok.exit_code, 0) << ok.err;
  ASSERT_EQ(ParseReports(ok.out).size(), 1u);
}

TEST_F(CheckTest, RegressionUnknownOutputExtensionExitsTwo) {
  // Issue 16: `check mine.csv --out reports.xlsx` wrote JSONL under that
  // name. Now a usage error that leaves no file behind, unless
  // --out-format says what to write.
  WriteFile(Path("in.csv"), std::string(kHeader) + "\na,NaCl,,,\n");
  CommandResult r = Check({Path("in.csv"), "--out", Path("x.xlsx")});
  EXPECT_EQ(r.exit_code, 2) << r.err;
  EXPECT_THAT(r.err, HasSubstr("--out-format"));
  EXPECT_FALSE(std::filesystem::exists(Path("x.xlsx")));
  CommandResult ok =
      Check({Path("in.csv"), "--out", Path("x.txt"), "--out-format", "csv"});
  EXPECT_EQ(ok.exit_code, 0) << ok.err;
  EXPECT_THAT(ReadFile(Path("x.txt")), StartsWith("row,id,"));
}

TEST_F(CheckTest, RegressionSummaryGroupsCodesBySeverity) {
  // Issue 16: error, warning and info codes were listed together, adding
  // up to more than the invalid rows. Fe3O4 is mixed valence (info),
  // CuSO4.5H2O a possible hydrate typo (warning), Fe2O3) malformed
  // (error), Xx2O an unknown element (error).
  WriteFile(Path("in.csv"), std::string(kHeader) +
                                "\na,Fe3O4,,,\nb,CuSO4.5H2O,,,\nc,Fe2O3),,,"
                                "\nd,Xx2O,,,\ne,NaCl,,,\n");
  CommandResult r = Check({Path("in.csv"), "--out", Path("out.jsonl"),
                           "--summary-json", Path("summary.json")});
  EXPECT_EQ(r.exit_code, 1) << r.err;
  EXPECT_THAT(r.err, HasSubstr("5 rows: 3 valid, 2 invalid; 1 with warnings;"));
  const size_t errors = r.err.find("errors (each makes its row invalid):");
  const size_t warnings = r.err.find("warnings (row stays valid):");
  const size_t info = r.err.find("info:");
  ASSERT_NE(errors, std::string::npos) << r.err;
  ASSERT_NE(warnings, std::string::npos) << r.err;
  ASSERT_NE(info, std::string::npos) << r.err;
  EXPECT_LT(errors, r.err.find("malformed_formula"));
  EXPECT_LT(r.err.find("malformed_formula"), warnings);
  EXPECT_LT(warnings, r.err.find("possible_hydrate_typo"));
  EXPECT_LT(r.err.find("possible_hydrate_typo"), info);
  EXPECT_LT(info, r.err.find("mixed_valence"));

  const std::string json = ReadFile(Path("summary.json"));
  EXPECT_THAT(json, StartsWith("{\"rows\":5,\"valid\":3,\"invalid\":2,"
                               "\"rows_with_warnings\":1,"));
  EXPECT_THAT(json, HasSubstr("\"error\":{\"malformed_formula\":1,"
                              "\"unknown_element\":1}"));
  EXPECT_THAT(json, HasSubstr("\"warning\":{\"possible_hydrate_typo\":1"));
  EXPECT_THAT(json, HasSubstr("\"mixed_valence\":1"));

  CommandResult quiet =
      Check({Path("in.csv"), "--out", Path("out.jsonl"), "--quiet"});
  EXPECT_THAT(quiet.err, ::testing::Not(HasSubstr("Caution")));
  EXPECT_THAT(r.err, HasSubstr("Caution"));
}

TEST_F(CheckTest, RepeatedIdsPastTheRememberedRowsAreStillFound) {
  // Rows count from the header line. The repeated-id check keeps a hash
  // of every id but the first row only of the first 65,536: a later id's
  // repeat is found and counted, and its warning names no row.
  std::string csv = "id,formula\n";
  for (int i = 0; i < 70000; ++i) csv += "u" + std::to_string(i) + ",MgO\n";
  csv += "u5,MgO\nu69000,MgO\n";
  WriteFile(Path("many.csv"), csv);
  CommandResult r = Check(
      {Path("many.csv"), "--out", Path("many.csv.jsonl"), "--fields", "valid"});
  EXPECT_EQ(r.exit_code, 0) << r.err;
  EXPECT_THAT(r.err, HasSubstr("row 70002: id 'u5' repeats the id of row 7"));
  EXPECT_THAT(r.err, HasSubstr("row 70003: id 'u69000' repeats the id of an "
                               "earlier row"));
  EXPECT_THAT(r.err, ContainsRegex("duplicate_id +2"));
}

TEST_F(CheckTest, RegressionRecordWarningsReachReportsAndSummary) {
  // Issue 16: unknown keys and columns were ignored in silence, and
  // repeated ids went unflagged.
  const std::string jsonl =
      "{\"id\":\"j1\",\"formula\":\"MgO\"}\n"
      "{\"id\":\"j8\",\"Formula\":\"MgO\"}\n"
      "{\"id\":\"j1\",\"formula\":\"NaCl\"}\n";
  CommandResult r = Check({"-", "--format", "jsonl"}, jsonl);
  EXPECT_EQ(r.exit_code, 1) << r.err;
  std::vector<v1::RecordReport> reports = ParseReports(r.out);
  ASSERT_EQ(reports.size(), 3u);
  EXPECT_TRUE(HasDiagnostic(reports[1], "warning", "unknown_field"));
  EXPECT_THAT(r.err, HasSubstr("row 3: id 'j1' repeats the id of row 1"));
  EXPECT_THAT(r.err, ContainsRegex("duplicate_id +1"));
  EXPECT_THAT(r.err, ContainsRegex("unknown_field +1"));

  WriteFile(Path("cols.csv"), "id,Formla,formula\na,x,NaCl\nb,y,KCl\n");
  CommandResult c = Check({Path("cols.csv"), "--out", Path("cols.jsonl")});
  EXPECT_EQ(c.exit_code, 0) << c.err;
  EXPECT_EQ(SplitLines(c.err).size(),
            SplitLines(Check({Path("cols.csv"), "--out", Path("c2.jsonl")}).err)
                .size());
  size_t named = 0;
  for (size_t at = c.err.find("'Formla'"); at != std::string::npos;
       at = c.err.find("'Formla'", at + 1)) {
    ++named;
  }
  EXPECT_EQ(named, 1u) << c.err;  // Once per file, not per row.
  EXPECT_THAT(c.err, HasSubstr("did you mean 'formula'?"));
}

TEST_F(CheckTest, JsonlFromStdinToStdout) {
  const std::string input =
      "{\"id\":\"j1\",\"formula\":\"Fe2O3\"}\n"  // 1
      "\n"                                       // 2
      "{\"id\":\"j2\",\"formula\":\"NaF2\"}\n"   // 3
      "{\"id\":\"j3\",\"formula\":\n"            // 4
      "{\"id\":\"j4\",\"formula\":\"Fe2O3\",\"declared_states\":\"Fe:2\"}\n"
      "{\"id\":\"j5\",\"formula\":\"SO4\",\"charge\":-2,\"row\":99}\n"  // 6
      "{\"id\":\"j6\",\"formula\":\"NaCl\",\"bogus_field\":1}\n"        // 7
      "not json at all\n"                                               // 8
      "{\"id\":\"j9\",\"formula\":\"Xx2O3\"}\n";                        // 9
  for (const std::vector<std::string>& args :
       {std::vector<std::string>{"-", "--format", "jsonl"},
        std::vector<std::string>{"-", "--format", "jsonl", "--out", "-"}}) {
    CommandResult r = Check(args, input);
    EXPECT_EQ(r.exit_code, 1) << r.err;
    EXPECT_THAT(r.err, HasSubstr("8 rows: 3 valid, 5 invalid"));
    const std::vector<v1::RecordReport> reports = ParseReports(r.out);
    ASSERT_EQ(reports.size(), 8u) << r.out;
    const std::vector<int> rows = {1, 3, 4, 5, 6, 7, 8, 9};
    for (size_t i = 0; i < rows.size(); ++i) {
      EXPECT_EQ(reports[i].row(), rows[i]) << i;
    }
    EXPECT_EQ(reports[0].id(), "j1");
    EXPECT_TRUE(reports[0].valid());
    EXPECT_EQ(reports[1].id(), "j2");
    EXPECT_TRUE(HasErrorWithCode(reports[1], "charge_not_balanced"));
    EXPECT_TRUE(HasErrorWithCode(reports[2], "malformed_record"));
    EXPECT_FALSE(reports[2].valid());
    EXPECT_EQ(reports[3].id(), "j4");
    EXPECT_TRUE(
        HasErrorWithCode(reports[3], "declared_state_contradicts_balance"));
    EXPECT_EQ(reports[4].id(), "j5");
    EXPECT_TRUE(reports[4].valid()) << reports[4].ShortDebugString();
    EXPECT_EQ(reports[5].id(), "j6");
    EXPECT_TRUE(reports[5].valid()) << reports[5].ShortDebugString();
    EXPECT_TRUE(HasErrorWithCode(reports[6], "malformed_record"));
    EXPECT_EQ(reports[7].id(), "j9");
    EXPECT_TRUE(HasErrorWithCode(reports[7], "unknown_element"));
  }
}

TEST_F(CheckTest, CsvFromStdinToStdout) {
  CommandResult r = Check({"-", "--format", "csv"},
                          std::string(kHeader) + "\na,NaCl,,,\nb,MgO,,,\n");
  EXPECT_EQ(r.exit_code, 0) << r.err;
  const std::vector<v1::RecordReport> reports = ParseReports(r.out);
  ASSERT_EQ(reports.size(), 2u);
  EXPECT_EQ(reports[0].id(), "a");
  EXPECT_EQ(reports[1].id(), "b");
  EXPECT_EQ(reports[1].row(), 3);
}

TEST_F(CheckTest, ByteOrderMarkAndCrlfFromSpreadsheetExports) {
  // Regression: a UTF-8 byte-order mark before the header hid the `id`
  // column, turning a good file into a usage error.
  CommandResult r =
      Check({"-", "--format", "csv"}, "\xEF\xBB\xBF" + std::string(kHeader) +
                                          "\r\na,NaCl,,,\r\nb,MgO,,,\r\n");
  EXPECT_EQ(r.exit_code, 0) << r.err;
  const std::vector<v1::RecordReport> reports = ParseReports(r.out);
  ASSERT_EQ(reports.size(), 2u);
  EXPECT_EQ(reports[0].id(), "a");
  EXPECT_EQ(reports[1].formula(), "MgO");
  CommandResult j = Check({"-", "--format", "jsonl"},
                          "\xEF\xBB\xBF{\"id\":\"k\",\"formula\":\"KBr\"}\r\n");
  EXPECT_EQ(j.exit_code, 0) << j.err;
  ASSERT_EQ(ParseReports(j.out).size(), 1u);
}

TEST_F(CheckTest, EmptyAndHeaderOnlyInputs) {
  CommandResult empty = Check({"-", "--format", "csv"}, "");
  EXPECT_EQ(empty.exit_code, 2);
  EXPECT_THAT(empty.err, HasSubstr("no header"));
  CommandResult header_only =
      Check({"-", "--format", "csv"}, std::string(kHeader) + "\n");
  EXPECT_EQ(header_only.exit_code, 0) << header_only.err;
  EXPECT_THAT(header_only.out, IsEmpty());
  EXPECT_THAT(header_only.err, HasSubstr("0 rows"));
  CommandResult empty_jsonl = Check({"-", "--format", "jsonl"}, "");
  EXPECT_EQ(empty_jsonl.exit_code, 0) << empty_jsonl.err;
  EXPECT_THAT(empty_jsonl.out, IsEmpty());
}

TEST_F(CheckTest, HostileLinesEachGetOneReport) {
  // Regressions from review: invalid UTF-8 in JSONL leaked into the
  // output, a record without an id passed as valid, and an over-long line
  // was read whole into memory.
  CommandResult j = Check({"-", "--format", "jsonl"},
                          "{\"id\":\"a\",\"formula\":\"Fe\xb7O\"}\n{"
                          "\"formula\":\"MgO\"}\n{\"id\":5}\n");
  EXPECT_EQ(j.exit_code, 1);
  const std::vector<v1::RecordReport> reports = ParseReports(j.out);
  ASSERT_EQ(reports.size(), 3u);  // ParseReports fails on invalid UTF-8.
  EXPECT_EQ(reports[0].id(), "a");
  EXPECT_TRUE(HasErrorWithCode(reports[1], "malformed_record"));
  EXPECT_THAT(reports[1].diagnostics(0).message(), HasSubstr("id"));
  EXPECT_TRUE(HasErrorWithCode(reports[2], "malformed_record"));
  EXPECT_EQ(reports[2].diagnostics(0).message().find('\n'), std::string::npos);

  CommandResult c = Check({"-", "--format", "csv"},
                          std::string(kHeader) + "\n,MgO,,,\nlong," +
                              std::string(3 << 20, 'x') + "\nb,NaCl,,,\n");
  EXPECT_EQ(c.exit_code, 1);
  const std::vector<v1::RecordReport> csv = ParseReports(c.out);
  ASSERT_EQ(csv.size(), 3u);
  EXPECT_TRUE(HasErrorWithCode(csv[0], "malformed_record"));
  EXPECT_EQ(csv[1].id(), "long");
  EXPECT_THAT(csv[1].diagnostics(0).message(), HasSubstr("longer than"));
  EXPECT_TRUE(csv[2].valid());
  EXPECT_EQ(csv[2].row(), 4);
}

TEST_F(CheckTest, HeaderNamesIgnoreCaseAndFormulaPaddingIsTrimmed) {
  CommandResult r =
      Check({"-", "--format", "csv"}, "Id, Formula ,Charge\na, Fe2O3 ,\n");
  EXPECT_EQ(r.exit_code, 0) << r.err;
  const std::vector<v1::RecordReport> reports = ParseReports(r.out);
  ASSERT_EQ(reports.size(), 1u);
  EXPECT_EQ(reports[0].formula(), "Fe2O3");
  EXPECT_TRUE(reports[0].valid());
  CommandResult dup = Check({"-", "--format", "csv"}, "id,formula,ID\n");
  EXPECT_EQ(dup.exit_code, 2);
  EXPECT_THAT(dup.err, HasSubstr("twice"));
}

TEST_F(CheckTest, CsvOutputHasHeaderAndOneLinePerRow) {
  const GeneratedCsv g = GenerateCsv(200);
  WriteFile(Path("in.csv"), g.text);
  CommandResult r = Check({Path("in.csv"), "--out", Path("out.csv")});
  EXPECT_EQ(r.exit_code, 1) << r.err;
  const std::vector<std::string> lines = SplitLines(ReadFile(Path("out.csv")));
  ASSERT_EQ(lines.size(), g.rows.size() + 1);
  EXPECT_THAT(lines[0], StartsWith("row,id,valid,formula,"));
  for (size_t i = 0; i < g.rows.size(); ++i) {
    const ExpectedRow& e = g.rows[i];
    EXPECT_THAT(lines[i + 1], StartsWith(std::to_string(e.row) + ","))
        << lines[i + 1];
    if (e.id_readable && e.id.find(',') == std::string::npos) {
      EXPECT_THAT(lines[i + 1],
                  StartsWith(std::to_string(e.row) + "," + e.id + "," +
                             (e.valid ? "true," : "false,")))
          << lines[i + 1];
    }
  }
  // --out-format csv to stdout gives the same bytes.
  CommandResult s =
      Check({Path("in.csv"), "--out", "-", "--out-format", "csv"});
  EXPECT_EQ(s.exit_code, 1) << s.err;
  EXPECT_EQ(s.out, ReadFile(Path("out.csv")));
}

TEST_F(CheckTest, SaturationMomentColumnsAreRead) {
  // Saturation moments (Smit and Wijn, Ferrites, from memory): Fe3O4 about
  // 4.1 μB, NiFe2O4 about 2.3; 14 μB for Fe3O4 is three free ions added.
  WriteFile(Path("sat.csv"),
            "id,formula,measured_saturation_moment,"
            "saturation_moment_tolerance,structure_family,temperature\n"
            "m,Fe3O4,4.1,,,\n"
            "n,NiFe2O4,2.3,0.3,spinel,300\n"
            "bad,Fe3O4,14,,,\n"
            "off,Fe3O4,14,,none,\n"
            "cold,Eu2O3,,,,-4\n");
  CommandResult r = Check({Path("sat.csv"), "--out", Path("sat.jsonl")});
  EXPECT_EQ(r.exit_code, 1) << r.err;
  const std::vector<v1::RecordReport> reports =
      ParseReports(ReadFile(Path("sat.jsonl")));
  ASSERT_EQ(reports.size(), 5u);
  EXPECT_TRUE(reports[0].valid());
  EXPECT_EQ(reports[0].structure_family(), "spinel");
  EXPECT_TRUE(reports[1].valid());
  EXPECT_FALSE(reports[2].valid());
  // No family: no ordered-moment model, so the value is not judged.
  EXPECT_TRUE(reports[3].valid());
  EXPECT_EQ(reports[3].structure_family(), "");
  EXPECT_FALSE(reports[4].valid());  // A negative temperature.
}

TEST_F(CheckTest, OutputIndependentOfJobsAndBatchSize) {
  const GeneratedCsv g = GenerateCsv(3000);
  WriteFile(Path("in.csv"), g.text);
  CommandResult a = Check({Path("in.csv"), "--out", Path("a.jsonl"), "--jobs",
                           "2", "--batch-size", "500"});
  CommandResult b = Check({Path("in.csv"), "--out", Path("b.jsonl"), "--jobs",
                           "1", "--batch-size", "1"});
  CommandResult c = Check({Path("in.csv"), "--out", Path("c.jsonl"), "--jobs",
                           "3", "--batch-size", "7"});
  EXPECT_EQ(a.exit_code, 1) << a.err;
  EXPECT_EQ(b.exit_code, 1) << b.err;
  EXPECT_EQ(c.exit_code, 1) << c.err;
  const std::string out_a = ReadFile(Path("a.jsonl"));
  EXPECT_EQ(SplitLines(out_a).size(), 3000u);
  EXPECT_TRUE(out_a == ReadFile(Path("b.jsonl")));
  EXPECT_TRUE(out_a == ReadFile(Path("c.jsonl")));
  EXPECT_EQ(a.err, b.err);
  EXPECT_EQ(a.err, c.err);
}

TEST_F(CheckTest, RowFieldsAreChecked) {
  WriteFile(Path("fields.csv"), std::string(kHeader) +
                                    "\n"
                                    "declared,Fe2O3,,Fe:2,\n"
                                    "moment,Fe2O3,,,99\n"
                                    "hydrate,CuSO4.5H2O,,,\n"
                                    "plausible,Fe2O3,,,8.4\n");
  CommandResult r = Check({Path("fields.csv"), "--out", Path("f.jsonl")});
  EXPECT_EQ(r.exit_code, 1) << r.err;
  const std::vector<v1::RecordReport> reports =
      ParseReports(ReadFile(Path("f.jsonl")));
  ASSERT_EQ(reports.size(), 4u);
  EXPECT_EQ(reports[0].id(), "declared");
  EXPECT_FALSE(reports[0].valid());
  EXPECT_TRUE(
      HasErrorWithCode(reports[0], "declared_state_contradicts_balance"))
      << reports[0].ShortDebugString();
  EXPECT_EQ(reports[1].id(), "moment");
  EXPECT_FALSE(reports[1].valid());
  EXPECT_TRUE(HasErrorWithCode(reports[1], "moment_out_of_range"))
      << reports[1].ShortDebugString();
  EXPECT_EQ(reports[2].id(), "hydrate");
  EXPECT_TRUE(reports[2].valid()) << reports[2].ShortDebugString();
  EXPECT_TRUE(HasDiagnostic(reports[2], "warning", "possible_hydrate_typo"))
      << reports[2].ShortDebugString();
  EXPECT_EQ(reports[3].id(), "plausible");
  EXPECT_TRUE(reports[3].valid()) << reports[3].ShortDebugString();
}

// ---------------------------------------------------------------------------
// Output integrity: failed writes, --out naming the input, signals.

namespace fs = std::filesystem;

// Names in `dir` that a run left behind besides `keep`.
std::vector<std::string> OtherFiles(const std::string& dir,
                                    const std::vector<std::string>& keep) {
  std::vector<std::string> other;
  for (const fs::directory_entry& e : fs::directory_iterator(dir)) {
    const std::string name = e.path().filename().string();
    if (std::find(keep.begin(), keep.end(), name) == keep.end()) {
      other.push_back(name);
    }
  }
  return other;
}

// Opens the FIFO `path` for writing once a reader has it open, waiting at
// most 10 s; -1 if none came.
int OpenFifoForWriting(const std::string& path) {
  const auto deadline =
      std::chrono::steady_clock::now() + std::chrono::seconds(10);
  while (std::chrono::steady_clock::now() < deadline) {
    const int fd = open(path.c_str(), O_WRONLY | O_NONBLOCK | O_CLOEXEC);
    if (fd >= 0) {
      fcntl(fd, F_SETFL, 0);  // Blocking writes from here on.
      return fd;
    }
    std::this_thread::sleep_for(std::chrono::milliseconds(20));
  }
  return -1;
}

void WriteAll(int fd, const std::string& text) {
  ASSERT_EQ(write(fd, text.data(), text.size()),
            static_cast<ssize_t>(text.size()));
}

TEST_F(CheckTest, RegressionFullStandardOutputExitsTwo) {
  WriteFile(Path("one.csv"), "id,formula\na,NaCl\n");
  // The shell points check's standard output at /dev/full; every write
  // there fails with ENOSPC. It used to exit 0 (the final flush was not
  // checked).
  CommandResult r =
      RunCommand({"/bin/sh", "-c", "exec \"$0\" check \"$1\" > /dev/full",
                  BinPath("clients/shellwright"), Path("one.csv")});
  EXPECT_EQ(r.exit_code, 2) << r.err;
  EXPECT_THAT(r.err, HasSubstr("cannot write to standard output"));
  EXPECT_THAT(r.err, HasSubstr("No space left on device"));
}

TEST_F(CheckTest, FullOutputDeviceExitsTwo) {
  WriteFile(Path("one.csv"), "id,formula\na,NaCl\n");
  CommandResult r =
      Check({Path("one.csv"), "--out", "/dev/full", "--out-format", "jsonl"});
  EXPECT_EQ(r.exit_code, 2) << r.err;
  EXPECT_THAT(r.err, HasSubstr("cannot write to output '/dev/full'"));
}

TEST_F(CheckTest, RegressionOutNamingTheInputIsRefusedAndLeavesItIntact) {
  // 3000 records: the input used to be truncated and read only up to its
  // first 64 KiB.
  const std::string text = GenerateCsv(3000).text;
  WriteFile(Path("x.csv"), text);
  ASSERT_EQ(symlink(Path("x.csv").c_str(), Path("soft.csv").c_str()), 0);
  ASSERT_EQ(link(Path("x.csv").c_str(), Path("hard.csv").c_str()), 0);
  const std::vector<std::pair<std::string, std::string>> cases = {
      {Path("x.csv"), Path("x.csv")},
      {Path("x.csv"), Path("soft.csv")},
      {Path("soft.csv"), Path("hard.csv")},
      {Path("hard.csv"), Path("x.csv")},
      // The same file by another spelling of its path.
      {Path("x.csv"), dir_ + "/./x.csv"}};
  for (const auto& [in, out] : cases) {
    CommandResult r = Check({in, "--out", out});
    EXPECT_EQ(r.exit_code, 2) << in << " -> " << out << ": " << r.err;
    EXPECT_THAT(r.err, HasSubstr("is the input file")) << in << " -> " << out;
    EXPECT_EQ(ReadFile(Path("x.csv")), text) << in << " -> " << out;
  }
  EXPECT_TRUE(fs::is_symlink(Path("soft.csv")));
  EXPECT_THAT(OtherFiles(dir_, {"x.csv", "soft.csv", "hard.csv"}), IsEmpty());

  // Appending standard output to the input is refused too.
  CommandResult r =
      RunCommand({"/bin/sh", "-c", "exec \"$0\" check \"$1\" >> \"$1\"",
                  BinPath("clients/shellwright"), Path("x.csv")});
  EXPECT_EQ(r.exit_code, 2) << r.err;
  EXPECT_THAT(r.err, HasSubstr("standard output is the input file"));
  EXPECT_EQ(ReadFile(Path("x.csv")), text);
}

TEST_F(CheckTest, OutIsReplacedOnlyWhenComplete) {
  WriteFile(Path("in.csv"), "id,formula\na,NaCl\nb,Fe2O3\n");
  WriteFile(Path("out.jsonl"), "previous reports\n");
  ASSERT_EQ(chmod(Path("out.jsonl").c_str(), 0640), 0);
  // A usage error found after the output is named leaves it as it was.
  CommandResult bad = Check({Path("in.csv"), "--out", Path("out.jsonl"),
                             "--server", "127.0.0.1:1", "--timeout", "2"});
  EXPECT_EQ(bad.exit_code, 2) << bad.err;
  EXPECT_EQ(ReadFile(Path("out.jsonl")), "previous reports\n");

  CommandResult r = Check({Path("in.csv"), "--out", Path("out.jsonl")});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(SplitLines(ReadFile(Path("out.jsonl"))).size(), 2u);
  struct stat st {};
  ASSERT_EQ(stat(Path("out.jsonl").c_str(), &st), 0);
  EXPECT_EQ(st.st_mode & 0777, 0640u) << "the file keeps its mode";
  EXPECT_THAT(OtherFiles(dir_, {"in.csv", "out.jsonl"}), IsEmpty());

  // Through a symbolic link: the file it names is replaced, the link kept.
  ASSERT_EQ(symlink("out.jsonl", Path("link.jsonl").c_str()), 0);
  WriteFile(Path("in.csv"), "id,formula\na,NaCl\n");
  r = Check({Path("in.csv"), "--out", Path("link.jsonl")});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_TRUE(fs::is_symlink(Path("link.jsonl")));
  EXPECT_EQ(SplitLines(ReadFile(Path("out.jsonl"))).size(), 1u);
  EXPECT_THAT(OtherFiles(dir_, {"in.csv", "out.jsonl", "link.jsonl"}),
              IsEmpty());
}

// A file system too small for the reports: the write fails part-way, and
// --out must neither look complete nor lose the file it would replace.
TEST_F(CheckTest, FullFileSystemExitsTwoAndKeepsThePreviousOut) {
  const std::string mnt = Path("small");
  fs::create_directory(mnt);
  CommandResult mount =
      RunCommand({"/bin/mount", "-t", "tmpfs", "-o", "size=64k", "tmpfs", mnt});
  if (mount.exit_code != 0) {
    GTEST_SKIP() << "cannot mount a 64 KiB tmpfs here (needs root and "
                    "CAP_SYS_ADMIN), so the full-file-system case is not "
                    "run; /dev/full covers the failed write itself: "
                 << mount.err;
  }
  struct Unmount {
    std::string path;
    ~Unmount() { RunCommand({"/bin/umount", path}); }
  } unmount{mnt};
  WriteFile(mnt + "/out.jsonl", "previous reports\n");
  // 1000 reports are well over 64 KiB of JSONL.
  WriteFile(Path("in.csv"), GenerateCsv(1000).text);
  CommandResult r = Check({Path("in.csv"), "--out", mnt + "/out.jsonl"});
  EXPECT_EQ(r.exit_code, 2) << r.err;
  EXPECT_THAT(r.err, HasSubstr("No space left on device"));
  EXPECT_EQ(ReadFile(mnt + "/out.jsonl"), "previous reports\n");
  EXPECT_THAT(OtherFiles(mnt, {"out.jsonl"}), IsEmpty());

  // And with no previous file: none is left.
  fs::remove(mnt + "/out.jsonl");
  r = Check({Path("in.csv"), "--out", mnt + "/new.jsonl"});
  EXPECT_EQ(r.exit_code, 2) << r.err;
  EXPECT_THAT(OtherFiles(mnt, {}), IsEmpty());
}

// SIGINT while check waits for more input on a pipe: it stops reading,
// writes whole lines only, prints the summary of what it wrote, exits 130.
TEST_F(CheckTest, SigintStopsReadingAndSummarisesWhatWasWritten) {
  const std::string fifo = Path("in.csv");
  ASSERT_EQ(mkfifo(fifo.c_str(), 0600), 0);
  std::unique_ptr<ChildProcess> child = ChildProcess::Start(
      {BinPath("clients/shellwright"), "check", fifo, "--jobs", "2"},
      Path("stderr.txt"));
  ASSERT_NE(child, nullptr);
  const int fd = OpenFifoForWriting(fifo);
  ASSERT_GE(fd, 0) << "check never opened its input";
  const GeneratedCsv g = GenerateCsv(300);
  WriteAll(fd, g.text);
  // The reports of what was sent arrive while the pipe stays open.
  ASSERT_TRUE(child->WaitForLine("{\"id\":\"r301\"", std::chrono::seconds(30)))
      << child->Stderr();
  EXPECT_EQ(child->SignalAndWait(SIGINT, std::chrono::seconds(30)), 130)
      << child->Stderr();
  close(fd);
  const std::string rest = child->DrainStdout();
  EXPECT_TRUE(rest.empty() || rest.back() == '\n') << "a partial line";
  const std::string err = child->Stderr();
  EXPECT_THAT(err, HasSubstr("stopped by SIGINT"));
  EXPECT_THAT(err, HasSubstr("300 reports were written to standard output"));
  EXPECT_THAT(err, HasSubstr("300 rows: 270 valid, 30 invalid"));
}

// SIGTERM with --out: exit 143, and the file is not replaced by a part of
// the reports (nor is a temporary left).
TEST_F(CheckTest, SigtermLeavesOutAsItWas) {
  const std::string fifo = Path("in.jsonl");
  ASSERT_EQ(mkfifo(fifo.c_str(), 0600), 0);
  WriteFile(Path("out.csv"), "previous reports\n");
  std::unique_ptr<ChildProcess> child = ChildProcess::Start(
      {BinPath("clients/shellwright"), "check", fifo, "--out", Path("out.csv")},
      Path("stderr.txt"));
  ASSERT_NE(child, nullptr);
  const int fd = OpenFifoForWriting(fifo);
  ASSERT_GE(fd, 0) << "check never opened its input";
  WriteAll(fd, "{\"id\":\"a\",\"formula\":\"NaCl\"}\n");
  // Partial line: never answered, since reading stops before its end.
  WriteAll(fd, "{\"id\":\"b\",\"formu");
  std::this_thread::sleep_for(std::chrono::milliseconds(300));
  EXPECT_EQ(child->SignalAndWait(SIGTERM, std::chrono::seconds(30)), 143)
      << child->Stderr();
  close(fd);
  const std::string err = child->Stderr();
  EXPECT_THAT(err, HasSubstr("stopped by SIGTERM"));
  EXPECT_THAT(err, HasSubstr("was left as it was"));
  EXPECT_THAT(err, Not(HasSubstr("2 rows")));
  EXPECT_EQ(ReadFile(Path("out.csv")), "previous reports\n");
  EXPECT_THAT(OtherFiles(dir_, {"in.jsonl", "out.csv", "stderr.txt"}),
              IsEmpty());
}

}  // namespace
}  // namespace shellwright
