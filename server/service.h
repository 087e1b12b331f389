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

class ElectronStructureImpl final
    : public v1::ElectronStructure::CallbackService {
 public:
  // `token` empty: no authentication. Otherwise every call must carry
  // "authorization: Bearer <token>".
  explicit ElectronStructureImpl(std::string token);

  ElectronStructureImpl(const ElectronStructureImpl&) = delete;
  ElectronStructureImpl& operator=(const ElectronStructureImpl&) = delete;

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

  // Reads one RecordBatch, writes its ReportBatch, and only then reads the
  // next, so a stream holds at most one batch and one reply in memory.
  grpc::ServerBidiReactor<v1::RecordBatch, v1::ReportBatch>* AnalyzeRecords(
      grpc::CallbackServerContext* context) override;

 private:
  // Authentication and deadline checks every method runs first.
  grpc::Status Admit(grpc::CallbackServerContext* context) const;

  // A unary call: Admit, then `body` guarded against exceptions, then
  // finish and log. Defined in service.cc, where all its users are.
  template <typename Body>
  grpc::ServerUnaryReactor* ServeUnary(grpc::CallbackServerContext* context,
                                       absl::string_view method, Body&& body);

  const BearerTokenVerifier verifier_;
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
};

// A started gRPC server hosting ElectronStructureImpl, the standard health
// service (SERVING for "" and "shellwright.v1.ElectronStructure") and
// server reflection. Health and reflection need no token.
class ShellwrightServer {
 public:
  // Reads credential files, binds and starts serving. INVALID_ARGUMENT for
  // bad options or files, its message starting with the ServerOptions
  // field at fault ("listen: ...", "tls.key_file: ..."); UNAVAILABLE when
  // the address cannot be bound.
  static absl::StatusOr<std::unique_ptr<ShellwrightServer>> Start(
      const ServerOptions& options);

  ShellwrightServer(const ShellwrightServer&) = delete;
  ShellwrightServer& operator=(const ShellwrightServer&) = delete;
  ~ShellwrightServer();  // Shuts down at once if Shutdown() was not called.

  // The listening address with the actual port: "127.0.0.1:43817".
  const std::string& address() const { return address_; }
  int port() const { return port_; }

  // Marks health NOT_SERVING, stops accepting calls and waits for in-flight
  // calls up to `grace`, then cancels the rest. Returns when all are done.
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
