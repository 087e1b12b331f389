// shellwright_loadgen: measures shellwrightd throughput and latency on
// loopback, next to a trivial echo service that shows the transport ceiling.
//
//   shellwright_loadgen                      # starts its own shellwrightd
//   shellwright_loadgen --seconds 5 --callers 1,8,32,64
//   shellwright_loadgen --target 127.0.0.1:50051   # a running server
//   shellwright_loadgen --fields valid,diagnostics  # masked reports
//
// Scenarios, each run for --warmup then measured for --seconds:
//   * DescribeAtom (unary) with 1, 8 and 32 concurrent callers: calls/s,
//     p50 and p99 latency;
//   * AnalyzeRecords (bidi stream) with batches of --batch records, one
//     batch in flight per stream: records/s and per-batch latency;
//   * the same two shapes against an echo server that answers with the
//     bytes shellwrightd would send, without doing any work: the transport
//     ceiling for these payload sizes.
// Callers use the gRPC callback API, so N callers are N concurrent calls on
// the shared channel(s). The echo server is this binary in --serve-echo
// mode, run as a separate process like shellwrightd, serving the generated
// ElectronStructure service with raw byte methods, so the client side is
// identical. Only loopback
// addresses are used. Prints markdown tables on stdout.

#include <signal.h>
#include <unistd.h>

#include <algorithm>
#include <atomic>
#include <chrono>
#include <condition_variable>
#include <cstdio>
#include <cstdlib>
#include <functional>
#include <iostream>
#include <map>
#include <memory>
#include <mutex>
#include <optional>
#include <string>
#include <thread>
#include <vector>

#include "absl/strings/numbers.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "absl/strings/str_split.h"
#include "absl/strings/strip.h"
#include "api/atoms.h"
#include "api/records.h"
#include "api/report_mask.h"
#include "engine/version.h"
#include "grpcpp/grpcpp.h"
#include "shellwright/v1/electron_structure.grpc.pb.h"
#include "util/command_line.h"
#include "util/small_file.h"
#include "util/subprocess.h"

namespace shellwright::loadgen {
namespace {

using Clock = std::chrono::steady_clock;

constexpr char kEchoListening[] = "shellwright_loadgen echo listening on ";
constexpr char kServerListening[] = "shellwrightd listening on ";

// ---------------------------------------------------------------------------
// Helpers.

struct Flags {
  std::string target;
  std::string shellwrightd;
  std::string server_log_level = "warning";
  std::string token_file;
  double seconds = 3;
  double warmup = 0.5;
  std::vector<int> callers = {1, 8, 32};
  std::vector<int> streams = {1, 4};
  int batch = 500;
  int channels = 1;
  std::string spec = "Fe3+";
  // AnalyzeRecords' report_mask: comma-separated RecordReport fields; "":
  // every field.
  std::string fields;
  bool no_echo = false;
  // --serve-echo mode (internal: the parent starts it).
  bool serve_echo = false;
};

// A comma-separated list of counts 1..4096, into `out`; "" when it is one.
std::string ParseCounts(const std::string& text, std::vector<int>* out) {
  out->clear();
  for (absl::string_view part : absl::StrSplit(text, ',')) {
    int n = 0;
    if (!absl::SimpleAtoi(part, &n) || n <= 0 || n > 4096) {
      return absl::StrCat(QuoteForMessage(part),
                          " is not a count from 1 to 4096");
    }
    out->push_back(n);
  }
  return "";
}

bool IsLoopback(const std::string& address) {
  const size_t colon = address.rfind(':');
  const std::string host = address.substr(0, colon);
  return host == "localhost" || host == "[::1]" || host.rfind("127.", 0) == 0 ||
         host == "ipv4:127.0.0.1";
}

std::string SelfDir() {
  char buf[4096];
  ssize_t n = readlink("/proc/self/exe", buf, sizeof(buf) - 1);
  if (n <= 0) return ".";
  std::string path(buf, static_cast<size_t>(n));
  return path.substr(0, path.rfind('/'));
}

// A server process this binary started and the address it listens on;
// stopped (SIGTERM, then SIGKILL) on destruction.
struct ChildServer {
  std::unique_ptr<ChildProcess> process;
  std::string address;

