#include "clients/cli/check_io.h"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <iostream>
#include <utility>

#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"

namespace shellwright::cli {
namespace {

RecordFormat FormatFromPath(const std::string& path) {
  if (absl::EndsWithIgnoreCase(path, ".csv")) return RecordFormat::kCsv;
  if (absl::EndsWithIgnoreCase(path, ".jsonl") ||
      absl::EndsWithIgnoreCase(path, ".ndjson") ||
      absl::EndsWithIgnoreCase(path, ".json")) {
    return RecordFormat::kJsonl;
  }
  return RecordFormat::kAuto;
}

}  // namespace

absl::StatusOr<RecordFormat> InputFormat(const std::string& path,
                                         RecordFormat given) {
  if (given != RecordFormat::kAuto) return given;
  const RecordFormat format = FormatFromPath(path);
  if (format == RecordFormat::kAuto) {
    return absl::InvalidArgumentError(
        absl::StrCat("cannot tell the format of '", path,
                     "' from its name; give --format csv or --format jsonl"));
  }
  return format;
}

absl::StatusOr<RecordFormat> OutputFormat(const std::string& path,
                                          RecordFormat given) {
  if (given != RecordFormat::kAuto) return given;
  if (path == "-") return RecordFormat::kJsonl;
  const RecordFormat format = FormatFromPath(path);
  if (format == RecordFormat::kAuto) {
    return absl::InvalidArgumentError(absl::StrCat(
        "cannot tell which format to write to '", path,
        "' from its name (.csv, .jsonl, .ndjson or .json); give --out-format "
        "csv or --out-format jsonl"));
  }
  return format;
}

// ---------------------------------------------------------------------------
// RecordInput.

RecordInput::RecordInput(std::unique_ptr<std::ifstream> file,
                         RecordFormat format, int64_t size)
    : file_(std::move(file)),
      lines_(file_ != nullptr ? static_cast<std::istream*>(file_.get())
                              : &std::cin),
      format_(format),
      size_(size) {}

absl::StatusOr<std::unique_ptr<RecordInput>> RecordInput::Open(
    const std::string& path, RecordFormat format) {
  absl::StatusOr<RecordFormat> resolved = InputFormat(path, format);
  if (!resolved.ok()) return resolved.status();
  std::unique_ptr<std::ifstream> file;
  int64_t size = 0;
  if (path != "-") {
    file = std::make_unique<std::ifstream>(path, std::ios::binary);
    if (!*file) {
      return absl::NotFoundError(
          absl::StrCat("cannot open input '", path, "'"));
    }
    struct stat st;
    if (stat(path.c_str(), &st) == 0 && S_ISREG(st.st_mode)) {
      size = st.st_size;
    }
  }
  std::unique_ptr<RecordInput> input(
      new RecordInput(std::move(file), *resolved, size));
  if (*resolved == RecordFormat::kCsv) {
    // The header comes first, so that a bad one is a usage error before
    // any output exists.
    std::string line;
    int row = 0;
    bool too_long = false;
    bool have_header = false;
    while (input->NextLine(&line, &row, &too_long)) {
      if (!line.empty()) {
        have_header = true;
        break;
      }
    }
    if (!input->status().ok()) return input->status();
    if (!have_header) {
      return absl::InvalidArgumentError("CSV input has no header line");
    }
    if (too_long) {
      return absl::InvalidArgumentError("CSV header line is too long");
    }
    if (absl::Status s = input->csv_.ReadHeader(line); !s.ok()) return s;
  }
  return input;
}

bool RecordInput::NextLine(std::string* line, int* row, bool* too_long) {
  return lines_.Next(line, row, too_long);
}

absl::Status RecordInput::status() const {
  return lines_.bad() ? absl::DataLossError("error reading the input")
                      : absl::OkStatus();
}

// ---------------------------------------------------------------------------
// RecordParser.

RecordParser::RecordParser(const RecordInput& input, int default_alternatives)
    : format_(input.format()),
      csv_(input.csv()),
      default_alternatives_(default_alternatives) {}

ParsedLine RecordParser::Parse(absl::string_view line, int row, bool too_long) {
  ParsedLine p;
  if (too_long) {
    p = TooLongLine(line, row,
                    format_ == RecordFormat::kCsv && csv_.id_is_first_column());
  } else if (format_ == RecordFormat::kJsonl) {
    p = ParseJsonLine(line, row);
  } else {
    // One record per physical line, as the output promises one report per
    // input line: a quoted field cannot span lines, so a broken quote costs
    // exactly one record, never the ones after it.
    p = csv_.ParseLine(line, row);
  }
  if (!p.record.has_max_alternatives()) {
    p.record.set_max_alternatives(default_alternatives_);
  }
  return p;
}

// ---------------------------------------------------------------------------
// ReportOutput.

ReportOutput::ReportOutput(int fd, std::string name)
    : fd_(fd), owned_(fd != STDOUT_FILENO), name_(std::move(name)) {}

absl::StatusOr<std::unique_ptr<ReportOutput>> ReportOutput::Open(
    const std::string& path) {
  if (path == "-") {
    return std::unique_ptr<ReportOutput>(
        new ReportOutput(STDOUT_FILENO, "standard output"));
  }
  const int fd =
      open(path.c_str(), O_WRONLY | O_CREAT | O_TRUNC | O_CLOEXEC, 0666);
  if (fd < 0) {
    return absl::ErrnoToStatus(errno,
                               absl::StrCat("cannot open output '", path, "'"));
  }
  return std::unique_ptr<ReportOutput>(
      new ReportOutput(fd, absl::StrCat("output '", path, "'")));
}

ReportOutput::~ReportOutput() {
  if (fd_ >= 0 && owned_) close(fd_);
}

absl::Status ReportOutput::Write(absl::string_view text) {
  if (fd_ < 0) return absl::FailedPreconditionError("output already closed");
  while (!text.empty()) {
    const ssize_t n = write(fd_, text.data(), text.size());
    if (n < 0) {
      if (errno == EINTR) continue;
      return absl::ErrnoToStatus(errno,
                                 absl::StrCat("cannot write to ", name_));
    }
    text.remove_prefix(static_cast<size_t>(n));
  }
  return absl::OkStatus();
}

absl::Status ReportOutput::Close() {
  if (fd_ < 0) return absl::FailedPreconditionError("output already closed");
  const int fd = fd_;
  fd_ = -1;
  // Writes go straight to the file descriptor, so nothing is buffered
  // here; close() can still report a failed write-back (NFS, quotas).
  if (owned_ && close(fd) != 0) {
    return absl::ErrnoToStatus(errno, absl::StrCat("cannot close ", name_));
  }
  return absl::OkStatus();
}

}  // namespace shellwright::cli
