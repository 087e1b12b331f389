// The remote backend (backend.h's MakeRemoteBackend): shellwrightd over
// gRPC. Built into its own library, shellwright_cli_remote, so that the
// in-process CLI links and loads no gRPC (clients/CMakeLists.txt).

#include <algorithm>
#include <atomic>
#include <chrono>
#include <functional>
#include <memory>
#include <mutex>
#include <ostream>
#include <string>
#include <utility>
#include <vector>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_join.h"
#include "absl/time/clock.h"
#include "absl/types/span.h"
#include "api/records.h"
#include "clients/cli/backend.h"
#include "clients/cli/record_io.h"
#include "grpcpp/grpcpp.h"
#include "shellwright/v1/electron_structure.grpc.pb.h"
#include "util/small_file.h"

namespace shellwright::cli {
namespace {

absl::Status FromGrpc(const grpc::Status& s) {
  if (s.ok()) return absl::OkStatus();
  return absl::Status(static_cast<absl::StatusCode>(s.error_code()),
                      s.error_message());
}

// A replica that failed is passed over for this long (while others are
// left), so that batches do not keep going to a dead server.
constexpr absl::Duration kAvoidFailedReplica = absl::Seconds(2);

// Times every replica is tried for one batch before the run fails, and the
// pause before each new round (doubled every round).
constexpr int kRoundsPerBatch = 4;
constexpr absl::Duration kFirstRoundPause = absl::Milliseconds(100);

// Service config for every channel: round_robin over the addresses a
// target resolves to (a dns:/// name with several records), and the
// standard health service, so that a draining replica (NOT_SERVING) gets
// no new streams from that channel.
constexpr char kServiceConfig[] = R"json({
  "loadBalancingConfig": [{"round_robin": {}}],
  "healthCheckConfig": {"serviceName": "shellwright.v1.ElectronStructure"}
})json";

// One server of the set.
struct Replica {
  std::string target;
  std::unique_ptr<v1::ElectronStructure::Stub> stub;
  // absl::GetCurrentTimeNanos() before which the replica is passed over.
  std::atomic<int64_t> avoid_until{0};
};

// The servers named by --server, and the turn in which batches go to them.
class ReplicaSet {
 public:
  ReplicaSet(std::vector<std::unique_ptr<Replica>> replicas,
             std::ostream* warnings)
      : replicas_(std::move(replicas)), warnings_(warnings) {}

  int size() const { return static_cast<int>(replicas_.size()); }
  Replica& at(int i) { return *replicas_[i]; }

  // The next replica in turn that `tried` does not mark, preferring ones
  // that have not failed lately; -1 when every one is marked.
  int Pick(const std::vector<bool>& tried) {
    const int n = size();
    const int start = static_cast<int>(next_.fetch_add(1) % n);
    const int64_t now = absl::GetCurrentTimeNanos();
    int fallback = -1;
    for (int k = 0; k < n; ++k) {
      const int i = (start + k) % n;
      if (tried[i]) continue;
      const int64_t until = replicas_[i]->avoid_until.load();
      if (until <= now) return i;
      if (fallback < 0 || until < replicas_[fallback]->avoid_until.load()) {
        fallback = i;
      }
    }
    return fallback;
  }

  // Replica i failed with `status`: passed over for a while, and a warning
  // line says so when there are other replicas to fall back on.
  void Failed(int i, const absl::Status& status, absl::string_view retry) {
    replicas_[i]->avoid_until.store(
        absl::GetCurrentTimeNanos() +
        absl::ToInt64Nanoseconds(kAvoidFailedReplica));
    // With one server the final error says it all.
    if (warnings_ == nullptr || size() == 1) return;
    std::lock_guard<std::mutex> lock(warnings_mu_);
    *warnings_ << "shellwright: server " << replicas_[i]->target << " failed ("
               << absl::StatusCodeToString(status.code()) << ": "
               << status.message() << "); " << retry << "\n";
  }

 private:
  const std::vector<std::unique_ptr<Replica>> replicas_;
  std::atomic<uint64_t> next_{0};
  std::ostream* const warnings_;
  std::mutex warnings_mu_;
};

// Failures that another replica (or the same one, later) may not have:
// the server went away, drained, was overloaded, or broke the stream.
// Caller errors (INVALID_ARGUMENT, UNAUTHENTICATED, ...) and deadlines
// would fail everywhere alike.
bool WorthRetrying(const absl::Status& status) {
  switch (status.code()) {
    case absl::StatusCode::kUnavailable:
    case absl::StatusCode::kCancelled:
    case absl::StatusCode::kAborted:
    case absl::StatusCode::kResourceExhausted:
    case absl::StatusCode::kDataLoss:
    case absl::StatusCode::kInternal:
    case absl::StatusCode::kUnknown:
      return true;
    default:
      return false;
  }
}

