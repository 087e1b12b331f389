#include "server/logging.h"

#include <unistd.h>

#include <atomic>
#include <string>

#include "absl/strings/str_cat.h"
#include "absl/time/clock.h"
#include "absl/time/time.h"

namespace shellwright {
namespace {

std::atomic<int> log_level{static_cast<int>(LogLevel::kInfo)};

}  // namespace

void SetLogLevel(LogLevel level) {
  log_level.store(static_cast<int>(level), std::memory_order_relaxed);
}

bool LogEnabled(LogLevel level) {
  return static_cast<int>(level) <= log_level.load(std::memory_order_relaxed);
}

void Log(LogLevel level, absl::string_view line) {
  if (!LogEnabled(level)) return;
  const std::string text =
      absl::StrCat(absl::FormatTime("%Y-%m-%dT%H:%M:%E6SZ", absl::Now(),
                                    absl::UTCTimeZone()),
                   " ", Name(level), " ", line, "\n");
  // One write per line keeps concurrent lines from interleaving.
  size_t done = 0;
  while (done < text.size()) {
    ssize_t n = ::write(STDERR_FILENO, text.data() + done, text.size() - done);
    if (n <= 0) break;
    done += static_cast<size_t>(n);
  }
}

}  // namespace shellwright
