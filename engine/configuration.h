// Electron configurations: how many electrons occupy each subshell.
//
// A Configuration is a fixed-size occupancy table over every subshell the
// engine knows (see subshell.h). It enforces the Pauli capacity of each
// subshell, formats itself in the three usual notations, and parses the
// notations users write in their records.
//
// Example:
//
//   absl::StatusOr<shellwright::Configuration> c =
//       shellwright::Configuration::Parse("[Ar] 3d6 4s2");
//   c->electrons();            // 26
//   c->ToCoreNotation();       // "[Ar] 3d6 4s2"
//   c->ToFullNotation();       // "1s2 2s2 2p6 3s2 3p6 3d6 4s2"
//   c->ToFillingOrderNotation();  // "1s2 2s2 2p6 3s2 3p6 4s2 3d6"
//   c->UnpairedElectrons();    // 4 (Hund filling of 3d6)
//
//   shellwright::Configuration::Parse("[Ne] 3s3");
//   // -> INVALID_ARGUMENT "subshell 3s holds 3 electrons, above its Pauli
//   //    capacity of 2"
//
// Thread safety: Configuration is a value type; const methods may be called
// concurrently.

#ifndef SHELLWRIGHT_ENGINE_CONFIGURATION_H_
#define SHELLWRIGHT_ENGINE_CONFIGURATION_H_

#include <array>
#include <cstdint>
#include <limits>
#include <string>
#include <vector>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "absl/strings/string_view.h"
#include "engine/subshell.h"

namespace shellwright {

// Longest configuration string Parse() accepts, in bytes.
inline constexpr size_t kMaxConfigurationLength = 512;

class Configuration {
 public:
  // The empty configuration (a bare nucleus).
  Configuration() { occupancy_.fill(0); }

  // Fills `electrons` electrons in Madelung order, each subshell to its Pauli
  // capacity before the next. REQUIRES: 0 <= electrons <= MaxElectrons().
  static Configuration Madelung(int electrons);

  // Total capacity of all represented subshells.
  static int MaxElectrons();

  // Parses noble-gas-core ("[Ar] 3d5 4s1") or full ("1s2 2s2 2p6") notation.
  // Tokens are separated by spaces; a core, if any, comes first; subshells
  // may come in any order but each at most once; occupancies may use ASCII
  // or Unicode superscript digits ("3d⁵"). Errors (INVALID_ARGUMENT) name the
  // offending token: an unknown core, a malformed token, l >= n, a subshell
  // listed twice or already inside the core, or an occupancy above the Pauli
  // capacity.
  static absl::StatusOr<Configuration> Parse(absl::string_view text);

  // Electrons in subshell `s`.
  int occupancy(Subshell s) const { return occupancy_[s.Index()]; }

  // Sets the occupancy of `s`. Returns INVALID_ARGUMENT, leaving the
  // configuration unchanged, when `electrons` is negative or above the Pauli
  // capacity of `s`.
  absl::Status SetOccupancy(Subshell s, int electrons);

  // Total number of electrons.
  int electrons() const;

  // Occupied subshells, ordered by n then l.
  std::vector<Subshell> OccupiedSubshells() const;

  // Partly filled subshells (0 < electrons < capacity), ordered by n then l.
  std::vector<Subshell> OpenSubshells() const;

  // True when every subshell is empty or full.
  bool IsClosedShell() const;

  // Noble-gas-core notation: the largest noble-gas core ([He], [Ne], [Ar],
  // [Kr], [Xe], [Rn], [Og]) whose subshells are all full and that has at
  // most `max_core_electrons` electrons, then the remaining occupied
  // subshells ordered by n then l. A configuration that is exactly a core
  // prints as the core ("[Ar]" for Ti4+), except a lone 1s2 which prints as
  // "1s2". A neutral noble-gas atom passes Z - 1 so that argon prints as
  // "[Ne] 3s2 3p6" rather than "[Ar]". Empty configuration: "".
  std::string ToCoreNotation(
      int max_core_electrons = std::numeric_limits<int>::max()) const;

  // Every occupied subshell, ordered by n then l: "1s2 2s2 2p6 3s1".
  std::string ToFullNotation() const;

  // Every occupied subshell in Madelung filling order: "... 4s2 3d6".
  std::string ToFillingOrderNotation() const;

  // Unpaired electrons when each open subshell is filled by Hund's first
  // rule (one electron per orbital before any pairing).
  int UnpairedElectrons() const;

  bool operator==(const Configuration& o) const {
    return occupancy_ == o.occupancy_;
  }
  bool operator!=(const Configuration& o) const { return !(*this == o); }

 private:
  std::array<uint8_t, kNumSubshells> occupancy_;
};

// Unpaired electrons in a subshell of orbital quantum number l holding
// `electrons` electrons under Hund's first rule.
// REQUIRES: 0 <= electrons <= 2(2l+1).
constexpr int HundUnpairedElectrons(int l, int electrons) {
  const int orbitals = 2 * l + 1;
  return electrons <= orbitals ? electrons : 2 * orbitals - electrons;
}

// A noble-gas core usable in core notation.
struct NobleGasCore {
  absl::string_view symbol;  // "Ar"
  int electrons;             // 18
};

// The cores in increasing size: He, Ne, Ar, Kr, Xe, Rn, Og.
absl::Span<const NobleGasCore> NobleGasCores();

}  // namespace shellwright

#endif  // SHELLWRIGHT_ENGINE_CONFIGURATION_H_
