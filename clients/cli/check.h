// `shellwright check`: batch validation of composition records.
//
// Streams records from CSV or JSONL (see record_io.h) through the engine on
// worker threads, or through a server's AnalyzeRecords stream, and writes
// exactly one report per input record, in input order, as JSONL or CSV.
// Memory stays bounded whatever the input size: at most a few batches per
// worker are in flight. A summary (valid and invalid counts, counts by
// diagnostic code) goes to `log`; a progress line too when `progress`.
//
// Example:
//
//   shellwright::cli::CheckOptions options;
//   options.input = "data/demo/sample_registry.csv";
//   options.output = "reports.jsonl";
//   absl::StatusOr<shellwright::cli::CheckSummary> summary =
//       shellwright::cli::RunCheck(options, /*remote=*/nullptr, std::cerr);
//
// Thread safety: RunCheck may be called from one thread at a time.

#ifndef SHELLWRIGHT_CLIENTS_CLI_CHECK_H_
#define SHELLWRIGHT_CLIENTS_CLI_CHECK_H_

#include <cstdint>
#include <map>
#include <ostream>
#include <string>

#include "absl/status/statusor.h"
#include "clients/cli/backend.h"
#include "util/enum_names.h"

namespace shellwright::cli {

// How records and reports are written. kAuto: by the file's extension.
enum class RecordFormat { kAuto, kCsv, kJsonl };

}  // namespace shellwright::cli

// The names users give (--format, --out-format); kAuto is the absence of one.
template <>
struct shellwright::EnumNames<shellwright::cli::RecordFormat> {
  static constexpr absl::string_view kWhat = "format";
  static constexpr NamedValue<cli::RecordFormat> kNames[] = {
      {cli::RecordFormat::kCsv, "csv"}, {cli::RecordFormat::kJsonl, "jsonl"}};
};

namespace shellwright::cli {

struct CheckOptions {
  std::string input = "-";   // Path, or "-" for standard input.
  std::string output = "-";  // Path, or "-" for standard output.
  RecordFormat input_format = RecordFormat::kAuto;   // By extension.
  RecordFormat output_format = RecordFormat::kAuto;  // By extension; JSONL.
  int jobs = 0;  // Worker threads; 0 means all cores.
  // Records per batch (and per stream message). 0 picks 256 in-process
  // (smaller batches keep less output in flight) and 500 for a server
  // (fewer, larger messages).
  int batch_size = 0;
  bool progress = false;
  // Alternatives asked for on records that do not set max_alternatives.
  // Batch runs default to none: they are rarely read and triple the work.
  int default_alternatives = 0;
};

struct CheckSummary {
  int64_t rows = 0;
  int64_t valid = 0;
  int64_t invalid = 0;
  std::map<std::string, int64_t> by_code;  // Diagnostic code -> count.
};

// INVALID_ARGUMENT for usage problems (unknown format, CSV header without
// id/formula), UNAVAILABLE/NOT_FOUND and the like for I/O and transport
// failures. Bad records are never errors: they get error reports.
absl::StatusOr<CheckSummary> RunCheck(const CheckOptions& options,
                                      Backend* remote, std::ostream& log);

// "3000 rows: 2700 valid, 300 invalid" plus one line per code.
std::string FormatSummary(const CheckSummary& summary);

}  // namespace shellwright::cli

#endif  // SHELLWRIGHT_CLIENTS_CLI_CHECK_H_
