// Helpers for the shellwrightd tests: child processes with bounded waits,
// temporary directories, a raw loopback socket, and test certificates made
// with the openssl CLI.
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
#include <fcntl.h>
#include <netinet/in.h>
#include <poll.h>
#include <signal.h>
#include <sys/socket.h>
#include <sys/stat.h>
#include <sys/types.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <cstdlib>
#include <fstream>
#include <memory>
#include <optional>
#include <random>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

#include "absl/strings/str_cat.h"
#include "gtest/gtest.h"
#include "shellwright/v1/electron_structure.pb.h"

namespace shellwright::testing {

// `records` records of a formula whose solver search takes tens of
// milliseconds each: a full batch of them is minutes of work.
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

// The build tree root: $SHELLWRIGHT_BIN_DIR when set, else the build tree
// this test was compiled in (SHELLWRIGHT_DEFAULT_BIN_DIR, set by
// tests/server/CMakeLists.txt).
inline std::string BinDir() {
  const char* dir = std::getenv("SHELLWRIGHT_BIN_DIR");
  if (dir != nullptr && *dir != '\0') return dir;
#ifdef SHELLWRIGHT_DEFAULT_BIN_DIR
  return SHELLWRIGHT_DEFAULT_BIN_DIR;
#else
  return std::string();
#endif
}

inline std::string ShellwrightdPath() {
  return BinDir() + "/server/shellwrightd";
}
inline std::string CliPath() { return BinDir() + "/clients/shellwright"; }

// A fresh directory under $TMPDIR, removed with its files on destruction.
class TempDir {
 public:
  TempDir() {
    const char* base = std::getenv("TMPDIR");
    std::string pattern =
        std::string(base != nullptr ? base : "/tmp") + "/shellwright-XXXXXX";
    std::vector<char> buf(pattern.begin(), pattern.end());
    buf.push_back('\0');
    if (mkdtemp(buf.data()) != nullptr) path_ = buf.data();
  }
  ~TempDir() {
    if (!path_.empty()) {
      std::string command = "rm -rf '" + path_ + "'";
      int ignored = std::system(command.c_str());
      (void)ignored;
    }
  }
  TempDir(const TempDir&) = delete;
  TempDir& operator=(const TempDir&) = delete;

  const std::string& path() const { return path_; }
  std::string File(const std::string& name) const { return path_ + "/" + name; }

  // Writes `contents` to File(name) and returns its path.
  std::string Write(const std::string& name, const std::string& contents,
                    mode_t mode = 0600) const {
    std::string file = File(name);
    std::ofstream(file, std::ios::binary) << contents;
    chmod(file.c_str(), mode);
    return file;
  }

 private:
  std::string path_;
};

inline std::string ReadFile(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  std::ostringstream buf;
  buf << in.rdbuf();
  return buf.str();
}

// A child process with stdout on a pipe and stderr in a file.
class ChildProcess {
 public:
  // Starts argv[0] with `argv`. Returns nullptr (and fails the test) if
  // fork or exec fails.
  static std::unique_ptr<ChildProcess> Start(
      const std::vector<std::string>& argv, const std::string& stderr_file) {
    int out[2];
    if (pipe2(out, O_CLOEXEC) != 0) {
      ADD_FAILURE() << "pipe failed";
      return nullptr;
    }
    // Everything the child needs is built before fork(): after fork() in a
    // threaded process only async-signal-safe calls are allowed.
    std::vector<char*> args;
    for (const std::string& a : argv) {
      args.push_back(const_cast<char*>(a.c_str()));
    }
    args.push_back(nullptr);
    sigset_t none;
    sigemptyset(&none);
    pid_t pid = fork();
    if (pid < 0) {
      ADD_FAILURE() << "fork failed";
      return nullptr;
    }
    if (pid == 0) {
      dup2(out[1], STDOUT_FILENO);
      int err = open(stderr_file.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0600);
      if (err >= 0) dup2(err, STDERR_FILENO);
      close(out[0]);
      close(out[1]);
      // The test runner may have signals blocked; the child must not
      // inherit that.
      sigprocmask(SIG_SETMASK, &none, nullptr);
      execv(args[0], args.data());
      _exit(127);
    }
    close(out[1]);
    fcntl(out[0], F_SETFL, O_NONBLOCK);
    return std::unique_ptr<ChildProcess>(
        new ChildProcess(pid, out[0], stderr_file));
  }

  ~ChildProcess() {
    if (pid_ > 0 && !exit_status_.has_value()) {
      kill(pid_, SIGKILL);
      int status;
      waitpid(pid_, &status, 0);
    }
    if (stdout_fd_ >= 0) close(stdout_fd_);
  }
  ChildProcess(const ChildProcess&) = delete;
  ChildProcess& operator=(const ChildProcess&) = delete;

