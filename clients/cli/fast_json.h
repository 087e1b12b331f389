// JSON strings and numbers written exactly as the protobuf JSON printer
// writes them, fast, into raw buffers: `check`'s report lines
// (clients/cli/report_lines.h) are built from these, one report per input
// row, where the protobuf printer would cost about 100 µs per report.
//   - Strings: quoted; short escapes for \b \t \n \f \r \" and \\;
//     \u00XX for other control characters, DEL, '<' and '>'; \u2028 and
//     \u2029; other valid UTF-8 as is.
//   - Doubles: %.15g when that reads back as the same value, else %.17g;
//     NaN and infinities as the strings "NaN", "Infinity", "-Infinity".
// Tests compare both with the protobuf printer and with printf.
//
// Example:
//   char buf[shellwright::cli::kJsonDoubleMax];
//   char* end = shellwright::cli::WriteJsonDouble(0.1 + 0.2, buf);
//   // [buf, end) is 0.30000000000000004
//
// Thread safety: thread-safe.

#ifndef SHELLWRIGHT_CLIENTS_CLI_FAST_JSON_H_
#define SHELLWRIGHT_CLIENTS_CLI_FAST_JSON_H_

#include <cstddef>
#include <cstdint>
#include <cstring>
#include <string>

#include "absl/strings/string_view.h"

namespace shellwright::cli {

// Write `s` quoted and escaped, or `v`, at `out`, which must have room for
// JsonStringBound(s.size()) or kJsonDoubleMax bytes; return the end. The
// bytes past the end, within that room, may be overwritten.
constexpr size_t JsonStringBound(size_t size) { return 6 * size + 2; }
inline constexpr size_t kJsonDoubleMax = 40;
char* WriteJsonString(absl::string_view s, char* out);
char* WriteJsonDouble(double v, char* out);

// Copies n <= 16 bytes from `from` to `to` with at most two fixed-size
// moves each way (overlapping where n is not a power of two) instead of a
// call, reading and writing no byte past from + n and to + n.
inline void CopyShortText(const char* from, size_t n, char* to) {
  if (n >= 8) {
    uint64_t head, tail;
    std::memcpy(&head, from, 8);
    std::memcpy(&tail, from + n - 8, 8);
    std::memcpy(to, &head, 8);
    std::memcpy(to + n - 8, &tail, 8);
  } else if (n >= 4) {
    uint32_t head, tail;
    std::memcpy(&head, from, 4);
    std::memcpy(&tail, from + n - 4, 4);
    std::memcpy(to, &head, 4);
    std::memcpy(to + n - 4, &tail, 4);
  } else if (n > 0) {
    // 1 to 3 bytes: the first, the middle and the last.
    to[0] = from[0];
    to[n / 2] = from[n / 2];
    to[n - 1] = from[n - 1];
  }
}

}  // namespace shellwright::cli

#endif  // SHELLWRIGHT_CLIENTS_CLI_FAST_JSON_H_