  ~ChildServer() {
    if (process != nullptr) {
      process->SignalAndWait(SIGTERM, std::chrono::seconds(10));
    }
  }
};

// Starts `argv` and waits for its line "<prefix><address>"; nullptr (with a
// message) if it does not come up.
std::unique_ptr<ChildServer> StartServer(const std::vector<std::string>& argv,
                                         const std::string& prefix) {
  auto server = std::make_unique<ChildServer>();
  server->process = ChildProcess::Start(argv);
  if (server->process != nullptr) {
    std::optional<std::string> address =
        server->process->WaitForLine(prefix, std::chrono::seconds(15));
    if (address.has_value()) {
      server->address = *address;
      return server;
    }
  }
  std::cerr << "shellwright_loadgen: " << argv[0] << " did not come up\n";
  return nullptr;
}

// ---------------------------------------------------------------------------
// The echo server: the generated service with raw (ByteBuffer) methods, so
// requests are not even parsed, answering with canned bytes. Same method
// names and client stub as shellwrightd; no work beyond the transport.

// Every method raw and callback-based, so the server runs no sync threads.
using RawEchoBase = v1::ElectronStructure::WithRawCallbackMethod_DescribeAtom<
    v1::ElectronStructure::WithRawCallbackMethod_DescribeAtoms<
        v1::ElectronStructure::WithRawCallbackMethod_ListElements<
            v1::ElectronStructure::WithRawCallbackMethod_AnalyzeCompound<
                v1::ElectronStructure::WithRawCallbackMethod_AnalyzeRecords<
                    v1::ElectronStructure::Service>>>>>;

grpc::ServerUnaryReactor* Unimplemented(grpc::CallbackServerContext* context) {
  grpc::ServerUnaryReactor* reactor = context->DefaultReactor();
  reactor->Finish(grpc::Status(grpc::StatusCode::UNIMPLEMENTED,
                               "the echo server answers DescribeAtom and "
                               "AnalyzeRecords only"));
  return reactor;
}

class EchoStreamReactor final
    : public grpc::ServerBidiReactor<grpc::ByteBuffer, grpc::ByteBuffer> {
 public:
  explicit EchoStreamReactor(grpc::ByteBuffer reply)
      : reply_(std::move(reply)) {
    StartRead(&request_);
  }
  void OnReadDone(bool ok) override {
    if (!ok) {
      Finish(grpc::Status::OK);
      return;
    }
    StartWrite(&reply_);
  }
  void OnWriteDone(bool ok) override {
    if (!ok) {
      Finish(grpc::Status(grpc::StatusCode::UNAVAILABLE, "write failed"));
      return;
    }
    StartRead(&request_);
  }
  void OnDone() override { delete this; }

 private:
  grpc::ByteBuffer request_;
  grpc::ByteBuffer reply_;
};

class EchoService final : public RawEchoBase {
 public:
  EchoService(grpc::ByteBuffer unary_reply, grpc::ByteBuffer stream_reply)
      : unary_reply_(std::move(unary_reply)),
        stream_reply_(std::move(stream_reply)) {}

  grpc::ServerUnaryReactor* DescribeAtom(grpc::CallbackServerContext* context,
                                         const grpc::ByteBuffer* request,
                                         grpc::ByteBuffer* response) override {
    *response = unary_reply_;
    grpc::ServerUnaryReactor* reactor = context->DefaultReactor();
    reactor->Finish(grpc::Status::OK);
    return reactor;
  }

  grpc::ServerBidiReactor<grpc::ByteBuffer, grpc::ByteBuffer>* AnalyzeRecords(
      grpc::CallbackServerContext* context) override {
    return new EchoStreamReactor(stream_reply_);
  }

