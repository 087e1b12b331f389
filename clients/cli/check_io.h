// Where `shellwright check` reads records and writes reports: a file or
// the standard streams, in a format named by the user or by the file's
// extension.
//
//   - RecordInput reads physical lines in constant memory (record_io.h's
//     LineSource) and, for CSV, the header up front, so that a bad header
//     is a usage error before any output is opened.
//   - RecordParser turns a line into a record (CSV or JSONL), one parser
//     per worker thread.
//   - ReportOutput writes report text with every write checked, and
//     Close() says whether all of it reached the file.
//
// Example:
//
//   absl::StatusOr<std::unique_ptr<RecordInput>> input =
//       RecordInput::Open("records.csv", RecordFormat::kAuto);
//   absl::StatusOr<std::unique_ptr<ReportOutput>> output =
//       ReportOutput::Open("reports.jsonl");
//   RecordParser parser(**input, /*default_alternatives=*/0);
//   std::string line;
//   int row;
//   bool too_long;
//   while ((*input)->NextLine(&line, &row, &too_long)) {
//     ParsedLine record = parser.Parse(line, row, too_long);
//     ...
//   }
//   absl::Status s = (*output)->Close();
//
// Thread safety: RecordInput and ReportOutput are used by one thread at a
// time; RecordParser is not thread-safe (one per thread).

#ifndef SHELLWRIGHT_CLIENTS_CLI_CHECK_IO_H_
#define SHELLWRIGHT_CLIENTS_CLI_CHECK_IO_H_

#include <sys/stat.h>
#include <sys/types.h>

#include <cstdint>
#include <memory>
#include <string>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "absl/strings/string_view.h"
#include "clients/cli/record_io.h"
#include "util/enum_names.h"

namespace shellwright::cli {

// How records and reports are written. kAuto: by the file's extension.
enum class RecordFormat { kAuto, kCsv, kJsonl };

}  // namespace shellwright::cli

// The names users give (--format, --out-format); kAuto is the absence of
// one.
template <>
struct shellwright::EnumNames<shellwright::cli::RecordFormat> {
  static constexpr absl::string_view kWhat = "format";
  static constexpr NamedValue<cli::RecordFormat> kNames[] = {
      {cli::RecordFormat::kCsv, "csv"}, {cli::RecordFormat::kJsonl, "jsonl"}};
};

namespace shellwright::cli {

// `given`, or the format `path`'s extension names (.csv; .jsonl, .ndjson,
// .json). INVALID_ARGUMENT when neither says.
absl::StatusOr<RecordFormat> InputFormat(const std::string& path,
                                         RecordFormat given);

// `given`, or the format `path`'s extension names, or JSONL for standard
// output ("-"). INVALID_ARGUMENT for any other path whose extension names
// no format (reports.xlsx, reports.tsv, reports): writing JSONL under such
// a name would mislead whoever opens the file.
absl::StatusOr<RecordFormat> OutputFormat(const std::string& path,
                                          RecordFormat given);

// The records' lines, from a file or standard input.
class RecordInput {
 public:
  // Opens `path` ("-": standard input) in `format` (kAuto: by extension)
  // and, for CSV, reads the header. NOT_FOUND (or the like) naming the
  // path when the file cannot be opened; INVALID_ARGUMENT for an unknown
  // format, a directory or a bad header. Once `stop_fd` (-1: none) is
  // readable, reading ends as at the end of the input (stopped()).
  static absl::StatusOr<std::unique_ptr<RecordInput>> Open(
      const std::string& path, RecordFormat format, int stop_fd = -1);

  ~RecordInput();

  RecordInput(const RecordInput&) = delete;
  RecordInput& operator=(const RecordInput&) = delete;

  // The next physical line after the header (empty ones included, so that
  // rows keep counting them). False at the end or on a read error (see
  // status()).
  bool NextLine(std::string* line, int* row, bool* too_long);

  // LineSource::Ready(): a line can be had without waiting.
  bool Ready() { return lines_.Ready(); }

  // OK, or DATA_LOSS once a read has failed.
  absl::Status status() const;

  // True when reading ended because of the stop fd.
  bool stopped() const { return lines_.stopped(); }

  // INVALID_ARGUMENT when `output_path` ("-": standard output) is the
  // file being read, whatever the names (symbolic or hard links): writing
  // it would destroy the input while it is read.
  absl::Status CheckNotInput(const std::string& output_path) const;

  RecordFormat format() const { return format_; }
  // The header's columns (CSV only).
  const CsvRecordReader& csv() const { return csv_; }
  // Bytes read so far, and the file's size (0 when unknown: a pipe).
  int64_t bytes_read() const { return lines_.bytes_read(); }
  int64_t size() const { return size_; }

 private:
  RecordInput(int fd, bool owned, RecordFormat format, int stop_fd,
              const struct stat& st);

  const int fd_;
  const bool owned_;  // A file we opened, not standard input.
  LineSource lines_;
  const RecordFormat format_;
  const int64_t size_;
  const dev_t device_;  // The input's identity, for CheckNotInput.
  const ino_t inode_;
  CsvRecordReader csv_;
};

// Turns lines into records: CSV per the input's header, or JSONL. A line
// that cannot be read becomes a ParsedLine with its error set.
class RecordParser {
 public:
  // `default_alternatives`: max_alternatives for records that set none.
  RecordParser(const RecordInput& input, int default_alternatives);

  ParsedLine Parse(absl::string_view line, int row, bool too_long);
  // The same into `out`, replacing what it held (and reusing its memory:
  // `check`'s workers keep a batch of lines).
  void Parse(absl::string_view line, int row, bool too_long, ParsedLine* out);

 private:
  const RecordFormat format_;
  CsvRecordReader csv_;  // A copy per parser: it keeps scratch buffers.
  const int default_alternatives_;
};

// Where report text goes: standard output, or a file. A file is written
// under a temporary name in its directory and renamed over `path` only by
// Close(), once every byte is on disk: a run that fails or is stopped
// leaves `path` as it was (absent, or the previous reports), never a
// truncated file that looks complete. A path that exists and is not a
// regular file (/dev/null, a pipe) is written directly. A symbolic link is
// followed: the file it names is replaced, the link kept.
class ReportOutput {
 public:
  // Opens `path` ("-": standard output) for writing. PERMISSION_DENIED
  // (or the like) naming the path when it cannot be written.
  static absl::StatusOr<std::unique_ptr<ReportOutput>> Open(
      const std::string& path);

  ~ReportOutput();  // Abandon(), unless Close() was called.
  ReportOutput(const ReportOutput&) = delete;
  ReportOutput& operator=(const ReportOutput&) = delete;

  // Writes all of `text`, or returns an error naming the output and the
  // system's reason (a full disk, a closed pipe).
  absl::Status Write(absl::string_view text);

  // Ends the output: makes a file's bytes durable and renames it into
  // place, checking each step. Call once, after the last Write.
  absl::Status Close();

  // Ends the output without committing it: a file's temporary is removed
  // and `path` left as it was. Standard output keeps what was written.
  void Abandon();

  // "standard output" or "output 'reports.jsonl'", for messages.
  const std::string& name() const { return name_; }

 private:
  ReportOutput(int fd, std::string name, std::string temp_path,
               std::string final_path);

  int fd_;                  // -1 once closed.
  const bool owned_;        // A file we opened, not standard output.
  const std::string name_;  // For messages.
  // Set when writing under a temporary name: that name, and the one it is
  // renamed to.
  const std::string temp_path_;
  const std::string final_path_;
};

}  // namespace shellwright::cli

#endif  // SHELLWRIGHT_CLIENTS_CLI_CHECK_IO_H_
