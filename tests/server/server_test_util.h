// Helpers for the shellwrightd tests: a real server on a free loopback port,
// a raw loopback socket, and test certificates made with the openssl CLI.
// Child processes and temporary directories come from tests/testing/.
//
// Every wait here has a deadline, so a hung server fails a test instead of
// hanging the suite.
//
// Example:
//
//   shellwright::testing::TempDir dir;
//   auto server = shellwright::testing::StartShellwrightd({"--log-level",
//                                                          "debug"});
//   ASSERT_NE(server, nullptr);
//   auto channel = grpc::CreateChannel(server->address(),
//                                      grpc::InsecureChannelCredentials());
//   ...
//   EXPECT_EQ(server->Terminate(), 0);  // SIGTERM, then the exit status.
//
// Thread safety: none; use each object from one thread.

#ifndef SHELLWRIGHT_TESTS_SERVER_SERVER_TEST_UTIL_H_
#define SHELLWRIGHT_TESTS_SERVER_SERVER_TEST_UTIL_H_

#include <arpa/inet.h>
#include <netinet/in.h>
#include <signal.h>
#include <sys/socket.h>
#include <unistd.h>

#include <chrono>
#include <cstdlib>
#include <memory>
#include <optional>
#include <random>
#include <string>
#include <vector>

#include "absl/strings/str_cat.h"
#include "gtest/gtest.h"
#include "shellwright/v1/electron_structure.pb.h"
#include "tests/testing/subprocess.h"
#include "tests/testing/temp_dir.h"

namespace shellwright::testing {

inline std::string ShellwrightdPath() { return BinPath("server/shellwrightd"); }
inline std::string CliPath() { return BinPath("clients/shellwright"); }

// Sanitizers slow every call several times over; deadlines that state a
// target for the release build are stretched by this factor under them
// (TSan: 5-15x, on a busy machine).
#if defined(__SANITIZE_THREAD__)
#define SHELLWRIGHT_TSAN 1
#endif
#if defined(__SANITIZE_ADDRESS__)
#define SHELLWRIGHT_ASAN 1
#endif
#if defined(__has_feature)
#if __has_feature(thread_sanitizer)
#define SHELLWRIGHT_TSAN 1
#endif
#if __has_feature(address_sanitizer)
#define SHELLWRIGHT_ASAN 1
#endif
#endif
// kShutdownSlowdown: gRPC's own shutdown (Server::Shutdown and Wait) takes
// seconds under the sanitizers on a loaded 2-core machine (seen: 2.5 s
// under TSan for what takes milliseconds in the release build). Bounds on
// shutdown time are stretched by this factor; each test's hard work is
// far longer than its stretched bound, so the bound still tells a stopped
// call from one left running.
#if defined(SHELLWRIGHT_TSAN)
inline constexpr int kSanitizerSlowdown = 30;
inline constexpr int kShutdownSlowdown = 10;
#elif defined(SHELLWRIGHT_ASAN)
inline constexpr int kSanitizerSlowdown = 10;
inline constexpr int kShutdownSlowdown = 4;
#else
inline constexpr int kSanitizerSlowdown = 1;
inline constexpr int kShutdownSlowdown = 1;
#endif

// `records` records of a formula whose solver search takes about 2 ms
// each in the release build and about 50 ms under TSan: a full batch of
// 10,000 is about 20 s of work, and minutes under the sanitizers.
inline v1::RecordBatch HardRecordBatch(int records) {
  v1::RecordBatch batch;
  for (int i = 0; i < records; ++i) {
    v1::CompositionRecord* record = batch.add_records();
    record->set_id(absl::StrCat("hard-", i));
    record->set_formula("TiVCrMnFeCoNiCuNbMoWRuO8.37");
    record->set_max_alternatives(5);
  }
  return batch;
}

// A running shellwrightd on a free loopback port.
class ServerProcess {
 public:
  const std::string& address() const { return address_; }
  int port() const { return port_; }
  ChildProcess& process() { return *process_; }
  std::string Stderr() const { return process_->Stderr(); }

  // SIGTERM, then the exit status (see ChildProcess::Wait).
  int Terminate(std::chrono::milliseconds timeout = std::chrono::seconds(20)) {
    return process_->SignalAndWait(SIGTERM, timeout);
  }

