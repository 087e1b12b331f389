#include "clients/cli/check.h"

#include <algorithm>
#include <atomic>
#include <memory>
#include <mutex>
#include <thread>
#include <utility>
#include <vector>

#include "absl/container/flat_hash_map.h"
#include "absl/container/flat_hash_set.h"
#include "absl/hash/hash.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "absl/strings/string_view.h"
#include "absl/time/clock.h"
#include "absl/time/time.h"
#include "api/caution.h"
#include "clients/cli/ordered_pipeline.h"
#include "engine/diagnostic_codes.h"
#include "util/utf8.h"

namespace shellwright::cli {
namespace {

// One input line of a batch: CheckBatch::lines[offset, offset + size).
struct LineRef {
  size_t offset;
  size_t size;
  int row;
  bool too_long;  // Cut at kMaxLineBytes.
};

// A batch on its way through the pipeline: its input lines (the reader
// only splits them; parsing runs on the workers, in parallel), then its
// report lines.
struct CheckBatch {
  std::string lines;  // The batch's input lines, back to back.
  std::vector<LineRef> refs;
  ReportLines out;
};

ReportLineFormat LineFormat(RecordFormat f) {
  return f == RecordFormat::kCsv ? ReportLineFormat::kCsv
                                 : ReportLineFormat::kJsonl;
}

// Report texts already written out, kept for the batches to come: a
// batch's text is about 1 MB of JSONL, and a block written a moment ago
// is still in the caches (and mapped), where a new one would be fetched
// from memory, page by page, as its lines are written. The most recent
// goes first. Holds at most as many texts as batches are in flight.
class TextPool {
 public:
  // A text with no lines, with the room of one given back, if any.
  ReportText Take() {
    std::lock_guard<std::mutex> lock(mu_);
    if (free_.empty()) return ReportText();
    ReportText text = std::move(free_.back());
    free_.pop_back();
    return text;
  }
  void Give(ReportText text) {
    text.clear();
    std::lock_guard<std::mutex> lock(mu_);
    free_.push_back(std::move(text));
  }

 private:
  std::mutex mu_;
  std::vector<ReportText> free_;  // Guarded by mu_.
};

// The progress line: rows, rate and, for a file, a bar and an ETA.
class Progress {
 public:
  Progress(std::ostream* log, int64_t input_size)
      : log_(log), input_size_(input_size), start_(absl::Now()) {}

  // At most every 250 ms.
  void Update(int64_t rows, int64_t bytes_read) {
    const absl::Time now = absl::Now();
    if (now - last_ < absl::Milliseconds(250)) return;
    last_ = now;
    const double seconds = absl::ToDoubleSeconds(now - start_);
    const double rate = seconds > 0 ? rows / seconds : 0;
    std::string eta = "?";
    if (input_size_ > 0 && bytes_read > 0 && seconds > 0) {
      const double fraction =
          std::min(1.0, static_cast<double>(bytes_read) / input_size_);
      constexpr int kWidth = 30;
      const int filled = static_cast<int>(fraction * kWidth);
      eta = absl::StrFormat(
          "[%s%s] ETA %.0fs", std::string(filled, '#'),
          std::string(kWidth - filled, '.'),
          fraction > 0 ? seconds * (1 - fraction) / fraction : 0.0);
    }
    *log_ << absl::StrFormat("\r%d rows, %.0f rows/s %s   ", rows, rate, eta)
          << std::flush;
  }

  void Clear() { *log_ << "\r" << std::string(72, ' ') << "\r"; }

 private:
  std::ostream* const log_;
  const int64_t input_size_;
  const absl::Time start_;
  absl::Time last_ = absl::InfinitePast();
};

// Ids seen so far, by hash. A repeated id is a warning: on `log` for the
// first kShown, naming the row that first had it where that row is among
// the first kRememberedRows ids, and counted in the summary as
// duplicate_id. Memory: about 9 to 18 bytes per distinct id (a 64-bit
// hash in a set that doubles at 7/8 full; 1M ids take 19 MB, 28 MB while
// the set grows), plus the first rows of the first kRememberedRows ids.
class DuplicateIds {
 public:
  explicit DuplicateIds(std::ostream* log) : log_(log) {}

