// Reference table of neutral-atom ground-state electron configurations for
// Z = 1..118. The engine's configuration builder is tested against it. The
// values were written down independently of the engine code. Z <= 103 are the
// measured ground configurations from the NIST Atomic Spectra Database
// (recalled from memory). Z >= 104 have no measured ground configuration, so
// they are Madelung-filling predictions and are marked that way in `source`.
//
// Notation: the largest noble-gas core that is wholly contained is written in
// brackets. The remaining occupied subshells follow, ordered by n and then by
// l. Empty subshells are never written. A noble gas is written with the
// previous noble gas as its core (Ne = "[He] 2s2 2p6"). He is "1s2".

#ifndef SHELLWRIGHT_TESTS_ENGINE_REFERENCE_CONFIGURATIONS_H_
#define SHELLWRIGHT_TESTS_ENGINE_REFERENCE_CONFIGURATIONS_H_

#include <cstddef>

namespace shellwright::testing {

struct ReferenceConfiguration {
  int atomic_number;
  const char* symbol;
  // Noble-gas-core notation, subshells ordered by n then l.
  const char* configuration;
  const char* source;
};

inline constexpr ReferenceConfiguration kReferenceConfigurations[] = {
    // Period 1.
    {1, "H", "1s1", "NIST ASD ground states, from memory"},
    {2, "He", "1s2", "NIST ASD ground states, from memory"},
    // Period 2.
    {3, "Li", "[He] 2s1", "NIST ASD ground states, from memory"},
    {4, "Be", "[He] 2s2", "NIST ASD ground states, from memory"},
    {5, "B", "[He] 2s2 2p1", "NIST ASD ground states, from memory"},
    {6, "C", "[He] 2s2 2p2", "NIST ASD ground states, from memory"},
    {7, "N", "[He] 2s2 2p3", "NIST ASD ground states, from memory"},
    {8, "O", "[He] 2s2 2p4", "NIST ASD ground states, from memory"},
    {9, "F", "[He] 2s2 2p5", "NIST ASD ground states, from memory"},
    {10, "Ne", "[He] 2s2 2p6", "NIST ASD ground states, from memory"},
    // Period 3.
    {11, "Na", "[Ne] 3s1", "NIST ASD ground states, from memory"},
    {12, "Mg", "[Ne] 3s2", "NIST ASD ground states, from memory"},
    {13, "Al", "[Ne] 3s2 3p1", "NIST ASD ground states, from memory"},
    {14, "Si", "[Ne] 3s2 3p2", "NIST ASD ground states, from memory"},
    {15, "P", "[Ne] 3s2 3p3", "NIST ASD ground states, from memory"},
    {16, "S", "[Ne] 3s2 3p4", "NIST ASD ground states, from memory"},
    {17, "Cl", "[Ne] 3s2 3p5", "NIST ASD ground states, from memory"},
    {18, "Ar", "[Ne] 3s2 3p6", "NIST ASD ground states, from memory"},
    // Period 4.
    {19, "K", "[Ar] 4s1", "NIST ASD ground states, from memory"},
    {20, "Ca", "[Ar] 4s2", "NIST ASD ground states, from memory"},
    {21, "Sc", "[Ar] 3d1 4s2", "NIST ASD ground states, from memory"},
    {22, "Ti", "[Ar] 3d2 4s2", "NIST ASD ground states, from memory"},
    {23, "V", "[Ar] 3d3 4s2", "NIST ASD ground states, from memory"},
    {24, "Cr", "[Ar] 3d5 4s1", "NIST ASD ground states, from memory"},
    {25, "Mn", "[Ar] 3d5 4s2", "NIST ASD ground states, from memory"},
    {26, "Fe", "[Ar] 3d6 4s2", "NIST ASD ground states, from memory"},
    {27, "Co", "[Ar] 3d7 4s2", "NIST ASD ground states, from memory"},
    {28, "Ni", "[Ar] 3d8 4s2", "NIST ASD ground states, from memory"},
    {29, "Cu", "[Ar] 3d10 4s1", "NIST ASD ground states, from memory"},
    {30, "Zn", "[Ar] 3d10 4s2", "NIST ASD ground states, from memory"},
    {31, "Ga", "[Ar] 3d10 4s2 4p1", "NIST ASD ground states, from memory"},
    {32, "Ge", "[Ar] 3d10 4s2 4p2", "NIST ASD ground states, from memory"},
    {33, "As", "[Ar] 3d10 4s2 4p3", "NIST ASD ground states, from memory"},
    {34, "Se", "[Ar] 3d10 4s2 4p4", "NIST ASD ground states, from memory"},
    {35, "Br", "[Ar] 3d10 4s2 4p5", "NIST ASD ground states, from memory"},
    {36, "Kr", "[Ar] 3d10 4s2 4p6", "NIST ASD ground states, from memory"},
    // Period 5.
    {37, "Rb", "[Kr] 5s1", "NIST ASD ground states, from memory"},
    {38, "Sr", "[Kr] 5s2", "NIST ASD ground states, from memory"},
    {39, "Y", "[Kr] 4d1 5s2", "NIST ASD ground states, from memory"},
    {40, "Zr", "[Kr] 4d2 5s2", "NIST ASD ground states, from memory"},
    {41, "Nb", "[Kr] 4d4 5s1", "NIST ASD ground states, from memory"},
    {42, "Mo", "[Kr] 4d5 5s1", "NIST ASD ground states, from memory"},
    {43, "Tc", "[Kr] 4d5 5s2", "NIST ASD ground states, from memory"},
    {44, "Ru", "[Kr] 4d7 5s1", "NIST ASD ground states, from memory"},
    {45, "Rh", "[Kr] 4d8 5s1", "NIST ASD ground states, from memory"},
    {46, "Pd", "[Kr] 4d10", "NIST ASD ground states, from memory"},
    {47, "Ag", "[Kr] 4d10 5s1", "NIST ASD ground states, from memory"},
    {48, "Cd", "[Kr] 4d10 5s2", "NIST ASD ground states, from memory"},
    {49, "In", "[Kr] 4d10 5s2 5p1", "NIST ASD ground states, from memory"},
    {50, "Sn", "[Kr] 4d10 5s2 5p2", "NIST ASD ground states, from memory"},
    {51, "Sb", "[Kr] 4d10 5s2 5p3", "NIST ASD ground states, from memory"},
    {52, "Te", "[Kr] 4d10 5s2 5p4", "NIST ASD ground states, from memory"},
    {53, "I", "[Kr] 4d10 5s2 5p5", "NIST ASD ground states, from memory"},
    {54, "Xe", "[Kr] 4d10 5s2 5p6", "NIST ASD ground states, from memory"},
    // Period 6.
    {55, "Cs", "[Xe] 6s1", "NIST ASD ground states, from memory"},
    {56, "Ba", "[Xe] 6s2", "NIST ASD ground states, from memory"},
    {57, "La", "[Xe] 5d1 6s2", "NIST ASD ground states, from memory"},
    {58, "Ce", "[Xe] 4f1 5d1 6s2", "NIST ASD ground states, from memory"},
    {59, "Pr", "[Xe] 4f3 6s2", "NIST ASD ground states, from memory"},
    {60, "Nd", "[Xe] 4f4 6s2", "NIST ASD ground states, from memory"},
    {61, "Pm", "[Xe] 4f5 6s2", "NIST ASD ground states, from memory"},
    {62, "Sm", "[Xe] 4f6 6s2", "NIST ASD ground states, from memory"},
    {63, "Eu", "[Xe] 4f7 6s2", "NIST ASD ground states, from memory"},
    {64, "Gd", "[Xe] 4f7 5d1 6s2", "NIST ASD ground states, from memory"},
    {65, "Tb", "[Xe] 4f9 6s2", "NIST ASD ground states, from memory"},
    {66, "Dy", "[Xe] 4f10 6s2", "NIST ASD ground states, from memory"},
    {67, "Ho", "[Xe] 4f11 6s2", "NIST ASD ground states, from memory"},
    {68, "Er", "[Xe] 4f12 6s2", "NIST ASD ground states, from memory"},
    {69, "Tm", "[Xe] 4f13 6s2", "NIST ASD ground states, from memory"},
    {70, "Yb", "[Xe] 4f14 6s2", "NIST ASD ground states, from memory"},
    {71, "Lu", "[Xe] 4f14 5d1 6s2", "NIST ASD ground states, from memory"},
    {72, "Hf", "[Xe] 4f14 5d2 6s2", "NIST ASD ground states, from memory"},
    {73, "Ta", "[Xe] 4f14 5d3 6s2", "NIST ASD ground states, from memory"},
    {74, "W", "[Xe] 4f14 5d4 6s2", "NIST ASD ground states, from memory"},
    {75, "Re", "[Xe] 4f14 5d5 6s2", "NIST ASD ground states, from memory"},
    {76, "Os", "[Xe] 4f14 5d6 6s2", "NIST ASD ground states, from memory"},
    {77, "Ir", "[Xe] 4f14 5d7 6s2", "NIST ASD ground states, from memory"},
    {78, "Pt", "[Xe] 4f14 5d9 6s1", "NIST ASD ground states, from memory"},
    {79, "Au", "[Xe] 4f14 5d10 6s1", "NIST ASD ground states, from memory"},
    {80, "Hg", "[Xe] 4f14 5d10 6s2", "NIST ASD ground states, from memory"},
    {81, "Tl", "[Xe] 4f14 5d10 6s2 6p1", "NIST ASD ground states, from memory"},
    {82, "Pb", "[Xe] 4f14 5d10 6s2 6p2", "NIST ASD ground states, from memory"},
    {83, "Bi", "[Xe] 4f14 5d10 6s2 6p3", "NIST ASD ground states, from memory"},
    {84, "Po", "[Xe] 4f14 5d10 6s2 6p4", "NIST ASD ground states, from memory"},
    {85, "At", "[Xe] 4f14 5d10 6s2 6p5", "NIST ASD ground states, from memory"},
    {86, "Rn", "[Xe] 4f14 5d10 6s2 6p6", "NIST ASD ground states, from memory"},
    // Period 7, measured (Z <= 103).
    {87, "Fr", "[Rn] 7s1", "NIST ASD ground states, from memory"},
    {88, "Ra", "[Rn] 7s2", "NIST ASD ground states, from memory"},
    {89, "Ac", "[Rn] 6d1 7s2", "NIST ASD ground states, from memory"},
    {90, "Th", "[Rn] 6d2 7s2", "NIST ASD ground states, from memory"},
    {91, "Pa", "[Rn] 5f2 6d1 7s2", "NIST ASD ground states, from memory"},
    {92, "U", "[Rn] 5f3 6d1 7s2", "NIST ASD ground states, from memory"},
    {93, "Np", "[Rn] 5f4 6d1 7s2", "NIST ASD ground states, from memory"},
    {94, "Pu", "[Rn] 5f6 7s2", "NIST ASD ground states, from memory"},
    {95, "Am", "[Rn] 5f7 7s2", "NIST ASD ground states, from memory"},
    {96, "Cm", "[Rn] 5f7 6d1 7s2", "NIST ASD ground states, from memory"},
    {97, "Bk", "[Rn] 5f9 7s2", "NIST ASD ground states, from memory"},
    {98, "Cf", "[Rn] 5f10 7s2", "NIST ASD ground states, from memory"},
    {99, "Es", "[Rn] 5f11 7s2", "NIST ASD ground states, from memory"},
    {100, "Fm", "[Rn] 5f12 7s2", "NIST ASD ground states, from memory"},
    {101, "Md", "[Rn] 5f13 7s2", "NIST ASD ground states, from memory"},
    {102, "No", "[Rn] 5f14 7s2", "NIST ASD ground states, from memory"},
    // Lr: 7p1, not 6d1. NIST lists [Rn] 5f14 7s2 7p1 as the ground state.
    {103, "Lr", "[Rn] 5f14 7s2 7p1", "NIST ASD ground states, from memory"},
    // Period 7, not measured (Z >= 104): Madelung-filling predictions.
    {104, "Rf", "[Rn] 5f14 6d2 7s2",
     "prediction, not measured; Madelung filling, from memory"},
    {105, "Db", "[Rn] 5f14 6d3 7s2",
     "prediction, not measured; Madelung filling, from memory"},
    {106, "Sg", "[Rn] 5f14 6d4 7s2",
     "prediction, not measured; Madelung filling, from memory"},
    {107, "Bh", "[Rn] 5f14 6d5 7s2",
     "prediction, not measured; Madelung filling, from memory"},
    {108, "Hs", "[Rn] 5f14 6d6 7s2",
     "prediction, not measured; Madelung filling, from memory"},
    {109, "Mt", "[Rn] 5f14 6d7 7s2",
     "prediction, not measured; Madelung filling, from memory"},
    {110, "Ds", "[Rn] 5f14 6d8 7s2",
     "prediction, not measured; Madelung filling, from memory"},
    {111, "Rg", "[Rn] 5f14 6d9 7s2",
     "prediction, not measured; Madelung filling, from memory"},
    {112, "Cn", "[Rn] 5f14 6d10 7s2",
     "prediction, not measured; Madelung filling, from memory"},
    {113, "Nh", "[Rn] 5f14 6d10 7s2 7p1",
     "prediction, not measured; Madelung filling, from memory"},
    {114, "Fl", "[Rn] 5f14 6d10 7s2 7p2",
     "prediction, not measured; Madelung filling, from memory"},
    {115, "Mc", "[Rn] 5f14 6d10 7s2 7p3",
     "prediction, not measured; Madelung filling, from memory"},
    {116, "Lv", "[Rn] 5f14 6d10 7s2 7p4",
     "prediction, not measured; Madelung filling, from memory"},
    {117, "Ts", "[Rn] 5f14 6d10 7s2 7p5",
     "prediction, not measured; Madelung filling, from memory"},
    {118, "Og", "[Rn] 5f14 6d10 7s2 7p6",
     "prediction, not measured; Madelung filling, from memory"},
};

inline constexpr std::size_t kReferenceConfigurationCount =
    sizeof(kReferenceConfigurations) / sizeof(kReferenceConfigurations[0]);

static_assert(kReferenceConfigurationCount == 118,
              "kReferenceConfigurations must list Z = 1..118");

// Returns true when row i holds atomic number i + 1 for every row.
constexpr bool ReferenceConfigurationsAreInOrder() {
  for (std::size_t i = 0; i < kReferenceConfigurationCount; ++i) {
    if (kReferenceConfigurations[i].atomic_number != static_cast<int>(i + 1)) {
      return false;
    }
  }
  return true;
}

static_assert(ReferenceConfigurationsAreInOrder(),
              "kReferenceConfigurations must be ordered by atomic number");

}  // namespace shellwright::testing

#endif  // SHELLWRIGHT_TESTS_ENGINE_REFERENCE_CONFIGURATIONS_H_
