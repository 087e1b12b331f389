// Running other programs: the tests run the project's binaries (the CLI,
// the server, the table compiler) and tools such as openssl, and the load
// generator starts the servers it measures. Every wait is bounded by a
// deadline, so a hung child fails a test instead of hanging the suite.
//
// Exit codes mean the same everywhere here: the child's exit status,
// 128 + N when signal N killed it, and -1 when it did not finish in time
// (it is then killed) or could not be started.
//
// Example:
//
//   shellwright::CommandResult r =
//       shellwright::RunCommand({"/usr/bin/openssl", "version"});
//   // r.exit_code == 0, r.out == "OpenSSL 3.0..."
//
//   auto server = shellwright::ChildProcess::Start(
//       {"build/server/shellwrightd", "--listen", "127.0.0.1:0"},
//       "/tmp/server.stderr");
//   std::optional<std::string> address = server->WaitForLine(
//       "shellwrightd listening on ", std::chrono::seconds(10));
//
// Thread safety: none; use each object from one thread.

#ifndef SHELLWRIGHT_UTIL_SUBPROCESS_H_
#define SHELLWRIGHT_UTIL_SUBPROCESS_H_

#include <sys/types.h>

#include <chrono>
#include <memory>
#include <optional>
#include <string>
#include <vector>

namespace shellwright {

// Timeout of RunCommand when none is given.
inline constexpr std::chrono::seconds kDefaultCommandTimeout{120};

struct CommandResult {
  int exit_code = -1;  // See the file comment.
  std::string out;     // Standard output.
  std::string err;     // Standard error.
};

// Runs argv[0] (a path) with the arguments, feeding `stdin_text` on its
// standard input, and waits at most `timeout` for it to finish.
CommandResult RunCommand(
    const std::vector<std::string>& argv, const std::string& stdin_text = "",
    std::chrono::milliseconds timeout = kDefaultCommandTimeout);
CommandResult RunCommand(const std::vector<std::string>& argv,
                         std::chrono::milliseconds timeout);

// A long-running child: standard output on a pipe read with WaitForLine,
// standard error in a file (so that it never blocks) or, when no file is
// given, shared with this process; no standard input. Killed (SIGKILL) on
// destruction if still running.
class ChildProcess {
 public:
  // Starts argv[0] with the arguments; nullptr if it cannot be started.
  static std::unique_ptr<ChildProcess> Start(
      const std::vector<std::string>& argv,
      const std::string& stderr_file = "");

  ~ChildProcess();
  ChildProcess(const ChildProcess&) = delete;
  ChildProcess& operator=(const ChildProcess&) = delete;

  pid_t pid() const { return pid_; }

  // Reads standard output until a line starting with `prefix` arrives;
  // returns the rest of that line, or nullopt after `timeout` or at the end
  // of the output. Lines before it are consumed.
  std::optional<std::string> WaitForLine(const std::string& prefix,
                                         std::chrono::milliseconds timeout);

  // The exit code if the child has finished, without blocking.
  std::optional<int> TryWait();

  // Waits up to `timeout` for the child to finish; returns its exit code
  // (-1 on timeout, when the child is killed).
  int Wait(std::chrono::milliseconds timeout);

  // Sends `sig`, then Wait(timeout).
  int SignalAndWait(int sig, std::chrono::milliseconds timeout);

  // Standard output not yet consumed by WaitForLine, including what is
  // still in the pipe.
  std::string DrainStdout();

  // Standard error so far ("" when it is shared with this process).
  std::string Stderr() const;

 private:
  ChildProcess(pid_t pid, int stdout_fd, std::string stderr_file);

  pid_t pid_;
  int stdout_fd_;
  std::string stderr_file_;
  std::string stdout_;
  std::optional<int> exit_code_;
};

}  // namespace shellwright

#endif  // SHELLWRIGHT_UTIL_SUBPROCESS_H_
