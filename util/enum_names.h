// One name table per enum, and the generic Name() / ParseName() that read
// it, instead of a pair of hand-written switch functions per enum. The
// command-line parsers take their allowed values from the same tables
// (NameList), so a flag, a record field and a report always agree.
//
// An enum opts in by specialising EnumNames next to its declaration:
//   - kWhat: what a value is, for messages ("geometry");
//   - kNames: every enumerator with its one canonical name;
//   - kAliases (optional): extra spellings that ParseName also accepts.
//
// Example:
//
//   enum class Shade { kLight, kDark };
//   template <>
//   struct EnumNames<Shade> {
//     static constexpr absl::string_view kWhat = "shade";
//     static constexpr NamedValue<Shade> kNames[] = {
//         {Shade::kLight, "light"}, {Shade::kDark, "dark"}};
//   };
//   Name(Shade::kDark);         // "dark"
//   ParseName<Shade>("light");  // Shade::kLight
//   ParseName<Shade>("grey");   // INVALID_ARGUMENT: unknown shade 'grey'
//                               //   (expected light or dark)
//
// Thread safety: pure functions over constant tables.

#ifndef SHELLWRIGHT_UTIL_ENUM_NAMES_H_
#define SHELLWRIGHT_UTIL_ENUM_NAMES_H_

#include <iterator>
#include <string>
#include <type_traits>
#include <vector>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/string_view.h"
#include "util/utf8.h"

namespace shellwright {

template <typename E>
struct NamedValue {
  E value;
  absl::string_view name;
};

// Specialised for each named enum; see the file comment.
template <typename E>
struct EnumNames;

namespace enum_names_internal {

template <typename E, typename = void>
struct HasAliases : std::false_type {};
template <typename E>
struct HasAliases<E, std::void_t<decltype(EnumNames<E>::kAliases)>>
    : std::true_type {};

}  // namespace enum_names_internal

// The canonical name of `value`; "" for a value outside the table (an
// enumerator someone forgot to name, which the tests of each table catch).
template <typename E>
constexpr absl::string_view Name(E value) {
  for (const NamedValue<E>& entry : EnumNames<E>::kNames) {
    if (entry.value == value) return entry.name;
  }
  return "";
}

// The canonical names in table order: "free, octahedral, ..." for help
// texts and messages.
template <typename E>
std::vector<std::string> NameList() {
  std::vector<std::string> names;
  for (const NamedValue<E>& entry : EnumNames<E>::kNames) {
    names.emplace_back(entry.name);
  }
  return names;
}

// "a, b or c": the canonical names for a message.
template <typename E>
std::string NamesForMessage() {
  std::string out;
  const size_t n = std::size(EnumNames<E>::kNames);
  for (size_t i = 0; i < n; ++i) {
    if (i > 0) out += i + 1 == n ? " or " : ", ";
    absl::StrAppend(&out, EnumNames<E>::kNames[i].name);
  }
  return out;
}

// The value named `text` (a canonical name or an alias, matched exactly).
// INVALID_ARGUMENT otherwise, quoting the text and listing the names.
template <typename E>
absl::StatusOr<E> ParseName(absl::string_view text) {
  for (const NamedValue<E>& entry : EnumNames<E>::kNames) {
    if (entry.name == text) return entry.value;
  }
  if constexpr (enum_names_internal::HasAliases<E>::value) {
    for (const NamedValue<E>& entry : EnumNames<E>::kAliases) {
      if (entry.name == text) return entry.value;
    }
  }
  return absl::InvalidArgumentError(
      absl::StrCat("unknown ", EnumNames<E>::kWhat, " ", QuoteForMessage(text),
                   " (expected ", NamesForMessage<E>(), ")"));
}

}  // namespace shellwright

#endif  // SHELLWRIGHT_UTIL_ENUM_NAMES_H_
