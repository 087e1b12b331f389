// Tests for server/service.cc through an in-process ShellwrightServer on a
// free loopback port: every RPC's success path and error codes, deadlines,
// authentication, message limits and hostile input.

#include "server/service.h"

#include <arpa/inet.h>
#include <netinet/in.h>
#include <poll.h>
#include <sys/socket.h>
#include <unistd.h>

#include <chrono>
#include <condition_variable>
#include <memory>
#include <mutex>
#include <random>
#include <string>
#include <thread>
#include <vector>

#include "absl/strings/str_cat.h"
#include "api/atoms.h"
#include "api/records.h"
#include "gmock/gmock.h"
#include "grpcpp/generic/generic_stub.h"
#include "grpcpp/grpcpp.h"
#include "gtest/gtest.h"
#include "shellwright/v1/electron_structure.grpc.pb.h"
#include "tests/server/server_test_util.h"

namespace shellwright {
namespace {

using ::shellwright::testing::HardRecordBatch;
using ::shellwright::testing::kShutdownSlowdown;
using ::testing::HasSubstr;

constexpr auto kCallTimeout = std::chrono::seconds(10);

struct Client {
  std::shared_ptr<grpc::Channel> channel;
  std::unique_ptr<v1::ElectronStructure::Stub> stub;
};

Client Connect(const std::string& address) {
  grpc::ChannelArguments args;
  args.SetMaxReceiveMessageSize(64 << 20);
  Client client;
  client.channel = grpc::CreateCustomChannel(
      address, grpc::InsecureChannelCredentials(), args);
  client.stub = v1::ElectronStructure::NewStub(client.channel);
  return client;
}

void SetDeadline(grpc::ClientContext* context) {
  context->set_deadline(std::chrono::system_clock::now() + kCallTimeout);
}

class ServiceTest : public ::testing::Test {
 protected:
  void SetUp() override {
    SetLogLevel(LogLevel::kWarning);
    ServerOptions options;
    options.listen = "127.0.0.1:0";
    Configure(&options);
    absl::StatusOr<std::unique_ptr<ShellwrightServer>> server =
        ShellwrightServer::Start(options);
    ASSERT_TRUE(server.ok()) << server.status();
    server_ = std::move(*server);
    client_ = Connect(server_->address());
  }

  void TearDown() override {
    if (server_ != nullptr) server_->Shutdown(absl::Seconds(5));
  }

  virtual void Configure(ServerOptions* options) {}

  grpc::Status Describe(const v1::DescribeAtomRequest& request,
                        v1::AtomDescription* response) {
    grpc::ClientContext context;
    SetDeadline(&context);
    return client_.stub->DescribeAtom(&context, request, response);
  }

  grpc::Status DescribeSpec(const std::string& spec,
                            v1::AtomDescription* response) {
    v1::DescribeAtomRequest request;
    request.set_spec(spec);
    return Describe(request, response);
  }