  pid_t pid() const { return pid_; }

  // Reads stdout until a line starting with `prefix` arrives; returns the
  // rest of that line, or nullopt after `timeout` or at end of output.
  std::optional<std::string> WaitForLine(const std::string& prefix,
                                         std::chrono::milliseconds timeout) {
    const auto deadline = std::chrono::steady_clock::now() + timeout;
    while (true) {
      size_t start = 0;
      for (size_t nl; (nl = stdout_.find('\n', start)) != std::string::npos;
           start = nl + 1) {
        std::string line = stdout_.substr(start, nl - start);
        if (line.rfind(prefix, 0) == 0) {
          stdout_.erase(0, nl + 1);
          return line.substr(prefix.size());
        }
      }
      auto left = std::chrono::duration_cast<std::chrono::milliseconds>(
          deadline - std::chrono::steady_clock::now());
      if (left.count() <= 0) return std::nullopt;
      pollfd p{stdout_fd_, POLLIN, 0};
      if (poll(&p, 1, static_cast<int>(left.count())) <= 0) continue;
      char buf[4096];
      ssize_t n = read(stdout_fd_, buf, sizeof(buf));
      if (n == 0) return std::nullopt;
      if (n > 0) stdout_.append(buf, static_cast<size_t>(n));
    }
  }

  // The exit status if the child has exited (see Wait), without blocking.
  std::optional<int> TryWait() {
    if (exit_status_.has_value()) return exit_status_;
    int status = 0;
    if (waitpid(pid_, &status, WNOHANG) == pid_) {
      exit_status_ =
          WIFEXITED(status) ? WEXITSTATUS(status) : 128 + WTERMSIG(status);
    }
    return exit_status_;
  }

  // Waits up to `timeout` for the exit. Returns the exit code, 128 + signal
  // for a signal death, or -1 on timeout (the child is then killed).
  int Wait(std::chrono::milliseconds timeout) {
    const auto deadline = std::chrono::steady_clock::now() + timeout;
    while (true) {
      if (std::optional<int> status = TryWait()) return *status;
      if (std::chrono::steady_clock::now() >= deadline) break;
      std::this_thread::sleep_for(std::chrono::milliseconds(5));
    }
    kill(pid_, SIGKILL);
    int status;
    waitpid(pid_, &status, 0);
    exit_status_ = -1;
    return -1;
  }

  // Sends `sig` and waits up to `timeout` for the exit status.
  int SignalAndWait(int sig, std::chrono::milliseconds timeout) {
    if (!exit_status_.has_value()) kill(pid_, sig);
    return Wait(timeout);
  }

  std::string Stderr() const { return ReadFile(stderr_file_); }

  // Stdout read so far and not consumed by WaitForLine, plus anything
  // still in the pipe.
  std::string DrainStdout() {
    char buf[4096];
    ssize_t n;
    while ((n = read(stdout_fd_, buf, sizeof(buf))) > 0) {
      stdout_.append(buf, static_cast<size_t>(n));
    }
    return stdout_;
  }

 private:
  ChildProcess(pid_t pid, int stdout_fd, std::string stderr_file)
      : pid_(pid),
        stdout_fd_(stdout_fd),
        stderr_file_(std::move(stderr_file)) {}

  pid_t pid_;
  int stdout_fd_;
  std::string stderr_file_;
  std::string stdout_;
  std::optional<int> exit_status_;
};

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
  if (server->process_ == nullptr) return nullptr;
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

struct CommandResult {
  int exit_code = -1;  // -1: did not finish within the timeout.
  std::string out;
  std::string err;
};

// Runs `argv` to completion (killed after `timeout`), capturing output.
inline CommandResult RunCommand(
    const std::vector<std::string>& argv,
    std::chrono::milliseconds timeout = std::chrono::seconds(30)) {
  TempDir dir;
  CommandResult result;
  std::unique_ptr<ChildProcess> child =
      ChildProcess::Start(argv, dir.File("stderr"));
  if (child == nullptr) return result;
  const auto deadline = std::chrono::steady_clock::now() + timeout;
  // Drain stdout while waiting, so a chatty child cannot fill the pipe.
  while (true) {
    child->DrainStdout();
    if (std::optional<int> status = child->TryWait()) {
      result.exit_code = *status;
      break;
    }
    if (std::chrono::steady_clock::now() >= deadline) {
      result.exit_code = child->Wait(std::chrono::milliseconds(0));
      break;
    }
    std::this_thread::sleep_for(std::chrono::milliseconds(2));
  }
  result.out = child->DrainStdout();
  result.err = child->Stderr();
  return result;
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
