#include "clients/cli/check.h"

#include <malloc.h>
#include <sys/stat.h>
#include <unistd.h>

#include <atomic>
#include <condition_variable>
#include <deque>
#include <fstream>
#include <iostream>
#include <mutex>
#include <optional>
#include <thread>
#include <vector>

#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "absl/time/clock.h"
#include "api/caution.h"
#include "api/records.h"
#include "clients/cli/record_io.h"
#include "clients/cli/report_lines.h"

namespace shellwright::cli {
namespace {

// One input line of a batch: Batch::lines[offset, offset + size).
struct LineRef {
  size_t offset;
  size_t size;
  int row;
  bool too_long;  // Cut at kMaxLineBytes.
};

// Turns input lines into records. The reader thread only splits lines;
// parsing happens on the threads that use the records, so that it runs in
// parallel and records are freed on the thread that made them.
class LineParser {
 public:
  LineParser(RecordFormat format, const CsvRecordReader& csv,
             int default_alternatives)
      : format_(format),
        csv_(csv),
        default_alternatives_(default_alternatives) {}

  // A non-empty error marks a malformed line, answered locally.
  ParsedLine Parse(absl::string_view line, int row, bool too_long) {
    ParsedLine p;
    if (too_long) {
      p = TooLongLine(
          line, row,
          format_ == RecordFormat::kCsv && csv_.id_is_first_column());
    } else if (format_ == RecordFormat::kJsonl) {
      p = ParseJsonLine(line, row);
    } else {
      // One record per physical line, as the output promises one report
      // per input line: a quoted field cannot span lines, so a broken
      // quote costs exactly one record, never the ones after it.
      p = csv_.ParseLine(line, row);
    }
    if (!p.record.has_max_alternatives()) {
      p.record.set_max_alternatives(default_alternatives_);
    }
    return p;
  }

 private:
  const RecordFormat format_;
  CsvRecordReader csv_;  // A copy per thread: it keeps scratch buffers.
  const int default_alternatives_;
};

struct Batch {
  int64_t seq = 0;
  std::string lines;  // The batch's input lines, back to back.
  std::vector<LineRef> refs;
  std::vector<ParsedLine> items;  // Remote mode: the parsed lines.
  v1::ReportBatch reply;          // Remote mode: the server's answer.
  std::string text;               // Formatted output lines.
  CheckSummary summary;
};

// A blocking FIFO with a capacity, closed by the producer.
template <typename T>
class BoundedQueue {
 public:
  explicit BoundedQueue(size_t capacity) : capacity_(capacity) {}
  BoundedQueue(const BoundedQueue&) = delete;
  BoundedQueue& operator=(const BoundedQueue&) = delete;

  // Returns false if the queue was cancelled.
  bool Push(T value) {
    std::unique_lock<std::mutex> lock(mu_);
    not_full_.wait(lock,
                   [&] { return items_.size() < capacity_ || cancelled_; });
    if (cancelled_) return false;
    items_.push_back(std::move(value));
    not_empty_.notify_one();
    return true;
  }
  // Returns nullopt when closed and drained, or cancelled.
  std::optional<T> Pop() {
    std::unique_lock<std::mutex> lock(mu_);
    not_empty_.wait(lock,
                    [&] { return !items_.empty() || closed_ || cancelled_; });
    if (cancelled_ || items_.empty()) return std::nullopt;
    T value = std::move(items_.front());
    items_.pop_front();
    not_full_.notify_one();
    return value;
  }
  void Close() {
    std::lock_guard<std::mutex> lock(mu_);
    closed_ = true;
    not_empty_.notify_all();
  }
  void Cancel() {
    std::lock_guard<std::mutex> lock(mu_);
    cancelled_ = true;
    not_empty_.notify_all();
    not_full_.notify_all();
  }

