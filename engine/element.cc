#include "engine/element.h"

#include <array>
#include <string>

#include "absl/container/flat_hash_map.h"
#include "absl/strings/ascii.h"
#include "absl/strings/str_cat.h"
#include "engine/internal/data_tables.h"
#include "engine/internal/text.h"

namespace shellwright {
namespace {

using internal::QuoteForMessage;

// Slot of a symbol in ElementIndex::by_symbol, or -1 when the text cannot
// be a symbol (wrong length or case).
int SymbolSlot(absl::string_view symbol) {
  if (symbol.empty() || symbol.size() > 3) return -1;
  const int c0 = symbol[0] - 'A';
  if (c0 < 0 || c0 >= 26) return -1;
  int c1 = 0, c2 = 0;
  if (symbol.size() >= 2) {
    c1 = symbol[1] - 'a' + 1;
    if (c1 < 1 || c1 > 26) return -1;
  }
  if (symbol.size() == 3) {
    c2 = symbol[2] - 'a' + 1;
    if (c2 < 1 || c2 > 26) return -1;
  }
  return (c0 * 27 + c1) * 27 + c2;
}

struct ElementIndex {
  std::array<Element, kMaxAtomicNumber> elements;
  // Symbols are one capital and up to two lowercase letters: a direct
  // table indexed by the letters is faster than hashing, and symbol
  // lookup is on every formula's hot path. Atomic numbers (0 for none),
  // not pointers: 19 KB instead of 150 KB for a process to zero.
  std::array<uint8_t, 26 * 27 * 27> by_symbol{};
  absl::flat_hash_map<std::string, const Element*> by_lower_symbol;
  absl::flat_hash_map<std::string, const Element*> by_lower_name;
};

const ElementIndex& Index() {
  static const ElementIndex* const kIndex = [] {
    auto* index = new ElementIndex;
    const auto rows = internal::ElementRows();
    for (size_t i = 0; i < rows.size() && i < kMaxAtomicNumber; ++i) {
      const internal::ElementRow& r = rows[i];
      Element& e = index->elements[i];
      e.atomic_number = r.atomic_number;
      e.symbol = r.symbol;
      e.name = r.name;
      e.period = r.period;
      e.group = r.group;
      // compile_tables has checked the letter.
      e.block =
          ParseName<Block>(absl::string_view(&r.block, 1)).value_or(Block::kS);
      e.standard_atomic_weight = r.standard_atomic_weight;
      e.atomic_weight_is_mass_number = r.weight_is_mass_number;
      e.atomic_weight_text = r.weight_text;
      if (r.has_electronegativity) {
        e.pauling_electronegativity = r.pauling_electronegativity;
      }
      e.electronegativity_estimated = r.electronegativity_estimated;
      index->by_symbol[SymbolSlot(e.symbol)] =
          static_cast<uint8_t>(e.atomic_number);
      index->by_lower_symbol[internal::AsciiLower(e.symbol)] = &e;
      index->by_lower_name[internal::AsciiLower(e.name)] = &e;
    }
    // Common alternative spellings.
    index->by_lower_name["aluminum"] = &index->elements[12];
    index->by_lower_name["cesium"] = &index->elements[54];
    index->by_lower_name["sulphur"] = &index->elements[15];
    return index;
  }();
  return *kIndex;
}

}  // namespace

absl::Span<const Element> AllElements() { return Index().elements; }

absl::StatusOr<const Element*> ElementByAtomicNumber(int z) {
  if (z < 1 || z > kMaxAtomicNumber) {
    return absl::InvalidArgumentError(absl::StrCat(
        "atomic number ", z, " is out of range (1 to ", kMaxAtomicNumber, ")"));
  }
  return &Index().elements[z - 1];
}

const Element* FindElementBySymbol(absl::string_view symbol) {
  const int slot = SymbolSlot(symbol);
  if (slot < 0) return nullptr;
  const ElementIndex& index = Index();
  const int z = index.by_symbol[slot];
  return z == 0 ? nullptr : &index.elements[z - 1];
}

absl::StatusOr<const Element*> LookupElement(absl::string_view spec) {
  if (spec.empty()) {
    return absl::InvalidArgumentError("element is empty");
  }
  if (spec.size() > 64) {
    return absl::InvalidArgumentError(
        absl::StrCat("unknown element ", QuoteForMessage(spec), " (too long)"));
  }
  if (absl::ascii_isdigit(static_cast<unsigned char>(spec[0]))) {
    int z = 0;
    for (char c : spec) {
      if (!absl::ascii_isdigit(static_cast<unsigned char>(c))) {
        return absl::InvalidArgumentError(
            absl::StrCat("unknown element ", QuoteForMessage(spec),
                         " (an atomic number must be a whole number)"));
      }
      if (z <= 1000) z = z * 10 + (c - '0');
    }
    if (z > 1000) {
      return absl::InvalidArgumentError(
          absl::StrCat("atomic number ", QuoteForMessage(spec),
                       " is out of range (1 to ", kMaxAtomicNumber, ")"));
    }
    return ElementByAtomicNumber(z);
  }
  if (const Element* e = FindElementBySymbol(spec)) return e;
  const ElementIndex& index = Index();
  const std::string lower = internal::AsciiLower(spec);
  if (auto it = index.by_lower_name.find(lower);
      it != index.by_lower_name.end()) {
    return it->second;
  }
  if (auto it = index.by_lower_symbol.find(lower);
      it != index.by_lower_symbol.end()) {
    return absl::InvalidArgumentError(
        absl::StrCat("unknown element ", QuoteForMessage(spec),
                     " (element symbols are case-sensitive: did you mean '",
                     it->second->symbol, "'?)"));
  }
  return absl::InvalidArgumentError(
      absl::StrCat("unknown element ", QuoteForMessage(spec),
                   " (expected a symbol such as Fe, an atomic number 1-118, "
                   "or a name such as iron)"));
}

}  // namespace shellwright
