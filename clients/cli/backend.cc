#include "clients/cli/backend.h"

#include <algorithm>
#include <chrono>
#include <functional>
#include <memory>

#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"
#include "absl/types/span.h"
#include "api/atoms.h"
#include "api/records.h"
#include "grpcpp/grpcpp.h"
#include "shellwright/v1/electron_structure.grpc.pb.h"
#include "util/small_file.h"
#include "util/utf8.h"

namespace shellwright::cli {
namespace {

// The reader's warnings about `line`, added to its report.
void AddReaderWarnings(const ParsedLine& line, v1::RecordReport* report) {
  for (const ReaderWarning& w : line.warnings) {
    v1::Diagnostic* d = report->add_diagnostics();
    d->set_severity(std::string(Name(Severity::kWarning)));
    d->set_code(w.code);
    d->set_message(w.message);
  }
}

// The engine, on the calling thread.
class InProcessBatchProcessor final : public BatchProcessor {
 public:
  explicit InProcessBatchProcessor(ReportLineFormat format) : format_(format) {}

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
        AddReport(format_, report, line.record, out);
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
    AddReport(format_, malformed_, out);
  }

  const ReportLineFormat format_;
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
      ReportLineFormat format) override {
    return std::make_unique<InProcessBatchProcessor>(format);
  }
  int DefaultBatchSize() const override { return 256; }
};

absl::Status FromGrpc(const grpc::Status& s) {
  if (s.ok()) return absl::OkStatus();
  return absl::Status(static_cast<absl::StatusCode>(s.error_code()),
                      s.error_message());
}

// One AnalyzeRecords stream, one batch in flight at a time: the records
// of a batch's readable lines go out as one RecordBatch, and their reports
// come back in order. `open` makes the stream's context (deadline, token).
class RemoteBatchProcessor final : public BatchProcessor {
 public:
  using OpenContext = std::function<std::unique_ptr<grpc::ClientContext>()>;

  RemoteBatchProcessor(v1::ElectronStructure::Stub* stub, OpenContext open,
                       ReportLineFormat format)
      : stub_(stub), open_(std::move(open)), format_(format) {}

  absl::Status Process(absl::Span<const ParsedLine> lines,
                       ReportLines* out) override {
    request_.Clear();
    for (const ParsedLine& line : lines) {
      if (line.error.empty()) *request_.add_records() = line.record;
    }
    if (request_.records_size() > 0) {
      if (stream_ == nullptr) {
        context_ = open_();
        stream_ = stub_->AnalyzeRecords(context_.get());
      }
      if (!stream_->Write(request_)) return Broken("sending a batch");
      if (!ReadAnswer(request_.records_size())) {
        return Broken("reading the answer to a batch");
      }
    }
    int k = 0;
    for (const ParsedLine& line : lines) {
      if (line.error.empty()) {
        v1::RecordReport* report = reply_.mutable_reports(k++);
        AddReaderWarnings(line, report);
        AddReport(format_, *report, out);
      } else {
        MalformedRecordReport(line.record, line.error, &malformed_);
        AddReaderWarnings(line, &malformed_);
        AddReport(format_, malformed_, out);
      }
    }
    return absl::OkStatus();
  }

  absl::Status Finish() override {
    if (stream_ == nullptr) return absl::OkStatus();
    stream_->WritesDone();
    absl::Status status = FromGrpc(stream_->Finish());
    stream_ = nullptr;
    return status;
  }

 private:
  // Reads the answer to the batch just sent into reply_: `expected`
  // reports, which the server sends in several ReportBatch messages when
  // one would pass a default client's 4 MiB limit. False when the stream
  // ends or a message would take the count past `expected`.
  bool ReadAnswer(int expected) {
    reply_.Clear();
    while (reply_.reports_size() < expected) {
      if (!stream_->Read(&part_) || part_.reports_size() == 0 ||
          reply_.reports_size() + part_.reports_size() > expected) {
        return false;
      }
      for (v1::RecordReport& report : *part_.mutable_reports()) {
        reply_.add_reports()->Swap(&report);
      }
    }
    return true;
  }

  // The stream's own status when it has one (UNAUTHENTICATED, ...), else
  // what was being done when it broke.
  absl::Status Broken(absl::string_view doing) {
    context_->TryCancel();
    absl::Status status = FromGrpc(stream_->Finish());
    stream_ = nullptr;
    if (!status.ok() && status.code() != absl::StatusCode::kCancelled) {
      return status;
    }
    return absl::DataLossError(
        absl::StrCat("the server's stream broke while ", doing,
                     " (a reply missing or with the wrong number of reports)"));
  }

