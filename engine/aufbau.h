// Ground configurations of neutral atoms and of ions.
//
// Neutral atoms fill by the Madelung rule (increasing n + l, then n), with
// the measured exceptions of data/configuration_exceptions.tsv applied. Ions
// follow the chemical (in-compound) convention:
//   - cations lose electrons from the valence subshells outside the atom's
//     noble-gas core first, highest n first and, within one n, highest l
//     first (4s before 3d; 6s, then 5d, then 4f in the lanthanides); only
//     when those are empty do electrons come from the core, in the same order;
//   - anions add electrons to the first subshell that is not full, in
//     Madelung order, down to a charge of -kMaxAnionCharge.
//
// Example:
//
//   shellwright::NeutralGroundConfiguration(24)->ToCoreNotation();
//   // "[Ar] 3d5 4s1" (measured exception)
//   shellwright::IonConfiguration(26, 3)->ToCoreNotation();   // "[Ar] 3d5"
//   shellwright::IonConfiguration(58, 3)->ToCoreNotation();   // "[Xe] 4f1"
//   shellwright::IonConfiguration(8, -2)->ToCoreNotation();   // "[Ne]"
//
// Thread safety: all functions are thread-safe.

#ifndef SHELLWRIGHT_ENGINE_AUFBAU_H_
#define SHELLWRIGHT_ENGINE_AUFBAU_H_

#include "absl/status/statusor.h"
#include "absl/strings/string_view.h"
#include "engine/configuration.h"
#include "engine/element.h"

namespace shellwright {

// Most negative charge accepted for an anion is -kMaxAnionCharge. Carbide
// C4- and silicide Si4- are the most negative monatomic anions in common
// use; beyond that no monatomic anion is known (common practice, no source).
inline constexpr int kMaxAnionCharge = 4;

// Ground configuration of the neutral atom with atomic number `z`.
// INVALID_ARGUMENT outside 1..118.
absl::StatusOr<Configuration> NeutralGroundConfiguration(int z);

// The source of a measured departure from Madelung filling for element `z`,
// or an empty view when `z` follows the Madelung rule.
absl::string_view MadelungExceptionSource(int z);

// OK when an ion of `element` with net charge `charge` can exist in this
// model: no more electrons removed than the atom has, and no anion beyond
// -kMaxAnionCharge. INVALID_ARGUMENT names the element and the charge.
absl::Status CheckIonCharge(const Element& element, int charge);

// Configuration of the ion of element `z` with net charge `charge`
// (positive for cations). INVALID_ARGUMENT when the charge removes more
// electrons than the atom has or is below -kMaxAnionCharge. charge == z, a
// bare nucleus, is allowed.
absl::StatusOr<Configuration> IonConfiguration(int z, int charge);

// Electrons of the largest noble-gas core below `z` (0 for H and He).
int CoreElectronsBelow(int z);

}  // namespace shellwright

#endif  // SHELLWRIGHT_ENGINE_AUFBAU_H_