// Runs `attempt(replica)` on replica after replica until one succeeds or
// fails with an error WorthRetrying() rejects, for kRoundsPerBatch rounds
// over the whole set; `what` names the work in messages. UNAVAILABLE
// naming every replica's last failure when none is left.
template <typename Attempt>
absl::Status OnSomeReplica(ReplicaSet& replicas, absl::string_view what,
                           Attempt&& attempt) {
  std::vector<bool> tried(replicas.size(), false);
  std::vector<std::string> last_failure(replicas.size());
  absl::Status last;
  absl::Duration pause = kFirstRoundPause;
  for (int round = 1;;) {
    const int r = replicas.Pick(tried);
    if (r < 0) {
      if (++round > kRoundsPerBatch) break;
      absl::SleepFor(pause);
      pause *= 2;
      tried.assign(replicas.size(), false);
      continue;
    }
    tried[r] = true;
    absl::Status status = attempt(r);
    if (status.ok() || !WorthRetrying(status)) return status;
    last = status;
    last_failure[r] = absl::StrCat(replicas.at(r).target, ": ",
                                   absl::StatusCodeToString(status.code()),
                                   ": ", status.message());
    replicas.Failed(r, status, absl::StrCat("sending ", what, " again"));
  }
  // One server's own failure says it best.
  if (replicas.size() == 1) return last;
  return absl::UnavailableError(absl::StrCat(
      "no server left to answer ", what, " after ", kRoundsPerBatch,
      " rounds over ", replicas.size(),
      " server(s); last failures: ", absl::StrJoin(last_failure, "; ")));
}

// AnalyzeRecords streams, one per replica at most, opened on first use, and
// one batch in flight at a time: the records of a batch's readable lines
// go out as one RecordBatch to the next replica in turn, and their reports
// come back in order. A batch whose stream breaks before its whole answer
// arrived (the replica died, drained or was overloaded) goes again, whole,
// to another replica; only a complete answer is written, so every line
// gets exactly one report. `open` makes a stream's context (deadline,
// token).
class RemoteBatchProcessor final : public BatchProcessor {
 public:
  using OpenContext = std::function<std::unique_ptr<grpc::ClientContext>()>;

  RemoteBatchProcessor(ReplicaSet* replicas, OpenContext open,
                       ReportLineFormat format, const ReportMask& fields)
      : replicas_(replicas),
        open_(std::move(open)),
        format_(format),
        fields_(fields),
        streams_(replicas->size()) {}

  absl::Status Process(absl::Span<const ParsedLine> lines,
                       ReportLines* out) override {
    request_.Clear();
    FieldsToRequest(format_, fields_)
        .ToFieldMask(request_.mutable_report_mask());
    for (const ParsedLine& line : lines) {
      if (line.error.empty()) *request_.add_records() = line.record;
    }
    if (request_.records_size() > 0) {
      absl::Status status = OnSomeReplica(
          *replicas_,
          absl::StrCat("a batch of ", request_.records_size(), " records"),
          [this](int r) { return Exchange(r); });
      if (!status.ok()) return status;
    }
    int k = 0;
    for (const ParsedLine& line : lines) {
      if (line.error.empty()) {
        v1::RecordReport* report = reply_.mutable_reports(k++);
        AddReaderWarnings(line, report);
        AddReport(format_, *report, out, fields_);
      } else {
        MalformedRecordReport(line.record, line.error, &malformed_);
        AddReaderWarnings(line, &malformed_);
        AddReport(format_, malformed_, out, fields_);
      }
    }
    return absl::OkStatus();
  }

  // Every batch was answered by now, so a stream that a replica ended
  // since (draining, gone) costs nothing; only other failures count.
  absl::Status Finish() override {
    absl::Status result;
    for (Stream& s : streams_) {
      if (s.stream == nullptr) continue;
      s.stream->WritesDone();
      absl::Status status = FromGrpc(s.stream->Finish());
      s.stream = nullptr;
      if (!WorthRetrying(status) && result.ok()) result = status;
    }
    return result;
  }

 private:
  struct Stream {
    std::unique_ptr<grpc::ClientContext> context;
    std::unique_ptr<grpc::ClientReaderWriter<v1::RecordBatch, v1::ReportBatch>>
        stream;
  };

  // Sends request_ on replica r's stream and reads its answer into reply_.
  absl::Status Exchange(int r) {
    Stream& s = streams_[r];
    if (s.stream == nullptr) {
      s.context = open_();
      s.stream = replicas_->at(r).stub->AnalyzeRecords(s.context.get());
    }
    // A stream that ended (the replica went away, drained or refused the
    // call) says why in its status.
    if (!s.stream->Write(request_)) return Ended(s, "sending a batch");
    switch (ReadAnswer(*s.stream, request_.records_size())) {
      case Answer::kComplete:
        return absl::OkStatus();
      case Answer::kEnded:
        return Ended(s, "reading the answer to a batch");
      case Answer::kWrongCount:
        s.context->TryCancel();
        s.stream->Finish().ok();  // CANCELLED: we ended it.
        s.stream = nullptr;
        return absl::DataLossError(
            "the server's answer to a batch had the wrong number of "
            "reports");
    }
    return absl::InternalError("unreachable");
  }

  enum class Answer { kComplete, kEnded, kWrongCount };

