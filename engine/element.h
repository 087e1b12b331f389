// The periodic table: element properties and lookup by symbol, Z or name.
//
// The data are compiled in from data/elements.tsv (see
// docs/data-sources.md), so lookups need no files at run time.
//
// Lookup rules:
//   - a symbol must have its standard capitalisation ("Fe"); a miscased
//     symbol ("fe", "FE") is rejected with a hint naming the right one,
//     because case carries meaning in chemistry ("Co" is cobalt, "CO" is
//     carbon monoxide);
//   - a name is matched case-insensitively ("iron", "Iron", "IRON"), and the
//     spellings "aluminum", "cesium" and "sulphur" are accepted as well;
//   - a decimal atomic number 1..118 ("26").
//
// Example:
//
//   absl::StatusOr<const shellwright::Element*> fe =
//       shellwright::LookupElement("iron");
//   (*fe)->symbol;         // "Fe"
//   (*fe)->atomic_number;  // 26
//   shellwright::LookupElement("fe").status();
//   // INVALID_ARGUMENT: unknown element 'fe' (element symbols are
//   //                   case-sensitive: did you mean 'Fe'?)
//
// Thread safety: all functions are thread-safe; returned pointers stay
// valid for the life of the program.

#ifndef SHELLWRIGHT_ENGINE_ELEMENT_H_
#define SHELLWRIGHT_ENGINE_ELEMENT_H_

#include <optional>

#include "absl/status/statusor.h"
#include "absl/strings/string_view.h"
#include "absl/types/span.h"
#include "util/enum_names.h"

namespace shellwright {

inline constexpr int kMaxAtomicNumber = 118;

// The block of the subshell that receives the last electron in Madelung
// filling.
enum class Block { kS, kP, kD, kF };

// Named by their letter: "s", "p", "d", "f".
template <>
struct EnumNames<Block> {
  static constexpr absl::string_view kWhat = "block";
  static constexpr NamedValue<Block> kNames[] = {
      {Block::kS, "s"}, {Block::kP, "p"}, {Block::kD, "d"}, {Block::kF, "f"}};
};

struct Element {
  int atomic_number;         // Z, 1..118.
  absl::string_view symbol;  // Standard capitalisation: "Fe".
  absl::string_view name;    // IUPAC English name: "Iron".
  int period;                // 1..7.
  int group;                 // 1..18; 0 for La-Yb and Ac-No (no group).
  Block block;
  // Standard atomic weight (IUPAC, abridged), in daltons. When
  // atomic_weight_is_mass_number is true there is no standard weight and
  // this is the mass number of the longest-lived isotope.
  double standard_atomic_weight;
  bool atomic_weight_is_mass_number;
  // The weight as published, with its significant trailing zeros: "20.180";
  // a mass number in brackets: "[98]".
  absl::string_view atomic_weight_text;
  // Pauling electronegativity, where one is tabulated.
  std::optional<double> pauling_electronegativity;
  // The tabulated value is an estimate (Pm, Eu, Tb, Yb, Am, Rn;
  // data/elements.tsv).
  bool electronegativity_estimated = false;
};

// All 118 elements in order of Z.
absl::Span<const Element> AllElements();

// Element with atomic number `z`; INVALID_ARGUMENT outside 1..118.
absl::StatusOr<const Element*> ElementByAtomicNumber(int z);

// Exact, case-sensitive symbol lookup. Returns nullptr when not found.
// This is the fast path used by the formula and ion-spec parsers.
const Element* FindElementBySymbol(absl::string_view symbol);

// Symbol, atomic number or name, per the rules in the file comment.
// INVALID_ARGUMENT names the input and, for a miscased symbol, the fix.
absl::StatusOr<const Element*> LookupElement(absl::string_view spec);

// Families of anion formers, by atomic number, as the chemistry rules name
// them. Astatine and the superheavy members are left out: no rule here
// knows their chemistry.
//
// P, As, Sb and Bi: group 15 without nitrogen.
constexpr bool IsHeavyPnictogen(int z) {
  return z == 15 || z == 33 || z == 51 || z == 83;
}
// S, Se and Te: group 16 without oxygen (and polonium).
constexpr bool IsHeavyChalcogen(int z) { return z == 16 || z == 34 || z == 52; }
// F, Cl, Br and I.
constexpr bool IsHalogen(int z) {
  return z == 9 || z == 17 || z == 35 || z == 53;
}
// Cl, Br and I: the halogens without fluorine.
constexpr bool IsHeavyHalogen(int z) { return z == 17 || z == 35 || z == 53; }
// Groups 3 to 12 of the d block (the transition metals with zinc's group).
constexpr bool IsTransitionMetal(const Element& e) {
  return e.block == Block::kD && e.group >= 3 && e.group <= 12;
}

}  // namespace shellwright

#endif  // SHELLWRIGHT_ENGINE_ELEMENT_H_
