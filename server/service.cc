#include "server/service.h"

#include <algorithm>
#include <atomic>
#include <chrono>
#include <condition_variable>
#include <exception>
#include <memory>
#include <mutex>
#include <optional>
#include <set>
#include <thread>
#include <utility>
#include <vector>

#include "absl/strings/ascii.h"
#include "absl/strings/escaping.h"
#include "absl/strings/match.h"
#include "absl/strings/numbers.h"
#include "absl/strings/str_cat.h"
#include "absl/time/clock.h"
#include "absl/types/span.h"
#include "api/atoms.h"
#include "api/records.h"
#include "api/report_mask.h"
#include "google/protobuf/io/coded_stream.h"
#include "google/protobuf/stubs/logging.h"
#include "grpcpp/ext/proto_server_reflection_plugin.h"
#include "grpcpp/health_check_service_interface.h"
#include "grpcpp/support/proto_buffer_reader.h"
#include "grpcpp/support/proto_buffer_writer.h"
#include "util/small_file.h"

namespace shellwright {
namespace internal {

// The service's view of its calls: how many are in progress (for the
// drain) and which AnalyzeRecords streams wait for their next batch (for
// the idle limit and the drain). A reaper thread cancels streams that have
// waited longer than the idle limit.
class CallTracker {
 public:
  // One AnalyzeRecords call, shared between its reactor and the tracker so
  // that cancelling never races with the reactor's deletion.
  struct Stream {
    // Recursive: TryCancel may run the reactor's reactions inline on the
    // cancelling thread, and they take this lock too.
    std::recursive_mutex mu;
    grpc::CallbackServerContext* context;  // Null once the call is done.
    // When the stream started waiting for its next batch; nullopt while
    // it works on one.
    std::optional<absl::Time> waiting_since;
  };

  explicit CallTracker(absl::Duration stream_idle_timeout)
      : idle_timeout_(stream_idle_timeout),
        reaper_([this] { ReapIdleStreams(); }) {}

  ~CallTracker() {
    {
      std::lock_guard<std::mutex> lock(mu_);
      stopping_ = true;
    }
    stop_.notify_all();
    reaper_.join();
  }

  bool draining() const { return draining_.load(std::memory_order_acquire); }

  std::shared_ptr<Stream> AddStream(grpc::CallbackServerContext* context) {
    auto stream = std::make_shared<Stream>();
    stream->context = context;
    std::lock_guard<std::mutex> lock(mu_);
    streams_.insert(stream);
    return stream;
  }

  // The stream's call is done; its context goes away after this.
  void RemoveStream(const std::shared_ptr<Stream>& stream) {
    {
      std::lock_guard<std::recursive_mutex> lock(stream->mu);
      stream->context = nullptr;
    }
    std::lock_guard<std::mutex> lock(mu_);
    streams_.erase(stream);
    changed_.notify_all();
  }

  // AnalyzeRecords streams and unary calls in progress.
  int InProgress() {
    std::lock_guard<std::mutex> lock(mu_);
    return static_cast<int>(streams_.size()) + unary_calls_;
  }

  void UnaryStarted() {
    std::lock_guard<std::mutex> lock(mu_);
    ++unary_calls_;
  }
  void UnaryDone() {
    std::lock_guard<std::mutex> lock(mu_);
    --unary_calls_;
    changed_.notify_all();
  }

  void BeginDrain() {
    draining_.store(true, std::memory_order_release);
    CancelWaiting(absl::InfiniteFuture(), "the server is draining");
  }

  bool WaitUntilIdle(absl::Time deadline) {
    std::unique_lock<std::mutex> lock(mu_);
    return changed_.wait_until(lock, absl::ToChronoTime(deadline), [&] {
      return streams_.empty() && unary_calls_ == 0;
    });
  }