 private:
  friend std::unique_ptr<ServerProcess> StartShellwrightd(
      const std::vector<std::string>& flags, const TempDir* log_dir);
  std::unique_ptr<ChildProcess> process_;
  std::unique_ptr<TempDir> own_dir_;
  std::string address_;
  int port_ = 0;
};

inline constexpr char kListeningPrefix[] = "shellwrightd listening on ";

// Starts the real shellwrightd with --listen 127.0.0.1:0 plus `flags`, and
// waits (10 s at most) for its listening line. Returns nullptr and fails
// the test if it does not come up. Stderr goes to a file in `log_dir` (or a
// private temporary directory).
inline std::unique_ptr<ServerProcess> StartShellwrightd(
    const std::vector<std::string>& flags, const TempDir* log_dir = nullptr) {
  auto server = std::make_unique<ServerProcess>();
  if (log_dir == nullptr) {
    server->own_dir_ = std::make_unique<TempDir>();
    log_dir = server->own_dir_.get();
  }
  std::vector<std::string> argv = {ShellwrightdPath(), "--listen",
                                   "127.0.0.1:0"};
  argv.insert(argv.end(), flags.begin(), flags.end());
  server->process_ =
      ChildProcess::Start(argv, log_dir->File("shellwrightd.stderr"));
  if (server->process_ == nullptr) {
    ADD_FAILURE() << "cannot start " << ShellwrightdPath();
    return nullptr;
  }
  std::optional<std::string> address =
      server->process_->WaitForLine(kListeningPrefix, std::chrono::seconds(10));
  if (!address.has_value()) {
    ADD_FAILURE() << "shellwrightd did not come up; stderr:\n"
                  << server->process_->Stderr();
    return nullptr;
  }
  server->address_ = *address;
  server->port_ = std::atoi(address->substr(address->rfind(':') + 1).c_str());
  if (address->rfind("127.0.0.1:", 0) != 0 || server->port_ <= 0) {
    ADD_FAILURE() << "unexpected listening address '" << *address << "'";
    return nullptr;
  }
  return server;
}

// Opens a TCP connection to 127.0.0.1:port, writes `bytes`, and closes it.
// Returns false if the connection could not be made.
inline bool SendRawBytes(int port, const std::string& bytes) {
  int fd = socket(AF_INET, SOCK_STREAM, 0);
  if (fd < 0) return false;
  sockaddr_in addr{};
  addr.sin_family = AF_INET;
  addr.sin_port = htons(static_cast<uint16_t>(port));
  addr.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
  if (connect(fd, reinterpret_cast<sockaddr*>(&addr), sizeof(addr)) != 0) {
    close(fd);
    return false;
  }
  timeval tv{2, 0};
  setsockopt(fd, SOL_SOCKET, SO_SNDTIMEO, &tv, sizeof(tv));
  size_t done = 0;
  while (done < bytes.size()) {
    ssize_t n =
        send(fd, bytes.data() + done, bytes.size() - done, MSG_NOSIGNAL);
    if (n <= 0) break;  // The server may hang up on junk; that is fine.
    done += static_cast<size_t>(n);
  }
  close(fd);
  return true;
}

// `n` pseudo-random bytes from a fixed seed, so failures reproduce.
inline std::string RandomBytes(size_t n, uint32_t seed) {
  std::mt19937 rng(seed);
  std::string bytes(n, '\0');
  for (char& c : bytes) c = static_cast<char>(rng() & 0xff);
  return bytes;
}

// Test certificates made with the openssl CLI, all in one directory.
struct TestPki {
  std::string ca_cert;      // CA that signs the server and client.
  std::string server_cert;  // CN=localhost, SAN localhost + 127.0.0.1.
  std::string server_key;
  std::string client_cert;  // Signed by ca_cert.
  std::string client_key;
  std::string other_ca_cert;      // An unrelated CA.
  std::string other_client_cert;  // Signed by other_ca_cert.
  std::string other_client_key;
};

// Makes a TestPki in `dir`. Returns nullopt (and fails the test) if any
// openssl command fails.
inline std::optional<TestPki> MakeTestPki(const TempDir& dir) {
  const std::string d = dir.path();
  auto run = [&](const std::vector<std::string>& argv) {
    CommandResult r = RunCommand(argv, std::chrono::seconds(30));
    if (r.exit_code != 0) {
      std::string joined;
      for (const std::string& a : argv) joined += a + " ";
      ADD_FAILURE() << "failed: " << joined << "\n" << r.err;
      return false;
    }
    return true;
  };
  const std::string openssl = "/usr/bin/openssl";
  auto make_ca = [&](const std::string& name) {
    return run({openssl, "req", "-x509", "-newkey", "rsa:2048", "-nodes",
                "-sha256", "-days", "2", "-subj",
                "/CN=Shellwright Test " + name, "-keyout",
                d + "/" + name + ".key", "-out", d + "/" + name + ".pem"});
  };
  auto make_leaf = [&](const std::string& name, const std::string& ca,
                       const std::string& cn, const std::string& ext) {
    dir.Write(name + ".ext", ext);
    return run({openssl, "req", "-new", "-newkey", "rsa:2048", "-nodes",
                "-subj", "/CN=" + cn, "-keyout", d + "/" + name + ".key",
                "-out", d + "/" + name + ".csr"}) &&
           run({openssl, "x509", "-req", "-sha256", "-days", "2", "-in",
                d + "/" + name + ".csr", "-CA", d + "/" + ca + ".pem", "-CAkey",
                d + "/" + ca + ".key", "-CAcreateserial", "-extfile",
                d + "/" + name + ".ext", "-out", d + "/" + name + ".pem"});
  };
  const std::string server_ext =
      "basicConstraints=CA:FALSE\n"
      "keyUsage=digitalSignature,keyEncipherment\n"
      "extendedKeyUsage=serverAuth\n"
      "subjectAltName=DNS:localhost,IP:127.0.0.1\n";
  const std::string client_ext =
      "basicConstraints=CA:FALSE\n"
      "keyUsage=digitalSignature,keyEncipherment\n"
      "extendedKeyUsage=clientAuth\n";
  if (!make_ca("ca") || !make_ca("other-ca") ||
      !make_leaf("server", "ca", "localhost", server_ext) ||
      !make_leaf("client", "ca", "shellwright-test-client", client_ext) ||
      !make_leaf("other-client", "other-ca", "intruder", client_ext)) {
    return std::nullopt;
  }
  TestPki pki;
  pki.ca_cert = d + "/ca.pem";
  pki.server_cert = d + "/server.pem";
  pki.server_key = d + "/server.key";
  pki.client_cert = d + "/client.pem";
  pki.client_key = d + "/client.key";
  pki.other_ca_cert = d + "/other-ca.pem";
  pki.other_client_cert = d + "/other-client.pem";
  pki.other_client_key = d + "/other-client.key";
  return pki;
}

}  // namespace shellwright::testing

#endif  // SHELLWRIGHT_TESTS_SERVER_SERVER_TEST_UTIL_H_
