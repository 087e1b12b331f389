// Reading composition records from CSV or JSONL, and writing reports as
// JSONL or CSV, one line per record, in constant memory.
//
// Input rules:
//   - CSV: the first line is a header naming the columns; `id` and
//     `formula` are required, and `charge`, `declared_states`, `geometry`,
//     `spin_state`, `measured_moment`, `moment_tolerance`,
//     `max_alternatives` are understood (other columns are ignored). One
//     record per line: fields may be quoted ("a, b"), with "" for a quote
//     inside, but may not span lines. Empty lines are skipped.
//   - JSONL: one shellwright.v1.CompositionRecord JSON object per line
//     (proto field names; unknown fields ignored). Empty lines are skipped.
// A line that cannot be read (bad quoting, wrong field count, a value that
// is not a number, broken JSON) becomes an error report with code
// "malformed_record", so every input line gets exactly one output line.
// Row numbers are physical line numbers, 1-based (a CSV header is line 1).
//
// Example:
//
//   shellwright::cli::CsvRecordReader reader;
//   absl::Status s = reader.ReadHeader("id,formula,charge");
//   shellwright::cli::ParsedLine p = reader.ParseLine("s1,Fe3O4,", 2);
//   // p.record.formula() == "Fe3O4", p.error is empty
//
// Thread safety: readers are not thread-safe; the formatting functions are.

#ifndef SHELLWRIGHT_CLIENTS_CLI_RECORD_IO_H_
#define SHELLWRIGHT_CLIENTS_CLI_RECORD_IO_H_

#include <map>
#include <string>
#include <vector>

#include "absl/status/status.h"
#include "absl/strings/string_view.h"
#include "shellwright/v1/electron_structure.pb.h"

namespace shellwright::cli {

// Longest input line accepted; longer lines become malformed_record.
inline constexpr size_t kMaxLineBytes = 1 << 20;

struct ParsedLine {
  v1::CompositionRecord record;  // row and whatever could be read.
  std::string error;             // Non-empty for a malformed line.
};

// Splits one CSV line. Returns false with `error` set on bad quoting.
bool SplitCsvLine(absl::string_view line, std::vector<std::string>* fields,
                  std::string* error);

class CsvRecordReader {
 public:
  // INVALID_ARGUMENT when `id` or `formula` is missing or a column repeats.
  absl::Status ReadHeader(absl::string_view line);
  ParsedLine ParseLine(absl::string_view line, int row) const;

 private:
  std::vector<std::string> columns_;
  std::map<std::string, size_t> index_;
};

ParsedLine ParseJsonLine(absl::string_view line, int row);

// The error report for a malformed line.
v1::RecordReport MalformedRecordReport(const ParsedLine& line);

// One JSONL line (no trailing newline): the report in compact proto JSON.
std::string ReportToJsonLine(const v1::RecordReport& report);

// CSV header and one CSV line for reports.
std::string ReportCsvHeader();
std::string ReportToCsvLine(const v1::RecordReport& report);

}  // namespace shellwright::cli

#endif  // SHELLWRIGHT_CLIENTS_CLI_RECORD_IO_H_
