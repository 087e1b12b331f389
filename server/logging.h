// shellwrightd's log: one process-wide level, and lines written whole to
// stderr as "<UTC time> <level> <text>", so that lines from concurrent calls
// never interleave.
//
// Example:
//
//   shellwright::SetLogLevel(shellwright::LogLevel::kWarning);
//   shellwright::Log(shellwright::LogLevel::kInfo, "not written");
//   shellwright::Log(shellwright::LogLevel::kError, "cannot bind");
//   // 2026-12-02T15:04:05.123456Z error cannot bind
//
// Thread safety: all functions are thread-safe.

#ifndef SHELLWRIGHT_SERVER_LOGGING_H_
#define SHELLWRIGHT_SERVER_LOGGING_H_

#include "absl/strings/string_view.h"
#include "util/enum_names.h"

namespace shellwright {

// Most severe first: a level writes its own lines and those above it.
enum class LogLevel { kError = 0, kWarning = 1, kInfo = 2, kDebug = 3 };

template <>
struct EnumNames<LogLevel> {
  static constexpr absl::string_view kWhat = "log level";
  static constexpr NamedValue<LogLevel> kNames[] = {
      {LogLevel::kError, "error"},
      {LogLevel::kWarning, "warning"},
      {LogLevel::kInfo, "info"},
      {LogLevel::kDebug, "debug"}};
};

// Sets the most verbose level written; the default is kInfo.
void SetLogLevel(LogLevel level);

// True when lines at `level` are written.
bool LogEnabled(LogLevel level);

// Writes "<UTC time> <level> <line>\n" to stderr in one write when `level`
// is enabled. `line` is written as given: escape client-controlled text
// before passing it.
void Log(LogLevel level, absl::string_view line);

}  // namespace shellwright

#endif  // SHELLWRIGHT_SERVER_LOGGING_H_
