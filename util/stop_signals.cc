#include "util/stop_signals.h"

#include <fcntl.h>
#include <unistd.h>

#include <atomic>
#include <cerrno>

namespace shellwright {
namespace {

// The handler's view of the installed instance. Plain lock-free atomics:
// a signal handler may touch nothing else.
std::atomic<int> g_signal{0};
std::atomic<int> g_write_fd{-1};
std::atomic<bool> g_installed{false};

static_assert(std::atomic<int>::is_always_lock_free);

void Record(std::atomic<int>* first, int sig, int write_fd) {
  int expected = 0;
  first->compare_exchange_strong(expected, sig);
  if (write_fd >= 0) {
    const int saved = errno;
    const char byte = 1;
    // The pipe is non-blocking: one byte is enough, a full pipe is fine.
    [[maybe_unused]] ssize_t n = write(write_fd, &byte, 1);
    errno = saved;
  }
}

void OnSignal(int sig) { Record(&g_signal, sig, g_write_fd.load()); }

}  // namespace

StopSignals::StopSignals(int read_fd, int write_fd, bool handlers)
    : read_fd_(read_fd), write_fd_(write_fd), handlers_(handlers) {}

std::unique_ptr<StopSignals> StopSignals::Install() {
  bool expected = false;
  if (!g_installed.compare_exchange_strong(expected, true)) return nullptr;
  int fds[2];
  if (pipe2(fds, O_CLOEXEC | O_NONBLOCK) != 0) {
    g_installed = false;
    return nullptr;
  }
  std::unique_ptr<StopSignals> stop(
      new StopSignals(fds[0], fds[1], /*handlers=*/true));
  g_signal = 0;
  g_write_fd = fds[1];
  struct sigaction action {};
  action.sa_handler = OnSignal;
  sigemptyset(&action.sa_mask);
  // No SA_RESTART: a blocking call returns EINTR. SA_RESETHAND: a second
  // signal takes its default action and ends the process.
  action.sa_flags = SA_RESETHAND;
  sigaction(SIGINT, &action, &stop->previous_int_);
  sigaction(SIGTERM, &action, &stop->previous_term_);
  return stop;
}

std::unique_ptr<StopSignals> StopSignals::WithoutHandlers() {
  int fds[2];
  if (pipe2(fds, O_CLOEXEC | O_NONBLOCK) != 0) return nullptr;
  return std::unique_ptr<StopSignals>(
      new StopSignals(fds[0], fds[1], /*handlers=*/false));
}

StopSignals::~StopSignals() {
  if (handlers_) {
    sigaction(SIGINT, &previous_int_, nullptr);
    sigaction(SIGTERM, &previous_term_, nullptr);
    g_write_fd = -1;
    g_installed = false;
  }
  close(read_fd_);
  close(write_fd_);
}

int StopSignals::signal() const {
  return handlers_ ? g_signal.load() : requested_.load();
}

void StopSignals::Request(int sig) {
  Record(handlers_ ? &g_signal : &requested_, sig, write_fd_);
}

const char* StopSignalName(int sig) {
  switch (sig) {
    case SIGINT:
      return "SIGINT";
    case SIGTERM:
      return "SIGTERM";
    default:
      return "a signal";
  }
}

}  // namespace shellwright
