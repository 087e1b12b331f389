// End-to-end tests of `shellwright --server A,B,C check`: three real
// shellwrightd on loopback, one killed (SIGKILL) and one drained (SIGTERM)
// while the CLI is in the middle of a run. The input comes through a FIFO
// that the test fills in parts, so that each signal lands while the run
// is going on, however fast the machine.

#include <fcntl.h>
#include <signal.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <filesystem>
#include <fstream>
#include <memory>
#include <optional>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_join.h"
#include "gmock/gmock.h"
#include "gtest/gtest.h"
#include "tests/server/server_test_util.h"

namespace shellwright {
namespace {

using ::shellwright::testing::ChildProcess;
using ::shellwright::testing::CliPath;
using ::shellwright::testing::CommandResult;
using ::shellwright::testing::RunCommand;
using ::shellwright::testing::ServerProcess;
using ::shellwright::testing::StartShellwrightd;
using ::shellwright::testing::TempDir;
using ::testing::HasSubstr;

constexpr auto kWait = std::chrono::seconds(60);

// `rows` CSV records (header excluded), mostly distinct compositions, with
// a malformed line now and then; `first` numbers the first one.
std::string CsvRows(int first, int rows) {
  static const char* const kBases[] = {"La%sSr%sMnO3", "LiNi%sCo%sO2",
                                       "Fe%sAl%sO4", "Nd%sCa%sCoO3"};
  std::string out;
  for (int i = first; i < first + rows; ++i) {
    if (i % 997 == 0) {
      absl::StrAppend(&out, "r", i, ",Fe2O3,not-a-number\n");
      continue;
    }
    const int x = i % 97 + 1;
    std::string formula = kBases[i % 4];
    formula.replace(formula.find("%s"), 2, absl::StrCat("0.", 100 - x));
    formula.replace(formula.find("%s"), 2,
                    x < 10 ? absl::StrCat("0.0", x) : absl::StrCat("0.", x));
    absl::StrAppend(&out, "r", i, ",", formula, ",", (i % 50) / 10.0, "\n");
  }
  return out;
}

constexpr char kHeader[] = "id,formula,measured_moment\n";

std::string ReadAll(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

// Lines in the file so far.
int LineCount(const std::string& path) {
  const std::string text = ReadAll(path);
  return static_cast<int>(std::count(text.begin(), text.end(), '\n'));
}

// check writes `dir/name` as "dir/.name.partial-XXXXXX" until it is
// complete; that file, or the finished one, or "" while neither exists.
std::string OutputSoFar(const std::string& dir, const std::string& name) {
  const std::string prefix = absl::StrCat(".", name, ".partial-");
  for (const auto& entry : std::filesystem::directory_iterator(dir)) {
    const std::string file = entry.path().filename().string();
    if (file == name || file.rfind(prefix, 0) == 0) return entry.path();
  }
  return "";
}

// Waits until check's output `dir/name` holds at least `lines` lines;
// false after kWait.
bool WaitForLines(const std::string& dir, const std::string& name, int lines) {
  const auto deadline = std::chrono::steady_clock::now() + kWait;
  while (LineCount(OutputSoFar(dir, name)) < lines) {
    if (std::chrono::steady_clock::now() > deadline) return false;
    std::this_thread::sleep_for(std::chrono::milliseconds(20));
  }
  return true;
}

bool WriteAll(int fd, const std::string& text) {
  size_t done = 0;
  while (done < text.size()) {
    const ssize_t n = write(fd, text.data() + done, text.size() - done);
    if (n <= 0) return false;
    done += static_cast<size_t>(n);
  }
  return true;
}

TEST(Replicas, OneKilledAndOneDrainedMidRunGiveTheInProcessBytes) {
  TempDir dir;
  constexpr int kBatch = 100;
  constexpr int kPart = 8000;  // Rows per part, about 300 KB.
  // check reads its input in 64 KiB blocks (about 2000 rows here), so up
  // to that much of a part waits for the next part to arrive.
  constexpr int kHeldBack = 4000;
  const std::string parts[] = {CsvRows(0, kPart), CsvRows(kPart, kPart),
                               CsvRows(2 * kPart, kPart)};
  dir.Write("all.csv", absl::StrCat(kHeader, parts[0], parts[1], parts[2]));
  CommandResult reference =
      RunCommand({CliPath(), "check", dir.File("all.csv"), "--out",
                  dir.File("reference.jsonl"), "--no-progress"},
                 kWait);
  ASSERT_EQ(reference.exit_code, 1) << reference.err;  // Some invalid rows.
  const std::string expected = ReadAll(dir.File("reference.jsonl"));
  ASSERT_EQ(std::count(expected.begin(), expected.end(), '\n'), 3 * kPart);

  std::vector<std::unique_ptr<ServerProcess>> servers;
  std::vector<std::string> addresses;
  for (int i = 0; i < 3; ++i) {
    servers.push_back(StartShellwrightd({"--log-level", "warning"}));
    ASSERT_NE(servers.back(), nullptr);
    addresses.push_back(servers.back()->address());
  }

  const std::string fifo = dir.File("input.csv");
  ASSERT_EQ(mkfifo(fifo.c_str(), 0600), 0);
  const std::string out = dir.File("remote.jsonl");
  std::unique_ptr<ChildProcess> cli = ChildProcess::Start(
      {CliPath(), "--server", absl::StrJoin(addresses, ","), "check", fifo,
       "--out", out, "--jobs", "3", "--batch-size", absl::StrCat(kBatch),
       "--no-progress"},
      dir.File("cli.stderr"));
  ASSERT_NE(cli, nullptr);
  const int input = open(fifo.c_str(), O_WRONLY);  // Waits for the reader.
  ASSERT_GE(input, 0);

  // Part 1 goes through all three replicas.
  ASSERT_TRUE(WriteAll(input, absl::StrCat(kHeader, parts[0])));
  ASSERT_TRUE(WaitForLines(dir.path(), "remote.jsonl", kPart - kHeldBack));
  // Part 2 is under way when replica 0 dies without a word.
  ASSERT_TRUE(WriteAll(input, parts[1]));
  ASSERT_EQ(servers[0]->process().SignalAndWait(SIGKILL, kWait), 128 + SIGKILL);
  ASSERT_TRUE(WaitForLines(dir.path(), "remote.jsonl", 2 * kPart - kHeldBack));
  // Part 3 is under way when replica 1 drains; it must exit cleanly.
  ASSERT_TRUE(WriteAll(input, parts[2]));
  EXPECT_EQ(servers[1]->Terminate(kWait), 0) << servers[1]->Stderr();
  close(input);

  EXPECT_EQ(cli->Wait(kWait), 1) << cli->Stderr();  // Some invalid rows.
  const std::string got = ReadAll(out);
  EXPECT_EQ(std::count(got.begin(), got.end(), '\n'), 3 * kPart);
  EXPECT_TRUE(got == expected) << "remote output differs from in-process";
  // The killed replica's batches were sent again, and said so.
  EXPECT_THAT(cli->Stderr(),
              HasSubstr(absl::StrCat("server ", addresses[0], " failed")));
  EXPECT_THAT(cli->Stderr(), HasSubstr(absl::StrCat(3 * kPart, " rows")));
  EXPECT_EQ(servers[2]->Terminate(kWait), 0);
}

TEST(Replicas, RunFailsNamingEveryServerWhenNoneIsLeft) {
  TempDir dir;
  dir.Write("in.csv", absl::StrCat(kHeader, CsvRows(1, 10)));
  std::unique_ptr<ServerProcess> server = StartShellwrightd({});
  ASSERT_NE(server, nullptr);
  const std::string address = server->address();
  ASSERT_EQ(server->Terminate(kWait), 0);
  // Both gone: port 1 never listens, and the server above has stopped.
  CommandResult r =
      RunCommand({CliPath(), "--server", absl::StrCat("127.0.0.1:1,", address),
                  "check", dir.File("in.csv"), "--no-progress"},
                 kWait);
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_THAT(r.err, HasSubstr("no server left"));
  EXPECT_THAT(r.err, HasSubstr("127.0.0.1:1: UNAVAILABLE"));
  EXPECT_THAT(r.err, HasSubstr(absl::StrCat(address, ": UNAVAILABLE")));
  EXPECT_TRUE(r.out.empty());
}

TEST(Replicas, EmptyTargetIsAUsageErrorNamingTheFlag) {
  CommandResult r = RunCommand(
      {CliPath(), "--server", "127.0.0.1:1,,127.0.0.1:2", "atom", "Fe"}, kWait);
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_THAT(r.err, HasSubstr("--server: "));
  EXPECT_THAT(r.err, HasSubstr("empty target"));
}

// A unary command goes to the next server when the first is gone.
TEST(Replicas, AtomFallsBackToALiveServer) {
  std::unique_ptr<ServerProcess> server = StartShellwrightd({});
  ASSERT_NE(server, nullptr);
  CommandResult r = RunCommand(
      {CliPath(), "--server", absl::StrCat("127.0.0.1:1,", server->address()),
       "atom", "Fe3+"},
      kWait);
  EXPECT_EQ(r.exit_code, 0) << r.err;
  EXPECT_THAT(r.out, HasSubstr("3d5"));
  EXPECT_EQ(server->Terminate(kWait), 0);
}

}  // namespace
}  // namespace shellwright
