// docs/deploy/nginx-shellwright.conf, run by the real nginx (Debian's
// package, installed by .ci/setup) in front of two real shellwrightd on
// loopback: check through it gives the in-process bytes, health answers
// through it, and it keeps answering when one replica is gone.

#include <netinet/in.h>
#include <signal.h>
#include <sys/socket.h>
#include <unistd.h>

#include <chrono>
#include <fstream>
#include <memory>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_replace.h"
#include "gmock/gmock.h"
#include "grpcpp/grpcpp.h"
#include "gtest/gtest.h"
#include "shellwright/v1/electron_structure.grpc.pb.h"
#include "tests/server/server_test_util.h"

namespace shellwright {
namespace {

using ::shellwright::testing::ChildProcess;
using ::shellwright::testing::CliPath;
using ::shellwright::testing::CommandResult;
using ::shellwright::testing::RunCommand;
using ::shellwright::testing::ServerProcess;
using ::shellwright::testing::SourcePath;
using ::shellwright::testing::StartShellwrightd;
using ::shellwright::testing::TempDir;

constexpr auto kWait = std::chrono::seconds(60);
constexpr char kNginx[] = "/usr/sbin/nginx";

std::string ReadAll(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

// A loopback port that was free a moment ago.
int FreePort() {
  const int fd = socket(AF_INET, SOCK_STREAM, 0);
  sockaddr_in addr{};
  addr.sin_family = AF_INET;
  addr.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
  addr.sin_port = 0;
  socklen_t len = sizeof(addr);
  if (fd < 0 || bind(fd, reinterpret_cast<sockaddr*>(&addr), len) != 0 ||
      getsockname(fd, reinterpret_cast<sockaddr*>(&addr), &len) != 0) {
    if (fd >= 0) close(fd);
    return -1;
  }
  close(fd);
  return ntohs(addr.sin_port);
}

// Calls DescribeAtom("Fe3+") through `address`; the configuration or "".
std::string Fe3Configuration(const std::string& address) {
  auto stub = v1::ElectronStructure::NewStub(
      grpc::CreateChannel(address, grpc::InsecureChannelCredentials()));
  grpc::ClientContext context;
  context.set_deadline(std::chrono::system_clock::now() +
                       std::chrono::seconds(10));
  v1::DescribeAtomRequest request;
  request.set_spec("Fe3+");
  v1::AtomDescription d;
  grpc::Status s = stub->DescribeAtom(&context, request, &d);
  return s.ok() ? d.configuration() : "error: " + s.error_message();
}

TEST(Nginx, FrontForTwoReplicasGivesTheInProcessBytes) {
  ASSERT_EQ(access(kNginx, X_OK), 0)
      << kNginx << " is missing; bash .ci/setup installs Debian's nginx";
  TempDir dir;
  std::unique_ptr<ServerProcess> replicas[] = {StartShellwrightd({}),
                                               StartShellwrightd({})};
  ASSERT_NE(replicas[0], nullptr);
  ASSERT_NE(replicas[1], nullptr);
  const int port = FreePort();
  ASSERT_GT(port, 0);
  const std::string front = absl::StrCat("127.0.0.1:", port);

  std::string conf = ReadAll(SourcePath("docs/deploy/nginx-shellwright.conf"));
  ASSERT_THAT(conf, ::testing::HasSubstr("server 127.0.0.1:50052"));
  conf = absl::StrReplaceAll(
      conf, {{"127.0.0.1:50051", replicas[0]->address()},
             {"127.0.0.1:50052", replicas[1]->address()},
             {"127.0.0.1:8443", front},
             {"/run/nginx-shellwright.pid", dir.File("nginx.pid")}});
  // Master process off: one process, which the test ends itself.
  conf = absl::StrCat("daemon off;\nmaster_process off;\n", conf);
  dir.Write("nginx.conf", conf);
  std::unique_ptr<ChildProcess> nginx =
      ChildProcess::Start({kNginx, "-p", dir.path(), "-e",
                           dir.File("error.log"), "-c", dir.File("nginx.conf")},
                          dir.File("nginx.stderr"));
  ASSERT_NE(nginx, nullptr);
  // Up once it answers through the front.
  std::string answer;
  for (int i = 0; i < 100 && answer != "[Ar] 3d5"; ++i) {
    std::this_thread::sleep_for(std::chrono::milliseconds(100));
    ASSERT_FALSE(nginx->TryWait().has_value())
        << ReadAll(dir.File("error.log")) << nginx->Stderr();
    answer = Fe3Configuration(front);
  }
  ASSERT_EQ(answer, "[Ar] 3d5") << ReadAll(dir.File("error.log"));

  std::string csv = "id,formula,measured_moment\n";
  for (int i = 0; i < 3000; ++i) {
    absl::StrAppend(&csv, "n", i, ",La0.", 50 + i % 49, "Sr0.", 50 - i % 49,
                    "MnO3,", (i % 40) / 10.0, "\n");
  }
  dir.Write("in.csv", csv);
  CommandResult reference =
      RunCommand({CliPath(), "check", dir.File("in.csv"), "--out",
                  dir.File("reference.jsonl"), "--no-progress"},
                 kWait);
  ASSERT_LE(reference.exit_code, 1) << reference.err;
  CommandResult remote =
      RunCommand({CliPath(), "--server", front, "check", dir.File("in.csv"),
                  "--out", dir.File("remote.jsonl"), "--jobs", "4",
                  "--batch-size", "100", "--no-progress"},
                 kWait);
  EXPECT_EQ(remote.exit_code, reference.exit_code) << remote.err;
  EXPECT_TRUE(ReadAll(dir.File("remote.jsonl")) ==
              ReadAll(dir.File("reference.jsonl")))
      << "output through nginx differs from in-process";

  // One replica gone: nginx passes it over for new calls.
  ASSERT_EQ(replicas[0]->Terminate(kWait), 0);
  for (int i = 0; i < 4; ++i) EXPECT_EQ(Fe3Configuration(front), "[Ar] 3d5");

  EXPECT_EQ(nginx->SignalAndWait(SIGQUIT, kWait), 0)
      << ReadAll(dir.File("error.log"));
  EXPECT_EQ(replicas[1]->Terminate(kWait), 0);
}

}  // namespace
}  // namespace shellwright
