// SIGINT and SIGTERM as a request to stop, for a program that must end
// cleanly (finish what it started, say what it did) rather than die
// mid-write. The first signal is recorded and makes fd() readable; the
// handler is then reset, so a second signal ends the process at once.
//
// Example:
//
//   std::unique_ptr<shellwright::StopSignals> stop =
//       shellwright::StopSignals::Install();
//   while (stop->signal() == 0 && ...) {
//     // poll() stop->fd() beside a blocking read to wake for the signal.
//   }
//   if (stop->signal() != 0) return 128 + stop->signal();  // 130, 143.
//
// Thread safety: signal(), fd() and Request() are thread-safe. At most one
// instance that installed handlers exists at a time.

#ifndef SHELLWRIGHT_UTIL_STOP_SIGNALS_H_
#define SHELLWRIGHT_UTIL_STOP_SIGNALS_H_

#include <signal.h>

#include <atomic>
#include <memory>

namespace shellwright {

class StopSignals {
 public:
  // Handles SIGINT and SIGTERM until destruction, which restores the
  // previous handlers. nullptr if a StopSignals is already installed or
  // the pipe behind fd() cannot be made.
  static std::unique_ptr<StopSignals> Install();

  // The same request, without handlers: only Request() stops it (tests).
  static std::unique_ptr<StopSignals> WithoutHandlers();

  ~StopSignals();
  StopSignals(const StopSignals&) = delete;
  StopSignals& operator=(const StopSignals&) = delete;

  // 0 until a stop is requested, then the first signal's number.
  int signal() const;

  // Readable once a stop is requested (and from then on).
  int fd() const { return read_fd_; }

  // Requests a stop as if `sig` had arrived.
  void Request(int sig);

 private:
  StopSignals(int read_fd, int write_fd, bool handlers);

  const int read_fd_;
  const int write_fd_;
  const bool handlers_;
  std::atomic<int> requested_{0};  // The signal, without handlers.
  struct sigaction previous_int_ {};
  struct sigaction previous_term_ {};
};

// "SIGINT", "SIGTERM", or "signal N".
const char* StopSignalName(int sig);

}  // namespace shellwright

#endif  // SHELLWRIGHT_UTIL_STOP_SIGNALS_H_
