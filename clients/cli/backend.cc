#include "clients/cli/backend.h"

#include <chrono>
#include <deque>
#include <mutex>

#include "absl/strings/str_cat.h"
#include "api/atoms.h"
#include "api/records.h"
#include "grpcpp/grpcpp.h"
#include "shellwright/v1/electron_structure.grpc.pb.h"
#include "util/small_file.h"

namespace shellwright::cli {
namespace {

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
};

absl::Status FromGrpc(const grpc::Status& s) {
  if (s.ok()) return absl::OkStatus();
  return absl::Status(static_cast<absl::StatusCode>(s.error_code()),
                      s.error_message());
}

class RemoteRecordStream final : public Backend::RecordStream {
 public:
  RemoteRecordStream(v1::ElectronStructure::Stub* stub,
                     std::unique_ptr<grpc::ClientContext> context)
      : context_(std::move(context)),
        stream_(stub->AnalyzeRecords(context_.get())) {}
  bool Write(const v1::RecordBatch& batch) override {
    {
      std::lock_guard<std::mutex> lock(mu_);
      expected_.push_back(batch.records_size());
    }
    return stream_->Write(batch);
  }
  // The server answers a batch in several ReportBatch messages when one
  // would pass a default client's 4 MiB limit; they are joined here, so a
  // caller sees one ReportBatch per RecordBatch.
  bool Read(v1::ReportBatch* batch) override {
    int expected = 0;
    {
      std::lock_guard<std::mutex> lock(mu_);
      if (!expected_.empty()) {
        expected = expected_.front();
        expected_.pop_front();
      }
    }
    if (!stream_->Read(batch)) return false;
    v1::ReportBatch part;
    while (batch->reports_size() < expected) {
      if (!stream_->Read(&part)) return false;
      if (part.reports_size() == 0) return true;  // Not ours: let it fail.
      for (v1::RecordReport& report : *part.mutable_reports()) {
        batch->add_reports()->Swap(&report);
      }
    }
    return true;
  }
  bool WritesDone() override { return stream_->WritesDone(); }
  absl::Status Finish() override { return FromGrpc(stream_->Finish()); }

 private:
  std::mutex mu_;
  std::deque<int> expected_;  // Records of each batch not yet answered.
  std::unique_ptr<grpc::ClientContext> context_;
  std::unique_ptr<grpc::ClientReaderWriter<v1::RecordBatch, v1::ReportBatch>>
      stream_;
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

  std::unique_ptr<RecordStream> OpenRecordStream() override {
    auto context = std::make_unique<grpc::ClientContext>();
    Prepare(context.get(), stream_timeout_);
    return std::make_unique<RemoteRecordStream>(stub_.get(),
                                                std::move(context));
  }

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
  auto channel = grpc::CreateCustomChannel(options.address, credentials, args);
  return std::unique_ptr<Backend>(
      new RemoteBackend(std::move(channel), std::move(token), options.timeout,
                        options.stream_timeout));
}

}  // namespace shellwright::cli