  void Check(const std::vector<ReportRow>& rows, ReportCounts* summary) {
    constexpr int64_t kShown = 20;
    // The set soon outgrows the caches: each id's slot is fetched a few
    // rows ahead of its insertion, so that the waits for memory overlap.
    constexpr size_t kAhead = 8;
    hashes_.resize(rows.size());
    for (size_t i = 0; i < rows.size(); ++i) {
      hashes_[i] = absl::HashOf(rows[i].id);
    }
    for (size_t i = 0; i < rows.size(); ++i) {
      if (i + kAhead < rows.size()) seen_.prefetch(hashes_[i + kAhead]);
      const ReportRow& r = rows[i];
      if (r.id.empty()) continue;  // Already an error (malformed_record).
      const uint64_t hash = hashes_[i];
      if (seen_.insert(hash).second) {
        if (first_row_.size() < kRememberedRows) first_row_[hash] = r.row;
        continue;
      }
      ++repeats_;
      ++summary->by_code[static_cast<int>(Severity::kWarning)]
                        [codes::kDuplicateId];
      ++summary->diagnostics;
      if (!r.warned) ++summary->rows_with_warnings;
      if (repeats_ <= kShown) {
        *log_ << "shellwright: check: warning: row " << r.row << ": id "
              << QuoteForMessage(r.id) << " repeats the id of ";
        const auto it = first_row_.find(hash);
        if (it != first_row_.end()) {
          *log_ << "row " << it->second << "\n";
        } else {
          *log_ << "an earlier row\n";
        }
      } else if (repeats_ == kShown + 1) {
        *log_ << "shellwright: check: warning: more repeated ids follow; "
                 "the summary counts them (duplicate_id)\n";
      }
    }
  }

