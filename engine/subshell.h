// Subshells (n, l) and their Pauli capacity.
//
// A subshell is the set of 2(2l+1) spin-orbitals that share a principal
// quantum number n and an orbital quantum number l. The Pauli exclusion
// principle allows at most one electron per spin-orbital, so a subshell holds
// at most Capacity() electrons.
//
// Example:
//
//   shellwright::Subshell d3{3, 2};
//   d3.Capacity();   // 10
//   d3.ToString();   // "3d"
//   shellwright::Subshell::FromIndex(d3.Index()) == d3;  // true
//
// Thread safety: all types and functions here are immutable or pure.

#ifndef SHELLWRIGHT_ENGINE_SUBSHELL_H_
#define SHELLWRIGHT_ENGINE_SUBSHELL_H_

#include <array>
#include <string>

#include "absl/strings/string_view.h"
#include "absl/types/span.h"

namespace shellwright {

// Highest principal quantum number the engine represents. Z = 118 fills to
// 7p; n = 8 leaves room for anions and user-supplied excited configurations.
inline constexpr int kMaxPrincipalQuantumNumber = 8;

// Number of (n, l) pairs with 1 <= n <= kMaxPrincipalQuantumNumber, l < n.
inline constexpr int kNumSubshells =
    kMaxPrincipalQuantumNumber * (kMaxPrincipalQuantumNumber + 1) / 2;

// Spectroscopic letters for l = 0, 1, 2, ... ("s", "p", "d", "f", then
// alphabetical, skipping j as spectroscopists do).
inline constexpr absl::string_view kOrbitalLetters = "spdfghiklmno";

struct Subshell {
  int n = 1;  // Principal quantum number, 1..kMaxPrincipalQuantumNumber.
  int l = 0;  // Orbital angular momentum quantum number, 0..n-1.

  // Pauli capacity 2(2l+1): 2 for s, 6 for p, 10 for d, 14 for f.
  constexpr int Capacity() const { return 2 * (2 * l + 1); }

  // Number of spatial orbitals, 2l+1.
  constexpr int Orbitals() const { return 2 * l + 1; }

  // Dense index in [0, kNumSubshells): n(n-1)/2 + l.
  constexpr int Index() const { return n * (n - 1) / 2 + l; }

  // Inverse of Index(). REQUIRES: 0 <= index < kNumSubshells.
  static constexpr Subshell FromIndex(int index) {
    int n = 1;
    while ((n + 1) * n / 2 <= index) ++n;
    return Subshell{n, index - n * (n - 1) / 2};
  }

  // The spectroscopic letter of l: 's', 'p', 'd', 'f', ...
  constexpr char Letter() const { return kOrbitalLetters[l]; }

  // "3d", "4f".
  std::string ToString() const;

  constexpr bool operator==(const Subshell& o) const {
    return n == o.n && l == o.l;
  }
  constexpr bool operator!=(const Subshell& o) const { return !(*this == o); }
};

// Returns l for a spectroscopic letter ('s' -> 0), or -1 if the letter does
// not name an orbital.
int OrbitalQuantumNumberFromLetter(char letter);

// All kNumSubshells subshells in Madelung order: increasing n + l, then
// increasing n. This is the Aufbau filling order 1s 2s 2p 3s 3p 4s 3d ...
absl::Span<const Subshell> MadelungOrder();

// Position of `s` in MadelungOrder().
int MadelungRank(Subshell s);

}  // namespace shellwright

#endif  // SHELLWRIGHT_ENGINE_SUBSHELL_H_
