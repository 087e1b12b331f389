// What answers `check`'s records, one batch at a time: the in-process
// engine or a shellwrightd stream, behind one interface (Backend makes
// them; see backend.h).
//
// A processor turns a batch of read lines into report lines in input
// order, exactly one per line: a line that could not be read as a record
// gets its malformed_record report (api/records.h), every other line the
// answer to its record. Formatting and counting go through report_lines.h,
// so both kinds of processor write the same bytes.
//
// Example:
//
//   std::unique_ptr<BatchProcessor> processor =
//       backend->NewBatchProcessor(ReportLineFormat::kJsonl);
//   ReportLines out;
//   absl::Status s = processor->Process(parsed_lines, &out);
//   // out.text holds parsed_lines.size() lines, out.counts their verdicts.
//   s = processor->Finish();
//
// Thread safety: a processor is used by one thread at a time; make one per
// worker thread.

#ifndef SHELLWRIGHT_CLIENTS_CLI_BATCH_PROCESSOR_H_
#define SHELLWRIGHT_CLIENTS_CLI_BATCH_PROCESSOR_H_

#include "absl/status/status.h"
#include "absl/types/span.h"
#include "clients/cli/record_io.h"
#include "clients/cli/report_lines.h"

namespace shellwright::cli {

class BatchProcessor {
 public:
  virtual ~BatchProcessor() = default;

  // Appends one report line per element of `lines`, in order, to
  // out->text, and counts them in out->counts. Non-OK only when the
  // answers cannot be had (a transport failure: UNAVAILABLE,
  // UNAUTHENTICATED, DATA_LOSS for a short reply, ...); `out` is then
  // unspecified and the processor unusable.
  virtual absl::Status Process(absl::Span<const ParsedLine> lines,
                               ReportLines* out) = 0;

  // Ends the processor's work: a remote one half-closes its stream and
  // returns the stream's final status. Call once, after the last Process.
  virtual absl::Status Finish() = 0;
};

}  // namespace shellwright::cli

#endif  // SHELLWRIGHT_CLIENTS_CLI_BATCH_PROCESSOR_H_