  // The generated raw defaults return nullptr, which gRPC cannot handle.
  grpc::ServerUnaryReactor* DescribeAtoms(grpc::CallbackServerContext* context,
                                          const grpc::ByteBuffer*,
                                          grpc::ByteBuffer*) override {
    return Unimplemented(context);
  }
  grpc::ServerUnaryReactor* ListElements(grpc::CallbackServerContext* context,
                                         const grpc::ByteBuffer*,
                                         grpc::ByteBuffer*) override {
    return Unimplemented(context);
  }
  grpc::ServerUnaryReactor* AnalyzeCompound(
      grpc::CallbackServerContext* context, const grpc::ByteBuffer*,
      grpc::ByteBuffer*) override {
    return Unimplemented(context);
  }

 private:
  const grpc::ByteBuffer unary_reply_;
  const grpc::ByteBuffer stream_reply_;
};

grpc::ByteBuffer ToByteBuffer(const google::protobuf::Message& message) {
  grpc::ByteBuffer buffer;
  bool own = false;
  grpc::GenericSerialize<grpc::ProtoBufferWriter, google::protobuf::Message>(
      message, &buffer, &own);
  return buffer;
}

v1::DescribeAtomRequest UnaryRequest(const Flags& flags) {
  v1::DescribeAtomRequest request;
  request.set_spec(flags.spec);
  return request;
}

// A batch of mostly distinct compositions, as real datasets hold:
// A-site-doped perovskites, layered oxides and substituted spinels with
// two-decimal fractions. Batch runs ask for no alternatives, as
// `shellwright check` does by default.
v1::RecordBatch StreamRequest(const Flags& flags) {
  const char* a_site[] = {"La", "Pr", "Nd", "Sm"};
  const char* dopant[] = {"Sr", "Ca", "Ba"};
  const char* b_site[] = {"Mn", "Fe", "Co", "Ni", "Cr"};
  const char* spinel[] = {"Mg", "Co", "Ni", "Zn", "Mn"};
  v1::RecordBatch batch;
  for (int i = 0; i < flags.batch; ++i) {
    v1::CompositionRecord* r = batch.add_records();
    r->set_id(absl::StrFormat("rec-%06d", i));
    const int x = 1 + (i * 37) % 60;
    switch (i % 3) {
      case 0:
        r->set_formula(absl::StrFormat("%s%.2f%s%.2f%sO3", a_site[i % 4],
                                       1 - x / 100.0, dopant[i % 3], x / 100.0,
                                       b_site[i % 5]));
        break;
      case 1:
        r->set_formula(absl::StrFormat("LiNi%.2fCo%.2fMn%.2fO2",
                                       (30 + x) / 100.0, (70 - x) / 200.0,
                                       (70 - x) / 200.0));
        break;
      default:
        r->set_formula(absl::StrFormat("%sFe%.2fAl%.2fO4", spinel[i % 5],
                                       2 - x / 100.0, x / 100.0));
        break;
    }
    r->set_max_alternatives(0);
  }
  if (!flags.fields.empty()) {
    // Checked when the flags were parsed.
    ReportMask::FromList(flags.fields)
        ->ToFieldMask(batch.mutable_report_mask());
  }
  return batch;
}

// The replies shellwrightd gives, computed with the same translation code.
grpc::ByteBuffer UnaryReply(const Flags& flags) {
  v1::AtomDescription reply;
  DescribeAtomMessage(UnaryRequest(flags), &reply).IgnoreError();
  return ToByteBuffer(reply);
}

grpc::ByteBuffer StreamReply(const Flags& flags) {
  const v1::RecordBatch batch = StreamRequest(flags);
  // Checked when the flags were parsed.
  const ReportMask mask = *ReportMask::FromFieldMask(batch.report_mask());
  v1::ReportBatch reply;
  for (const v1::CompositionRecord& r : batch.records()) {
    AnalyzeRecord(r, reply.add_reports(), mask);
  }
  return ToByteBuffer(reply);
}

int ServeEcho(const Flags& flags) {
  sigset_t signals;
  sigemptyset(&signals);
  sigaddset(&signals, SIGTERM);
  sigaddset(&signals, SIGINT);
  pthread_sigmask(SIG_BLOCK, &signals, nullptr);
  EchoService service(UnaryReply(flags), StreamReply(flags));
  grpc::ServerBuilder builder;
  int port = 0;
  builder.AddListeningPort("127.0.0.1:0", grpc::InsecureServerCredentials(),
                           &port);
  builder.RegisterService(&service);
  builder.SetMaxReceiveMessageSize(64 << 20);
  std::unique_ptr<grpc::Server> server = builder.BuildAndStart();
  if (server == nullptr || port == 0) return 1;
  std::cout << kEchoListening << "127.0.0.1:" << port << std::endl;
  int sig = 0;
  sigwait(&signals, &sig);
  server->Shutdown(std::chrono::system_clock::now() + std::chrono::seconds(2));
  return 0;
}

// ---------------------------------------------------------------------------
// Measurement.

// The window in which completions count.
struct Window {
  Clock::time_point start;  // End of the warm-up.
  Clock::time_point end;
  bool Contains(Clock::time_point t) const { return t >= start && t <= end; }
};

struct Result {
  std::string target;    // "shellwrightd" or "echo".
  std::string scenario;  // "DescribeAtom", "AnalyzeRecords".
  int concurrency = 0;
  double seconds = 0;
  int64_t calls = 0;    // Calls (unary) or batches (stream) in the window.
  int64_t records = 0;  // Records answered in the window (streams).
  int64_t errors = 0;
  std::vector<int64_t> latencies_us;

