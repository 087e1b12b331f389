// A fast JSON printer for shellwright.v1 messages, byte-identical to the
// protobuf JSON printer with the CLI's options (proto field names, every
// default-valued primitive field printed, no whitespace).
//
// `check` prints one report per record; the protobuf printer builds a tree
// of default values for every message it prints and costs about 100 µs per
// report here, which would dominate a batch run. This printer walks the
// message with reflection straight into a string. Tests compare its output
// with the protobuf printer's on every kind of field and character.
//
// Example:
//   std::string line;
//   shellwright::cli::AppendCompactJson(report, &line);
//
// Thread safety: thread-safe.

#ifndef SHELLWRIGHT_CLIENTS_CLI_FAST_JSON_H_
#define SHELLWRIGHT_CLIENTS_CLI_FAST_JSON_H_

#include <cstddef>
#include <string>

#include "absl/strings/string_view.h"
#include "google/protobuf/message.h"

namespace shellwright::cli {

// Appends the compact JSON form of `message` to `out`. Map fields and the
// well-known wrapper types are not supported (the shellwright.v1 schema
// uses neither).
void AppendCompactJson(const google::protobuf::Message& message,
                       std::string* out);

// A quoted, escaped JSON string and a JSON number, exactly as the
// protobuf printer writes them (doubles: the shorter of %.15g and %.17g
// that round-trips).
void AppendJsonString(absl::string_view s, std::string* out);
void AppendJsonDouble(double v, std::string* out);

// The same, written at `out`, which must have room for
// JsonStringBound(s.size()) or kJsonDoubleMax bytes; return the end.
constexpr size_t JsonStringBound(size_t size) { return 6 * size + 2; }
inline constexpr size_t kJsonDoubleMax = 40;
char* WriteJsonString(absl::string_view s, char* out);
char* WriteJsonDouble(double v, char* out);

}  // namespace shellwright::cli

#endif  // SHELLWRIGHT_CLIENTS_CLI_FAST_JSON_H_
