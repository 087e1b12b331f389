// `shellwright check`: batch validation of composition records.
//
// A short driver over its parts:
//   RecordInput (check_io.h)  -> batches of lines, on a reader thread;
//   RecordParser + BatchProcessor (batch_processor.h), on worker threads:
//     records answered by the engine or by a server's stream, as lines;
//   ReportOutput (check_io.h) <- the lines, in input order, on the caller.
// OrderedPipeline (ordered_pipeline.h) keeps the order and bounds the
// batches in flight, so memory stays constant whatever the input size.
// Exactly one report per input record. A summary (valid and invalid
// counts, counts by diagnostic code) goes to `log`; a progress line too
// when `progress`.
//
// Example:
//
//   shellwright::cli::CheckOptions options;
//   options.input = "data/demo/sample_registry.csv";
//   options.output = "reports.jsonl";
//   std::unique_ptr<shellwright::cli::Backend> engine =
//       shellwright::cli::MakeInProcessBackend();
//   absl::StatusOr<shellwright::cli::CheckResult> result =
//       shellwright::cli::RunCheck(options, *engine, std::cerr);
//
// Thread safety: RunCheck may be called from one thread at a time.

#ifndef SHELLWRIGHT_CLIENTS_CLI_CHECK_H_
#define SHELLWRIGHT_CLIENTS_CLI_CHECK_H_

#include <ostream>
#include <string>

#include "absl/status/statusor.h"
#include "clients/cli/backend.h"
#include "clients/cli/check_io.h"
#include "clients/cli/report_lines.h"
#include "util/stop_signals.h"

namespace shellwright::cli {

struct CheckOptions {
  std::string input = "-";   // Path, or "-" for standard input.
  std::string output = "-";  // Path, or "-" for standard output.
  RecordFormat input_format = RecordFormat::kAuto;   // By extension.
  RecordFormat output_format = RecordFormat::kAuto;  // By extension; JSONL.
  // Worker threads (with a server: streams); 0 means all cores.
  int jobs = 0;
  // Records per batch (and per stream message); 0: the backend's default.
  int batch_size = 0;
  bool progress = false;
  // The report fields to write (JSONL keys, CSV columns); a server is
  // asked for only those (api/report_mask.h). Default: all.
  ReportMask fields;
  // Alternatives asked for on records that do not set max_alternatives.
  // Batch runs default to none: they are rarely read and triple the work.
  int default_alternatives = 0;
  // When set and a stop is requested (SIGINT, SIGTERM), reading stops;
  // the records already read are answered and written, whole lines only.
  const StopSignals* stop = nullptr;
};

struct CheckResult {
  ReportCounts counts;  // Of the reports written.
  // The signal that stopped the run before the end of its input, or 0. A
  // stopped run's --out file is not written (standard output keeps the
  // whole lines written before the stop).
  int stopped_by = 0;
};

// Runs check: reads records, answers them through `backend` (one batch
// processor per worker), writes one report per record in input order.
// Returns the counts, or INVALID_ARGUMENT for usage problems (unknown
// format, a CSV header without id or formula, an output that is the
// input, CSV output of a field without a column: "fields: ..."), NOT_FOUND,
// PERMISSION_DENIED, DATA_LOSS and the like for I/O failures (every write is
// checked; --out is replaced only on success), and the transport's status when
// a server fails. Bad records are never errors: they get error reports.
absl::StatusOr<CheckResult> RunCheck(const CheckOptions& options,
                                     Backend& backend, std::ostream& log);

// "3000 rows: 2700 valid, 300 invalid; 120 with warnings; 450
// diagnostics", then one line per code under its severity (errors,
// warnings, info), and the moment caution when `caution`.
std::string FormatSummary(const ReportCounts& summary, bool caution = true);

// The same counts as one JSON object, line break included, for pipelines:
//   {"rows":3000,"valid":2700,"invalid":300,"rows_with_warnings":120,
//    "diagnostics":450,"codes":{"error":{"malformed_formula":40,...},
//    "warning":{...},"info":{...}}}
std::string FormatSummaryJson(const ReportCounts& summary);

}  // namespace shellwright::cli

#endif  // SHELLWRIGHT_CLIENTS_CLI_CHECK_H_
