// The shellwright.v1.ElectronStructure gRPC service and the server that
// hosts it, shared by shellwrightd and the in-process server tests.
//
// The service only translates: requests are answered by the api/ layer
// (api/atoms.h, api/records.h), absl::Status codes map one-to-one onto
// grpc::Status codes, and internal errors reach clients only as a generic
// message. Each call is logged (server/logging.h) as one line at info
// level; tokens are never logged.
//
// Example:
//
//   shellwright::ServerOptions options;
//   options.listen = "127.0.0.1:0";  // Any free port.
//   absl::StatusOr<std::unique_ptr<shellwright::ShellwrightServer>> server =
//       shellwright::ShellwrightServer::Start(options);
//   if (!server.ok()) return server.status();
//   std::cout << "listening on " << (*server)->address() << "\n";
//   ...
//   (*server)->Shutdown(absl::Seconds(10));  // In-flight calls may finish.
//
// Thread safety: ElectronStructureImpl serves calls from any number of
// gRPC threads at once. ShellwrightServer methods are thread-safe;
// Shutdown() must be called at most once.

#ifndef SHELLWRIGHT_SERVER_SERVICE_H_
#define SHELLWRIGHT_SERVER_SERVICE_H_

#include <memory>
#include <string>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "absl/strings/string_view.h"
#include "absl/time/time.h"
#include "grpcpp/grpcpp.h"
#include "server/auth.h"
#include "server/logging.h"
#include "shellwright/v1/electron_structure.grpc.pb.h"

namespace shellwright {

// ---------------------------------------------------------------------------
// Status mapping.

// The grpc::Status for an engine status: same code; the message passes
// through for caller errors (INVALID_ARGUMENT, NOT_FOUND, OUT_OF_RANGE, ...)
// and becomes "internal error" for INTERNAL, UNKNOWN and DATA_LOSS, whose
// details are logged instead.
grpc::Status ToGrpcStatus(const absl::Status& status);

// ---------------------------------------------------------------------------
// The service.

// Largest ReportBatch the service writes, in bytes: a default gRPC client
// receives at most 4 MiB per message, so the answer to a RecordBatch whose
// reports would not fit comes as several ReportBatch messages.
inline constexpr size_t kMaxReportBatchBytes = (4 << 20) - (16 << 10);

namespace internal {
class CallTracker;  // In-flight calls and idle streams (service.cc).
}  // namespace internal

namespace internal {
class RateLimiter;  // A token bucket (service.cc).
}  // namespace internal

// Overload limits the service enforces itself, each answered with
// RESOURCE_EXHAUSTED (a client should back off or go to another replica).
struct CallLimits {
  // Calls in progress at once (AnalyzeRecords streams and unary calls,
  // over all connections); a call beyond it is refused. 0: no limit.
  int max_concurrent_calls = 128;
  // With a token: requests per second (a unary call or one RecordBatch
  // counts as one) that callers with the token may make, on average; a
  // stream whose batch comes over the rate ends. 0: no limit.
  double token_rate_limit = 0;
  // Requests that may come at once above the rate. >= 1.
  int token_rate_burst = 100;
};

// The generated callback service, but for AnalyzeRecords, which reads and
// writes bytes: its reactor parses each RecordBatch and writes each
// ReportBatch's bytes itself, so that a report's size is computed once
// (protobuf's own serialisation of the batch would compute every report's
// size again).
using ElectronStructureService =
    v1::ElectronStructure::WithCallbackMethod_DescribeAtom<
        v1::ElectronStructure::WithCallbackMethod_DescribeAtoms<
            v1::ElectronStructure::WithCallbackMethod_ListElements<
                v1::ElectronStructure::WithCallbackMethod_AnalyzeCompound<
                    v1::ElectronStructure::WithRawCallbackMethod_AnalyzeRecords<
                        v1::ElectronStructure::Service>>>>>;

class ElectronStructureImpl final : public ElectronStructureService {
 public:
  // `token` empty: no authentication. Otherwise every call must carry
  // "authorization: Bearer <token>". An AnalyzeRecords stream that waits
  // longer than `stream_idle_timeout` for its next batch is cancelled, so
  // idle streams cannot hold a connection's stream slots.
  explicit ElectronStructureImpl(
      std::string token, absl::Duration stream_idle_timeout = absl::Minutes(5),
      CallLimits limits = CallLimits());
  ~ElectronStructureImpl() override;

  ElectronStructureImpl(const ElectronStructureImpl&) = delete;
  ElectronStructureImpl& operator=(const ElectronStructureImpl&) = delete;

  // Starts draining: new calls get UNAVAILABLE, streams waiting for a batch
  // are cancelled, and a stream working on a batch ends with UNAVAILABLE
  // once that batch is answered. Thread-safe; idempotent.
  void BeginDrain();

  // Blocks until no call is in progress, or until `deadline`. True when
  // none is. Thread-safe.
  bool WaitUntilIdle(absl::Time deadline);

  grpc::ServerUnaryReactor* DescribeAtom(
      grpc::CallbackServerContext* context,
      const v1::DescribeAtomRequest* request,
      v1::AtomDescription* response) override;

  grpc::ServerUnaryReactor* DescribeAtoms(
      grpc::CallbackServerContext* context,
      const v1::DescribeAtomsRequest* request,
      v1::DescribeAtomsResponse* response) override;