 private:
  static constexpr size_t kRememberedRows = 1 << 16;
  std::ostream* const log_;
  absl::flat_hash_set<uint64_t> seen_;
  std::vector<uint64_t> hashes_;  // The batch's, reused.
  absl::flat_hash_map<uint64_t, int32_t> first_row_;
  int64_t repeats_ = 0;
};

}  // namespace

std::string FormatSummary(const ReportCounts& s, bool caution) {
  std::string out = absl::StrFormat(
      "%d rows: %d valid, %d invalid; %d with warnings; %d diagnostics\n",
      s.rows, s.valid, s.invalid, s.rows_with_warnings, s.diagnostics);
  // Codes under their severity: an invalid row may have several errors,
  // and warnings and info do not make a row invalid, so only the row
  // counts above add up to the rows.
  constexpr absl::string_view kHeadings[] = {
      "errors (each makes its row invalid)", "warnings (row stays valid)",
      "info"};
  for (int i = 0; i < 3; ++i) {
    if (s.by_code[i].empty()) continue;
    absl::StrAppend(&out, kHeadings[i], ":\n");
    for (const auto& [code, count] : s.by_code[i]) {
      absl::StrAppendFormat(&out, "  %-36s %d\n", code, count);
    }
  }
  if (caution) absl::StrAppend(&out, kMomentCaution, "\n");
  return out;
}

std::string FormatSummaryJson(const ReportCounts& s) {
  std::string out = absl::StrFormat(
      "{\"rows\":%d,\"valid\":%d,\"invalid\":%d,\"rows_with_warnings\":%d,"
      "\"diagnostics\":%d,\"codes\":{",
      s.rows, s.valid, s.invalid, s.rows_with_warnings, s.diagnostics);
  for (int i = 0; i < 3; ++i) {
    absl::StrAppend(&out, i > 0 ? "," : "", "\"",
                    Name(static_cast<Severity>(i)), "\":{");
    bool first = true;
    // Codes are lower-case ASCII identifiers (engine/diagnostic_codes.h).
    for (const auto& [code, count] : s.by_code[i]) {
      absl::StrAppend(&out, first ? "" : ",", "\"", code, "\":", count);
      first = false;
    }
    out += "}";
  }
  out += "}}\n";
  return out;
}

absl::StatusOr<CheckResult> RunCheck(const CheckOptions& options,
                                     Backend& backend, std::ostream& log) {
  const StopSignals* const stop = options.stop;
  absl::StatusOr<std::unique_ptr<RecordInput>> input = RecordInput::Open(
      options.input, options.input_format, stop ? stop->fd() : -1);
  if (!input.ok()) return input.status();
  absl::StatusOr<RecordFormat> output_format =
      OutputFormat(options.output, options.output_format);
  if (!output_format.ok()) return output_format.status();
  if (absl::Status s = (*input)->CheckNotInput(options.output); !s.ok()) {
    return s;
  }
  const ReportLineFormat format = LineFormat(*output_format);
  if (format == ReportLineFormat::kCsv) {
    if (absl::Status s = CheckCsvFields(options.fields); !s.ok()) return s;
  }
  // Opened only once the input looks usable, so that a usage error never
  // truncates an existing output file.
  absl::StatusOr<std::unique_ptr<ReportOutput>> output =
      ReportOutput::Open(options.output);
  if (!output.ok()) return output.status();
  if (format == ReportLineFormat::kCsv) {
    absl::Status s = (*output)->Write(ReportCsvHeader(options.fields) + "\n");
    if (!s.ok()) return s;
  }

  const int jobs = options.jobs > 0
                       ? options.jobs
                       : std::max(1u, std::thread::hardware_concurrency());
  const int batch_size =
      options.batch_size > 0 ? options.batch_size : backend.DefaultBatchSize();
  std::vector<std::unique_ptr<BatchProcessor>> processors;
  std::vector<RecordParser> parsers;
  std::vector<std::vector<ParsedLine>> parsed(jobs);  // Reused per worker.
  for (int j = 0; j < jobs; ++j) {
    processors.push_back(backend.NewBatchProcessor(format, options.fields));
    parsers.emplace_back(**input, options.default_alternatives);
  }

  TextPool texts;
  std::atomic<int64_t> bytes_read{0};
  bool stopped = false;  // The source's own.
  auto read = [&](CheckBatch* batch) -> absl::StatusOr<bool> {
    // A stop ends the input between batches (and wakes a waiting read).
    if (stop != nullptr && stop->signal() != 0) stopped = true;
    if (stopped || (*input)->stopped()) {
      stopped = true;
      return false;
    }
    batch->refs.reserve(batch_size);
    std::string line;
    int row = 0;
    bool too_long = false;
    // A batch goes on when full, or when the input (a pipe) has no more
    // lines for now: its reports should not wait for the next ones.
    while (static_cast<int>(batch->refs.size()) < batch_size &&
           (batch->refs.empty() || (*input)->Ready()) &&
           (*input)->NextLine(&line, &row, &too_long)) {
      if (line.empty()) continue;
      batch->refs.push_back(
          LineRef{batch->lines.size(), line.size(), row, too_long});
      batch->lines += line;
    }
    bytes_read.store((*input)->bytes_read(), std::memory_order_relaxed);
    if (absl::Status s = (*input)->status(); !s.ok()) return s;
    return !batch->refs.empty();
  };
  auto process = [&](int worker, CheckBatch& batch) {
    // Parsed into the worker's records of the batch before, which keep
    // their strings' memory.
    std::vector<ParsedLine>& lines = parsed[worker];
    lines.resize(batch.refs.size());
    for (size_t i = 0; i < batch.refs.size(); ++i) {
      const LineRef& ref = batch.refs[i];
      parsers[worker].Parse(
          absl::string_view(batch.lines).substr(ref.offset, ref.size), ref.row,
          ref.too_long, &lines[i]);
    }
    // About 3.8 KB per JSONL report (and 4 KB of room while one is
    // written) and 520 B per CSV line: room for the whole batch, so that
    // its text is never copied to grow.
    batch.out.text = texts.Take();
    batch.out.rows.reserve(batch.refs.size());
    batch.out.text.reserve((batch.refs.size() + 1) *
                           (format == ReportLineFormat::kCsv ? 640 : 4096));
    absl::Status status = processors[worker]->Process(lines, &batch.out);
    // The input is done with; free it on the thread that parsed it.
    std::string().swap(batch.lines);
    std::vector<LineRef>().swap(batch.refs);
    return status;
  };
  CheckResult result;
  ReportCounts& summary = result.counts;
  // Columns no record field has: named once, counted once.
  for (const std::string& unknown : (*input)->csv().unknown_columns()) {
    log << "shellwright: check: warning: " << unknown << "\n";
    ++summary
          .by_code[static_cast<int>(Severity::kWarning)][codes::kUnknownField];
    ++summary.diagnostics;
  }
  DuplicateIds duplicates(&log);
  Progress progress(&log, (*input)->size());
  auto write = [&](CheckBatch& batch) {
    absl::Status status = (*output)->Write(batch.out.text.view());
    texts.Give(std::move(batch.out.text));
    summary.Add(batch.out.counts);
    duplicates.Check(batch.out.rows, &summary);
    if (options.progress) {
      progress.Update(summary.rows, bytes_read.load(std::memory_order_relaxed));
    }
    return status;
  };

  OrderedPipeline<CheckBatch>::Options pipeline_options;
  pipeline_options.workers = jobs;
  // Enough batches for every worker to have one in hand and one waiting,
  // plus slack for workers that finish out of order.
  pipeline_options.max_in_flight = 4 * jobs + 4;
  OrderedPipeline<CheckBatch> pipeline(pipeline_options);
  absl::Status status = pipeline.Run(read, process, write);
  for (std::unique_ptr<BatchProcessor>& processor : processors) {
    absl::Status s = processor->Finish();
    if (status.ok()) status = std::move(s);
  }
  // Reading is over: the stop was seen by the source or not at all.
  if (stopped || (*input)->stopped()) result.stopped_by = stop->signal();
  if (status.ok() && result.stopped_by == 0) {
    status = (*output)->Close();
  } else {
    (*output)->Abandon();  // --out keeps what it had.
  }
  if (options.progress) progress.Clear();
  if (!status.ok()) return status;
  return result;
}

}  // namespace shellwright::cli
