#include "util/subprocess.h"

#include <fcntl.h>
#include <poll.h>
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include <fstream>
#include <sstream>
#include <thread>

namespace shellwright {
namespace {

using Clock = std::chrono::steady_clock;

// Spawn(): the child shares this process's stream.
constexpr int kInherit = -2;

// The exit code of a wait status, as documented in the header.
int ExitCode(int status) {
  if (WIFEXITED(status)) return WEXITSTATUS(status);
  if (WIFSIGNALED(status)) return 128 + WTERMSIG(status);
  return -1;
}

// Forks and execs argv[0] with `in`, `out` and `err` as its standard
// streams (-1: /dev/null; kInherit: this process's). Returns the child's pid,
// or -1. Everything the child needs is prepared before fork(): a threaded
// parent's child may only make async-signal-safe calls.
pid_t Spawn(const std::vector<std::string>& argv, int in, int out, int err) {
  std::vector<char*> args;
  for (const std::string& a : argv)
    args.push_back(const_cast<char*>(a.c_str()));
  args.push_back(nullptr);
  sigset_t none;
  sigemptyset(&none);
  const pid_t pid = fork();
  if (pid != 0) return pid;
  const int null = open("/dev/null", O_RDWR | O_CLOEXEC);
  dup2(in >= 0 ? in : null, STDIN_FILENO);
  dup2(out >= 0 ? out : null, STDOUT_FILENO);
  if (err != kInherit) dup2(err >= 0 ? err : null, STDERR_FILENO);
  // The test runner may block signals; the child must not inherit that.
  sigprocmask(SIG_SETMASK, &none, nullptr);
  execv(args[0], args.data());
  _exit(127);
}

int RemainingMillis(Clock::time_point deadline) {
  const auto left = std::chrono::duration_cast<std::chrono::milliseconds>(
      deadline - Clock::now());
  return left.count() < 0 ? 0 : static_cast<int>(left.count());
}

}  // namespace

CommandResult RunCommand(const std::vector<std::string>& argv,
                         const std::string& stdin_text,
                         std::chrono::milliseconds timeout) {
  CommandResult result;
  int in[2], out[2], err[2];
  if (pipe2(in, O_CLOEXEC) != 0) return result;
  if (pipe2(out, O_CLOEXEC) != 0 || pipe2(err, O_CLOEXEC) != 0) {
    close(in[0]);
    close(in[1]);
    return result;
  }
  const pid_t pid = Spawn(argv, in[0], out[1], err[1]);
  close(in[0]);
  close(out[1]);
  close(err[1]);
  if (pid < 0) {
    for (int fd : {in[1], out[0], err[0]}) close(fd);
    return result;
  }
  // Feed standard input and drain both outputs without deadlocking.
  fcntl(in[1], F_SETFL, O_NONBLOCK);
  size_t written = 0;
  bool in_open = true, out_open = true, err_open = true;
  if (stdin_text.empty()) {
    close(in[1]);
    in_open = false;
  }
  const Clock::time_point deadline = Clock::now() + timeout;
  bool timed_out = false;
  char buf[65536];
  while (out_open || err_open) {
    pollfd fds[3];
    int n = 0, out_i = -1, err_i = -1, in_i = -1;
    if (out_open) {
      fds[n] = {out[0], POLLIN, 0};
      out_i = n++;
    }
    if (err_open) {
      fds[n] = {err[0], POLLIN, 0};
      err_i = n++;
    }
    if (in_open) {
      fds[n] = {in[1], POLLOUT, 0};
      in_i = n++;
    }
    const int ready = poll(fds, n, RemainingMillis(deadline));
    if (ready == 0) {
      timed_out = true;
      break;
    }
    if (ready < 0) continue;  // EINTR.
    auto drain = [&](int i, int fd, bool* open, std::string* to) {
      if (i < 0 || fds[i].revents == 0) return;
      const ssize_t r = read(fd, buf, sizeof(buf));
      if (r <= 0) {
        *open = false;
      } else {
        to->append(buf, static_cast<size_t>(r));
      }
    };
    drain(out_i, out[0], &out_open, &result.out);
    drain(err_i, err[0], &err_open, &result.err);
    if (in_i >= 0 && fds[in_i].revents != 0) {
      const ssize_t w = write(in[1], stdin_text.data() + written,
                              stdin_text.size() - written);
      if (w > 0) written += static_cast<size_t>(w);
      if (w < 0 || written == stdin_text.size()) {
        close(in[1]);
        in_open = false;
      }
    }
  }
  if (in_open) close(in[1]);
  close(out[0]);
  close(err[0]);
  int status = 0;
  if (timed_out) {
    kill(pid, SIGKILL);
    waitpid(pid, &status, 0);
    return result;  // exit_code stays -1.
  }
  // Both outputs closed: the child is exiting (or handed them on); wait
  // for it within what is left of the deadline.
  while (true) {
    const pid_t done = waitpid(pid, &status, WNOHANG);
    if (done == pid) {
      result.exit_code = ExitCode(status);
      return result;
    }
    if (Clock::now() >= deadline) break;
    std::this_thread::sleep_for(std::chrono::milliseconds(2));
  }
  kill(pid, SIGKILL);
  waitpid(pid, &status, 0);
  return result;
}

CommandResult RunCommand(const std::vector<std::string>& argv,
                         std::chrono::milliseconds timeout) {
  return RunCommand(argv, "", timeout);
}

std::unique_ptr<ChildProcess> ChildProcess::Start(
    const std::vector<std::string>& argv, const std::string& stderr_file) {
  int out[2];
  if (pipe2(out, O_CLOEXEC) != 0) return nullptr;
  int err = kInherit;
  if (!stderr_file.empty()) {
    err = open(stderr_file.c_str(), O_WRONLY | O_CREAT | O_TRUNC | O_CLOEXEC,
               0600);
    if (err < 0) {
      close(out[0]);
      close(out[1]);
      return nullptr;
    }
  }
  const pid_t pid = Spawn(argv, -1, out[1], err);
  close(out[1]);
  if (err >= 0) close(err);
  if (pid < 0) {
    close(out[0]);
    return nullptr;
  }
  fcntl(out[0], F_SETFL, O_NONBLOCK);
  return std::unique_ptr<ChildProcess>(
      new ChildProcess(pid, out[0], stderr_file));
}

ChildProcess::ChildProcess(pid_t pid, int stdout_fd, std::string stderr_file)
    : pid_(pid), stdout_fd_(stdout_fd), stderr_file_(std::move(stderr_file)) {}

ChildProcess::~ChildProcess() {
  if (!exit_code_.has_value()) {
    kill(pid_, SIGKILL);
    int status;
    waitpid(pid_, &status, 0);
  }
  close(stdout_fd_);
}

std::optional<std::string> ChildProcess::WaitForLine(
    const std::string& prefix, std::chrono::milliseconds timeout) {
  const Clock::time_point deadline = Clock::now() + timeout;
  while (true) {
    size_t start = 0;
    for (size_t nl; (nl = stdout_.find('\n', start)) != std::string::npos;
         start = nl + 1) {
      if (stdout_.compare(start, prefix.size(), prefix) == 0) {
        std::string rest =
            stdout_.substr(start + prefix.size(), nl - start - prefix.size());
        stdout_.erase(0, nl + 1);
        return rest;
      }
    }
    const int left = RemainingMillis(deadline);
    if (left == 0) return std::nullopt;
    pollfd p{stdout_fd_, POLLIN, 0};
    if (poll(&p, 1, left) <= 0) continue;
    char buf[4096];
    const ssize_t n = read(stdout_fd_, buf, sizeof(buf));
    if (n == 0) return std::nullopt;
    if (n > 0) stdout_.append(buf, static_cast<size_t>(n));
  }
}

std::optional<int> ChildProcess::TryWait() {
  if (exit_code_.has_value()) return exit_code_;
  int status = 0;
  if (waitpid(pid_, &status, WNOHANG) == pid_) exit_code_ = ExitCode(status);
  return exit_code_;
}

int ChildProcess::Wait(std::chrono::milliseconds timeout) {
  const Clock::time_point deadline = Clock::now() + timeout;
  while (true) {
    if (std::optional<int> code = TryWait()) return *code;
    if (Clock::now() >= deadline) break;
    std::this_thread::sleep_for(std::chrono::milliseconds(5));
  }
  kill(pid_, SIGKILL);
  int status;
  waitpid(pid_, &status, 0);
  exit_code_ = -1;
  return -1;
}

int ChildProcess::SignalAndWait(int sig, std::chrono::milliseconds timeout) {
  if (!exit_code_.has_value()) kill(pid_, sig);
  return Wait(timeout);
}

std::string ChildProcess::DrainStdout() {
  char buf[4096];
  ssize_t n;
  while ((n = read(stdout_fd_, buf, sizeof(buf))) > 0) {
    stdout_.append(buf, static_cast<size_t>(n));
  }
  return stdout_;
}

std::string ChildProcess::Stderr() const {
  if (stderr_file_.empty()) return "";
  std::ifstream in(stderr_file_, std::ios::binary);
  std::ostringstream text;
  text << in.rdbuf();
  return text.str();
}

}  // namespace shellwright
