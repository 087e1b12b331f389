// Where the CLI gets its answers: the in-process engine (the default) or a
// shellwrightd server (--server). Both speak shellwright.v1 messages, and
// both answer `check`'s batches through a BatchProcessor, so the CLI
// formats their answers identically.
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
#include <ostream>
#include <string>
#include <vector>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "absl/strings/string_view.h"
#include "absl/time/time.h"
#include "clients/cli/batch_processor.h"
#include "clients/cli/report_lines.h"
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

  // A processor for `check`'s batches (batch_processor.h) that writes
  // report lines in `format` with the fields of `fields` (a remote one
  // asks the server for only those and what the counts need:
  // FieldsToRequest); `check` makes one per worker thread. The
  // in-process one runs the engine on the calling thread. A remote one
  // owns one AnalyzeRecords stream, opened on its first batch, so N
  // workers keep N batches in flight. Over several replicas, each batch
  // goes to the next replica in turn (a processor keeps one stream per
  // replica), and a batch whose replica fails or drains before answering
  // it is sent again, whole, to another; only complete answers are
  // written.
  virtual std::unique_ptr<BatchProcessor> NewBatchProcessor(
      ReportLineFormat format, const ReportMask& fields) = 0;

  // Records per `check` batch when the user sets none: 256 in process
  // (less output in flight), 500 remote (fewer, larger messages).
  virtual int DefaultBatchSize() const = 0;
};

std::unique_ptr<Backend> MakeInProcessBackend();

// The port shellwrightd listens on by default (docs/api.md), which
// --server uses when the address names none.
inline constexpr int kDefaultServerPort = 50051;

// `address` as a gRPC target: "HOST" and "[v6]" get kDefaultServerPort,
// a bare IPv6 address ("::1") gets brackets and the port; an address with a
// port or a scheme ("unix:/run/s.sock", "dns:///h:1") is kept as it is.
std::string ServerTarget(const std::string& address);

// `status` from a call to the server at `target`, in the user's words when
// the server could not be reached or did not answer in time: what was
// tried and what to check. Other statuses are returned unchanged.
absl::Status ExplainRemoteFailure(const absl::Status& status,
                                  const std::string& target);

struct RemoteOptions {
  // One or more gRPC targets, comma-separated, each HOST:PORT, HOST
  // (kDefaultServerPort), or a name that resolves to several servers
  // (dns:///NAME:PORT); batches are spread over all of them.
  std::string address;
  std::string tls_ca_file;      // PEM roots; enables TLS when set.
  std::string tls_cert_file;    // Client certificate for mutual TLS.
  std::string tls_key_file;     // Client key for mutual TLS.
  std::string tls_server_name;  // Overrides the name checked in the cert.
  std::string token_file;       // Bearer token, sent as authorization.
  absl::Duration timeout = absl::Seconds(30);  // Per-call deadline.
  // Deadline for a whole AnalyzeRecords stream (one per check worker).
  absl::Duration stream_timeout = absl::Hours(24);
  // Where a line goes each time a server fails and its work is sent to
  // another (not thread-safe itself: the backend serialises its writes);
  // null: nowhere.
  std::ostream* warnings = nullptr;
};

// The targets of a --server value: split at commas, blanks trimmed.
// INVALID_ARGUMENT starting with "address: " for an empty target.
absl::StatusOr<std::vector<std::string>> ParseServerTargets(
    absl::string_view address);

// Defined in remote_backend.cc, in the library shellwright_cli_remote
// (which links gRPC; the in-process CLI does not link it). Connects
// lazily. A call or batch that a server fails with UNAVAILABLE,
// CANCELLED, ABORTED, RESOURCE_EXHAUSTED, DATA_LOSS, INTERNAL or UNKNOWN
// is tried on the other servers, in four rounds over all of them with
// pauses of 0.1, 0.2 and 0.4 s between rounds; the error then names every
// server's last failure (with one server: that failure itself). Other
// codes are returned at once. Credential files are
// read here (util/small_file.h): an unreadable or malformed one gives
// INVALID_ARGUMENT naming the file.
absl::StatusOr<std::unique_ptr<Backend>> MakeRemoteBackend(
    const RemoteOptions& options);

}  // namespace shellwright::cli

#endif  // SHELLWRIGHT_CLIENTS_CLI_BACKEND_H_