  std::unique_ptr<ShellwrightServer> server_;
  Client client_;
};

TEST_F(ServiceTest, ListensOnTheSelectedPort) {
  EXPECT_GT(server_->port(), 0);
  EXPECT_EQ(server_->address(), absl::StrCat("127.0.0.1:", server_->port()));
}

TEST_F(ServiceTest, DescribeAtomMatchesTheInProcessTranslation) {
  v1::DescribeAtomRequest request;
  request.set_spec("Fe3+");
  request.set_geometry(v1::GEOMETRY_OCTAHEDRAL);
  v1::AtomDescription remote;
  grpc::Status status = Describe(request, &remote);
  ASSERT_TRUE(status.ok()) << status.error_message();
  EXPECT_EQ(remote.configuration(), "[Ar] 3d5");
  EXPECT_EQ(remote.unpaired_electrons(), 5);

  v1::AtomDescription local;
  ASSERT_TRUE(DescribeAtomMessage(request, &local).ok());
  EXPECT_EQ(remote.SerializeAsString(), local.SerializeAsString());
}

TEST_F(ServiceTest, DescribeAtomByAtomicNumber) {
  v1::DescribeAtomRequest request;
  request.set_atomic_number(64);
  request.set_charge(3);
  v1::AtomDescription d;
  ASSERT_TRUE(Describe(request, &d).ok());
  EXPECT_EQ(d.symbol(), "Gd");
  EXPECT_EQ(d.configuration(), "[Xe] 4f7");
}

TEST_F(ServiceTest, DescribeAtomInvalidArgumentsNameTheField) {
  struct Case {
    v1::DescribeAtomRequest request;
    std::string field;
  };
  std::vector<Case> cases(6);
  cases[0].request.set_spec("Xx");
  cases[0].field = "spec";
  cases[1].request.set_spec("Fe99+");
  cases[1].field = "spec";
  cases[2].request.set_spec("Fe");
  cases[2].request.set_configuration("[Ar] 3d99");
  cases[2].field = "configuration";
  cases[3].request.set_spec("Fe");
  cases[3].request.set_configuration("[Ar] 3d5");  // 23 electrons, not 26.
  cases[3].field = "configuration";
  cases[4].request.set_atomic_number(119);
  cases[4].field = "atomic_number";
  cases[5].field = "spec";  // Neither spec nor atomic_number.
  for (const Case& c : cases) {
    v1::AtomDescription d;
    grpc::Status status = Describe(c.request, &d);
    EXPECT_EQ(status.error_code(), grpc::StatusCode::INVALID_ARGUMENT)
        << c.request.ShortDebugString();
    EXPECT_THAT(status.error_message(), HasSubstr(c.field + ":"))
        << c.request.ShortDebugString();
  }
}

TEST_F(ServiceTest, DescribeAtomRejectsUnknownEnumValues) {
  v1::DescribeAtomRequest request;
  request.set_spec("Fe");
  request.set_geometry(static_cast<v1::Geometry>(77));
  v1::AtomDescription d;
  grpc::Status status = Describe(request, &d);
  EXPECT_EQ(status.error_code(), grpc::StatusCode::INVALID_ARGUMENT);
  EXPECT_THAT(status.error_message(), HasSubstr("geometry"));

  request.set_geometry(v1::GEOMETRY_FREE);
  request.set_spin_state(static_cast<v1::SpinStatePreference>(-5));
  status = Describe(request, &d);
  EXPECT_EQ(status.error_code(), grpc::StatusCode::INVALID_ARGUMENT);
  EXPECT_THAT(status.error_message(), HasSubstr("spin_state"));
}

TEST_F(ServiceTest, DescribeAtomsAnswersItemByItem) {
  v1::DescribeAtomsRequest request;
  request.add_requests()->set_spec("Fe3+");
  request.add_requests()->set_spec("Xx");
  request.add_requests()->set_atomic_number(8);
  request.add_requests()->set_spec("Fe99+");
  v1::DescribeAtomsResponse response;
  grpc::ClientContext context;
  SetDeadline(&context);
  grpc::Status status =
      client_.stub->DescribeAtoms(&context, request, &response);
  ASSERT_TRUE(status.ok()) << status.error_message();
  ASSERT_EQ(response.results_size(), 4);
  EXPECT_EQ(response.results(0).description().configuration(), "[Ar] 3d5");
  EXPECT_EQ(response.results(1).error().code(), 3);  // INVALID_ARGUMENT
  EXPECT_THAT(response.results(1).error().message(), HasSubstr("spec"));
  EXPECT_EQ(response.results(2).description().symbol(), "O");
  EXPECT_EQ(response.results(3).error().code(), 3);
}

TEST_F(ServiceTest, DescribeAtomsAcceptsExactlyOneThousandItems) {
  v1::DescribeAtomsRequest request;
  for (int i = 0; i < kMaxDescribeAtomsBatch; ++i) {
    request.add_requests()->set_atomic_number(1 + i % 118);
  }
  v1::DescribeAtomsResponse response;
  {
    grpc::ClientContext context;
    SetDeadline(&context);
    grpc::Status status =
        client_.stub->DescribeAtoms(&context, request, &response);
    ASSERT_TRUE(status.ok()) << status.error_message();
    ASSERT_EQ(response.results_size(), kMaxDescribeAtomsBatch);
    EXPECT_EQ(response.results(117).description().symbol(), "Og");
    EXPECT_EQ(response.results(118).description().symbol(), "H");
  }
  request.add_requests()->set_spec("H");
  grpc::ClientContext context;
  SetDeadline(&context);
  grpc::Status status =
      client_.stub->DescribeAtoms(&context, request, &response);
  EXPECT_EQ(status.error_code(), grpc::StatusCode::INVALID_ARGUMENT);
  EXPECT_THAT(status.error_message(), HasSubstr("requests"));
}

TEST_F(ServiceTest, DescribeAtomsEmptyRequestGivesEmptyResponse) {
  v1::DescribeAtomsResponse response;
  grpc::ClientContext context;
  SetDeadline(&context);
  ASSERT_TRUE(
      client_.stub
          ->DescribeAtoms(&context, v1::DescribeAtomsRequest(), &response)
          .ok());
  EXPECT_EQ(response.results_size(), 0);
}

TEST_F(ServiceTest, ListElementsReturnsAllOneHundredEighteen) {
  v1::ListElementsResponse response;
  grpc::ClientContext context;
  SetDeadline(&context);
  grpc::Status status = client_.stub->ListElements(
      &context, v1::ListElementsRequest(), &response);
  ASSERT_TRUE(status.ok()) << status.error_message();
  ASSERT_EQ(response.elements_size(), 118);
  for (int i = 0; i < 118; ++i) {
    EXPECT_EQ(response.elements(i).atomic_number(), i + 1);
  }
  EXPECT_EQ(response.elements(25).symbol(), "Fe");
  EXPECT_EQ(response.elements(25).ground_configuration(), "[Ar] 3d6 4s2");
}

TEST_F(ServiceTest, AnalyzeCompoundBalancesAndAnnotates) {
  v1::CompositionRecord record;
  record.set_id("r1");
  record.set_formula("LiFePO4");
  v1::RecordReport report;
  grpc::ClientContext context;
  SetDeadline(&context);
  grpc::Status status =
      client_.stub->AnalyzeCompound(&context, record, &report);
  ASSERT_TRUE(status.ok()) << status.error_message();
  EXPECT_EQ(report.id(), "r1");
  EXPECT_TRUE(report.valid());
  // Lithium iron phosphate holds Fe2+ (Greenwood & Earnshaw, from memory).
  bool fe2 = false;
  for (const v1::OxidationState& s : report.oxidation_states()) {
    fe2 |= s.element() == "Fe" && s.state() == 2;
  }
  EXPECT_TRUE(fe2);
}

TEST_F(ServiceTest, AnalyzeCompoundMalformedFormulaIsAnErrorReport) {
  v1::CompositionRecord record;
  record.set_id("r2");
  record.set_formula("Fe2O3)");
  v1::RecordReport report;
  grpc::ClientContext context;
  SetDeadline(&context);
  grpc::Status status =
      client_.stub->AnalyzeCompound(&context, record, &report);
  ASSERT_TRUE(status.ok()) << status.error_message();
  EXPECT_FALSE(report.valid());
  ASSERT_GE(report.diagnostics_size(), 1);
  EXPECT_EQ(report.diagnostics(0).code(), "malformed_formula");
  EXPECT_EQ(report.diagnostics(0).column(), 6);
}

// Streams `sizes.size()` batches of the given sizes, one write then one read
// at a time, and returns every report in arrival order.
std::vector<v1::RecordReport> StreamRecords(v1::ElectronStructure::Stub* stub,
                                            const std::vector<int>& sizes,
                                            grpc::Status* status,
                                            std::vector<int>* reply_sizes) {
  grpc::ClientContext context;
  SetDeadline(&context);
  auto stream = stub->AnalyzeRecords(&context);
  std::vector<v1::RecordReport> reports;
  int next_id = 0;
  for (int size : sizes) {
    v1::RecordBatch batch;
    for (int i = 0; i < size; ++i) {
      v1::CompositionRecord* r = batch.add_records();
      r->set_id(absl::StrCat("rec-", next_id++));
      r->set_formula("NaCl");
    }
    if (!stream->Write(batch)) break;
    v1::ReportBatch reply;
    if (!stream->Read(&reply)) break;
    reply_sizes->push_back(reply.reports_size());
    for (const v1::RecordReport& r : reply.reports()) reports.push_back(r);
  }
  stream->WritesDone();
  v1::ReportBatch extra;
  EXPECT_FALSE(stream->Read(&extra)) << "a reply without a batch";
  *status = stream->Finish();
  return reports;
}

TEST_F(ServiceTest, AnalyzeRecordsAnswersEveryRecordInOrder) {
  const std::vector<int> sizes = {500, 1, 0, 37, 500, 2};
  grpc::Status status;
  std::vector<int> reply_sizes;
  std::vector<v1::RecordReport> reports =
      StreamRecords(client_.stub.get(), sizes, &status, &reply_sizes);
  ASSERT_TRUE(status.ok()) << status.error_message();
  EXPECT_EQ(reply_sizes, sizes);  // One reply per batch, same length.
  ASSERT_EQ(reports.size(), 1040u);
  for (size_t i = 0; i < reports.size(); ++i) {
    EXPECT_EQ(reports[i].id(), absl::StrCat("rec-", i));
    EXPECT_TRUE(reports[i].valid());  // NaCl balances as Na+ Cl-.
  }
}

TEST_F(ServiceTest, AnalyzeRecordsBatchOfOne) {
  grpc::Status status;
  std::vector<int> reply_sizes;
  std::vector<v1::RecordReport> reports =
      StreamRecords(client_.stub.get(), {1}, &status, &reply_sizes);
  ASSERT_TRUE(status.ok()) << status.error_message();
  ASSERT_EQ(reports.size(), 1u);
  EXPECT_EQ(reports[0].id(), "rec-0");
}

TEST_F(ServiceTest, AnalyzeRecordsWithNoBatchesEndsCleanly) {
  grpc::Status status;
  std::vector<int> reply_sizes;
  std::vector<v1::RecordReport> reports =
      StreamRecords(client_.stub.get(), {}, &status, &reply_sizes);
  EXPECT_TRUE(status.ok()) << status.error_message();
  EXPECT_TRUE(reports.empty());
}

TEST_F(ServiceTest, AnalyzeRecordsPipelinedWritesStillGetOrderedReplies) {
  // The client writes every batch before reading anything; the server reads
  // one batch per written reply, so all replies still arrive, in order.
  grpc::ClientContext context;
  SetDeadline(&context);
  auto stream = client_.stub->AnalyzeRecords(&context);
  constexpr int kBatches = 20;
  std::thread writer([&] {
    for (int b = 0; b < kBatches; ++b) {
      v1::RecordBatch batch;
      for (int i = 0; i < 10; ++i) {
        batch.add_records()->set_id(absl::StrCat(b, "/", i));
      }
      if (!stream->Write(batch)) return;
    }
    stream->WritesDone();
  });
  std::vector<std::string> ids;
  v1::ReportBatch reply;
  while (stream->Read(&reply)) {
    for (const v1::RecordReport& r : reply.reports()) ids.push_back(r.id());
  }
  writer.join();
  ASSERT_TRUE(stream->Finish().ok());
  ASSERT_EQ(ids.size(), static_cast<size_t>(kBatches * 10));
  for (int b = 0; b < kBatches; ++b) {
    for (int i = 0; i < 10; ++i) {
      EXPECT_EQ(ids[b * 10 + i], absl::StrCat(b, "/", i));
    }
  }
}

// 1000 items with explicit configurations: several milliseconds of work,
// far beyond a 1 µs deadline even though gRPC 1.51 rounds deadlines up to
// the next millisecond.
v1::DescribeAtomsRequest SlowDescribeAtomsRequest() {
  v1::DescribeAtomsRequest request;
  for (int i = 0; i < kMaxDescribeAtomsBatch; ++i) {
    v1::DescribeAtomRequest* item = request.add_requests();
    item->set_spec("Fe");
    item->set_configuration("[Ar] 3d6 4s2");
  }
  return request;
}

TEST_F(ServiceTest, DeadlineInThePastIsDeadlineExceeded) {
  v1::DescribeAtomRequest request;
  request.set_spec("Fe");
  v1::AtomDescription d;
  grpc::ClientContext past;
  past.set_deadline(std::chrono::system_clock::now() - std::chrono::seconds(1));
  EXPECT_EQ(client_.stub->DescribeAtom(&past, request, &d).error_code(),
            grpc::StatusCode::DEADLINE_EXCEEDED);
  EXPECT_TRUE(DescribeSpec("Fe", &d).ok());  // The server is unharmed.
}

TEST_F(ServiceTest, OneMicrosecondDeadlineIsDeadlineExceeded) {
  const v1::DescribeAtomsRequest request = SlowDescribeAtomsRequest();
  v1::DescribeAtomsResponse response;
  grpc::ClientContext tiny;
  tiny.set_deadline(std::chrono::system_clock::now() +
                    std::chrono::microseconds(1));
  EXPECT_EQ(client_.stub->DescribeAtoms(&tiny, request, &response).error_code(),
            grpc::StatusCode::DEADLINE_EXCEEDED);

  // A stream whose deadline passes while it is open.
  grpc::ClientContext stream_context;
  stream_context.set_deadline(std::chrono::system_clock::now() +
                              std::chrono::microseconds(1));
  auto stream = client_.stub->AnalyzeRecords(&stream_context);
  std::this_thread::sleep_for(std::chrono::milliseconds(20));
  stream->Write(v1::RecordBatch());
  v1::ReportBatch reply;
  EXPECT_FALSE(stream->Read(&reply));
  EXPECT_EQ(stream->Finish().error_code(), grpc::StatusCode::DEADLINE_EXCEEDED);

  v1::AtomDescription d;
  EXPECT_TRUE(DescribeSpec("Fe", &d).ok());  // The server is unharmed.
}

// Regression: the deadline was checked only between batches, so one batch
// of hard records kept the server busy for seconds after a 50 ms deadline.
TEST_F(ServiceTest, AnalyzeRecordsStopsWithinABatchAtTheDeadline) {
  const v1::RecordBatch batch = HardRecordBatch(kMaxRecordsPerBatch);
  grpc::ClientContext context;
  const auto deadline =
      std::chrono::system_clock::now() + std::chrono::milliseconds(100);
  context.set_deadline(deadline);
  auto stream = client_.stub->AnalyzeRecords(&context);
  stream->Write(batch);
  v1::ReportBatch reply;
  EXPECT_FALSE(stream->Read(&reply));
  EXPECT_EQ(stream->Finish().error_code(), grpc::StatusCode::DEADLINE_EXCEEDED);

  v1::AtomDescription d;
  EXPECT_TRUE(DescribeSpec("Fe", &d).ok());
  // Shutdown returns only once every handler has: had the batch gone on,
  // this would take minutes.
  server_->Shutdown(absl::ZeroDuration());
  EXPECT_LT(std::chrono::system_clock::now() - deadline,
            std::chrono::seconds(2) * kShutdownSlowdown);
}

TEST_F(ServiceTest, AnalyzeRecordsStopsWithinABatchWhenCancelled) {
  const v1::RecordBatch batch = HardRecordBatch(kMaxRecordsPerBatch);
  grpc::ClientContext context;
  SetDeadline(&context);
  auto stream = client_.stub->AnalyzeRecords(&context);
  stream->Write(batch);
  std::this_thread::sleep_for(std::chrono::milliseconds(100));
  const auto cancelled = std::chrono::system_clock::now();
  context.TryCancel();
  v1::ReportBatch reply;
  EXPECT_FALSE(stream->Read(&reply));
  EXPECT_EQ(stream->Finish().error_code(), grpc::StatusCode::CANCELLED);

  v1::AtomDescription d;
  EXPECT_TRUE(DescribeSpec("Fe", &d).ok());
  server_->Shutdown(absl::ZeroDuration());
  EXPECT_LT(std::chrono::system_clock::now() - cancelled,
            std::chrono::seconds(2) * kShutdownSlowdown);
}

// Regression: a 10,000-record batch got one 6.9 MB reply, which a client
// with gRPC's default 4 MiB receive limit refused (RESOURCE_EXHAUSTED) after
// the server had done all the work. Now the answer comes in several
// ReportBatch messages, each under the limit.
TEST_F(ServiceTest, AnAnswerTooLargeForADefaultClientComesInSeveralParts) {
  v1::RecordBatch batch;
  for (int i = 0; i < kMaxRecordsPerBatch; ++i) {
    v1::CompositionRecord* record = batch.add_records();
    record->set_id(absl::StrCat(std::string(200, 'r'), "-", i));
    record->set_formula("Fe3O4");
    record->set_max_alternatives(2);
  }
  // A client with every setting at gRPC's default: 4 MiB received at most.
  auto stub = v1::ElectronStructure::NewStub(grpc::CreateChannel(
      server_->address(), grpc::InsecureChannelCredentials()));
  grpc::ClientContext context;
  context.set_deadline(std::chrono::system_clock::now() +
                       std::chrono::seconds(120));
  auto stream = stub->AnalyzeRecords(&context);
  ASSERT_TRUE(stream->Write(batch));
  int answered = 0;
  int replies = 0;
  size_t total_bytes = 0;
  v1::ReportBatch reply;
  while (answered < batch.records_size() && stream->Read(&reply)) {
    ++replies;
    total_bytes += reply.ByteSizeLong();
    EXPECT_LE(reply.ByteSizeLong(), size_t{4} << 20);
    for (const v1::RecordReport& report : reply.reports()) {
      ASSERT_LT(answered, batch.records_size());
      EXPECT_EQ(report.id(), batch.records(answered).id());
      ++answered;
    }
  }
  EXPECT_EQ(answered, batch.records_size());
  EXPECT_GT(total_bytes, size_t{4} << 20);  // One message would not do.
  EXPECT_GT(replies, 1);
  // The stream goes on: the next batch gets its own answer.
  v1::RecordBatch one;
  one.add_records()->set_id("next");
  ASSERT_TRUE(stream->Write(one));
  ASSERT_TRUE(stream->Read(&reply));
  ASSERT_EQ(reply.reports_size(), 1);
  EXPECT_EQ(reply.reports(0).id(), "next");
  stream->WritesDone();
  EXPECT_TRUE(stream->Finish().ok());
}

TEST_F(ServiceTest, OversizedRequestIsResourceExhausted) {
  v1::DescribeAtomRequest request;
  request.set_spec(std::string(5 << 20, 'F'));  // Above the 4 MiB default.
  v1::AtomDescription d;
  grpc::Status status = Describe(request, &d);
  EXPECT_EQ(status.error_code(), grpc::StatusCode::RESOURCE_EXHAUSTED);

  // Large but allowed input is an ordinary INVALID_ARGUMENT.
  request.set_spec(std::string(1 << 20, 'F'));
  EXPECT_EQ(Describe(request, &d).error_code(),
            grpc::StatusCode::INVALID_ARGUMENT);
  EXPECT_TRUE(DescribeSpec("Fe", &d).ok());
}

TEST_F(ServiceTest, OversizedRecordBatchEndsTheStreamResourceExhausted) {
  grpc::ClientContext context;
  SetDeadline(&context);
  auto stream = client_.stub->AnalyzeRecords(&context);
  v1::RecordBatch batch;
  batch.add_records()->set_id(std::string(5 << 20, 'x'));
  stream->Write(batch);
  stream->WritesDone();
  v1::ReportBatch reply;
  EXPECT_FALSE(stream->Read(&reply));
  EXPECT_EQ(stream->Finish().error_code(),
            grpc::StatusCode::RESOURCE_EXHAUSTED);
}

TEST_F(ServiceTest, GarbageBytesOnTheSocketDoNotHurtTheServer) {
  const std::string preface = "PRI * HTTP/2.0\r\n\r\nSM\r\n\r\n";
  std::vector<std::string> junk = {
      testing::RandomBytes(64 << 10, 1),
      preface + testing::RandomBytes(16 << 10, 2),
      "GET / HTTP/1.1\r\nHost: localhost\r\n\r\n",
      // A frame header claiming a 16 MiB DATA frame on stream 1.
      preface + std::string("\xff\xff\xff\x00\x01\x00\x00\x00\x01", 9),
      std::string(),
  };
  for (const std::string& bytes : junk) {
    ASSERT_TRUE(testing::SendRawBytes(server_->port(), bytes));
  }
  v1::AtomDescription d;
  grpc::Status status = DescribeSpec("Fe3+", &d);
  ASSERT_TRUE(status.ok()) << status.error_message();
  EXPECT_EQ(d.configuration(), "[Ar] 3d5");
}

// Bytes sent with a generic stub, bypassing client-side checks. Returns the
// call's status.
grpc::Status RawUnaryCall(const std::shared_ptr<grpc::Channel>& channel,
                          const std::string& method,
                          const std::string& payload) {
  grpc::GenericStub generic(channel);
  grpc::Slice slice(payload);
  grpc::ByteBuffer request(&slice, 1);
  grpc::ByteBuffer response;
  grpc::ClientContext context;
  SetDeadline(&context);
  std::mutex mu;
  std::condition_variable cv;
  bool done = false;
  grpc::Status status;
  generic.UnaryCall(&context, method, grpc::StubOptions(), &request, &response,
                    [&](grpc::Status s) {
                      std::lock_guard<std::mutex> lock(mu);
                      status = std::move(s);
                      done = true;
                      cv.notify_one();
                    });
  std::unique_lock<std::mutex> lock(mu);
  if (!cv.wait_for(lock, std::chrono::seconds(15), [&] { return done; })) {
    ADD_FAILURE() << "raw call did not finish";
    context.TryCancel();
    cv.wait(lock, [&] { return done; });
  }
  return status;
}

TEST_F(ServiceTest, MalformedProtobufPayloadsAreRejectedNotFatal) {
  for (uint32_t seed = 0; seed < 50; ++seed) {
    grpc::Status status = RawUnaryCall(
        client_.channel, "/shellwright.v1.ElectronStructure/DescribeAtom",
        testing::RandomBytes(1 + seed * 13, seed));
    // Random bytes occasionally parse as a request (then the spec is
    // checked as usual); otherwise gRPC rejects the payload. Either way the
    // process lives on and answers.
    EXPECT_NE(status.error_code(), grpc::StatusCode::UNAVAILABLE);
    EXPECT_NE(status.error_code(), grpc::StatusCode::DEADLINE_EXCEEDED);
  }
  for (const char* method :
       {"/shellwright.v1.ElectronStructure/DescribeAtoms",
        "/shellwright.v1.ElectronStructure/ListElements",
        "/shellwright.v1.ElectronStructure/AnalyzeCompound",
        "/shellwright.v1.ElectronStructure/NoSuchMethod",
        "/no.such.Service/X"}) {
    grpc::Status status =
        RawUnaryCall(client_.channel, method, testing::RandomBytes(300, 7));
    EXPECT_FALSE(status.ok()) << method;
  }
  v1::AtomDescription d;
  EXPECT_TRUE(DescribeSpec("Fe", &d).ok());
}

TEST_F(ServiceTest, InvalidUtf8InAStringFieldIsRejected) {
  // DescribeAtomRequest{spec: "Fe", configuration: "\xff"}: proto3 strings
  // must be UTF-8, so the request does not parse. gRPC 1.51's callback
  // server answers UNIMPLEMENTED before the handler runs.
  const std::string payload(
      "\x0a\x02"
      "Fe"
      "\x32\x01\xff",
      7);
  grpc::Status status =
      RawUnaryCall(client_.channel,
                   "/shellwright.v1.ElectronStructure/DescribeAtom", payload);
  EXPECT_FALSE(status.ok());
  v1::AtomDescription d;
  EXPECT_TRUE(DescribeSpec("Fe", &d).ok());
}

TEST_F(ServiceTest, RecordBatchThatDoesNotParseIsInvalidArgument) {
  // RecordBatch{records: [{id: "\xff"}]}: not UTF-8. AnalyzeRecords parses
  // its batches itself (it writes its replies as bytes), and says what
  // was wrong.
  const std::string payload("\x0a\x03\x0a\x01\xff", 5);
  grpc::Status status =
      RawUnaryCall(client_.channel,
                   "/shellwright.v1.ElectronStructure/AnalyzeRecords", payload);
  EXPECT_EQ(status.error_code(), grpc::StatusCode::INVALID_ARGUMENT);
  EXPECT_THAT(status.error_message(), HasSubstr("RecordBatch"));
  // A batch that parses, sent the same way, is answered.
  grpc::Status fine = RawUnaryCall(
      client_.channel, "/shellwright.v1.ElectronStructure/AnalyzeRecords",
      std::string("\x0a\x03\x0a\x01x", 5));
  EXPECT_TRUE(fine.ok()) << fine.error_message();
  v1::AtomDescription d;
  EXPECT_TRUE(DescribeSpec("Fe", &d).ok());
}

TEST_F(ServiceTest, RandomSpecsAndConfigurationsNeverCrash) {
  const std::vector<std::string> pieces = {
      "Fe",       "Gd", "Og",   "H",    "26", "0",          "118",
      "119",      "-",  "+",    "(",    ")",  "I",          "V",
      "X",        "IX", "[Ar]", "[Xe]", "[",  "]",          " ",
      "3d",       "4f", "1s",   "10",   "99", "2147483648", "-2147483649",
      "\xce\xb1", "\t", "\x7f", "iron", "e",  "s",          "p",
      "g",        "7p", "8s",   "0s"};
  std::mt19937 rng(42);
  for (int i = 0; i < 1500; ++i) {
    std::string spec, configuration;
    int n = 1 + static_cast<int>(rng() % 6);
    for (int j = 0; j < n; ++j) spec += pieces[rng() % pieces.size()];
    n = static_cast<int>(rng() % 8);
    for (int j = 0; j < n; ++j) {
      configuration += pieces[rng() % pieces.size()];
    }
    v1::DescribeAtomRequest request;
    request.set_spec(spec);
    if (rng() % 3 == 0) request.set_charge(static_cast<int>(rng() % 300) - 150);
    request.set_configuration(configuration);
    request.set_geometry(static_cast<v1::Geometry>(rng() % 6));
    request.set_spin_state(static_cast<v1::SpinStatePreference>(rng() % 5));
    // The message is built locally first: what the server answers must
    // match what the translation layer answers.
    v1::AtomDescription local;
    absl::Status expected = DescribeAtomMessage(request, &local);
    v1::AtomDescription remote;
    grpc::Status status = Describe(request, &remote);
    ASSERT_EQ(static_cast<int>(status.error_code()),
              static_cast<int>(expected.code()))
        << request.ShortDebugString() << ": " << status.error_message();
    ASSERT_NE(status.error_code(), grpc::StatusCode::INTERNAL);
  }
}

TEST_F(ServiceTest, ConcurrentCallersAllSucceed) {
  constexpr int kThreads = 8;
  constexpr int kCallsPerThread = 100;
  std::atomic<int> ok{0};
  std::vector<std::thread> threads;
  for (int t = 0; t < kThreads; ++t) {
    threads.emplace_back([&, t] {
      for (int i = 0; i < kCallsPerThread; ++i) {
        v1::DescribeAtomRequest request;
        request.set_atomic_number(1 + (t * kCallsPerThread + i) % 118);
        v1::AtomDescription d;
        grpc::ClientContext context;
        SetDeadline(&context);
        if (client_.stub->DescribeAtom(&context, request, &d).ok() &&
            d.atomic_number() == request.atomic_number()) {
          ++ok;
        }
      }
    });
  }
  for (std::thread& t : threads) t.join();
  EXPECT_EQ(ok.load(), kThreads * kCallsPerThread);
}

// ---------------------------------------------------------------------------
// Idle limits.

class IdleLimitTest : public ServiceTest {
 protected:
  void Configure(ServerOptions* options) override {
    options->idle_timeout = absl::Seconds(1);
  }
};

// Regression: a stream that never sent its next batch kept its stream slot
// for ever, so idle streams could fill a connection's 100 slots.
TEST_F(IdleLimitTest, AStreamWaitingPastTheIdleTimeoutIsCancelled) {
  grpc::ClientContext context;
  SetDeadline(&context);
  auto stream = client_.stub->AnalyzeRecords(&context);
  v1::ReportBatch reply;
  // Busy: a batch every 100 ms for a second keeps the stream open.
  for (int i = 0; i < 10; ++i) {
    v1::RecordBatch batch;
    batch.add_records()->set_id(absl::StrCat("busy-", i));
    ASSERT_TRUE(stream->Write(batch));
    ASSERT_TRUE(stream->Read(&reply)) << i;
    std::this_thread::sleep_for(std::chrono::milliseconds(100));
  }
  // Idle: cancelled soon after the 1 s limit.
  const auto start = std::chrono::steady_clock::now();
  EXPECT_FALSE(stream->Read(&reply));
  EXPECT_LT(std::chrono::steady_clock::now() - start, std::chrono::seconds(5));
  EXPECT_EQ(stream->Finish().error_code(), grpc::StatusCode::CANCELLED);
}

// Regression: a connection that sent the HTTP/2 preface and then nothing
// was held indefinitely.
TEST_F(IdleLimitTest, AConnectionThatOnlySendsThePrefaceIsClosed) {
  const int port = server_->port();
  const int fd = socket(AF_INET, SOCK_STREAM, 0);
  ASSERT_GE(fd, 0);
  sockaddr_in addr{};
  addr.sin_family = AF_INET;
  addr.sin_port = htons(static_cast<uint16_t>(port));
  addr.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
  ASSERT_EQ(connect(fd, reinterpret_cast<sockaddr*>(&addr), sizeof(addr)), 0);
  // The client preface and an empty SETTINGS frame (RFC 9113, 3.4 and 6.5).
  const std::string preface = std::string("PRI * HTTP/2.0\r\n\r\nSM\r\n\r\n") +
                              std::string("\0\0\0\x04\0\0\0\0\0", 9);
  ASSERT_EQ(send(fd, preface.data(), preface.size(), MSG_NOSIGNAL),
            static_cast<ssize_t>(preface.size()));
  // Read (and ignore) what the server sends until it closes the socket.
  const auto start = std::chrono::steady_clock::now();
  bool closed = false;
  while (!closed &&
         std::chrono::steady_clock::now() - start < std::chrono::seconds(10)) {
    pollfd p{fd, POLLIN, 0};
    if (poll(&p, 1, 100) <= 0) continue;
    char buffer[4096];
    closed = recv(fd, buffer, sizeof(buffer), 0) <= 0;
  }
  close(fd);
  EXPECT_TRUE(closed);
  EXPECT_LT(std::chrono::steady_clock::now() - start, std::chrono::seconds(5));
}

TEST(ServerOptions, IdleAndKeepaliveLimitsMustBePositive) {
  ServerOptions options;
  options.listen = "127.0.0.1:0";
  options.idle_timeout = absl::ZeroDuration();
  EXPECT_EQ(ShellwrightServer::Start(options).status().code(),
            absl::StatusCode::kInvalidArgument);
  options.idle_timeout = absl::Minutes(5);
  options.keepalive_interval = absl::Seconds(-1);
  EXPECT_EQ(ShellwrightServer::Start(options).status().code(),
            absl::StatusCode::kInvalidArgument);
}

// ---------------------------------------------------------------------------
// With a token.

constexpr char kToken[] = "s3cret-Token_42";

class AuthServiceTest : public ServiceTest {
 protected:
  void Configure(ServerOptions* options) override {
    options->auth_token_file = dir_.Write("token", std::string(kToken) + "\n");
  }

