#include "util/small_file.h"

#include <fstream>
#include <utility>

#include "absl/strings/ascii.h"
#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"

namespace shellwright {

absl::StatusOr<std::string> ReadSmallFile(const std::string& path,
                                          absl::string_view what,
                                          size_t max_bytes) {
  std::ifstream in(path, std::ios::binary);
  if (!in) {
    return absl::InvalidArgumentError(
        absl::StrCat("cannot read ", what, " file '", path, "'"));
  }
  std::string text;
  // Read one byte past the limit so that an oversized file is detected
  // without reading all of it.
  text.resize(max_bytes + 1);
  in.read(text.data(), static_cast<std::streamsize>(text.size()));
  if (in.bad()) {
    return absl::InvalidArgumentError(
        absl::StrCat("cannot read ", what, " file '", path, "'"));
  }
  text.resize(static_cast<size_t>(in.gcount()));
  if (text.size() > max_bytes) {
    return absl::InvalidArgumentError(absl::StrCat(
        what, " file '", path, "' is larger than ", max_bytes, " bytes"));
  }
  return text;
}

absl::StatusOr<std::string> ReadTokenFile(const std::string& path) {
  absl::StatusOr<std::string> text = ReadSmallFile(path, "token");
  if (!text.ok()) return text.status();
  std::string token = std::move(*text);
  while (!token.empty() &&
         absl::ascii_isspace(static_cast<unsigned char>(token.back()))) {
    token.pop_back();
  }
  if (token.empty()) {
    return absl::InvalidArgumentError(
        absl::StrCat("token file '", path, "' is empty"));
  }
  for (char c : token) {
    // Metadata values are printable ASCII; a token with anything else could
    // never be sent, so it is refused up front.
    if (c < 0x21 || c > 0x7e) {
      return absl::InvalidArgumentError(absl::StrCat(
          "token file '", path,
          "' holds characters other than printable ASCII without spaces"));
    }
  }
  return token;
}

absl::StatusOr<std::string> ReadPemFile(const std::string& path) {
  absl::StatusOr<std::string> text = ReadSmallFile(path, "PEM");
  if (!text.ok()) return text.status();
  if (!absl::StrContains(*text, "-----BEGIN ")) {
    return absl::InvalidArgumentError(
        absl::StrCat("file '", path, "' holds no PEM block"));
  }
  return text;
}

}  // namespace shellwright
