#include "clients/cli/backend.h"

#include <algorithm>
#include <memory>
#include <string>
#include <vector>

#include "absl/strings/ascii.h"
#include "absl/strings/escaping.h"
#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_split.h"
#include "absl/types/span.h"
#include "api/atoms.h"
#include "api/records.h"
#include "util/utf8.h"

namespace shellwright::cli {
namespace {

// The engine, on the calling thread.
class InProcessBatchProcessor final : public BatchProcessor {
 public:
  InProcessBatchProcessor(ReportLineFormat format, const ReportMask& fields)
      : format_(format), fields_(fields) {}

  absl::Status Process(absl::Span<const ParsedLine> lines,
                       ReportLines* out) override {
    // Reports go straight from the engine to text: building a message per
    // record would cost as much as analysing it.
    for (const ParsedLine& line : lines) {
      if (line.error.empty()) {
        CompositionReport report =
            AnalyzeComposition(CompositionInputFromProto(line.record));
        for (const ReaderWarning& w : line.warnings) {
          report.diagnostics.push_back(
              {Severity::kWarning, w.code, w.message, 0});
        }
        AddReport(format_, report, line.record, out, fields_);
      } else {
        AddMalformed(line, out);
      }
    }
    return absl::OkStatus();
  }

  absl::Status Finish() override { return absl::OkStatus(); }

 private:
  void AddMalformed(const ParsedLine& line, ReportLines* out) {
    MalformedRecordReport(line.record, line.error, &malformed_);
    AddReaderWarnings(line, &malformed_);
    AddReport(format_, malformed_, out, fields_);
  }

  const ReportLineFormat format_;
  const ReportMask fields_;
  v1::RecordReport malformed_;  // Reused.
};

class InProcessBackend final : public Backend {
 public:
  absl::Status DescribeAtom(const v1::DescribeAtomRequest& request,
                            v1::AtomDescription* response) override {
    return DescribeAtomMessage(request, response);
  }
  absl::Status ListElements(v1::ListElementsResponse* response) override {
    ListElementsMessage(response);
    return absl::OkStatus();
  }
  absl::Status AnalyzeCompound(const v1::CompositionRecord& record,
                               v1::RecordReport* report) override {
    AnalyzeRecord(record, report);
    return absl::OkStatus();
  }
  std::unique_ptr<BatchProcessor> NewBatchProcessor(
      ReportLineFormat format, const ReportMask& fields) override {
    return std::make_unique<InProcessBatchProcessor>(format, fields);
  }
  int DefaultBatchSize() const override { return 256; }
};

}  // namespace

std::string ServerTarget(const std::string& address) {
  if (address.find('/') != std::string::npos) return address;  // A scheme.
  if (!address.empty() && address.front() == '[') {
    // "[::1]" or "[::1]:50051".
    return absl::EndsWith(address, "]")
               ? absl::StrCat(address, ":", kDefaultServerPort)
               : address;
  }
  const size_t colons = std::count(address.begin(), address.end(), ':');
  if (colons == 0) return absl::StrCat(address, ":", kDefaultServerPort);
  if (colons > 1) {
    return absl::StrCat("[", address, "]:", kDefaultServerPort);  // IPv6.
  }
  // One colon: "host:port", or a scheme such as "unix:path".
  return address;
}

absl::Status ExplainRemoteFailure(const absl::Status& status,
                                  const std::string& target) {
  switch (status.code()) {
    case absl::StatusCode::kUnavailable:
      return absl::UnavailableError(absl::StrCat(
          "cannot reach shellwrightd at ", target,
          ": check that the server is running and listens on that address "
          "and port (default ",
          kDefaultServerPort,
          "), and that --tls-ca is given exactly when the server uses TLS. "
          "(transport: ",
          Utf8Prefix(status.message(), 160), ")"));
    case absl::StatusCode::kDeadlineExceeded:
      return absl::DeadlineExceededError(absl::StrCat(
          "shellwrightd at ", target,
          " did not answer before the deadline: check that the address is "
          "right and the server is not overloaded, or raise --timeout"));
    default:
      return status;
  }
}

std::unique_ptr<Backend> MakeInProcessBackend() {
  return std::make_unique<InProcessBackend>();
}

absl::StatusOr<std::vector<std::string>> ParseServerTargets(
    absl::string_view address) {
  std::vector<std::string> targets;
  for (absl::string_view part : absl::StrSplit(address, ',')) {
    part = absl::StripAsciiWhitespace(part);
    if (part.empty()) {
      return absl::InvalidArgumentError(absl::StrCat(
          "address: '", absl::CEscape(address),
          "' has an empty target; expected HOST:PORT[,HOST:PORT...] or "
          "dns:///NAME:PORT"));
    }
    targets.emplace_back(part);
  }
  return targets;
}

}  // namespace shellwright::cli
