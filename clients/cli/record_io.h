// Reading composition records from CSV or JSONL, one record per line, in
// constant memory (clients/cli/report_lines.h writes the reports).
//
// Input rules:
//   - CSV: the first line is a header naming the columns (matched without
//     regard to case or surrounding spaces); `id` and `formula` are
//     required, and `charge`, `declared_states`, `geometry`,
//     `spin_state`, `measured_moment`, `moment_tolerance`,
//     `measured_saturation_moment`, `saturation_moment_tolerance`,
//     `structure_family`, `temperature`, `max_alternatives`, `variables`
//     are understood (other columns are
//     ignored, and listed by unknown_columns()). One record per line: fields
//     may be quoted ("a, b"), with "" for a quote inside, but may not span
//     lines (a line break inside quotes would let one broken quote swallow the
//     records after it; the output promises one report per input line). Empty
//     lines are skipped, and row numbers keep counting them. A record whose id
//     is empty is malformed.
//   - JSONL: one shellwright.v1.CompositionRecord JSON object per line
//     (proto field names). A key that is no field is ignored with an
//     "unknown_field" warning in the record's report (naming the field it
//     was likely meant to be); a value of the wrong type makes the line
//     malformed with a message naming the field and the type it needs.
//     Empty lines are skipped.
// A line that cannot be read (bad quoting, wrong field count, a value that
// is not a number, broken JSON, longer than kMaxLineBytes) becomes an error
// report with code "malformed_record" (api/records.h's
// MalformedRecordReport), so every non-empty input line gets exactly one
// output line. Invalid UTF-8 becomes U+FFFD.
// Row numbers are physical line numbers, 1-based (a CSV header is line 1).
//
// Example:
//
//   shellwright::cli::CsvRecordReader reader;
//   absl::Status s = reader.ReadHeader("id,formula,charge");
//   shellwright::cli::ParsedLine p = reader.ParseLine("s1,Fe3O4,", 2);
//   // p.record.formula() == "Fe3O4", p.error is empty
//
// Thread safety: readers are not thread-safe (one per thread); the free
// functions are.

#ifndef SHELLWRIGHT_CLIENTS_CLI_RECORD_IO_H_
#define SHELLWRIGHT_CLIENTS_CLI_RECORD_IO_H_

#include <algorithm>
#include <cstdint>
#include <iterator>
#include <string>
#include <vector>

#include "absl/status/status.h"
#include "absl/strings/string_view.h"
#include "shellwright/v1/electron_structure.pb.h"

namespace shellwright::cli {

// Longest input line accepted; longer lines become malformed_record.
inline constexpr size_t kMaxLineBytes = 1 << 20;

// Physical lines of a file descriptor in constant memory: a line longer
// than kMaxLineBytes is cut there (the rest is skipped, not stored) and
// flagged. A UTF-8 byte-order mark at the very start is dropped. Lines
// lose their "\n" and a trailing "\r". Reads take what is there (a pipe's
// lines are answered as they come), and a read that waits can be woken by
// `stop_fd` becoming readable (util/stop_signals.h): the input then ends
// there, as if at its end, with stopped() true, and a line not yet ended
// by "\n" is dropped, never returned in part.
class LineSource {
 public:
  // Reads `fd`, which the caller keeps open; `stop_fd` -1: never stopped.
  explicit LineSource(int fd, int stop_fd = -1);
  LineSource(const LineSource&) = delete;
  LineSource& operator=(const LineSource&) = delete;

  // False at the end of the input, on a read error (see bad()), or once
  // stopped.
  bool Next(std::string* line, int* line_no, bool* too_long);

  // True when Next() would answer without waiting for the input: a whole
  // line is buffered, more can be read now, or the input is over. Lets a
  // reader of a pipe hand on what it has instead of waiting for more.
  bool Ready();

  int64_t bytes_read() const { return bytes_read_; }
  bool bad() const { return error_ != 0; }
  int error() const { return error_; }  // The failed read's errno.
  bool stopped() const { return stopped_; }

 private:
  bool Fill();

  const int fd_;
  const int stop_fd_;
  std::vector<char> buffer_;
  size_t pos_ = 0;
  size_t end_ = 0;
  int line_no_ = 0;
  int64_t bytes_read_ = 0;
  bool at_start_ = true;
  bool at_end_ = false;
  bool stopped_ = false;
  int error_ = 0;
};

// A reader's warning about a line it could read: its report carries it
// with severity "warning".
struct ReaderWarning {
  std::string code;  // engine/diagnostic_codes.h, e.g. "unknown_field".
  std::string message;
};

struct ParsedLine {
  v1::CompositionRecord record;         // row and whatever could be read.
  std::string error;                    // Non-empty for a malformed line.
  std::vector<ReaderWarning> warnings;  // Usually none.
};

// Adds `line`'s reader warnings to `report` as diagnostics with severity
// "warning", after those it has. Thread-safe for distinct reports.
void AddReaderWarnings(const ParsedLine& line, v1::RecordReport* report);

// The record field that `name` (an unknown key or column) was most likely
// meant to be: the same name in another case or with spaces or '-' for
// '_', or one at most two edits away. Empty when none is that close.
std::string NearestRecordField(absl::string_view name);

// Splits one CSV line. Returns false with `error` set on bad quoting.
bool SplitCsvLine(absl::string_view line, std::vector<std::string>* fields,
                  std::string* error);

class CsvRecordReader {
 public:
  CsvRecordReader() { std::fill(std::begin(column_), std::end(column_), -1); }
  // INVALID_ARGUMENT when `id` or `formula` is missing or a column repeats.
  absl::Status ReadHeader(absl::string_view line);
  // One record from one line after the header.
  ParsedLine ParseLine(absl::string_view line, int row);
  // The same into `out`, whose earlier contents it replaces (reusing
  // their memory: a caller that parses many lines keeps a few).
  void ParseLine(absl::string_view line, int row, ParsedLine* out);
  bool id_is_first_column() const { return column_[kId] == 0; }

  // The header's columns that no record field has, each with a "did you
  // mean" hint where one is close: "column 'Formla' is not a record field
  // and is ignored (did you mean 'formula'?)". `check` prints them once.
  const std::vector<std::string>& unknown_columns() const {
    return unknown_columns_;
  }

 private:
  // The columns the reader understands; column_[k] is the position of
  // column k in the header, or -1.
  enum Column {
    kId,
    kFormula,
    kCharge,
    kDeclaredStates,
    kGeometry,
    kSpinState,
    kMeasuredMoment,
    kMomentTolerance,
    kMaxAlternatives,
    kVariables,
    kMeasuredSaturationMoment,
    kSaturationMomentTolerance,
    kStructureFamily,
    kTemperature,
    kColumns
  };
  // The field of column k in the last split line, or "" when absent.
  const std::string& Field(Column k) const {
    const int i = column_[k];
    return i >= 0 && static_cast<size_t>(i) < fields_.size() ? fields_[i]
                                                             : empty_;
  }

  size_t header_size_ = 0;
  int column_[kColumns];
  std::vector<std::string> unknown_columns_;
  std::vector<std::string> fields_;  // Reused for every line.
  std::string empty_;  // Field() of an absent column; stays empty.
};

ParsedLine ParseJsonLine(absl::string_view line, int row);

// The error for a line cut at kMaxLineBytes; for CSV, the id is recovered
// from the start of the line when it is the first column.
ParsedLine TooLongLine(absl::string_view prefix, int row, bool csv_id_first);

}  // namespace shellwright::cli

#endif  // SHELLWRIGHT_CLIENTS_CLI_RECORD_IO_H_