 private:
  std::mutex mu_;
  std::condition_variable not_empty_, not_full_;
  std::deque<T> items_;
  const size_t capacity_;
  bool closed_ = false;
  bool cancelled_ = false;
};

// Collects finished batches and releases them in sequence order. Producers
// block while they are more than `window` batches ahead of the writer.
class OrderedSink {
 public:
  explicit OrderedSink(int64_t window) : window_(window) {}
  void Put(Batch batch) {
    std::unique_lock<std::mutex> lock(mu_);
    room_.wait(lock, [&] { return batch.seq < next_ + window_ || cancelled_; });
    if (cancelled_) return;
    const int64_t seq = batch.seq;
    done_.emplace(seq, std::move(batch));
    ready_.notify_all();
  }
  // Returns the next batch in order, or nullopt once `total` are out.
  std::optional<Batch> Next(const std::atomic<int64_t>& total,
                            const std::atomic<bool>& total_known) {
    std::unique_lock<std::mutex> lock(mu_);
    ready_.wait_for(lock, std::chrono::milliseconds(200), [&] {
      return done_.count(next_) > 0 || cancelled_ ||
             (total_known.load() && next_ >= total.load());
    });
    if (cancelled_) return std::nullopt;
    auto it = done_.find(next_);
    if (it == done_.end()) {
      if (total_known.load() && next_ >= total.load()) return std::nullopt;
      Batch none;  // Nothing yet; the caller retries.
      none.seq = -1;
      return none;
    }
    Batch b = std::move(it->second);
    done_.erase(it);
    ++next_;
    room_.notify_all();
    return b;
  }
  void Cancel() {
    std::lock_guard<std::mutex> lock(mu_);
    cancelled_ = true;
    ready_.notify_all();
    room_.notify_all();
  }
  void Wake() { ready_.notify_all(); }