  grpc::ServerUnaryReactor* ListElements(
      grpc::CallbackServerContext* context,
      const v1::ListElementsRequest* request,
      v1::ListElementsResponse* response) override;

  // One record, answered like a one-record AnalyzeRecords batch.
  grpc::ServerUnaryReactor* AnalyzeCompound(
      grpc::CallbackServerContext* context,
      const v1::CompositionRecord* request,
      v1::RecordReport* response) override;

  // Reads one RecordBatch, writes its answer, and only then reads the
  // next, so a stream holds at most one batch and one reply in memory. The
  // answer is one ReportBatch, or several when one would pass
  // kMaxReportBatchBytes. Messages travel as their bytes: a RecordBatch
  // that does not parse ends the stream with INVALID_ARGUMENT.
  grpc::ServerBidiReactor<grpc::ByteBuffer, grpc::ByteBuffer>* AnalyzeRecords(
      grpc::CallbackServerContext* context) override;

 private:
  // Drain, limit, authentication and deadline checks every method runs
  // first. `counted_self`: the tracker already counts this call.
  grpc::Status Admit(grpc::CallbackServerContext* context,
                     bool counted_self) const;

  // A unary call: Admit, then `body` guarded against exceptions, then
  // finish and log. Defined in service.cc, where all its users are.
  template <typename Body>
  grpc::ServerUnaryReactor* ServeUnary(grpc::CallbackServerContext* context,
                                       absl::string_view method, Body&& body);

  const BearerTokenVerifier verifier_;
  const CallLimits limits_;
  const std::unique_ptr<internal::CallTracker> tracker_;
  // Null without a token or a rate limit.
  const std::unique_ptr<internal::RateLimiter> rate_limiter_;
};

// ---------------------------------------------------------------------------
// The server.

// OK when `listen` is an address to serve on: HOST:PORT with a non-empty
// HOST (an IPv6 one in brackets, "[::1]:50051") and PORT decimal 0..65535,
// or "unix:PATH" / "unix-abstract:NAME", passed to gRPC unchanged.
// Otherwise INVALID_ARGUMENT quoting the address and naming the problem.
absl::Status ValidateListenAddress(absl::string_view listen);

struct ServerOptions {
  // HOST:PORT (see ValidateListenAddress); port 0 picks a free port (see
  // ShellwrightServer::port()).
  std::string listen = "127.0.0.1:50051";
  TlsFiles tls;                 // All empty: plaintext.
  std::string auth_token_file;  // Empty: no authentication.
  // Largest request message accepted, in bytes; larger ones fail with
  // RESOURCE_EXHAUSTED. 1..2^31-1.
  int max_message_bytes = 4 << 20;
  // HTTP/2 streams (concurrent calls) per connection; 0 keeps gRPC's
  // default.
  int max_concurrent_streams = 100;
  // A connection with no call for this long is closed (GOAWAY), and so is
  // an AnalyzeRecords stream waiting this long for its next batch. > 0.
  absl::Duration idle_timeout = absl::Minutes(5);
  // Interval of the server's HTTP/2 keepalive pings on a connection; a
  // peer that does not answer one within 20 s is dropped. > 0.
  absl::Duration keepalive_interval = absl::Minutes(1);
  // A connection older than this gets GOAWAY, so that clients reconnect
  // and load balancers rebalance; calls on it then get
  // max_connection_age_grace to end before it is closed. Zero: no limit.
  absl::Duration max_connection_age = absl::Minutes(30);
  absl::Duration max_connection_age_grace = absl::Seconds(30);
  CallLimits limits;  // See CallLimits; token_rate_limit needs a token.
};

// A started gRPC server hosting ElectronStructureImpl, the standard health
// service (SERVING for "" and "shellwright.v1.ElectronStructure") and
// server reflection. Health and reflection need no token.
class ShellwrightServer {
 public:
  // Reads credential files, binds and starts serving. INVALID_ARGUMENT for
  // bad options or files, its message starting with the ServerOptions
  // field at fault ("listen: ...", "key_file: ..."); UNAVAILABLE when the
  // address cannot be bound.
  static absl::StatusOr<std::unique_ptr<ShellwrightServer>> Start(
      const ServerOptions& options);

  ShellwrightServer(const ShellwrightServer&) = delete;
  ShellwrightServer& operator=(const ShellwrightServer&) = delete;
  ~ShellwrightServer();  // Shuts down at once if Shutdown() was not called.

  // The listening address with the actual port: "127.0.0.1:43817".
  const std::string& address() const { return address_; }
  int port() const { return port_; }

  // Drains: marks health NOT_SERVING, refuses new calls with UNAVAILABLE,
  // cancels streams waiting for a batch, and waits up to `grace` for the
  // calls still working to be answered; then cancels what is left and
  // closes every connection, idle ones included, at once. Returns when all
  // are done. An idle connection therefore never holds the shutdown.
  void Shutdown(absl::Duration grace);

 private:
  ShellwrightServer() = default;

  std::unique_ptr<ElectronStructureImpl> service_;
  std::unique_ptr<grpc::Server> server_;
  std::string address_;
  int port_ = 0;
  bool shut_down_ = false;
};

}  // namespace shellwright

#endif  // SHELLWRIGHT_SERVER_SERVICE_H_
