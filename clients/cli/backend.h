// Where the CLI gets its answers: the in-process engine (the default) or a
// shellwrightd server (--server). Both speak shellwright.v1 messages, so the
// CLI formats their answers identically.
//
// Example:
//
//   std::unique_ptr<shellwright::cli::Backend> backend =
//       shellwright::cli::MakeInProcessBackend();
//   shellwright::v1::DescribeAtomRequest request;
//   request.set_spec("Gd3+");
//   shellwright::v1::AtomDescription d;
//   absl::Status s = backend->DescribeAtom(request, &d);
//
// Thread safety: a Backend may be used from several threads at once.

#ifndef SHELLWRIGHT_CLIENTS_CLI_BACKEND_H_
#define SHELLWRIGHT_CLIENTS_CLI_BACKEND_H_

#include <memory>
#include <string>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "absl/time/time.h"
#include "shellwright/v1/electron_structure.pb.h"

namespace shellwright::cli {

class Backend {
 public:
  virtual ~Backend() = default;

  // INVALID_ARGUMENT for bad input; other codes for transport failures.
  virtual absl::Status DescribeAtom(const v1::DescribeAtomRequest& request,
                                    v1::AtomDescription* response) = 0;
  virtual absl::Status ListElements(v1::ListElementsResponse* response) = 0;
  virtual absl::Status AnalyzeCompound(const v1::CompositionRecord& record,
                                       v1::RecordReport* report) = 0;

  // A bidirectional AnalyzeRecords stream, for remote backends; nullptr for
  // the in-process backend, where `check` runs its own worker threads.
  class RecordStream {
   public:
    virtual ~RecordStream() = default;
    // Returns false when the stream is broken (then call Finish()).
    virtual bool Write(const v1::RecordBatch& batch) = 0;
    // The whole answer to the oldest batch written and not yet read, even
    // when the server sent it in several messages.
    virtual bool Read(v1::ReportBatch* batch) = 0;
    // Half-closes the sending side. Thread-safe against Read.
    virtual bool WritesDone() = 0;
    virtual absl::Status Finish() = 0;
  };
  virtual std::unique_ptr<RecordStream> OpenRecordStream() { return nullptr; }
};

std::unique_ptr<Backend> MakeInProcessBackend();

struct RemoteOptions {
  std::string address;          // HOST:PORT.
  std::string tls_ca_file;      // PEM roots; enables TLS when set.
  std::string tls_cert_file;    // Client certificate for mutual TLS.
  std::string tls_key_file;     // Client key for mutual TLS.
  std::string tls_server_name;  // Overrides the name checked in the cert.
  std::string token_file;       // Bearer token, sent as authorization.
  absl::Duration timeout = absl::Seconds(30);  // Per-call deadline.
  // Deadline for a whole AnalyzeRecords stream.
  absl::Duration stream_timeout = absl::Hours(24);
};

// Connects lazily. Credential files are read here (util/small_file.h): an
// unreadable or malformed one gives INVALID_ARGUMENT naming the file.
absl::StatusOr<std::unique_ptr<Backend>> MakeRemoteBackend(
    const RemoteOptions& options);

}  // namespace shellwright::cli

#endif  // SHELLWRIGHT_CLIENTS_CLI_BACKEND_H_