  // Reads the answer to the batch just sent into reply_: `expected`
  // reports, which the server sends in several ReportBatch messages when
  // one would pass a default client's 4 MiB limit.
  Answer ReadAnswer(
      grpc::ClientReaderWriter<v1::RecordBatch, v1::ReportBatch>& stream,
      int expected) {
    reply_.Clear();
    while (reply_.reports_size() < expected) {
      if (!stream.Read(&part_)) return Answer::kEnded;
      if (part_.reports_size() == 0 ||
          reply_.reports_size() + part_.reports_size() > expected) {
        return Answer::kWrongCount;
      }
      for (v1::RecordReport& report : *part_.mutable_reports()) {
        reply_.add_reports()->Swap(&report);
      }
    }
    return Answer::kComplete;
  }

  // The status of a stream that ended while `doing`; DATA_LOSS when the
  // server ended it with OK although a batch was unanswered. The stream
  // is closed.
  absl::Status Ended(Stream& s, absl::string_view doing) {
    absl::Status status = FromGrpc(s.stream->Finish());
    s.stream = nullptr;
    if (!status.ok()) return status;
    return absl::DataLossError(absl::StrCat(
        "the server ended the stream while ", doing, " without an answer"));
  }

  ReplicaSet* const replicas_;
  const OpenContext open_;
  const ReportLineFormat format_;
  const ReportMask fields_;
  std::vector<Stream> streams_;  // By replica.
  // Reused between batches.
  v1::RecordBatch request_;
  v1::ReportBatch reply_;
  v1::ReportBatch part_;
  v1::RecordReport malformed_;
};

class RemoteBackend final : public Backend {
 public:
  RemoteBackend(std::unique_ptr<ReplicaSet> replicas, std::string token,
                absl::Duration timeout, absl::Duration stream_timeout)
      : replicas_(std::move(replicas)),
        token_(std::move(token)),
        timeout_(timeout),
        stream_timeout_(stream_timeout) {}

  absl::Status AnalyzeCompound(const v1::CompositionRecord& record,
                               v1::RecordReport* report) override {
    return Unary("the record", [&](v1::ElectronStructure::Stub& stub,
                                   grpc::ClientContext* context) {
      return stub.AnalyzeCompound(context, record, report);
    });
  }

  std::unique_ptr<BatchProcessor> NewBatchProcessor(
      ReportLineFormat format, const ReportMask& fields) override {
    return std::make_unique<RemoteBatchProcessor>(
        replicas_.get(),
        [this] {
          auto context = std::make_unique<grpc::ClientContext>();
          Prepare(context.get(), stream_timeout_);
          return context;
        },
        format, fields);
  }

  int DefaultBatchSize() const override { return 500; }

  absl::Status DescribeAtom(const v1::DescribeAtomRequest& request,
                            v1::AtomDescription* response) override {
    return Unary("the request", [&](v1::ElectronStructure::Stub& stub,
                                    grpc::ClientContext* context) {
      return stub.DescribeAtom(context, request, response);
    });
  }

  absl::Status ListElements(v1::ListElementsResponse* response) override {
    return Unary("the request", [&](v1::ElectronStructure::Stub& stub,
                                    grpc::ClientContext* context) {
      return stub.ListElements(context, v1::ListElementsRequest(), response);
    });
  }

 private:
  // One unary call, on another replica when one fails.
  template <typename Call>
  absl::Status Unary(absl::string_view what, Call&& call) {
    return OnSomeReplica(*replicas_, what, [&](int r) {
      grpc::ClientContext context;
      Prepare(&context, timeout_);
      return FromGrpc(call(*replicas_->at(r).stub, &context));
    });
  }

  void Prepare(grpc::ClientContext* context, absl::Duration timeout) const {
    context->set_deadline(std::chrono::system_clock::now() +
                          absl::ToChronoMilliseconds(timeout));
    if (!token_.empty()) {
      context->AddMetadata("authorization", absl::StrCat("Bearer ", token_));
    }
  }

  const std::unique_ptr<ReplicaSet> replicas_;
  const std::string token_;
  const absl::Duration timeout_;
  const absl::Duration stream_timeout_;
};

}  // namespace

absl::StatusOr<std::unique_ptr<Backend>> MakeRemoteBackend(
    const RemoteOptions& options) {
  absl::StatusOr<std::vector<std::string>> targets =
      ParseServerTargets(options.address);
  if (!targets.ok()) return targets.status();
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
  args.SetServiceConfigJSON(kServiceConfig);
  std::vector<std::unique_ptr<Replica>> replicas;
  for (std::string& target : *targets) {
    auto replica = std::make_unique<Replica>();
    replica->stub = v1::ElectronStructure::NewStub(
        grpc::CreateCustomChannel(ServerTarget(target), credentials, args));
    replica->target = ServerTarget(target);
    replicas.push_back(std::move(replica));
  }
  return std::unique_ptr<Backend>(new RemoteBackend(
      std::make_unique<ReplicaSet>(std::move(replicas), options.warnings),
      std::move(token), options.timeout, options.stream_timeout));
}

}  // namespace shellwright::cli
