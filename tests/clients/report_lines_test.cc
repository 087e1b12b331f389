// Tests clients/cli/report_lines.h: the JSONL line written from a
// RecordReport is exactly the protobuf printer's JSON, and the lines
// written straight from the engine report equal those written from the
// report's proto translation, for JSONL and CSV.

#include "clients/cli/report_lines.h"

#include <algorithm>
#include <cstring>
#include <fstream>
#include <random>
#include <string>
#include <utility>
#include <vector>

#include "absl/strings/str_cat.h"
#include "absl/strings/string_view.h"
#include "api/records.h"
#include "clients/cli/atom_format.h"
#include "clients/cli/record_io.h"
#include "gtest/gtest.h"
#include "shellwright/v1/electron_structure.pb.h"
#include "tests/testing/subprocess.h"

namespace shellwright::cli {
namespace {

std::string ProtoLine(const v1::RecordReport& r,
                      ReportLineFormat format = ReportLineFormat::kJsonl) {
  std::string out;
  AppendReportLine(format, r, &out);
  return out;
}

// The line written from the engine report of `record`.
std::string EngineLine(const v1::CompositionRecord& record,
                       ReportLineFormat format) {
  std::string out;
  AppendReportLine(format,
                   AnalyzeComposition(CompositionInputFromProto(record)),
                   record, &out);
  return out;
}

// Sets every field of `m` and of its sub-messages, two elements per
// repeated field, to a value that differs from the default, so that a
// field the specialised writer misses shows up in the protobuf printer's
// output only.
void Populate(google::protobuf::Message* m, int depth, std::mt19937* rng) {
  using google::protobuf::FieldDescriptor;
  const auto* d = m->GetDescriptor();
  const auto* r = m->GetReflection();
  for (int i = 0; i < d->field_count(); ++i) {
    const FieldDescriptor* f = d->field(i);
    const int n = f->is_repeated() ? 2 : 1;
    for (int k = 0; k < n; ++k) {
      const std::string text = absl::StrCat(f->name(), "\"<", k, "\n·");
      const int integer = static_cast<int>((*rng)() % 200) - 100 + 1;
      const double real = static_cast<double>((*rng)() % 100000) / 7.0 + 0.1;
      switch (f->cpp_type()) {
        case FieldDescriptor::CPPTYPE_STRING:
          f->is_repeated() ? r->AddString(m, f, text)
                           : r->SetString(m, f, text);
          break;
        case FieldDescriptor::CPPTYPE_INT32:
          f->is_repeated() ? r->AddInt32(m, f, integer)
                           : r->SetInt32(m, f, integer);
          break;
        case FieldDescriptor::CPPTYPE_DOUBLE:
          f->is_repeated() ? r->AddDouble(m, f, real)
                           : r->SetDouble(m, f, real);
          break;
        case FieldDescriptor::CPPTYPE_BOOL:
          f->is_repeated() ? r->AddBool(m, f, true) : r->SetBool(m, f, true);
          break;
        case FieldDescriptor::CPPTYPE_MESSAGE:
          if (depth < 3) {
            Populate(f->is_repeated() ? r->AddMessage(m, f)
                                      : r->MutableMessage(m, f),
                     depth + 1, rng);
          }
          break;
        default:
          ADD_FAILURE() << "RecordReport gained a field kind the test and "
                           "the specialised writer do not handle: "
                        << f->full_name();
      }
    }
  }
}

TEST(ReportLines,
     JsonFromTheProtoMatchesTheProtobufPrinterOnFullyPopulatedReports) {
  std::mt19937 rng(11);
  for (int i = 0; i < 50; ++i) {
    v1::RecordReport r;
    Populate(&r, 0, &rng);
    ASSERT_EQ(r.alternatives_size(), 2);
    ASSERT_EQ(r.alternatives(1).oxidation_states_size(), 2);
    EXPECT_EQ(ProtoLine(r), ToJson(r, /*pretty=*/false) + "\n");
  }
  v1::RecordReport empty;
  EXPECT_EQ(ProtoLine(empty), ToJson(empty, false) + "\n");
}

// Records of every shape the engine answers: the demo registry (typos,
// unbalanced formulas, wrong declared states, implausible moments) and
// hand-made ones with settings, charges, alternatives and an over-long
// formula.
std::vector<v1::CompositionRecord> Records() {
  std::vector<v1::CompositionRecord> out;
  std::ifstream in(testing::SourcePath("data/demo/sample_registry.csv"));
  EXPECT_TRUE(in.good());
  CsvRecordReader reader;
  std::string line;
  int row = 1;
  std::getline(in, line);
  EXPECT_TRUE(reader.ReadHeader(line).ok());
  while (std::getline(in, line)) {
    ParsedLine p = reader.ParseLine(line, ++row);
    if (p.error.empty()) out.push_back(p.record);
  }
  EXPECT_GT(out.size(), 2000u);
  auto add = [&](const std::string& formula) -> v1::CompositionRecord& {
    out.emplace_back();
    out.back().set_id(absl::StrCat("made-", out.size()));
    out.back().set_formula(formula);
    out.back().set_row(static_cast<int>(out.size()));
    return out.back();
  };
  add("Fe3O4").set_max_alternatives(3);
  add("Pb3O4").set_max_alternatives(5);
  add("Co3O4").set_geometry("Co:tetrahedral");
  add("NiO").set_spin_state("Ni:low");
  add("K3[Fe(CN)6]").set_spin_state("Fe:low");
  add("Fe2O3").set_declared_states("Fe:2");
  add("SO4").set_charge(-2);
  add("Gd2O3").set_measured_moment(11.2);
  add("La0.7Sr0.3MnO3").set_measured_moment(99);
  add(std::string(1100, 'C'));
  add("Fe2O3)");
  add("Xx2O3");
  add("");
  add("CuSO4.5H2O");
  // Metallic phases: each moment model, and none.
  for (const char* formula :
       {"Co2MnAl", "Fe0.7Co0.3", "SmCo5", "Gd", "Fe3Al", "Pd", "Fe2VAl"}) {
    add(formula);
  }
  // One description (Fe3+, octahedral, auto spin) with two moment ranges:
  // the default gives a range, a geometry set by the record fixes it. The
  // ion text cache must tell them apart.
  add("Fe2O3");
  add("Fe2O3").set_geometry("Fe:octahedral");
  add("Fe2O3");
  // A line far above the writer's initial 4 KB: many ions, alternatives.
  add("LiNaKRbCsMgCaSrBaScYLaTiZrHfVNbTaCrMoWMnFeCoNiCuZnAlGaInSnPbO40")
      .set_max_alternatives(5);
  return out;
}

TEST(ReportLines, EngineLinesEqualTheProtoPathsLines) {
  const std::vector<v1::CompositionRecord> records = Records();
  size_t longest = 0;
  // Twice over, so that the second pass reads the per-thread ion cache.
  for (int pass = 0; pass < 2; ++pass) {
    for (const v1::CompositionRecord& record : records) {
      const CompositionReport report =
          AnalyzeComposition(CompositionInputFromProto(record));
      v1::RecordReport proto;
      RecordReportToProto(report, record, &proto);
      for (ReportLineFormat format :
           {ReportLineFormat::kJsonl, ReportLineFormat::kCsv}) {
        std::string engine;
        AppendReportLine(format, report, record, &engine);
        ASSERT_EQ(engine, ProtoLine(proto, format))
            << record.id() << " " << record.formula();
        longest = std::max(longest, engine.size());
      }
    }
  }
  EXPECT_GT(longest, 3 * 4096u);  // The writer's storage had to grow.
}

// AddReport writes a batch's lines straight into its text, which grows in
// the middle of lines (its room starts small): the text is the lines
// AppendReportLine writes one by one, in order, and the message form's
// lines go in the same way.
TEST(ReportLines, AddReportWritesTheSameLinesAsAppendReportLine) {
  const std::vector<v1::CompositionRecord> records = Records();
  for (ReportLineFormat format :
       {ReportLineFormat::kJsonl, ReportLineFormat::kCsv}) {
    ReportLines lines;
    lines.text.reserve(16);
    ReportLines from_messages;
    std::string expected;
    for (const v1::CompositionRecord& record : records) {
      const CompositionReport report =
          AnalyzeComposition(CompositionInputFromProto(record));
      v1::RecordReport proto;
      RecordReportToProto(report, record, &proto);
      AddReport(format, report, record, &lines);
      AddReport(format, proto, &from_messages);
      AppendReportLine(format, report, record, &expected);
    }
    EXPECT_EQ(lines.text.view(), expected);
    EXPECT_EQ(from_messages.text.view(), expected);
    EXPECT_EQ(lines.counts.rows, static_cast<int64_t>(records.size()));
    ASSERT_EQ(lines.rows.size(), records.size());
    EXPECT_EQ(lines.rows.back().id, records.back().id());
  }
}

TEST(ReportText, KeepsItsTextAcrossGrowthMovesAndClears) {
  ReportText text;
  EXPECT_TRUE(text.empty());
  text.append("ab");
  text.push_back('c');
  // Written through Room and kept with Commit, past the first room.
  char* at = text.Room(5000);
  ASSERT_GE(text.room_end() - at, 5000);
  std::memset(at, 'x', 5000);
  text.Commit(at + 5000);
  text.append(absl::string_view("yz"));
  ASSERT_EQ(text.size(), 5005u);
  EXPECT_EQ(text.view().substr(0, 4), "abcx");
  EXPECT_EQ(text.view().substr(5001), "xxyz");
  EXPECT_EQ(std::count(text.data(), text.data() + text.size(), 'x'), 5000);

  const size_t capacity = text.capacity();
  ReportText moved = std::move(text);
  EXPECT_EQ(moved.size(), 5005u);
  EXPECT_EQ(moved.view().substr(0, 3), "abc");
  EXPECT_EQ(text.size(), 0u);  // NOLINT: a moved-from text is empty.
  EXPECT_EQ(text.capacity(), 0u);

  moved.clear();  // Keeps the room, so that a reused text need not grow.
  EXPECT_TRUE(moved.empty());
  EXPECT_EQ(moved.capacity(), capacity);
  moved.append("again");
  EXPECT_EQ(moved.view(), "again");
}

// check --fields: in process, a line is the engine walk's with the mask;
// remote, the server fills FieldsToRequest's fields and the line is
// written from that message with the mask. Every field alone (CSV: every
// field with a column) and some sets give the same bytes both ways.
TEST(ReportLines, MaskedEngineLinesEqualTheServersMaskedLines) {
  std::vector<ReportMask> masks;
  for (const std::string& name : ReportMask::FieldNames()) {
    masks.push_back(*ReportMask::FromPaths({name}));
  }
  masks.push_back(*ReportMask::FromList("valid,diagnostics,oxidation_states"));
  masks.push_back(*ReportMask::FromList("formula,ions,curie_constant"));
  int csv_masks = 0;
  for (const ReportMask& mask : masks) {
    for (ReportLineFormat format :
         {ReportLineFormat::kJsonl, ReportLineFormat::kCsv}) {
      if (format == ReportLineFormat::kCsv && !CheckCsvFields(mask).ok()) {
        continue;  // No column: a usage error (tests/clients/cli_test.cc).
      }
      csv_masks += format == ReportLineFormat::kCsv;
      const ReportMask requested = FieldsToRequest(format, mask);
      for (const v1::CompositionRecord& record : Records()) {
        const CompositionReport report =
            AnalyzeComposition(CompositionInputFromProto(record));
        v1::RecordReport sent;
        AnalyzeRecord(record, &sent, requested);
        std::string engine, remote;
        AppendReportLine(format, report, record, &engine, mask);
        AppendReportLine(format, sent, &remote, mask);
        ASSERT_EQ(engine, remote) << ::testing::PrintToString(mask.Paths())
                                  << " " << record.formula();
      }
    }
  }
  EXPECT_GT(csv_masks, 10);
  // One field alone, in JSONL: just its key.
  v1::CompositionRecord record;
  record.set_formula("Fe3O4");
  std::string line;
  AppendReportLine(ReportLineFormat::kJsonl,
                   AnalyzeComposition(CompositionInputFromProto(record)),
                   record, &line, *ReportMask::FromPaths({"valid"}));
  EXPECT_EQ(line, "{\"valid\":true}\n");
}

// The cell of the CSV column `name` in `fields`, by the header's order.
std::string Cell(const std::vector<std::string>& fields,
                 absl::string_view name) {
  std::vector<std::string> header;
  std::string error;
  if (!SplitCsvLine(ReportCsvHeader(), &header, &error)) return "(bad header)";
  for (size_t i = 0; i < header.size() && i < fields.size(); ++i) {
    if (header[i] == name) return fields[i];
  }
  return "(no column)";
}

TEST(ReportLines, CsvLineHasOneFieldPerHeaderColumn) {
  v1::CompositionRecord record;
  record.set_id("a,\"b\"");
  record.set_formula("NiO");
  record.set_row(2);
  v1::RecordReport proto;
  AnalyzeRecord(record, &proto);
  const std::string line = ProtoLine(proto, ReportLineFormat::kCsv);
  std::vector<std::string> fields, header;
  std::string error;
  ASSERT_TRUE(SplitCsvLine(line.substr(0, line.size() - 1), &fields, &error))
      << error;
  ASSERT_TRUE(SplitCsvLine(ReportCsvHeader(), &header, &error));
  EXPECT_EQ(fields.size(), header.size());
  EXPECT_EQ(fields[1], "a,\"b\"");
  // Issue 16: "Fe:0x23/25" read like hexadecimal; now signed states.
  EXPECT_EQ(Cell(fields, "oxidation_states"), "Ni+2:1;O-2:1");
  // No saturation estimate for NiO (no structure family): blank, not 0.
  EXPECT_EQ(Cell(fields, "saturation_moment_per_formula_unit"), "");
  EXPECT_EQ(Cell(fields, "saturation_moment_low"), "");
  EXPECT_EQ(Cell(fields, "saturation_moment_model"), "");
  EXPECT_EQ(Cell(fields, "moment_model"), "local_moment");
  EXPECT_EQ(Cell(fields, "total_valence_electrons"), "16");  // 10 + 6.
  // Octahedral Ni2+ measures 2.8-3.5 μB (Figgis and Lewis, from memory).
  EXPECT_EQ(Cell(fields, "expected_moment_low"), "2.8");
  EXPECT_EQ(Cell(fields, "expected_moment_high"), "3.5");
  // Ni2+ d8: 2 unpaired (Greenwood and Earnshaw, from memory); octahedral
  // d8 has one spin state, so none is written.
  EXPECT_EQ(Cell(fields, "ions"),
            "Ni+2 count=1 unpaired=2 moment=2.82843; "
            "O-2 count=1 unpaired=0 moment=0");
  EXPECT_EQ(Cell(fields, "diagnostic_codes"), "");
}

TEST(ReportLines, CsvLineHasTheMetallicMomentEstimate) {
  v1::CompositionRecord record;
  record.set_formula("Co2MnAl");
  v1::RecordReport proto;
  AnalyzeRecord(record, &proto);
  std::vector<std::string> fields;
  std::string error;
  for (const std::string& line : {ProtoLine(proto, ReportLineFormat::kCsv),
                                  EngineLine(record, ReportLineFormat::kCsv)}) {
    ASSERT_TRUE(SplitCsvLine(line.substr(0, line.size() - 1), &fields, &error));
    // M = Z_t - 24 = 28 - 24 (Galanakis et al., Phys. Rev. B 66, 174429
    // (2002), from memory).
    EXPECT_EQ(Cell(fields, "saturation_moment_per_formula_unit"), "4");
    EXPECT_EQ(Cell(fields, "saturation_moment_low"), "4");
    EXPECT_EQ(Cell(fields, "saturation_moment_high"), "4");
    EXPECT_EQ(Cell(fields, "saturation_moment_model"),
              "slater_pauling_full_heusler");
    EXPECT_EQ(Cell(fields, "moment_model"), "slater_pauling_full_heusler");
    EXPECT_EQ(Cell(fields, "total_valence_electrons"), "28");
    // No free-atom unpaired count.
    EXPECT_EQ(Cell(fields, "unpaired_per_formula_unit"), "0");
  }
  // Fe2VAl's estimate is 0, written as 0, not as a blank.
  record.set_formula("Fe2VAl");
  proto.Clear();
  AnalyzeRecord(record, &proto);
  const std::string line = ProtoLine(proto, ReportLineFormat::kCsv);
  ASSERT_TRUE(SplitCsvLine(line.substr(0, line.size() - 1), &fields, &error));
  EXPECT_EQ(Cell(fields, "saturation_moment_per_formula_unit"), "0");
}

TEST(ReportLines, RegressionInvalidRowsHaveBlankFigures) {
  // Issue 16: invalid rows showed 0 in the number columns.
  v1::CompositionRecord record;
  record.set_id("bad");
  record.set_formula("Fe2O3)");
  v1::RecordReport proto;
  AnalyzeRecord(record, &proto);
  const std::string line = ProtoLine(proto, ReportLineFormat::kCsv);
  std::vector<std::string> fields;
  std::string error;
  ASSERT_TRUE(SplitCsvLine(line.substr(0, line.size() - 1), &fields, &error));
  for (const char* name :
       {"score", "unpaired_per_formula_unit",
        "effective_moment_per_formula_unit", "expected_moment_low",
        "expected_moment_high", "curie_constant",
        "valence_electron_concentration", "saturation_moment_per_formula_unit",
        "saturation_moment_low", "saturation_moment_high",
        "saturation_moment_model", "moment_model", "structure_family",
        "total_valence_electrons", "ions"}) {
    EXPECT_EQ(Cell(fields, name), "") << name;
  }
  EXPECT_EQ(Cell(fields, "diagnostic_codes"), "error:malformed_formula");
  EXPECT_EQ(Cell(fields, "diagnostics").rfind("error malformed_formula: ", 0),
            0u)
      << Cell(fields, "diagnostics");
}

}  // namespace
}  // namespace shellwright::cli