  int64_t Percentile(double p) {
    if (latencies_us.empty()) return 0;
    size_t k = static_cast<size_t>(p * (latencies_us.size() - 1));
    std::nth_element(latencies_us.begin(), latencies_us.begin() + k,
                     latencies_us.end());
    return latencies_us[k];
  }
};

// Counts finished workers; Wait() blocks until all have finished.
class Latch {
 public:
  explicit Latch(int n) : left_(n) {}
  void CountDown() {
    std::lock_guard<std::mutex> lock(mu_);
    if (--left_ == 0) cv_.notify_all();
  }
  void Wait() {
    std::unique_lock<std::mutex> lock(mu_);
    cv_.wait(lock, [&] { return left_ == 0; });
  }

 private:
  std::mutex mu_;
  std::condition_variable cv_;
  int left_;
};

using UnaryStart = std::function<void(
    grpc::ClientContext*, const v1::DescribeAtomRequest*, v1::AtomDescription*,
    std::function<void(grpc::Status)>)>;

// One caller: a chain of unary calls, each started when the previous one
// completes, until the window closes.
class UnaryCaller {
 public:
  UnaryCaller(UnaryStart start, const v1::DescribeAtomRequest& request,
              const std::string& token, Window window, Latch* latch)
      : start_(std::move(start)),
        request_(request),
        authorization_(token.empty() ? "" : "Bearer " + token),
        window_(window),
        latch_(latch) {}

  void Next() {
    const Clock::time_point now = Clock::now();
    if (now > window_.end) {
      latch_->CountDown();
      return;
    }
    context_ = std::make_unique<grpc::ClientContext>();
    context_->set_deadline(std::chrono::system_clock::now() +
                           std::chrono::seconds(10));
    if (!authorization_.empty()) {
      context_->AddMetadata("authorization", authorization_);
    }
    call_start_ = now;
    start_(context_.get(), &request_, &response_,
           [this](grpc::Status status) { Done(status); });
  }

  std::vector<int64_t> latencies_us;
  int64_t errors = 0;

 private:
  void Done(const grpc::Status& status) {
    const Clock::time_point now = Clock::now();
    if (window_.Contains(now) && call_start_ >= window_.start) {
      if (status.ok()) {
        latencies_us.push_back(
            std::chrono::duration_cast<std::chrono::microseconds>(now -
                                                                  call_start_)
                .count());
      } else {
        ++errors;
      }
    }
    Next();
  }

