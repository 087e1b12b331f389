#include "util/field_names.h"

#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"

namespace shellwright {

std::string RenameField(absl::string_view message,
                        absl::Span<const FieldName> names) {
  for (const FieldName& n : names) {
    if (absl::StartsWith(message, n.field) &&
        message.substr(n.field.size(), 1) == ":") {
      return absl::StrCat(n.name, message.substr(n.field.size()));
    }
  }
  return std::string(message);
}

}  // namespace shellwright
