#include "clients/cli/check_io.h"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstdlib>
#include <cstring>
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

RecordInput::RecordInput(int fd, bool owned, RecordFormat format, int stop_fd,
                         const struct stat& st)
    : fd_(fd),
      owned_(owned),
      lines_(fd, stop_fd),
      format_(format),
      size_(S_ISREG(st.st_mode) ? st.st_size : 0),
      device_(st.st_dev),
      inode_(st.st_ino) {}

RecordInput::~RecordInput() {
  if (owned_) close(fd_);
}

absl::StatusOr<std::unique_ptr<RecordInput>> RecordInput::Open(
    const std::string& path, RecordFormat format, int stop_fd) {
  absl::StatusOr<RecordFormat> resolved = InputFormat(path, format);
  if (!resolved.ok()) return resolved.status();
  const bool is_stdin = path == "-";
  const int fd =
      is_stdin ? STDIN_FILENO : open(path.c_str(), O_RDONLY | O_CLOEXEC);
  if (fd < 0) {
    return absl::ErrnoToStatus(errno,
                               absl::StrCat("cannot open input '", path, "'"));
  }
  struct stat st {};
  if (fstat(fd, &st) != 0) {
    const int error = errno;
    if (!is_stdin) close(fd);
    return absl::ErrnoToStatus(error,
                               absl::StrCat("cannot read input '", path, "'"));
  }
  std::unique_ptr<RecordInput> input(
      new RecordInput(fd, !is_stdin, *resolved, stop_fd, st));
  if (S_ISDIR(st.st_mode)) {
    return absl::InvalidArgumentError(
        absl::StrCat("input '", path, "' is a directory"));
  }
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
    if (!have_header && input->stopped()) return input;  // Nothing to do.
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

absl::Status RecordInput::CheckNotInput(const std::string& output_path) const {
  struct stat st {};
  const bool exists = output_path == "-" ? fstat(STDOUT_FILENO, &st) == 0
                                         : stat(output_path.c_str(), &st) == 0;
  // Only a regular file can be both: a terminal or a pipe on both ends is
  // two streams.
  if (exists && S_ISREG(st.st_mode) && st.st_dev == device_ &&
      st.st_ino == inode_) {
    return absl::InvalidArgumentError(absl::StrCat(
        output_path == "-" ? "standard output"
                           : absl::StrCat("--out '", output_path, "'"),
        " is the input file; writing it would destroy the records while "
        "they are read. Write the reports to another file"));
  }
  return absl::OkStatus();
}

bool RecordInput::NextLine(std::string* line, int* row, bool* too_long) {
  return lines_.Next(line, row, too_long);
}

absl::Status RecordInput::status() const {
  if (!lines_.bad()) return absl::OkStatus();
  return absl::DataLossError(
      absl::StrCat("error reading the input: ", strerror(lines_.error())));
}

// ---------------------------------------------------------------------------
// RecordParser.

RecordParser::RecordParser(const RecordInput& input, int default_alternatives)
    : format_(input.format()),
      csv_(input.csv()),
      default_alternatives_(default_alternatives) {}

ParsedLine RecordParser::Parse(absl::string_view line, int row, bool too_long) {
  ParsedLine p;
  Parse(line, row, too_long, &p);
  return p;
}

void RecordParser::Parse(absl::string_view line, int row, bool too_long,
                         ParsedLine* out) {
  if (too_long) {
    *out = TooLongLine(
        line, row, format_ == RecordFormat::kCsv && csv_.id_is_first_column());
  } else if (format_ == RecordFormat::kJsonl) {
    *out = ParseJsonLine(line, row);
  } else {
    // One record per physical line, as the output promises one report per
    // input line: a quoted field cannot span lines, so a broken quote costs
    // exactly one record, never the ones after it.
    csv_.ParseLine(line, row, out);
  }
  if (!out->record.has_max_alternatives()) {
    out->record.set_max_alternatives(default_alternatives_);
  }
}

// ---------------------------------------------------------------------------
// ReportOutput.

ReportOutput::ReportOutput(int fd, std::string name, std::string temp_path,
                           std::string final_path)
    : fd_(fd),
      owned_(fd != STDOUT_FILENO),
      name_(std::move(name)),
      temp_path_(std::move(temp_path)),
      final_path_(std::move(final_path)) {}

absl::StatusOr<std::unique_ptr<ReportOutput>> ReportOutput::Open(
    const std::string& path) {
  if (path == "-") {
    return std::unique_ptr<ReportOutput>(
        new ReportOutput(STDOUT_FILENO, "standard output", "", ""));
  }
  std::string name = absl::StrCat("output '", path, "'");
  struct stat st {};
  const bool exists = stat(path.c_str(), &st) == 0;
  if (exists && !S_ISREG(st.st_mode)) {
    if (S_ISDIR(st.st_mode)) {
      return absl::InvalidArgumentError(
          absl::StrCat("--out '", path, "' is a directory"));
    }
    // A device or a pipe: nothing to replace, so written directly.
    const int fd = open(path.c_str(), O_WRONLY | O_CLOEXEC);
    if (fd < 0) {
      return absl::ErrnoToStatus(errno, absl::StrCat("cannot open ", name));
    }
    return std::unique_ptr<ReportOutput>(
        new ReportOutput(fd, std::move(name), "", ""));
  }
  // The file a symbolic link names is the one replaced.
  std::string target = path;
  if (exists) {
    if (char* real = realpath(path.c_str(), nullptr)) {
      target = real;
      free(real);
    }
  }
  const size_t slash = target.rfind('/');
  const std::string dir =
      slash == std::string::npos ? "." : target.substr(0, slash + 1);
  const std::string base =
      slash == std::string::npos ? target : target.substr(slash + 1);
  std::string temp = absl::StrCat(dir, slash == std::string::npos ? "/" : "",
                                  ".", base, ".partial-XXXXXX");
  const int fd = mkostemp(temp.data(), O_CLOEXEC);
  if (fd < 0) {
    return absl::ErrnoToStatus(
        errno, absl::StrCat("cannot create a temporary file beside ", name,
                            " (in '", dir, "')"));
  }
  // mkostemp makes the file 0600; give it the mode the file has, or the
  // one a new file would get.
  mode_t mode = st.st_mode & 07777;
  if (!exists) {
    // umask() can only be read by setting it; nothing runs beside this
    // yet (check opens its output before starting threads).
    const mode_t mask = umask(0);
    umask(mask);
    mode = 0666 & ~mask;
  }
  fchmod(fd, mode);
  return std::unique_ptr<ReportOutput>(
      new ReportOutput(fd, std::move(name), std::move(temp), target));
}

ReportOutput::~ReportOutput() {
  if (fd_ >= 0) Abandon();
}

void ReportOutput::Abandon() {
  if (fd_ < 0) return;
  if (owned_) close(fd_);
  fd_ = -1;
  if (!temp_path_.empty()) unlink(temp_path_.c_str());
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
  if (!owned_) {
    fd_ = -1;
    return absl::OkStatus();  // Each write went straight to the fd.
  }
  if (!temp_path_.empty() && fsync(fd_) != 0) {
    const int error = errno;
    Abandon();
    return absl::ErrnoToStatus(error, absl::StrCat("cannot write to ", name_));
  }
  const int fd = fd_;
  fd_ = -1;
  // close() can still report a failed write-back (NFS, quotas).
  if (close(fd) != 0) {
    const int error = errno;
    if (!temp_path_.empty()) unlink(temp_path_.c_str());
    return absl::ErrnoToStatus(error, absl::StrCat("cannot write to ", name_));
  }
  if (!temp_path_.empty() &&
      rename(temp_path_.c_str(), final_path_.c_str()) != 0) {
    const int error = errno;
    unlink(temp_path_.c_str());
    return absl::ErrnoToStatus(error, absl::StrCat("cannot write ", name_));
  }
  return absl::OkStatus();
}

}  // namespace shellwright::cli
