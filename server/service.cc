#include "server/service.h"

#include <unistd.h>

#include <atomic>
#include <chrono>
#include <exception>
#include <mutex>
#include <utility>

#include "absl/strings/escaping.h"
#include "absl/strings/str_cat.h"
#include "absl/time/clock.h"
#include "google/protobuf/stubs/logging.h"
#include "grpcpp/ext/proto_server_reflection_plugin.h"
#include "grpcpp/health_check_service_interface.h"
#include "server/convert.h"
#include "server/records.h"

namespace shellwright {
namespace {

// ---------------------------------------------------------------------------
// Helpers.

constexpr char kInternalMessage[] = "internal error";

std::atomic<int> log_level{static_cast<int>(LogLevel::kInfo)};

absl::string_view LevelName(LogLevel level) {
  switch (level) {
    case LogLevel::kError:
      return "error";
    case LogLevel::kWarning:
      return "warning";
    case LogLevel::kInfo:
      return "info";
    case LogLevel::kDebug:
      return "debug";
  }
  return "info";
}

absl::string_view CodeName(grpc::StatusCode code) {
  // grpc and absl codes are the same numbers.
  static const auto* const kNames = [] {
    auto* names = new std::string[17];
    for (int i = 0; i < 17; ++i) {
      names[i] = absl::StatusCodeToString(static_cast<absl::StatusCode>(i));
    }
    return names;
  }();
  const int i = static_cast<int>(code);
  return i >= 0 && i < 17 ? absl::string_view(kNames[i]) : "UNKNOWN";
}

bool IsInternal(absl::StatusCode code) {
  return code == absl::StatusCode::kInternal ||
         code == absl::StatusCode::kUnknown ||
         code == absl::StatusCode::kDataLoss;
}

// Measures one call from handler entry to completion.
class CallTimer {
 public:
  CallTimer() : start_(std::chrono::steady_clock::now()) {}
  int64_t ElapsedMicros() const {
    return std::chrono::duration_cast<std::chrono::microseconds>(
               std::chrono::steady_clock::now() - start_)
        .count();
  }