  const UnaryStart start_;
  const v1::DescribeAtomRequest request_;
  const std::string authorization_;
  const Window window_;
  Latch* const latch_;
  std::unique_ptr<grpc::ClientContext> context_;
  v1::AtomDescription response_;
  Clock::time_point call_start_;
};

Window MakeWindow(const Flags& flags) {
  Window w;
  w.start = Clock::now() +
            std::chrono::microseconds(static_cast<int64_t>(flags.warmup * 1e6));
  w.end = w.start +
          std::chrono::microseconds(static_cast<int64_t>(flags.seconds * 1e6));
  return w;
}

// The figures of one scenario, pooled over its callers.
template <typename Pool>
Result Collect(const std::string& target, const char* scenario, int concurrency,
               const Flags& flags, const Pool& pool) {
  Result result;
  result.target = target;
  result.scenario = scenario;
  result.concurrency = concurrency;
  result.seconds = flags.seconds;
  for (const auto& caller : pool) {
    result.errors += caller->errors;
    result.latencies_us.insert(result.latencies_us.end(),
                               caller->latencies_us.begin(),
                               caller->latencies_us.end());
  }
  result.calls = static_cast<int64_t>(result.latencies_us.size());
  return result;
}

Result RunUnary(const std::string& target,
                const std::vector<UnaryStart>& starts, int callers,
                const Flags& flags, const std::string& token) {
  const Window window = MakeWindow(flags);
  Latch latch(callers);
  std::vector<std::unique_ptr<UnaryCaller>> pool;
  const v1::DescribeAtomRequest request = UnaryRequest(flags);
  for (int i = 0; i < callers; ++i) {
    pool.push_back(std::make_unique<UnaryCaller>(
        starts[i % starts.size()], request, token, window, &latch));
  }
  for (auto& caller : pool) caller->Next();
  latch.Wait();
  return Collect(target, "DescribeAtom", callers, flags, pool);
}

// One stream: write a batch, read its reply, repeat until the window closes.
class StreamCaller final
    : public grpc::ClientBidiReactor<v1::RecordBatch, v1::ReportBatch> {
 public:
  StreamCaller(const v1::RecordBatch& batch, Window window, Latch* latch)
      : batch_(batch), window_(window), latch_(latch) {}

  grpc::ClientContext* context() { return &context_; }

  void Begin() {
    StartCall();
    SendBatch();
  }

  // A batch's write and its reply's read complete in either order; the next
  // batch starts once both have (one write may be outstanding at a time).
  void OnWriteDone(bool ok) override {
    if (!ok) return;  // OnDone follows with the status.
    StepDone();
  }

  void OnReadDone(bool ok) override {
    if (!ok) return;  // End of stream, or OnDone follows with the status.
    // An answer too large for one message comes in several; the batch is
    // done once they hold a report per record.
    answered_ += reply_.reports_size();
    if (answered_ < batch_.records_size() && reply_.reports_size() > 0) {
      StartRead(&reply_);
      return;
    }
    const Clock::time_point now = Clock::now();
    if (window_.Contains(now) && batch_start_ >= window_.start) {
      latencies_us.push_back(
          std::chrono::duration_cast<std::chrono::microseconds>(now -
                                                                batch_start_)
              .count());
      records += answered_;
    }
    StepDone();
  }

  void OnDone(const grpc::Status& status) override {
    if (!status.ok()) {
      ++errors;
      std::cerr << "AnalyzeRecords stream: " << status.error_message() << "\n";
    }
    latch_->CountDown();
  }

  std::vector<int64_t> latencies_us;
  int64_t records = 0;
  int64_t errors = 0;

 private:
  void StepDone() {
    if (steps_left_.fetch_sub(1) != 1) return;
    if (Clock::now() > window_.end) {
      StartWritesDone();
      StartRead(&reply_);  // Sees the end of the stream.
      return;
    }
    SendBatch();
  }

  void SendBatch() {
    steps_left_ = 2;
    answered_ = 0;
    batch_start_ = Clock::now();
    StartWrite(&batch_);
    StartRead(&reply_);
  }

  grpc::ClientContext context_;
  const v1::RecordBatch batch_;
  v1::ReportBatch reply_;
  const Window window_;
  Latch* const latch_;
  Clock::time_point batch_start_;
  std::atomic<int> steps_left_{0};
  int answered_ = 0;  // Reports received for the batch in flight.
};

using StreamPrepare = std::function<void(StreamCaller*)>;

Result RunStreams(const std::string& target,
                  const std::vector<StreamPrepare>& prepares, int streams,
                  const Flags& flags, const std::string& token) {
  // Streams are long-lived: give the deadline room beyond the window.
  const Window window = MakeWindow(flags);
  Latch latch(streams);
  const v1::RecordBatch batch = StreamRequest(flags);
  std::vector<std::unique_ptr<StreamCaller>> pool;
  for (int i = 0; i < streams; ++i) {
    auto caller = std::make_unique<StreamCaller>(batch, window, &latch);
    caller->context()->set_deadline(std::chrono::system_clock::now() +
                                    std::chrono::seconds(static_cast<int64_t>(
                                        flags.warmup + flags.seconds + 30)));
    if (!token.empty()) {
      caller->context()->AddMetadata("authorization", "Bearer " + token);
    }
    prepares[i % prepares.size()](caller.get());
    pool.push_back(std::move(caller));
  }
  for (auto& caller : pool) caller->Begin();
  latch.Wait();
  Result result = Collect(target, "AnalyzeRecords", streams, flags, pool);
  for (auto& caller : pool) result.records += caller->records;
  return result;
}

// The ways callers start calls on `stub`.
void AddStarts(v1::ElectronStructure::Stub* stub,
               std::vector<UnaryStart>* unary,
               std::vector<StreamPrepare>* stream) {
  unary->push_back([stub](grpc::ClientContext* c,
                          const v1::DescribeAtomRequest* req,
                          v1::AtomDescription* resp,
                          std::function<void(grpc::Status)> done) {
    stub->async()->DescribeAtom(c, req, resp, std::move(done));
  });
  stream->push_back([stub](StreamCaller* caller) {
    stub->async()->AnalyzeRecords(caller->context(), caller);
  });
}

std::vector<std::shared_ptr<grpc::Channel>> MakeChannels(
    const std::string& address, int n) {
  std::vector<std::shared_ptr<grpc::Channel>> channels;
  for (int i = 0; i < n; ++i) {
    grpc::ChannelArguments args;
    args.SetMaxReceiveMessageSize(64 << 20);
    // Distinct arguments keep gRPC from sharing one connection among them.
    args.SetInt("shellwright.loadgen.channel", i);
    channels.push_back(grpc::CreateCustomChannel(
        address, grpc::InsecureChannelCredentials(), args));
  }
  return channels;
}

void PrintTables(std::vector<Result>& results, const Flags& flags) {
  std::cout << "\n| target | RPC | concurrent calls | calls/s | p50 µs | "
               "p99 µs | errors |\n"
            << "|---|---|---:|---:|---:|---:|---:|\n";
  for (Result& r : results) {
    if (r.scenario != "DescribeAtom") continue;
    std::cout << absl::StrFormat(
        "| %s | DescribeAtom | %d | %.0f | %d | %d | "
        "%d |\n",
        r.target, r.concurrency, r.calls / r.seconds, r.Percentile(0.50),
        r.Percentile(0.99), r.errors);
  }
  std::cout << "\n| target | RPC | streams | records/s | batches/s | "
               "batch p50 µs | batch p99 µs | errors |\n"
            << "|---|---|---:|---:|---:|---:|---:|---:|\n";
  for (Result& r : results) {
    if (r.scenario != "AnalyzeRecords") continue;
    std::cout << absl::StrFormat(
        "| %s | AnalyzeRecords (batch %d) | %d | %.0f | %.0f | %d | %d | %d "
        "|\n",
        r.target, flags.batch, r.concurrency, r.records / r.seconds,
        r.calls / r.seconds, r.Percentile(0.50), r.Percentile(0.99), r.errors);
  }
}

// An option holding a list of counts (ParseCounts), into `counts`.
void AddCountsOption(CLI::App* app, const std::string& name,
                     std::vector<int>* counts, const std::string& help) {
  app->add_option_function<std::string>(
         name, [counts](const std::string& v) { ParseCounts(v, counts); }, help)
      ->check(CLI::Validator(
          [](std::string& v) -> std::string {
            std::vector<int> ignored;
            return ParseCounts(v, &ignored);
          },
          "LIST"));
}

// Parses argv into `flags`. Returns nullopt to go on, or an exit code.
std::optional<int> ParseFlags(int argc, char** argv, Flags* flags) {
  CLI::App app{
      "Measures shellwrightd's throughput and latency on loopback, next to "
      "an echo server that shows the transport ceiling.",
      "shellwright_loadgen"};
  app.set_version_flag(
      "--version",
      std::string(absl::StripSuffix(VersionText("shellwright_loadgen"), "\n")),
      "print the version and the data tables' versions");
  CLI::Option* target =
      app.add_option("--target", flags->target,
                     "measure a running shellwrightd at HOST:PORT (loopback "
                     "only) instead of starting one")
          ->check(CLI::Validator(
              [](std::string& v) -> std::string {
                return IsLoopback(v) ? "" : "not a loopback address";
              },
              "HOST:PORT"));
  app.add_option("--shellwrightd", flags->shellwrightd,
                 "server binary to start (default: this build's "
                 "server/shellwrightd)")
      ->excludes(target);
  app.add_option("--server-log-level", flags->server_log_level,
                 "--log-level for the started server (info logs every call)")
      ->excludes(target)
      ->capture_default_str();
  app.add_option("--token-file", flags->token_file,
                 "bearer token for a --target server that needs one")
      ->needs(target);
  app.add_option("--seconds", flags->seconds, "measured time per scenario")
      ->check(NumberIn(0, 600, /*above_lo=*/true))
      ->capture_default_str();
  app.add_option("--warmup", flags->warmup,
                 "unmeasured seconds before each scenario")
      ->check(NumberIn(0, 60))
      ->capture_default_str();
  AddCountsOption(&app, "--callers", &flags->callers,
                  "concurrent DescribeAtom callers, e.g. 1,8,32 (the default)");
  AddCountsOption(&app, "--streams", &flags->streams,
                  "concurrent AnalyzeRecords streams, e.g. 1,4 (the default)");
  app.add_option("--batch", flags->batch, "records per RecordBatch")
      ->check(IntegerIn(1, kMaxRecordsPerBatch))
      ->capture_default_str();
  app.add_option("--channels", flags->channels,
                 "channels (TCP connections) shared by the callers")
      ->check(IntegerIn(1, 64))
      ->capture_default_str();
  app.add_option("--spec", flags->spec, "species asked for")
      ->capture_default_str();
  app.add_option("--fields", flags->fields,
                 "AnalyzeRecords report_mask: RecordReport fields, "
                 "comma-separated (default: every field)")
      ->check(Accepts(
          [](const std::string& text) {
            absl::Status s = ReportMask::FromList(text).status();
            return s.ok() ? s
                          : absl::InvalidArgumentError(absl::StripPrefix(
                                s.message(), "report_mask: "));
          },
          "FIELD[,FIELD...]"));
  app.add_flag("--no-echo", flags->no_echo, "skip the echo ceiling");
  // Internal: the parent starts the echo server as this binary.
  app.add_flag("--serve-echo", flags->serve_echo)->group("");
  return ParseCommandLine(app, argc, argv, std::cout, std::cerr);
}

int Main(int argc, char** argv) {
  Flags flags;
  if (std::optional<int> exit = ParseFlags(argc, argv, &flags)) return *exit;
  if (flags.serve_echo) return ServeEcho(flags);
  signal(SIGPIPE, SIG_IGN);

  std::unique_ptr<ChildServer> server;
  std::string address = flags.target;
  if (address.empty()) {
    std::string path = flags.shellwrightd.empty()
                           ? SelfDir() + "/../../server/shellwrightd"
                           : flags.shellwrightd;
    server = StartServer({path, "--listen", "127.0.0.1:0", "--log-level",
                          flags.server_log_level},
                         kServerListening);
    if (server == nullptr) return 1;
    address = server->address;
  }
  std::string token;
  if (!flags.token_file.empty()) {
    absl::StatusOr<std::string> t = ReadTokenFile(flags.token_file);
    if (!t.ok()) {
      std::cerr << "shellwright_loadgen: " << t.status().message() << "\n";
      return 2;
    }
    token = std::move(*t);
  }

  std::unique_ptr<ChildServer> echo;
  if (!flags.no_echo) {
    std::vector<std::string> argv_echo = {SelfDir() + "/shellwright_loadgen",
                                          "--serve-echo",
                                          "--spec",
                                          flags.spec,
                                          "--batch",
                                          std::to_string(flags.batch)};
    if (!flags.fields.empty()) {
      argv_echo.insert(argv_echo.end(), {"--fields", flags.fields});
    }
    echo = StartServer(argv_echo, kEchoListening);
    if (echo == nullptr) return 1;
  }

  // Check the target answers before measuring it.
  {
    auto stub = v1::ElectronStructure::NewStub(
        grpc::CreateChannel(address, grpc::InsecureChannelCredentials()));
    grpc::ClientContext context;
    context.set_deadline(std::chrono::system_clock::now() +
                         std::chrono::seconds(10));
    if (!token.empty()) context.AddMetadata("authorization", "Bearer " + token);
    v1::AtomDescription d;
    grpc::Status s = stub->DescribeAtom(&context, UnaryRequest(flags), &d);
    if (!s.ok()) {
      std::cerr << "shellwright_loadgen: DescribeAtom(" << flags.spec
                << ") failed: " << s.error_message() << "\n";
      return 1;
    }
    std::cerr << absl::StrFormat(
        "target %s, DescribeAtom(%s): request %d B, reply %d B\n", address,
        flags.spec, UnaryRequest(flags).ByteSizeLong(), d.ByteSizeLong());
    std::cerr << absl::StrFormat(
        "AnalyzeRecords: %d records per batch, fields %s: request %d B, "
        "reply %.0f B per record\n",
        flags.batch, flags.fields.empty() ? "all" : flags.fields,
        StreamRequest(flags).ByteSizeLong(),
        static_cast<double>(StreamReply(flags).Length()) / flags.batch);
  }

  std::vector<Result> results;
  auto channels = MakeChannels(address, flags.channels);
  std::vector<std::unique_ptr<v1::ElectronStructure::Stub>> stubs;
  std::vector<UnaryStart> unary;
  std::vector<StreamPrepare> stream;
  for (auto& channel : channels) {
    stubs.push_back(v1::ElectronStructure::NewStub(channel));
    AddStarts(stubs.back().get(), &unary, &stream);
  }

  std::vector<std::unique_ptr<v1::ElectronStructure::Stub>> echo_stubs;
  std::vector<UnaryStart> echo_unary;
  std::vector<StreamPrepare> echo_stream;
  if (echo != nullptr) {
    for (auto& channel : MakeChannels(echo->address, flags.channels)) {
      echo_stubs.push_back(v1::ElectronStructure::NewStub(channel));
      AddStarts(echo_stubs.back().get(), &echo_unary, &echo_stream);
    }
  }

  for (int callers : flags.callers) {
    std::cerr << "DescribeAtom, " << callers << " callers...\n";
    results.push_back(RunUnary("shellwrightd", unary, callers, flags, token));
    if (echo != nullptr) {
      results.push_back(RunUnary("echo", echo_unary, callers, flags, ""));
    }
  }
  for (int streams : flags.streams) {
    std::cerr << "AnalyzeRecords, " << streams << " streams...\n";
    results.push_back(
        RunStreams("shellwrightd", stream, streams, flags, token));
    if (echo != nullptr) {
      results.push_back(RunStreams("echo", echo_stream, streams, flags, ""));
    }
  }
  PrintTables(results, flags);
  int64_t errors = 0;
  for (const Result& r : results) errors += r.errors;
  return errors == 0 ? 0 : 1;
}

}  // namespace
}  // namespace shellwright::loadgen

int main(int argc, char** argv) {
  return shellwright::loadgen::Main(argc, argv);
}