  v1::ElectronStructure::Stub* const stub_;
  const OpenContext open_;
  const ReportLineFormat format_;
  std::unique_ptr<grpc::ClientContext> context_;
  std::unique_ptr<grpc::ClientReaderWriter<v1::RecordBatch, v1::ReportBatch>>
      stream_;
  // Reused between batches.
  v1::RecordBatch request_;
  v1::ReportBatch reply_;
  v1::ReportBatch part_;
  v1::RecordReport malformed_;
};

class RemoteBackend final : public Backend {
 public:
  RemoteBackend(std::shared_ptr<grpc::Channel> channel, std::string token,
                absl::Duration timeout, absl::Duration stream_timeout)
      : stub_(v1::ElectronStructure::NewStub(std::move(channel))),
        token_(std::move(token)),
        timeout_(timeout),
        stream_timeout_(stream_timeout) {}

  absl::Status AnalyzeCompound(const v1::CompositionRecord& record,
                               v1::RecordReport* report) override {
    grpc::ClientContext context;
    Prepare(&context, timeout_);
    return FromGrpc(stub_->AnalyzeCompound(&context, record, report));
  }

  std::unique_ptr<BatchProcessor> NewBatchProcessor(
      ReportLineFormat format) override {
    return std::make_unique<RemoteBatchProcessor>(
        stub_.get(),
        [this] {
          auto context = std::make_unique<grpc::ClientContext>();
          Prepare(context.get(), stream_timeout_);
          return context;
        },
        format);
  }

  int DefaultBatchSize() const override { return 500; }

  absl::Status DescribeAtom(const v1::DescribeAtomRequest& request,
                            v1::AtomDescription* response) override {
    grpc::ClientContext context;
    Prepare(&context, timeout_);
    return FromGrpc(stub_->DescribeAtom(&context, request, response));
  }

  absl::Status ListElements(v1::ListElementsResponse* response) override {
    grpc::ClientContext context;
    Prepare(&context, timeout_);
    return FromGrpc(
        stub_->ListElements(&context, v1::ListElementsRequest(), response));
  }

 private:
  void Prepare(grpc::ClientContext* context, absl::Duration timeout) const {
    context->set_deadline(std::chrono::system_clock::now() +
                          absl::ToChronoMilliseconds(timeout));
    if (!token_.empty()) {
      context->AddMetadata("authorization", absl::StrCat("Bearer ", token_));
    }
  }

  std::unique_ptr<v1::ElectronStructure::Stub> stub_;
  const std::string token_;
  const absl::Duration timeout_;
  const absl::Duration stream_timeout_;
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

absl::StatusOr<std::unique_ptr<Backend>> MakeRemoteBackend(
    const RemoteOptions& options) {
  std::shared_ptr<grpc::ChannelCredentials> credentials;
  if (!options.tls_ca_file.empty() || !options.tls_cert_file.empty()) {
    grpc::SslCredentialsOptions ssl;
    if (!options.tls_ca_file.empty()) {
      absl::StatusOr<std::string> ca = ReadPemFile(options.tls_ca_file);
      if (!ca.ok()) return ca.status();
      ssl.pem_root_certs = *ca;
    }
    if (!options.tls_cert_file.empty() || !options.tls_key_file.empty()) {
      absl::StatusOr<std::string> cert = ReadPemFile(options.tls_cert_file);
      if (!cert.ok()) return cert.status();
      absl::StatusOr<std::string> key = ReadPemFile(options.tls_key_file);
      if (!key.ok()) return key.status();
      ssl.pem_cert_chain = *cert;
      ssl.pem_private_key = *key;
    }
    credentials = grpc::SslCredentials(ssl);
  } else {
    credentials = grpc::InsecureChannelCredentials();
  }
  std::string token;
  if (!options.token_file.empty()) {
    absl::StatusOr<std::string> t = ReadTokenFile(options.token_file);
    if (!t.ok()) return t.status();
    token = *t;
  }
  grpc::ChannelArguments args;
  args.SetMaxReceiveMessageSize(64 << 20);
  if (!options.tls_server_name.empty()) {
    args.SetSslTargetNameOverride(options.tls_server_name);
  }
  auto channel = grpc::CreateCustomChannel(ServerTarget(options.address),
                                           credentials, args);
  return std::unique_ptr<Backend>(
      new RemoteBackend(std::move(channel), std::move(token), options.timeout,
                        options.stream_timeout));
}

}  // namespace shellwright::cli