 private:
  const std::chrono::steady_clock::time_point start_;
};

// The client's address, only when debug lines will show it.
std::string PeerForLog(grpc::CallbackServerContext* context) {
  return LogEnabled(LogLevel::kDebug) ? context->peer() : std::string();
}

// The one info line per call; debug adds the peer and the status message
// (escaped, since it may quote client input).
void LogCall(absl::string_view method, const grpc::Status& status,
             const CallTimer& timer, absl::string_view peer,
             absl::string_view extra = "") {
  if (!LogEnabled(LogLevel::kInfo)) return;
  std::string line = absl::StrCat(
      "call method=", method, " code=", CodeName(status.error_code()),
      " duration_us=", timer.ElapsedMicros(), extra);
  if (LogEnabled(LogLevel::kDebug)) {
    absl::StrAppend(&line, " peer=", peer);
    if (!status.ok()) {
      absl::StrAppend(&line, " message=\"",
                      absl::CEscape(status.error_message()), "\"");
    }
  }
  Log(LogLevel::kInfo, line);
}

// Runs `body`, turning any exception into a generic INTERNAL status so no
// input can take the process down through an uncaught throw.
template <typename Body>
grpc::Status RunGuarded(absl::string_view method, Body&& body) {
  try {
    return body();
  } catch (const std::exception& e) {
    Log(LogLevel::kError,
        absl::StrCat(method, " threw: ", absl::CEscape(e.what())));
  } catch (...) {
    Log(LogLevel::kError, absl::StrCat(method, " threw a non-std exception"));
  }
  return grpc::Status(grpc::StatusCode::INTERNAL, kInternalMessage);
}

grpc::ServerUnaryReactor* FinishUnary(grpc::CallbackServerContext* context,
                                      absl::string_view method,
                                      const CallTimer& timer,
                                      const grpc::Status& status) {
  LogCall(method, status, timer, PeerForLog(context));
  grpc::ServerUnaryReactor* reactor = context->DefaultReactor();
  reactor->Finish(status);
  return reactor;
}

// DescribeAtoms reports item failures inside the response, so they need the
// same scrubbing as call statuses.
void ScrubItemErrors(v1::DescribeAtomsResponse* response) {
  for (v1::DescribeAtomResult& result : *response->mutable_results()) {
    if (!result.has_error()) continue;
    const auto code = static_cast<absl::StatusCode>(result.error().code());
    if (IsInternal(code)) {
      Log(LogLevel::kError,
          absl::StrCat("DescribeAtoms item failed: ",
                       absl::CEscape(result.error().message())));
      result.mutable_error()->set_message(kInternalMessage);
    }
  }
}

// Protobuf reports malformed client input (such as invalid UTF-8 in a
// string field) through its own logger; route it through ours so the level
// flag applies and the client-controlled text is escaped.
void ProtobufLogHandler(google::protobuf::LogLevel level, const char* filename,
                        int line, const std::string& message) {
  const LogLevel ours =
      level >= google::protobuf::LOGLEVEL_FATAL     ? LogLevel::kError
      : level >= google::protobuf::LOGLEVEL_WARNING ? LogLevel::kWarning
                                                    : LogLevel::kDebug;
  Log(ours, absl::StrCat("protobuf: ", absl::CEscape(message)));
}

// AnalyzeRecords: one batch read, analysed and written at a time. Reading
// the next batch only after the previous reply is written lets HTTP/2 flow
// control push back on a client that sends faster than it reads.
class RecordStreamReactor final
    : public grpc::ServerBidiReactor<v1::RecordBatch, v1::ReportBatch> {
 public:
  RecordStreamReactor(grpc::CallbackServerContext* context,
                      const grpc::Status& admitted)
      : peer_(PeerForLog(context)) {
    if (!admitted.ok()) {
      FinishAndRecord(admitted);
      return;
    }
    StartRead(&batch_);
  }

  void OnReadDone(bool ok) override {
    if (!ok) {
      // The client half-closed (or the call broke; then OnCancel says so).
      FinishAndRecord(grpc::Status::OK);
      return;
    }
    if (batch_.records_size() > kMaxRecordsPerBatch) {
      FinishAndRecord(grpc::Status(
          grpc::StatusCode::INVALID_ARGUMENT,
          absl::StrCat("records: ", batch_.records_size(),
                       " records in one batch, above the limit of ",
                       kMaxRecordsPerBatch)));
      return;
    }
    grpc::Status status = RunGuarded("AnalyzeRecords", [&] {
      reply_.Clear();
      reply_.mutable_reports()->Reserve(batch_.records_size());
      for (const v1::CompositionRecord& record : batch_.records()) {
        AnalyzeRecordMessage(record, reply_.add_reports());
      }
      return grpc::Status::OK;
    });
    if (!status.ok()) {
      FinishAndRecord(status);
      return;
    }
    ++batches_;
    records_ += batch_.records_size();
    StartWrite(&reply_);
  }

  void OnWriteDone(bool ok) override {
    if (!ok) {
      FinishAndRecord(
          grpc::Status(grpc::StatusCode::UNAVAILABLE,
                       "the stream closed before a reply was written"));
      return;
    }
    StartRead(&batch_);
  }

  void OnCancel() override { cancelled_ = true; }

  void OnDone() override {
    grpc::Status logged = status_;
    if (cancelled_ && status_.ok()) {
      logged = grpc::Status(grpc::StatusCode::CANCELLED, "cancelled");
    }
    LogCall("AnalyzeRecords", logged, timer_, peer_,
            absl::StrCat(" batches=", batches_, " records=", records_));
    delete this;
  }

 private:
  // Finish, keeping the status for the log line written in OnDone.
  void FinishAndRecord(const grpc::Status& status) {
    status_ = status;
    Finish(status);
  }

  const std::string peer_;  // Empty unless debug logging is on.
  const CallTimer timer_;
  v1::RecordBatch batch_;
  v1::ReportBatch reply_;
  grpc::Status status_;
  int64_t batches_ = 0;
  int64_t records_ = 0;
  std::atomic<bool> cancelled_{false};
};

}  // namespace

// ---------------------------------------------------------------------------
// Logging and status mapping.

absl::StatusOr<LogLevel> ParseLogLevel(absl::string_view name) {
  for (LogLevel level : {LogLevel::kError, LogLevel::kWarning, LogLevel::kInfo,
                         LogLevel::kDebug}) {
    if (name == LevelName(level)) return level;
  }
  return absl::InvalidArgumentError(
      absl::StrCat("log level must be error, warning, info or debug, got '",
                   absl::CEscape(name), "'"));
}

void SetLogLevel(LogLevel level) {
  log_level.store(static_cast<int>(level), std::memory_order_relaxed);
}

bool LogEnabled(LogLevel level) {
  return static_cast<int>(level) <= log_level.load(std::memory_order_relaxed);
}

void Log(LogLevel level, absl::string_view line) {
  if (!LogEnabled(level)) return;
  const std::string text =
      absl::StrCat(absl::FormatTime("%Y-%m-%dT%H:%M:%E6SZ", absl::Now(),
                                    absl::UTCTimeZone()),
                   " ", LevelName(level), " ", line, "\n");
  // One write per line keeps concurrent lines from interleaving.
  size_t done = 0;
  while (done < text.size()) {
    ssize_t n = ::write(STDERR_FILENO, text.data() + done, text.size() - done);
    if (n <= 0) break;
    done += static_cast<size_t>(n);
  }
}

grpc::Status ToGrpcStatus(const absl::Status& status) {
  if (status.ok()) return grpc::Status::OK;
  const auto code = static_cast<grpc::StatusCode>(status.code());
  if (IsInternal(status.code())) {
    Log(LogLevel::kError,
        absl::StrCat("internal failure: ", absl::CEscape(status.message())));
    return grpc::Status(code, kInternalMessage);
  }
  return grpc::Status(code, std::string(status.message()));
}

// ---------------------------------------------------------------------------
// The service.

ElectronStructureImpl::ElectronStructureImpl(std::string token)
    : verifier_(std::move(token)) {}

grpc::Status ElectronStructureImpl::Admit(
    grpc::CallbackServerContext* context) const {
  grpc::Status status = verifier_.Check(context->client_metadata());
  if (!status.ok()) return status;
  if (context->deadline() <= std::chrono::system_clock::now()) {
    return grpc::Status(grpc::StatusCode::DEADLINE_EXCEEDED,
                        "deadline exceeded before the call started");
  }
  return grpc::Status::OK;
}

grpc::ServerUnaryReactor* ElectronStructureImpl::DescribeAtom(
    grpc::CallbackServerContext* context,
    const v1::DescribeAtomRequest* request, v1::AtomDescription* response) {
  const CallTimer timer;
  grpc::Status status = Admit(context);
  if (status.ok()) {
    status = RunGuarded("DescribeAtom", [&] {
      return ToGrpcStatus(DescribeAtomMessage(*request, response));
    });
  }
  return FinishUnary(context, "DescribeAtom", timer, status);
}

grpc::ServerUnaryReactor* ElectronStructureImpl::DescribeAtoms(
    grpc::CallbackServerContext* context,
    const v1::DescribeAtomsRequest* request,
    v1::DescribeAtomsResponse* response) {
  const CallTimer timer;
  grpc::Status status = Admit(context);
  if (status.ok()) {
    status = RunGuarded("DescribeAtoms", [&] {
      grpc::Status s = ToGrpcStatus(DescribeAtomsMessage(*request, response));
      if (s.ok()) ScrubItemErrors(response);
      return s;
    });
  }
  return FinishUnary(context, "DescribeAtoms", timer, status);
}

grpc::ServerUnaryReactor* ElectronStructureImpl::ListElements(
    grpc::CallbackServerContext* context,
    const v1::ListElementsRequest* request,
    v1::ListElementsResponse* response) {
  const CallTimer timer;
  grpc::Status status = Admit(context);
  if (status.ok()) {
    status = RunGuarded("ListElements", [&] {
      ListElementsMessage(response);
      return grpc::Status::OK;
    });
  }
  return FinishUnary(context, "ListElements", timer, status);
}

grpc::ServerUnaryReactor* ElectronStructureImpl::AnalyzeCompound(
    grpc::CallbackServerContext* context, const v1::CompositionRecord* request,
    v1::RecordReport* response) {
  const CallTimer timer;
  grpc::Status status = Admit(context);
  if (status.ok()) {
    status = RunGuarded("AnalyzeCompound", [&] {
      AnalyzeRecordMessage(*request, response);
      return grpc::Status::OK;
    });
  }
  return FinishUnary(context, "AnalyzeCompound", timer, status);
}

grpc::ServerBidiReactor<v1::RecordBatch, v1::ReportBatch>*
ElectronStructureImpl::AnalyzeRecords(grpc::CallbackServerContext* context) {
  return new RecordStreamReactor(context, Admit(context));
}

// ---------------------------------------------------------------------------
// The server.

absl::StatusOr<std::unique_ptr<ShellwrightServer>> ShellwrightServer::Start(
    const ServerOptions& options) {
  if (options.listen.empty()) {
    return absl::InvalidArgumentError("--listen is empty");
  }
  if (options.max_message_bytes <= 0) {
    return absl::InvalidArgumentError(
        "--max-message-bytes must be a positive number of bytes");
  }
  if (options.max_concurrent_streams < 0) {
    return absl::InvalidArgumentError(
        "--max-concurrent-streams must be 0 (gRPC default) or positive");
  }
  absl::StatusOr<std::shared_ptr<grpc::ServerCredentials>> credentials =
      MakeServerCredentials(options.tls);
  if (!credentials.ok()) return credentials.status();
  std::string token;
  if (!options.auth_token_file.empty()) {
    absl::StatusOr<std::string> t = ReadTokenFile(options.auth_token_file);
    if (!t.ok()) return t.status();
    token = std::move(*t);
  }

  // Both are process-wide registrations; the reflection plugin must be
  // registered once or every later builder would add it twice.
  static std::once_flag plugins_once;
  std::call_once(plugins_once, [] {
    grpc::EnableDefaultHealthCheckService(true);
    grpc::reflection::InitProtoReflectionServerBuilderPlugin();
    google::protobuf::SetLogHandler(&ProtobufLogHandler);
  });

  // The engine precomputes its ion tables on first use; pay that here rather
  // than in the first caller's latency.
  {
    v1::DescribeAtomRequest warm_up;
    warm_up.set_spec("H");
    v1::AtomDescription ignored;
    DescribeAtomMessage(warm_up, &ignored).IgnoreError();
  }

  std::unique_ptr<ShellwrightServer> server(new ShellwrightServer());
  server->service_ = std::make_unique<ElectronStructureImpl>(std::move(token));

  grpc::ServerBuilder builder;
  builder.AddListeningPort(options.listen, *credentials, &server->port_);
  builder.RegisterService(server->service_.get());
  builder.SetMaxReceiveMessageSize(options.max_message_bytes);
  // gRPC binds with SO_REUSEPORT by default, which would let a second
  // server silently share a port that is already in use.
  builder.AddChannelArgument(GRPC_ARG_ALLOW_REUSEPORT, 0);
  if (options.max_concurrent_streams > 0) {
    builder.AddChannelArgument(GRPC_ARG_MAX_CONCURRENT_STREAMS,
                               options.max_concurrent_streams);
  }
  server->server_ = builder.BuildAndStart();
  if (server->server_ == nullptr || server->port_ == 0) {
    return absl::UnavailableError(
        absl::StrCat("cannot listen on '", options.listen, "'"));
  }

  grpc::HealthCheckServiceInterface* health =
      server->server_->GetHealthCheckService();
  if (health != nullptr) {
    health->SetServingStatus("", true);
    health->SetServingStatus(v1::ElectronStructure::service_full_name(), true);
  }

  // Report the port actually bound, which differs from the request for :0.
  const size_t colon = options.listen.rfind(':');
  const std::string host = colon == std::string::npos
                               ? options.listen
                               : options.listen.substr(0, colon);
  server->address_ = absl::StrCat(host, ":", server->port_);
  return server;
}

ShellwrightServer::~ShellwrightServer() {
  if (!shut_down_ && server_ != nullptr) Shutdown(absl::ZeroDuration());
}

void ShellwrightServer::Shutdown(absl::Duration grace) {
  if (shut_down_ || server_ == nullptr) return;
  shut_down_ = true;
  if (grpc::HealthCheckServiceInterface* health =
          server_->GetHealthCheckService()) {
    health->SetServingStatus(false);
  }
  server_->Shutdown(std::chrono::system_clock::now() +
                    absl::ToChronoMicroseconds(grace));
  server_->Wait();
}

}  // namespace shellwright