 private:
  std::mutex mu_;
  std::condition_variable ready_, room_;
  std::map<int64_t, Batch> done_;
  int64_t next_ = 0;
  const int64_t window_;
  bool cancelled_ = false;
};

RecordFormat FormatFromPath(const std::string& path, RecordFormat fallback) {
  if (absl::EndsWithIgnoreCase(path, ".csv")) return RecordFormat::kCsv;
  if (absl::EndsWithIgnoreCase(path, ".jsonl") ||
      absl::EndsWithIgnoreCase(path, ".ndjson") ||
      absl::EndsWithIgnoreCase(path, ".json")) {
    return RecordFormat::kJsonl;
  }
  return fallback;
}

ReportLineFormat LineFormat(RecordFormat f) {
  return f == RecordFormat::kCsv ? ReportLineFormat::kCsv
                                 : ReportLineFormat::kJsonl;
}

// Counts one report in its batch's summary.
template <typename Diagnostics, typename CodeOf>
void Count(bool valid, const Diagnostics& diagnostics, CodeOf code_of,
           Batch* b) {
  ++b->summary.rows;
  ++(valid ? b->summary.valid : b->summary.invalid);
  for (const auto& d : diagnostics) ++b->summary.by_code[code_of(d)];
}

// Formats one report into its batch's output and counts it.
void Emit(RecordFormat output, const v1::RecordReport& r, Batch* b) {
  AppendReportLine(LineFormat(output), r, &b->text);
  Count(
      r.valid(), r.diagnostics(),
      [](const v1::Diagnostic& d) -> const std::string& { return d.code(); },
      b);
}

void Emit(RecordFormat output, const CompositionReport& r,
          const v1::CompositionRecord& record, Batch* b) {
  AppendReportLine(LineFormat(output), r, record, &b->text);
  Count(
      r.valid, r.diagnostics,
      [](const Diagnostic& d) -> const std::string& { return d.code; }, b);
}

v1::RecordReport MalformedReport(const ParsedLine& line) {
  v1::RecordReport report;
  MalformedRecordReport(line.record, line.error, &report);
  return report;
}

// Drops a formatted batch's input, records and replies.
void Release(Batch* b) {
  std::string().swap(b->lines);
  std::vector<LineRef>().swap(b->refs);
  std::vector<ParsedLine>().swap(b->items);
  b->reply.Clear();
}

}  // namespace

absl::StatusOr<RecordFormat> ParseRecordFormat(absl::string_view text) {
  if (text == "csv") return RecordFormat::kCsv;
  if (text == "jsonl") return RecordFormat::kJsonl;
  if (text == "auto") return RecordFormat::kAuto;
  return absl::InvalidArgumentError(
      absl::StrCat("unknown format '", text, "' (expected csv or jsonl)"));
}

std::string FormatSummary(const CheckSummary& s) {
  std::string out = absl::StrFormat("%d rows: %d valid, %d invalid\n", s.rows,
                                    s.valid, s.invalid);
  for (const auto& [code, count] : s.by_code) {
    absl::StrAppendFormat(&out, "  %-36s %d\n", code, count);
  }
  absl::StrAppend(&out, kMomentCaution, "\n");
  return out;
}

absl::StatusOr<CheckSummary> RunCheck(const CheckOptions& options,
                                      Backend* remote, std::ostream& log) {
  // Batches' output buffers are a few MB and change threads; keep glibc
  // from returning them to the kernel (and zeroing fresh pages) each time.
  mallopt(M_MMAP_THRESHOLD, 256 << 20);
  mallopt(M_TRIM_THRESHOLD, 512 << 20);
  RecordFormat in_format = options.input_format;
  if (in_format == RecordFormat::kAuto) {
    in_format = FormatFromPath(options.input, RecordFormat::kAuto);
    if (in_format == RecordFormat::kAuto) {
      return absl::InvalidArgumentError(
          absl::StrCat("cannot tell the format of '", options.input,
                       "' from its name; give --format csv or --format jsonl"));
    }
  }
  RecordFormat out_format = options.output_format;
  if (out_format == RecordFormat::kAuto) {
    out_format = FormatFromPath(options.output, RecordFormat::kJsonl);
  }

  std::ifstream in_file;
  std::istream* in = &std::cin;
  off_t input_size = 0;
  if (options.input != "-") {
    in_file.open(options.input, std::ios::binary);
    if (!in_file) {
      return absl::NotFoundError(
          absl::StrCat("cannot open input '", options.input, "'"));
    }
    struct stat st;
    if (stat(options.input.c_str(), &st) == 0 && S_ISREG(st.st_mode)) {
      input_size = st.st_size;
    }
    in = &in_file;
  }
  // The CSV header is read up front so that a bad header is a usage error.
  CsvRecordReader csv;
  std::string line;
  std::atomic<int64_t> bytes_read{0};
  // Lines come in constant memory; a byte-order mark (spreadsheet exports)
  // is dropped.
  LineSource source(in);
  int row = 0;
  bool too_long = false;
  if (in_format == RecordFormat::kCsv) {
    bool have_header = false;
    while (source.Next(&line, &row, &too_long)) {
      if (!line.empty()) {
        have_header = true;
        break;
      }
    }
    if (!have_header) {
      return absl::InvalidArgumentError("CSV input has no header line");
    }
    if (too_long) {
      return absl::InvalidArgumentError("CSV header line is too long");
    }
    absl::Status s = csv.ReadHeader(line);
    if (!s.ok()) return s;
  }
  // Opened only once the input looks usable, so that a usage error never
  // truncates an existing output file.
  std::ofstream out_file;
  std::ostream* out = &std::cout;
  if (options.output != "-") {
    out_file.open(options.output, std::ios::binary | std::ios::trunc);
    if (!out_file) {
      return absl::PermissionDeniedError(
          absl::StrCat("cannot open output '", options.output, "'"));
    }
    out = &out_file;
  }

  if (out_format == RecordFormat::kCsv) *out << ReportCsvHeader() << "\n";

  const int jobs = options.jobs > 0
                       ? options.jobs
                       : std::max(1u, std::thread::hardware_concurrency());
  const int batch_size =
      options.batch_size > 0 ? options.batch_size : (remote ? 500 : 256);
  BoundedQueue<Batch> input_queue(2 * jobs + 2);
  OrderedSink sink(4 * jobs + 4);
  std::atomic<int64_t> batches_total{0};
  std::atomic<bool> total_known{false};
  std::atomic<bool> failed{false};
  absl::Status failure;
  std::mutex failure_mu;
  auto fail = [&](absl::Status s) {
    std::lock_guard<std::mutex> lock(failure_mu);
    if (failure.ok()) failure = std::move(s);
    failed = true;
    input_queue.Cancel();
    sink.Cancel();
  };

  std::thread reader([&] {
    Batch batch;
    int64_t seq = 0;
    auto flush = [&] {
      batch.seq = seq++;
      if (!input_queue.Push(std::move(batch))) return false;
      batch = Batch();
      batch.refs.reserve(batch_size);
      return true;
    };
    batch.refs.reserve(batch_size);
    while (!failed && source.Next(&line, &row, &too_long)) {
      bytes_read = source.bytes_read();
      if (line.empty()) continue;
      batch.refs.push_back(
          LineRef{batch.lines.size(), line.size(), row, too_long});
      batch.lines += line;
      if (static_cast<int>(batch.refs.size()) == batch_size && !flush()) {
        break;
      }
    }
    if (source.bad()) fail(absl::DataLossError("error reading the input"));
    if (!batch.refs.empty() && !failed) flush();
    batches_total = seq;
    total_known = true;
    input_queue.Close();
    sink.Wake();
  });
  auto line_of = [](const Batch& b, const LineRef& ref) {
    return absl::string_view(b.lines).substr(ref.offset, ref.size);
  };
  std::vector<std::thread> workers;
  std::thread receiver;
  std::unique_ptr<Backend::RecordStream> stream;
  BoundedQueue<Batch> awaiting(4);
  if (remote == nullptr) {
    for (int j = 0; j < jobs; ++j) {
      workers.emplace_back([&] {
        LineParser parser(in_format, csv, options.default_alternatives);
        // Reports go straight from the engine to text: building a
        // message per record would cost as much as analysing it.
        while (std::optional<Batch> b = input_queue.Pop()) {
          // About 2.4 KB per JSONL report and 300 B per CSV line.
          b->text.reserve(b->refs.size() *
                          (out_format == RecordFormat::kCsv ? 320 : 2560));
          for (const LineRef& ref : b->refs) {
            const ParsedLine item =
                parser.Parse(line_of(*b, ref), ref.row, ref.too_long);
            if (item.error.empty()) {
              Emit(out_format,
                   AnalyzeComposition(CompositionInputFromProto(item.record)),
                   item.record, &*b);
            } else {
              Emit(out_format, MalformedReport(item), &*b);
            }
          }
          Release(&*b);
          sink.Put(std::move(*b));
        }
      });
    }
  } else {
    stream = remote->OpenRecordStream();
    if (stream == nullptr) {
      fail(absl::InternalError("the backend cannot stream records"));
    } else {
      // Sender: ship each batch's well-formed records as one RecordBatch.
      workers.emplace_back([&] {
        LineParser parser(in_format, csv, options.default_alternatives);
        while (std::optional<Batch> b = input_queue.Pop()) {
          v1::RecordBatch request;
          b->items.reserve(b->refs.size());
          for (const LineRef& ref : b->refs) {
            b->items.push_back(
                parser.Parse(line_of(*b, ref), ref.row, ref.too_long));
            if (b->items.back().error.empty()) {
              *request.add_records() = b->items.back().record;
            }
          }
          if (request.records_size() > 0 && !stream->Write(request)) {
            fail(absl::UnavailableError("the server closed the stream"));
            break;
          }
          if (!awaiting.Push(std::move(*b))) break;
        }
        stream->WritesDone();
        awaiting.Close();
      });
      // Receiver: match each reply to its batch, in order.
      receiver = std::thread([&] {
        while (std::optional<Batch> b = awaiting.Pop()) {
          int expected = 0;
          for (const ParsedLine& item : b->items) {
            expected += item.error.empty();
          }
          if (expected > 0) {
            v1::ReportBatch& reply = b->reply;
            if (!stream->Read(&reply) || reply.reports_size() != expected) {
              fail(absl::DataLossError(absl::StrCat(
                  "the server's reply to batch ", b->seq,
                  " is missing or has the wrong number of reports")));
              break;
            }
          }
          int k = 0;
          for (const ParsedLine& item : b->items) {
            if (item.error.empty()) {
              Emit(out_format, b->reply.reports(k++), &*b);
            } else {
              Emit(out_format, MalformedReport(item), &*b);
            }
          }
          Release(&*b);
          sink.Put(std::move(*b));
        }
      });
    }
  }

  // Writer (this thread).
  CheckSummary summary;
  const absl::Time start = absl::Now();
  absl::Time last_progress = start;
  while (true) {
    std::optional<Batch> b = sink.Next(batches_total, total_known);
    if (!b.has_value()) break;
    if (b->seq >= 0) {
      *out << b->text;
      summary.rows += b->summary.rows;
      summary.valid += b->summary.valid;
      summary.invalid += b->summary.invalid;
      for (const auto& [code, count] : b->summary.by_code) {
        summary.by_code[code] += count;
      }
      if (!*out) {
        fail(absl::DataLossError("error writing the output"));
        break;
      }
    }
    if (options.progress &&
        absl::Now() - last_progress > absl::Milliseconds(250)) {
      last_progress = absl::Now();
      const double seconds = absl::ToDoubleSeconds(last_progress - start);
      const double rate = seconds > 0 ? summary.rows / seconds : 0;
      std::string eta = "?";
      if (input_size > 0 && bytes_read > 0 && seconds > 0) {
        const double fraction =
            std::min(1.0, static_cast<double>(bytes_read) / input_size);
        const int width = 30;
        const int filled = static_cast<int>(fraction * width);
        eta = absl::StrFormat(
            "[%s%s] ETA %.0fs", std::string(filled, '#'),
            std::string(width - filled, '.'),
            fraction > 0 ? seconds * (1 - fraction) / fraction : 0.0);
      }
      log << absl::StrFormat("\r%d rows, %.0f rows/s %s   ", summary.rows, rate,
                             eta)
          << std::flush;
    }
  }
  input_queue.Cancel();
  reader.join();
  for (std::thread& w : workers) w.join();
  if (receiver.joinable()) receiver.join();
  if (stream != nullptr) {
    absl::Status s = stream->Finish();
    if (!s.ok() && !failed) fail(s);
  }
  out->flush();
  if (options.progress) log << "\r" << std::string(72, ' ') << "\r";
  if (failed) return failure;
  return summary;
}

}  // namespace shellwright::cli
