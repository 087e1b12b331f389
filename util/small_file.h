// Reading small files whole, with a size bound: bearer tokens, PEM
// certificates and keys. The server, the CLI and the load generator all
// read their credentials through these, so a file is accepted or refused
// by the same rules everywhere.
//
// Messages name the file and what it was for, never its contents.
//
// Example:
//
//   absl::StatusOr<std::string> token =
//       shellwright::ReadTokenFile("/etc/shellwright/token");
//   absl::StatusOr<std::string> ca = shellwright::ReadPemFile("ca.pem");
//
// Thread safety: thread-safe.

#ifndef SHELLWRIGHT_UTIL_SMALL_FILE_H_
#define SHELLWRIGHT_UTIL_SMALL_FILE_H_

#include <cstddef>
#include <string>

#include "absl/status/statusor.h"
#include "absl/strings/string_view.h"

namespace shellwright {

// Largest credential file read, in bytes.
inline constexpr size_t kMaxCredentialFileBytes = 1 << 20;

// The whole file, unchanged. INVALID_ARGUMENT naming `what` ("token",
// "PEM") and the path when it cannot be read or holds more than
// `max_bytes` bytes (found without reading past the bound).
absl::StatusOr<std::string> ReadSmallFile(
    const std::string& path, absl::string_view what,
    size_t max_bytes = kMaxCredentialFileBytes);

// A bearer token: the whole file with trailing whitespace removed.
// INVALID_ARGUMENT when the file is unreadable, empty, too large, or holds
// characters that cannot appear in a metadata value (anything but
// printable ASCII without spaces).
absl::StatusOr<std::string> ReadTokenFile(const std::string& path);

// A PEM file (certificate chain, key or roots). INVALID_ARGUMENT when it
// is unreadable, too large, or holds no "-----BEGIN " block.
absl::StatusOr<std::string> ReadPemFile(const std::string& path);

}  // namespace shellwright

#endif  // SHELLWRIGHT_UTIL_SMALL_FILE_H_
