// Fuzzes `check`'s record-line reader (clients/cli/record_io.h) for CSV and
// JSONL, and the report line written for whatever it reads.
//
// Input layout: the first byte picks the mode (bit 0: CSV or JSONL; bit 1:
// treat the line as one cut at kMaxLineBytes). For CSV the rest up to the
// first line break is the header (the full default header when it is not
// usable) and the remainder is the record line.
//
// Properties, for every line:
//   - exactly one report line comes out, as valid UTF-8 ending in "\n";
//   - the JSONL line parses back, as JSON, to the report it was written
//     from;
//   - the in-process path (engine report to text) and the proto path (the
//     record and the report crossing the wire as a server would send them)
//     give byte-identical JSONL and CSV lines.

#include <cstddef>
#include <cstdint>
#include <string>

#include "absl/strings/string_view.h"
#include "api/records.h"
#include "clients/cli/record_io.h"
#include "clients/cli/report_lines.h"
#include "engine/composition.h"
#include "google/protobuf/util/json_util.h"
#include "google/protobuf/util/message_differencer.h"
#include "tests/fuzz/fuzz_checks.h"

namespace {

using shellwright::cli::ReportLineFormat;
namespace v1 = shellwright::v1;

constexpr absl::string_view kDefaultHeader =
    "id,formula,charge,declared_states,geometry,spin_state,measured_moment,"
    "moment_tolerance,max_alternatives";

// The message after a round trip through its wire form, as the other side
// of a gRPC call would see it. Aborts when it does not survive the trip
// (proto3 rejects strings that are not UTF-8).
template <typename Message>
Message OverTheWire(const Message& message, absl::string_view input) {
  std::string bytes;
  FUZZ_CHECK(message.SerializeToString(&bytes), input);
  Message received;
  FUZZ_CHECK(received.ParseFromString(bytes), input);
  return received;
}

// Checks one written JSONL line against the report it was written from.
void CheckJsonLine(const std::string& line, const v1::RecordReport& report,
                   absl::string_view input) {
  FUZZ_CHECK(!line.empty() && line.back() == '\n', line);
  FUZZ_CHECK(line.find('\n') == line.size() - 1, line);
  FUZZ_CHECK(shellwright::testing::IsWellFormedUtf8(line), line);
  v1::RecordReport parsed;
  const auto status = google::protobuf::util::JsonStringToMessage(
      line.substr(0, line.size() - 1), &parsed);
  FUZZ_CHECK(status.ok(), line);
  FUZZ_CHECK(google::protobuf::util::MessageDifferencer::Equals(parsed, report),
             line);
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  if (size == 0) return 0;
  const bool csv = (data[0] & 1) != 0;
  const bool cut = (data[0] & 2) != 0;
  absl::string_view rest(reinterpret_cast<const char*>(data) + 1, size - 1);
  const absl::string_view input = rest;

  constexpr int kRow = 2;
  shellwright::cli::ParsedLine parsed;
  if (csv) {
    shellwright::cli::CsvRecordReader reader;
    const size_t nl = rest.find('\n');
    if (nl != absl::string_view::npos) {
      if (!reader.ReadHeader(rest.substr(0, nl)).ok()) {
        FUZZ_CHECK(reader.ReadHeader(kDefaultHeader).ok(), kDefaultHeader);
      }
      rest.remove_prefix(nl + 1);
    } else {
      FUZZ_CHECK(reader.ReadHeader(kDefaultHeader).ok(), kDefaultHeader);
    }
    parsed = cut ? shellwright::cli::TooLongLine(rest, kRow,
                                                 reader.id_is_first_column())
                 : reader.ParseLine(rest, kRow);
  } else {
    parsed = cut ? shellwright::cli::TooLongLine(rest, kRow, false)
                 : shellwright::cli::ParseJsonLine(rest, kRow);
  }
  if (!parsed.record.has_max_alternatives()) {
    parsed.record.set_max_alternatives(0);  // What `check` does by default.
  }

  if (!parsed.error.empty()) {
    v1::RecordReport malformed;
    shellwright::MalformedRecordReport(parsed.record, parsed.error, &malformed);
    const v1::RecordReport report = OverTheWire(malformed, input);
    std::string jsonl, csv_line;
    shellwright::cli::AppendReportLine(ReportLineFormat::kJsonl, report,
                                       &jsonl);
    shellwright::cli::AppendReportLine(ReportLineFormat::kCsv, report,
                                       &csv_line);
    CheckJsonLine(jsonl, report, input);
    FUZZ_CHECK(shellwright::testing::IsWellFormedUtf8(csv_line), csv_line);
    return 0;
  }

  // In process: engine report straight to text.
  const shellwright::CompositionReport engine_report =
      shellwright::AnalyzeComposition(
          shellwright::CompositionInputFromProto(parsed.record));
  std::string engine_jsonl, engine_csv;
  shellwright::cli::AppendReportLine(ReportLineFormat::kJsonl, engine_report,
                                     parsed.record, &engine_jsonl);
  shellwright::cli::AppendReportLine(ReportLineFormat::kCsv, engine_report,
                                     parsed.record, &engine_csv);

  // Through a server: the record goes over the wire, the report comes back.
  const v1::CompositionRecord sent = OverTheWire(parsed.record, input);
  v1::RecordReport answered;
  shellwright::AnalyzeRecord(sent, &answered);
  const v1::RecordReport received = OverTheWire(answered, input);
  std::string proto_jsonl, proto_csv;
  shellwright::cli::AppendReportLine(ReportLineFormat::kJsonl, received,
                                     &proto_jsonl);
  shellwright::cli::AppendReportLine(ReportLineFormat::kCsv, received,
                                     &proto_csv);

  FUZZ_CHECK(engine_jsonl == proto_jsonl, engine_jsonl + proto_jsonl);
  FUZZ_CHECK(engine_csv == proto_csv, engine_csv + proto_csv);
  CheckJsonLine(engine_jsonl, received, input);
  FUZZ_CHECK(!engine_csv.empty() && engine_csv.back() == '\n', engine_csv);
  FUZZ_CHECK(shellwright::testing::IsWellFormedUtf8(engine_csv), engine_csv);
  return 0;
}