  testing::TempDir dir_;
};

TEST_F(AuthServiceTest, EveryMethodNeedsTheToken) {
  for (const char* header :
       {"", "Bearer wrong", "Bearer s3cret-Token_4", "s3cret-Token_42"}) {
    SCOPED_TRACE(header);
    auto prepare = [&](grpc::ClientContext* context) {
      SetDeadline(context);
      if (*header != '\0') context->AddMetadata("authorization", header);
    };
    {
      grpc::ClientContext context;
      prepare(&context);
      v1::DescribeAtomRequest request;
      request.set_spec("Fe");
      v1::AtomDescription d;
      grpc::Status s = client_.stub->DescribeAtom(&context, request, &d);
      EXPECT_EQ(s.error_code(), grpc::StatusCode::UNAUTHENTICATED);
      EXPECT_THAT(s.error_message(), ::testing::Not(HasSubstr(kToken)));
    }
    {
      grpc::ClientContext context;
      prepare(&context);
      v1::DescribeAtomsResponse r;
      EXPECT_EQ(
          client_.stub->DescribeAtoms(&context, v1::DescribeAtomsRequest(), &r)
              .error_code(),
          grpc::StatusCode::UNAUTHENTICATED);
    }
    {
      grpc::ClientContext context;
      prepare(&context);
      v1::ListElementsResponse r;
      EXPECT_EQ(
          client_.stub->ListElements(&context, v1::ListElementsRequest(), &r)
              .error_code(),
          grpc::StatusCode::UNAUTHENTICATED);
    }
    {
      grpc::ClientContext context;
      prepare(&context);
      v1::RecordReport r;
      EXPECT_EQ(
          client_.stub->AnalyzeCompound(&context, v1::CompositionRecord(), &r)
              .error_code(),
          grpc::StatusCode::UNAUTHENTICATED);
    }
    {
      grpc::ClientContext context;
      prepare(&context);
      auto stream = client_.stub->AnalyzeRecords(&context);
      stream->Write(v1::RecordBatch());
      stream->WritesDone();
      v1::ReportBatch reply;
      EXPECT_FALSE(stream->Read(&reply));
      EXPECT_EQ(stream->Finish().error_code(),
                grpc::StatusCode::UNAUTHENTICATED);
    }
  }
}

TEST_F(AuthServiceTest, TheRightTokenIsAccepted) {
  grpc::ClientContext context;
  SetDeadline(&context);
  context.AddMetadata("authorization", absl::StrCat("Bearer ", kToken));
  v1::DescribeAtomRequest request;
  request.set_spec("Fe3+");
  v1::AtomDescription d;
  grpc::Status s = client_.stub->DescribeAtom(&context, request, &d);
  ASSERT_TRUE(s.ok()) << s.error_message();
  EXPECT_EQ(d.configuration(), "[Ar] 3d5");

  grpc::ClientContext stream_context;
  SetDeadline(&stream_context);
  stream_context.AddMetadata("authorization", absl::StrCat("Bearer ", kToken));
  auto stream = client_.stub->AnalyzeRecords(&stream_context);
  v1::RecordBatch batch;
  batch.add_records()->set_id("only");
  ASSERT_TRUE(stream->Write(batch));
  v1::ReportBatch reply;
  ASSERT_TRUE(stream->Read(&reply));
  ASSERT_EQ(reply.reports_size(), 1);
  EXPECT_EQ(reply.reports(0).id(), "only");
  stream->WritesDone();
  EXPECT_TRUE(stream->Finish().ok());
}

// ---------------------------------------------------------------------------
// Options.

TEST(ServerOptions, SmallMessageLimitIsEnforced) {
  SetLogLevel(LogLevel::kWarning);
  ServerOptions options;
  options.listen = "127.0.0.1:0";
  options.max_message_bytes = 1024;
  absl::StatusOr<std::unique_ptr<ShellwrightServer>> server =
      ShellwrightServer::Start(options);
  ASSERT_TRUE(server.ok()) << server.status();
  Client client = Connect((*server)->address());
  v1::DescribeAtomRequest request;
  request.set_spec("Fe");
  request.set_configuration(std::string(2000, ' '));
  v1::AtomDescription d;
  grpc::ClientContext context;
  SetDeadline(&context);
  EXPECT_EQ(client.stub->DescribeAtom(&context, request, &d).error_code(),
            grpc::StatusCode::RESOURCE_EXHAUSTED);
  request.clear_configuration();
  grpc::ClientContext ok_context;
  SetDeadline(&ok_context);
  EXPECT_TRUE(client.stub->DescribeAtom(&ok_context, request, &d).ok());
  (*server)->Shutdown(absl::Seconds(1));
}

TEST(ServerOptions, BadOptionsAreInvalidArgument) {
  ServerOptions options;
  options.listen = "127.0.0.1:0";
  options.max_message_bytes = 0;
  EXPECT_EQ(ShellwrightServer::Start(options).status().code(),
            absl::StatusCode::kInvalidArgument);
  options.max_message_bytes = 1024;
  options.max_concurrent_streams = -1;
  EXPECT_EQ(ShellwrightServer::Start(options).status().code(),
            absl::StatusCode::kInvalidArgument);
  options.max_concurrent_streams = 10;
  options.auth_token_file = "/nonexistent/token";
  EXPECT_EQ(ShellwrightServer::Start(options).status().code(),
            absl::StatusCode::kInvalidArgument);
}

// Regression: gRPC took 99999 modulo 65536, 65536 as "any port" and an
// empty port as 443.
TEST(ServerOptions, ListenAddressNeedsAHostAndADecimalPort) {
  for (const char* good :
       {"127.0.0.1:0", "127.0.0.1:50051", "localhost:65535", "[::1]:0",
        "0.0.0.0:443", "unix:/tmp/shellwrightd.sock", "unix-abstract:sw"}) {
    EXPECT_TRUE(ValidateListenAddress(good).ok()) << good;
  }
  const struct {
    const char* listen;
    const char* problem;
  } kBad[] = {
      {"127.0.0.1:99999", "0..65535"},  {"127.0.0.1:65536", "0..65535"},
      {"127.0.0.1:", "port is empty"},  {"127.0.0.1:http", "0..65535"},
      {"127.0.0.1:-1", "0..65535"},     {"127.0.0.1:+80", "0..65535"},
      {"127.0.0.1:000080", "0..65535"}, {":50051", "host is empty"},
      {"localhost", "HOST:PORT"},       {"::1:50051", "brackets"},
      {"[::1:50051", "bracket"},        {"", "empty"},
      {"unix:", "path is empty"},
  };
  for (const auto& bad : kBad) {
    absl::Status status = ValidateListenAddress(bad.listen);
    EXPECT_EQ(status.code(), absl::StatusCode::kInvalidArgument) << bad.listen;
    // The address, quoted; the binary adds its flag's name.
    EXPECT_THAT(status.message(),
                HasSubstr(absl::StrCat("'", bad.listen, "': ")));
    EXPECT_THAT(status.message(), ::testing::Not(HasSubstr("--listen")));
    EXPECT_THAT(status.message(), HasSubstr(bad.problem)) << bad.listen;
  }
  ServerOptions options;
  options.listen = "127.0.0.1:99999";
  EXPECT_EQ(ShellwrightServer::Start(options).status().code(),
            absl::StatusCode::kInvalidArgument);
}

TEST(ServerOptions, AnAddressInUseIsUnavailable) {
  SetLogLevel(LogLevel::kError);
  ServerOptions options;
  options.listen = "127.0.0.1:0";
  absl::StatusOr<std::unique_ptr<ShellwrightServer>> first =
      ShellwrightServer::Start(options);
  ASSERT_TRUE(first.ok()) << first.status();
  options.listen = (*first)->address();
  absl::StatusOr<std::unique_ptr<ShellwrightServer>> second =
      ShellwrightServer::Start(options);
  EXPECT_EQ(second.status().code(), absl::StatusCode::kUnavailable);
}

TEST(StatusMapping, KeepsCodesAndHidesInternalDetails) {
  grpc::Status invalid = ToGrpcStatus(absl::InvalidArgumentError("spec: bad"));
  EXPECT_EQ(invalid.error_code(), grpc::StatusCode::INVALID_ARGUMENT);
  EXPECT_EQ(invalid.error_message(), "spec: bad");
  EXPECT_EQ(ToGrpcStatus(absl::NotFoundError("x")).error_code(),
            grpc::StatusCode::NOT_FOUND);
  EXPECT_EQ(ToGrpcStatus(absl::OutOfRangeError("x")).error_code(),
            grpc::StatusCode::OUT_OF_RANGE);
  SetLogLevel(LogLevel::kError);
  for (const absl::Status& s :
       {absl::InternalError("table row 17 corrupt at 0x7ffd"),
        absl::UnknownError("errno 5"), absl::DataLossError("crc")}) {
    grpc::Status g = ToGrpcStatus(s);
    EXPECT_EQ(static_cast<int>(g.error_code()), static_cast<int>(s.code()));
    EXPECT_EQ(g.error_message(), "internal error");
  }
  EXPECT_TRUE(ToGrpcStatus(absl::OkStatus()).ok());
}

TEST(Logging, ParsesLevelNames) {
  EXPECT_EQ(*ParseName<LogLevel>("error"), LogLevel::kError);
  EXPECT_EQ(*ParseName<LogLevel>("warning"), LogLevel::kWarning);
  EXPECT_EQ(*ParseName<LogLevel>("info"), LogLevel::kInfo);
  EXPECT_EQ(*ParseName<LogLevel>("debug"), LogLevel::kDebug);
  EXPECT_FALSE(ParseName<LogLevel>("verbose").ok());
  SetLogLevel(LogLevel::kWarning);
  EXPECT_TRUE(LogEnabled(LogLevel::kError));
  EXPECT_FALSE(LogEnabled(LogLevel::kInfo));
}

}  // namespace
}  // namespace shellwright
