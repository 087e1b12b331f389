// Putting a binary's own names into a library's error message.
//
// Libraries start an INVALID_ARGUMENT message (a caller's mistake) with the
// field to fix, by the field's own name: "spec: unknown element 'Xx'",
// "key_file: missing; cert_file and key_file go together". A binary that
// took the field from a flag or an argument swaps in the name its user
// typed ("--tls-key: missing; ..."), so a message points at what to change
// in the caller's own words.
//
// Example:
//
//   shellwright::RenameField("cert_file: needed by client_ca_file",
//                            {{"cert_file", "--tls-cert"},
//                             {"key_file", "--tls-key"}});
//   // "--tls-cert: needed by client_ca_file"
//
// Thread safety: pure function.

#ifndef SHELLWRIGHT_UTIL_FIELD_NAMES_H_
#define SHELLWRIGHT_UTIL_FIELD_NAMES_H_

#include <string>

#include "absl/strings/string_view.h"
#include "absl/types/span.h"

namespace shellwright {

// A library's field name and the name a binary uses for it.
struct FieldName {
  absl::string_view field;
  absl::string_view name;
};

// `message` with its leading "<field>:" replaced by "<name>:" when the field
// is one of `names`; otherwise `message` unchanged.
std::string RenameField(absl::string_view message,
                        absl::Span<const FieldName> names);

}  // namespace shellwright

#endif  // SHELLWRIGHT_UTIL_FIELD_NAMES_H_
