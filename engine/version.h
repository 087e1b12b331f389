// The project version and the versions of the data tables compiled in,
// which every binary prints for --version.
//
// A table's version is the start of the SHA-256 of its TSV file, so two
// builds give the same answers exactly when their versions agree.
//
// Example:
//
//   std::cout << shellwright::VersionText("shellwright");
//   // shellwright 0.1.0
//   //   data/elements.tsv sha256:3f0c2a9b81d4
//   //   ...
//
// Thread safety: constants.

#ifndef SHELLWRIGHT_ENGINE_VERSION_H_
#define SHELLWRIGHT_ENGINE_VERSION_H_

#include <string>

#include "absl/strings/string_view.h"
#include "absl/types/span.h"

namespace shellwright {

struct TableVersion {
  absl::string_view table;    // "elements.tsv".
  absl::string_view version;  // "sha256:" and 12 hex digits.
};

// "0.1.0", from CMakeLists.txt's project().
absl::string_view ProjectVersion();

// One entry per table in data/ that is compiled in, in build order.
absl::Span<const TableVersion> TableVersions();

// "PROGRAM VERSION" and one line per table, each line ending in '\n'.
std::string VersionText(absl::string_view program);

}  // namespace shellwright

#endif  // SHELLWRIGHT_ENGINE_VERSION_H_