 private:
  // Cancels every stream that has waited for a batch since before `cutoff`.
  void CancelWaiting(absl::Time cutoff, absl::string_view why) {
    std::vector<std::shared_ptr<Stream>> streams;
    {
      std::lock_guard<std::mutex> lock(mu_);
      streams.assign(streams_.begin(), streams_.end());
    }
    // Outside mu_: a cancellation may finish the call on this thread, and
    // RemoveStream takes mu_.
    for (const std::shared_ptr<Stream>& stream : streams) {
      std::lock_guard<std::recursive_mutex> lock(stream->mu);
      if (stream->context == nullptr || !stream->waiting_since.has_value() ||
          *stream->waiting_since > cutoff) {
        continue;
      }
      Log(LogLevel::kDebug,
          absl::StrCat("cancelling an AnalyzeRecords stream waiting for a "
                       "batch: ",
                       why));
      stream->waiting_since.reset();
      stream->context->TryCancel();
    }
  }

  void ReapIdleStreams() {
    const absl::Duration period =
        std::clamp(idle_timeout_ / 4, absl::Milliseconds(10), absl::Seconds(5));
    std::unique_lock<std::mutex> lock(mu_);
    while (!stopping_) {
      stop_.wait_for(lock, absl::ToChronoMilliseconds(period));
      if (stopping_) break;
      lock.unlock();
      CancelWaiting(absl::Now() - idle_timeout_,
                    "idle for longer than the idle timeout");
      lock.lock();
    }
  }

  const absl::Duration idle_timeout_;
  std::atomic<bool> draining_{false};
  std::mutex mu_;
  std::condition_variable changed_;            // A call ended.
  std::condition_variable stop_;               // stopping_ was set.
  std::set<std::shared_ptr<Stream>> streams_;  // Guarded by mu_.
  int unary_calls_ = 0;                        // Guarded by mu_.
  bool stopping_ = false;                      // Guarded by mu_.
  std::thread reaper_;  // Last: starts once the members above exist.
};

// A token bucket: `rate` requests per second on average, `burst` at once.
class RateLimiter {
 public:
  RateLimiter(double rate, int burst)
      : rate_(rate), burst_(burst), tokens_(burst), last_(absl::Now()) {}

  // True when a request may go ahead now (and counts it). Thread-safe.
  bool Take() {
    std::lock_guard<std::mutex> lock(mu_);
    const absl::Time now = absl::Now();
    tokens_ = std::min<double>(
        burst_, tokens_ + rate_ * absl::ToDoubleSeconds(now - last_));
    last_ = now;
    if (tokens_ < 1) return false;
    tokens_ -= 1;
    return true;
  }

 private:
  const double rate_;
  const int burst_;
  std::mutex mu_;
  double tokens_;    // Guarded by mu_.
  absl::Time last_;  // Guarded by mu_.
};

}  // namespace internal

namespace {

grpc::Status RateLimited() {
  return grpc::Status(grpc::StatusCode::RESOURCE_EXHAUSTED,
                      "the request rate limit for this token is reached; "
                      "back off and retry");
}

// ---------------------------------------------------------------------------
// Helpers.

constexpr char kInternalMessage[] = "internal error";

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

// Tells whether a call is still worth working on: work past its deadline
// or after a cancellation is thrown away by gRPC, so long loops ask between
// items and stop early.
class CallWatch {
 public:
  // How far before the server's copy of the deadline a cancellation still
  // counts as the deadline's (common practice, no source: well above a
  // loopback transit, well below any deadline a client would set).
  static constexpr std::chrono::milliseconds kDeadlineSlack{100};

  explicit CallWatch(grpc::CallbackServerContext* context)
      : context_(context), deadline_(context->deadline()) {}

  // True once the deadline has passed. One clock read, so cheap enough to
  // ask before every item.
  bool DeadlinePassed() const {
    return std::chrono::system_clock::now() >= deadline_;
  }

  // OK while the call should go on; DEADLINE_EXCEEDED once its deadline has
  // passed; CANCELLED once it was cancelled (by the client or by a server
  // shutdown). Takes a lock inside gRPC.
  grpc::Status Check() const {
    if (DeadlinePassed()) {
      return grpc::Status(grpc::StatusCode::DEADLINE_EXCEEDED,
                          "deadline exceeded");
    }
    if (context_->IsCancelled()) return Cancelled();
    return grpc::Status::OK;
  }

  // The status of a call found cancelled. The server's copy of the
  // deadline is the propagated timeout counted from the call's arrival, so
  // it falls a transit time after the client's, whose timer cancels the
  // call first: a cancellation within kDeadlineSlack of the deadline is
  // the deadline's.
  grpc::Status Cancelled() const {
    if (std::chrono::system_clock::now() >= deadline_ - kDeadlineSlack) {
      return grpc::Status(grpc::StatusCode::DEADLINE_EXCEEDED,
                          "deadline exceeded");
    }
    return grpc::Status(grpc::StatusCode::CANCELLED, "cancelled");
  }

 private:
  grpc::CallbackServerContext* const context_;
  // Cached, as deadline() converts from gpr_timespec on every call.
  const std::chrono::system_clock::time_point deadline_;
};

// Finishes a unary call. A call whose deadline passed or that was cancelled
// while it ran is finished (and logged) with that code rather than OK.
grpc::ServerUnaryReactor* FinishUnary(grpc::CallbackServerContext* context,
                                      absl::string_view method,
                                      const CallTimer& timer,
                                      grpc::Status status) {
  if (status.ok()) status = CallWatch(context).Check();
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

// "unix:PATH" or "unix-abstract:NAME": a socket address without a port.
bool IsUnixSocketAddress(absl::string_view listen) {
  return absl::StartsWith(listen, "unix:") ||
         absl::StartsWith(listen, "unix-abstract:");
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

// DescribeAtoms item by item, stopping early once `watch` says the call is
// over. Each item is answered by DescribeAtomItem, as in
// DescribeAtomsMessage, so the results are those of the in-process API.
grpc::Status DescribeAtomsWatched(const CallWatch& watch,
                                  const v1::DescribeAtomsRequest& request,
                                  v1::DescribeAtomsResponse* response) {
  if (request.requests_size() > kMaxDescribeAtomsBatch) {
    // Its INVALID_ARGUMENT names the limit.
    return ToGrpcStatus(DescribeAtomsMessage(request, response));
  }
  response->Clear();
  for (const v1::DescribeAtomRequest& item : request.requests()) {
    if (grpc::Status s = watch.Check(); !s.ok()) return s;
    DescribeAtomItem(item, response->add_results());
  }
  return grpc::Status::OK;
}

// A peer gets this long to answer a keepalive ping, and a new connection
// this long to finish its handshake (common practice, no source).
constexpr absl::Duration kKeepaliveTimeout = absl::Seconds(20);
constexpr absl::Duration kHandshakeTimeout = absl::Seconds(20);

// The shortest interval between a client's keepalive pings that the server
// accepts (common practice, no source).
constexpr absl::Duration kMinClientPingInterval = absl::Seconds(10);

// Records analysed between two cancellation checks in AnalyzeRecords
// (the deadline is checked before every record).
constexpr int kRecordsPerCancelCheck = 64;

// The tag of ReportBatch.reports (field 1, length-delimited).
constexpr uint8_t kReportsTag = (1 << 3) | 2;

// Bytes a report adds to a ReportBatch: its tag, its length and itself.
// Computes the report's size, which SerializeReports then uses.
size_t ReportFieldBytes(const v1::RecordReport& report) {
  const size_t size = report.ByteSizeLong();
  return 1 + google::protobuf::io::CodedOutputStream::VarintSize64(size) + size;
}

// The bytes of the ReportBatch holding `reports`, whose sizes are computed
// (ReportFieldBytes) and add up to `bytes`: written straight from the
// cached sizes, in gRPC's usual slices (one large slice per reply would
// cost page faults every batch). INTERNAL when they do not add up.
grpc::Status SerializeReports(
    absl::Span<const std::unique_ptr<v1::RecordReport>> reports, size_t bytes,
    grpc::ByteBuffer* out) {
  grpc::ByteBuffer buffer;
  bool wrong_size;
  {
    // The stream asks for room ahead of what it writes: give it some
    // slack, which Trim hands back.
    grpc::ProtoBufferWriter writer(&buffer,
                                   grpc::kProtoBufferWriterMaxBufferLength,
                                   static_cast<int>(bytes) + 64);
    google::protobuf::io::CodedOutputStream coded(&writer);
    for (const std::unique_ptr<v1::RecordReport>& report : reports) {
      coded.WriteTag(kReportsTag);
      coded.WriteVarint32(static_cast<uint32_t>(report->GetCachedSize()));
      report->SerializeWithCachedSizes(&coded);
    }
    coded.Trim();
    wrong_size =
        coded.HadError() || static_cast<size_t>(coded.ByteCount()) != bytes;
  }
  if (wrong_size) {
    return grpc::Status(grpc::StatusCode::INTERNAL,
                        "a reply's size did not add up");
  }
  out->Swap(&buffer);
  return grpc::Status::OK;
}

// AnalyzeRecords: one batch read, analysed and answered at a time. Reading
// the next batch only after the previous answer is written lets HTTP/2
// flow control push back on a client that sends faster than it reads. An
// answer that would pass kMaxReportBatchBytes goes out in several
// ReportBatch messages, each written once the one before it is.
class RecordStreamReactor final
    : public grpc::ServerBidiReactor<grpc::ByteBuffer, grpc::ByteBuffer> {
 public:
  RecordStreamReactor(grpc::CallbackServerContext* context,
                      const grpc::Status& admitted,
                      internal::CallTracker* tracker,
                      internal::RateLimiter* rate_limiter)
      : peer_(PeerForLog(context)),
        watch_(context),
        tracker_(tracker),
        rate_limiter_(rate_limiter) {
    if (!admitted.ok()) {
      FinishAndRecord(admitted);
      return;
    }
    tracked_ = tracker_->AddStream(context);
    ReadNext();
  }

  void OnReadDone(bool ok) override {
    std::lock_guard<std::recursive_mutex> reaction(reaction_mu_);
    {
      // Claims the batch, unless an idle or drain cancellation came first
      // (then the call is cancelled and Interrupted() says so).
      std::lock_guard<std::recursive_mutex> lock(tracked_->mu);
      tracked_->waiting_since.reset();
    }
    if (!ok) {
      // The client half-closed, or the call ended under us (deadline,
      // cancellation).
      FinishAndRecord(Interrupted());
      return;
    }
    bool parsed;
    {
      grpc::ProtoBufferReader reader(&request_);
      parsed = batch_.ParseFromZeroCopyStream(&reader);
    }
    request_.Clear();
    if (!parsed) {
      FinishAndRecord(grpc::Status(
          grpc::StatusCode::INVALID_ARGUMENT,
          "records: the RecordBatch could not be parsed (is every string "
          "UTF-8?)"));
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
    absl::StatusOr<ReportMask> mask =
        ReportMask::FromFieldMask(batch_.report_mask());
    if (!mask.ok()) {
      FinishAndRecord(ToGrpcStatus(mask.status()));
      return;
    }
    mask_ = *mask;
    // The call itself took the stream's first request.
    if (batches_ > 0 && rate_limiter_ != nullptr && !rate_limiter_->Take()) {
      FinishAndRecord(RateLimited());
      return;
    }
    next_record_ = 0;
    carried_ = false;
    ++batches_;
    AnswerSome();
  }

  void OnWriteDone(bool ok) override {
    std::lock_guard<std::recursive_mutex> reaction(reaction_mu_);
    if (!ok) {
      grpc::Status status = Interrupted();
      FinishAndRecord(status.ok() ? grpc::Status(grpc::StatusCode::UNAVAILABLE,
                                                 "the stream closed before a "
                                                 "reply was written")
                                  : status);
      return;
    }
    if (next_record_ < batch_.records_size() || carried_) {
      AnswerSome();  // The rest of this batch's answer.
      return;
    }
    if (tracker_->draining()) {
      FinishAndRecord(grpc::Status(
          grpc::StatusCode::UNAVAILABLE,
          "the server is shutting down; every batch read so far was "
          "answered, send the rest to another server"));
      return;
    }
    ReadNext();
  }

  void OnCancel() override { cancelled_ = true; }

  void OnDone() override {
    // Every reaction before this one has ended (see reaction_mu_).
    { std::lock_guard<std::recursive_mutex> reaction(reaction_mu_); }
    if (tracked_ != nullptr) tracker_->RemoveStream(tracked_);
    grpc::Status logged = status_;
    if (cancelled_ && status_.ok()) logged = watch_.Cancelled();
    LogCall("AnalyzeRecords", logged, timer_, peer_,
            absl::StrCat(" batches=", batches_, " records=", records_));
    delete this;
  }

 private:
  void ReadNext() {
    {
      std::lock_guard<std::recursive_mutex> lock(tracked_->mu);
      tracked_->waiting_since = absl::Now();
    }
    StartRead(&request_);
  }

  // Analyses records from next_record_ on into reports_ until the batch
  // ends or the next report would take the reply past kMaxReportBatchBytes
  // (it is carried into the next reply), then writes the reply. The
  // reports are reused from batch to batch.
  void AnswerSome() {
    grpc::Status status = RunGuarded("AnalyzeRecords", [&] {
      size_t bytes = 0;
      int count = 0;  // Reports in this reply: reports_[0, count).
      if (carried_) {
        std::swap(reports_[0], reports_[carried_index_]);
        bytes += ReportFieldBytes(*reports_[0]);
        count = 1;
        carried_ = false;
      }
      const int end = batch_.records_size();
      for (; next_record_ < end; ++next_record_) {
        // A hard record takes tens of milliseconds, so checking only every
        // kRecordsPerCancelCheck records could overrun the deadline by
        // seconds; one clock read per record costs well under 1%.
        if (watch_.DeadlinePassed() || cancelled_ ||
            next_record_ % kRecordsPerCancelCheck == 0) {
          if (grpc::Status s = Interrupted(); !s.ok()) return s;
        }
        if (count == static_cast<int>(reports_.size())) {
          reports_.push_back(std::make_unique<v1::RecordReport>());
        }
        v1::RecordReport* report = reports_[count].get();
        AnalyzeRecord(batch_.records(next_record_), report, mask_);
        ++records_;
        const size_t report_bytes = ReportFieldBytes(*report);
        if (bytes + report_bytes > kMaxReportBatchBytes && count > 0) {
          carried_ = true;
          carried_index_ = count;
          ++next_record_;
          break;
        }
        bytes += report_bytes;
        ++count;
      }
      return SerializeReports(absl::MakeConstSpan(reports_.data(), count),
                              bytes, &reply_);
    });
    if (!status.ok()) {
      FinishAndRecord(status);
      return;
    }
    StartWrite(&reply_);
  }

  // Finish, keeping the status for the log line written in OnDone.
  void FinishAndRecord(const grpc::Status& status) {
    status_ = status;
    Finish(status);
  }

  // OK while the call goes on, else DEADLINE_EXCEEDED or CANCELLED.
  grpc::Status Interrupted() const {
    grpc::Status status = watch_.Check();
    if (status.ok() && cancelled_) status = watch_.Cancelled();
    return status;
  }

  const std::string peer_;  // Empty unless debug logging is on.
  const CallWatch watch_;
  const CallTimer timer_;
  internal::CallTracker* const tracker_;
  internal::RateLimiter* const rate_limiter_;  // Null: no rate limit.
  std::shared_ptr<internal::CallTracker::Stream> tracked_;  // Null: refused.
  grpc::ByteBuffer request_;  // The RecordBatch read, until parsed.
  v1::RecordBatch batch_;
  ReportMask mask_;      // batch_'s report_mask.
  int next_record_ = 0;  // The next record of batch_ to analyse.
  // Reports, reused: the answer in hand is written from the first ones.
  std::vector<std::unique_ptr<v1::RecordReport>> reports_;
  // When set, reports_[carried_index_] did not fit in the last reply; it
  // opens the next one.
  bool carried_ = false;
  int carried_index_ = 0;
  grpc::ByteBuffer reply_;  // The ReportBatch being written.
  grpc::Status status_;
  int64_t batches_ = 0;
  int64_t records_ = 0;
  std::atomic<bool> cancelled_{false};
  // Held through each reaction, and taken once when the call is done.
  // gRPC runs a stream's reactions one at a time, possibly on different
  // threads, and orders them inside its own (uninstrumented) library:
  // this lock makes that order visible to ThreadSanitizer, which
  // otherwise reports the reports written by one reaction and freed by
  // OnDone on another thread, and spends minutes symbolising each such
  // suppressed report. Recursive, as a reaction may run the next one
  // inline on its own thread. Uncontended, so it costs a few nanoseconds
  // per batch.
  std::recursive_mutex reaction_mu_;
};

}  // namespace

// ---------------------------------------------------------------------------
// Status mapping.

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

ElectronStructureImpl::ElectronStructureImpl(std::string token,
                                             absl::Duration stream_idle_timeout,
                                             CallLimits limits)
    : verifier_(token),
      limits_(limits),
      tracker_(std::make_unique<internal::CallTracker>(stream_idle_timeout)),
      rate_limiter_(!token.empty() && limits.token_rate_limit > 0
                        ? std::make_unique<internal::RateLimiter>(
                              limits.token_rate_limit,
                              std::max(1, limits.token_rate_burst))
                        : nullptr) {}

ElectronStructureImpl::~ElectronStructureImpl() = default;

void ElectronStructureImpl::BeginDrain() { tracker_->BeginDrain(); }

bool ElectronStructureImpl::WaitUntilIdle(absl::Time deadline) {
  return tracker_->WaitUntilIdle(deadline);
}

grpc::Status ElectronStructureImpl::Admit(grpc::CallbackServerContext* context,
                                          bool counted_self) const {
  if (tracker_->draining()) {
    return grpc::Status(grpc::StatusCode::UNAVAILABLE,
                        "the server is shutting down");
  }
  if (limits_.max_concurrent_calls > 0 &&
      tracker_->InProgress() - (counted_self ? 1 : 0) >=
          limits_.max_concurrent_calls) {
    return grpc::Status(
        grpc::StatusCode::RESOURCE_EXHAUSTED,
        absl::StrCat("the server is at its limit of ",
                     limits_.max_concurrent_calls,
                     " calls in progress; retry later or on another "
                     "server"));
  }
  grpc::Status status = verifier_.Check(context->client_metadata());
  if (!status.ok()) return status;
  if (rate_limiter_ != nullptr && !rate_limiter_->Take()) {
    return RateLimited();
  }
  if (context->deadline() <= std::chrono::system_clock::now()) {
    return grpc::Status(grpc::StatusCode::DEADLINE_EXCEEDED,
                        "deadline exceeded before the call started");
  }
  return grpc::Status::OK;
}

template <typename Body>
grpc::ServerUnaryReactor* ElectronStructureImpl::ServeUnary(
    grpc::CallbackServerContext* context, absl::string_view method,
    Body&& body) {
  const CallTimer timer;
  tracker_->UnaryStarted();
  grpc::Status status = Admit(context, /*counted_self=*/true);
  if (status.ok()) status = RunGuarded(method, std::forward<Body>(body));
  grpc::ServerUnaryReactor* reactor =
      FinishUnary(context, method, timer, status);
  tracker_->UnaryDone();
  return reactor;
}

grpc::ServerUnaryReactor* ElectronStructureImpl::DescribeAtom(
    grpc::CallbackServerContext* context,
    const v1::DescribeAtomRequest* request, v1::AtomDescription* response) {
  return ServeUnary(context, "DescribeAtom", [&] {
    return ToGrpcStatus(DescribeAtomMessage(*request, response));
  });
}

grpc::ServerUnaryReactor* ElectronStructureImpl::DescribeAtoms(
    grpc::CallbackServerContext* context,
    const v1::DescribeAtomsRequest* request,
    v1::DescribeAtomsResponse* response) {
  return ServeUnary(context, "DescribeAtoms", [&] {
    grpc::Status s =
        DescribeAtomsWatched(CallWatch(context), *request, response);
    if (s.ok()) ScrubItemErrors(response);
    return s;
  });
}

grpc::ServerUnaryReactor* ElectronStructureImpl::ListElements(
    grpc::CallbackServerContext* context,
    const v1::ListElementsRequest* request,
    v1::ListElementsResponse* response) {
  return ServeUnary(context, "ListElements", [&] {
    ListElementsMessage(response);
    return grpc::Status::OK;
  });
}

grpc::ServerUnaryReactor* ElectronStructureImpl::AnalyzeCompound(
    grpc::CallbackServerContext* context, const v1::CompositionRecord* request,
    v1::RecordReport* response) {
  return ServeUnary(context, "AnalyzeCompound", [&] {
    AnalyzeRecord(*request, response);
    return grpc::Status::OK;
  });
}

grpc::ServerBidiReactor<grpc::ByteBuffer, grpc::ByteBuffer>*
ElectronStructureImpl::AnalyzeRecords(grpc::CallbackServerContext* context) {
  return new RecordStreamReactor(context, Admit(context, false), tracker_.get(),
                                 rate_limiter_.get());
}

// ---------------------------------------------------------------------------
// The server.

absl::Status ValidateListenAddress(absl::string_view listen) {
  const auto bad = [listen](absl::string_view problem) {
    return absl::InvalidArgumentError(
        absl::StrCat("'", absl::CEscape(listen), "': ", problem));
  };
  if (listen.empty()) return bad("empty; expected HOST:PORT");
  if (IsUnixSocketAddress(listen)) {
    return listen.back() != ':' ? absl::OkStatus()
                                : bad("the socket path is empty");
  }
  const size_t colon = listen.rfind(':');
  if (colon == absl::string_view::npos) {
    return bad("expected HOST:PORT, e.g. 127.0.0.1:50051");
  }
  const absl::string_view host = listen.substr(0, colon);
  const absl::string_view port = listen.substr(colon + 1);
  if (host.empty()) return bad("the host is empty");
  if (host.front() == '[') {
    if (host.size() < 3 || host.back() != ']') {
      return bad("a bracketed IPv6 host must look like [::1]");
    }
  } else if (absl::StrContains(host, ':')) {
    return bad("an IPv6 host needs brackets, as in [::1]:50051");
  }
  if (port.empty()) return bad("the port is empty (use 0 for any free port)");
  // gRPC itself takes a port modulo 65536 or by service name, so only
  // plain decimal digits get through.
  int number = -1;
  if (port.size() > 5 ||
      !std::all_of(port.begin(), port.end(),
                   [](char c) { return absl::ascii_isdigit(c); }) ||
      !absl::SimpleAtoi(port, &number) || number > 65535) {
    return bad(
        "the port must be a decimal number 0..65535 (0 picks a free "
        "port)");
  }
  return absl::OkStatus();
}

absl::StatusOr<std::unique_ptr<ShellwrightServer>> ShellwrightServer::Start(
    const ServerOptions& options) {
  if (absl::Status s = ValidateListenAddress(options.listen); !s.ok()) {
    return absl::InvalidArgumentError(absl::StrCat("listen: ", s.message()));
  }
  if (options.max_message_bytes <= 0) {
    return absl::InvalidArgumentError(
        "max_message_bytes: must be a positive number of bytes");
  }
  if (options.max_concurrent_streams < 0) {
    return absl::InvalidArgumentError(
        "max_concurrent_streams: must be 0 (gRPC default) or positive");
  }
  if (options.idle_timeout <= absl::ZeroDuration()) {
    return absl::InvalidArgumentError("idle_timeout: must be positive");
  }
  if (options.keepalive_interval <= absl::ZeroDuration()) {
    return absl::InvalidArgumentError("keepalive_interval: must be positive");
  }
  if (options.max_connection_age < absl::ZeroDuration() ||
      options.max_connection_age_grace < absl::ZeroDuration()) {
    return absl::InvalidArgumentError(
        "max_connection_age: must be 0 (no limit) or positive, and so must "
        "its grace");
  }
  if (options.limits.max_concurrent_calls < 0) {
    return absl::InvalidArgumentError(
        "max_concurrent_calls: must be 0 (no limit) or positive");
  }
  if (options.limits.token_rate_limit < 0 ||
      options.limits.token_rate_burst < 1) {
    return absl::InvalidArgumentError(
        "token_rate_limit: must be 0 (no limit) or positive, with a burst of "
        "at least 1");
  }
  if (options.limits.token_rate_limit > 0 && options.auth_token_file.empty()) {
    return absl::InvalidArgumentError(
        "token_rate_limit: limits callers with a token; set "
        "auth_token_file too");
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
  server->service_ = std::make_unique<ElectronStructureImpl>(
      std::move(token), options.idle_timeout, options.limits);

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
  // Connections that hold nothing go away: one with no call for the idle
  // timeout gets GOAWAY (streams that idle are cancelled by the service),
  // a peer that stops answering keepalive pings is dropped, and a client
  // that connects but never completes the handshake is cut off.
  const auto millis = [](absl::Duration d) {
    return static_cast<int>(
        std::min<int64_t>(absl::ToInt64Milliseconds(d), INT32_MAX));
  };
  builder.AddChannelArgument(GRPC_ARG_MAX_CONNECTION_IDLE_MS,
                             millis(options.idle_timeout));
  builder.AddChannelArgument(GRPC_ARG_KEEPALIVE_TIME_MS,
                             millis(options.keepalive_interval));
  builder.AddChannelArgument(GRPC_ARG_KEEPALIVE_TIMEOUT_MS,
                             millis(kKeepaliveTimeout));
  builder.AddChannelArgument(GRPC_ARG_SERVER_HANDSHAKE_TIMEOUT_MS,
                             millis(kHandshakeTimeout));
  // Clients may send keepalive pings this often, to notice a server that
  // vanished without closing its connections; gRPC's default of 5
  // minutes would answer them with GOAWAY.
  builder.AddChannelArgument(
      GRPC_ARG_HTTP2_MIN_RECV_PING_INTERVAL_WITHOUT_DATA_MS,
      millis(kMinClientPingInterval));
  builder.AddChannelArgument(GRPC_ARG_KEEPALIVE_PERMIT_WITHOUT_CALLS, 1);
  if (options.max_connection_age > absl::ZeroDuration()) {
    builder.AddChannelArgument(GRPC_ARG_MAX_CONNECTION_AGE_MS,
                               millis(options.max_connection_age));
    builder.AddChannelArgument(GRPC_ARG_MAX_CONNECTION_AGE_GRACE_MS,
                               millis(options.max_connection_age_grace));
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
  // A unix socket has no port (gRPC reports 1), so its address stays as is.
  const size_t colon = options.listen.rfind(':');
  server->address_ =
      IsUnixSocketAddress(options.listen)
          ? options.listen
          : absl::StrCat(options.listen.substr(0, colon), ":", server->port_);
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
  // gRPC's own grace would also wait for idle connections to close after
  // GOAWAY; waiting for our calls instead, then shutting down at once,
  // ends the drain as soon as the work in hand is answered.
  service_->BeginDrain();
  if (!service_->WaitUntilIdle(absl::Now() + grace)) {
    Log(LogLevel::kWarning, absl::StrCat("calls still running after the ",
                                         absl::FormatDuration(grace),
                                         " grace period are cancelled"));
  }
  server_->Shutdown(std::chrono::system_clock::now());
  server_->Wait();
}

}  // namespace shellwright
