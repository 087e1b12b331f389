// Reference table of observed ground levels (term symbol plus J) for the
// neutral atoms Z = 1..103. The engine's term-symbol and Hund's-rule code is
// tested against it. The values were written down independently of the engine
// code, from the NIST Atomic Spectra Database ground levels as recalled from
// memory.
//
// ASCII level format: the multiplicity 2S+1, then the L letter
// (S P D F G H I K L M N O Q R T U V, with J skipped). An 'o' comes straight
// after the L letter when the parity is odd. J comes last, written as an
// integer or as n/2. Examples: "2S1/2", "2Po1/2", "3P0", "5Lo6", "4K11/2".

#ifndef SHELLWRIGHT_TESTS_ENGINE_REFERENCE_GROUND_LEVELS_H_
#define SHELLWRIGHT_TESTS_ENGINE_REFERENCE_GROUND_LEVELS_H_

#include <cstddef>

namespace shellwright::testing {

struct ReferenceGroundLevel {
  int atomic_number;
  const char* symbol;
  const char* level;
  const char* source;
};

inline constexpr ReferenceGroundLevel kReferenceGroundLevels[] = {
    // Period 1.
    {1, "H", "2S1/2", "NIST ASD ground levels, from memory"},
    {2, "He", "1S0", "NIST ASD ground levels, from memory"},
    // Period 2.
    {3, "Li", "2S1/2", "NIST ASD ground levels, from memory"},
    {4, "Be", "1S0", "NIST ASD ground levels, from memory"},
    {5, "B", "2Po1/2", "NIST ASD ground levels, from memory"},
    {6, "C", "3P0", "NIST ASD ground levels, from memory"},
    {7, "N", "4So3/2", "NIST ASD ground levels, from memory"},
    {8, "O", "3P2", "NIST ASD ground levels, from memory"},
    {9, "F", "2Po3/2", "NIST ASD ground levels, from memory"},
    {10, "Ne", "1S0", "NIST ASD ground levels, from memory"},
    // Period 3.
    {11, "Na", "2S1/2", "NIST ASD ground levels, from memory"},
    {12, "Mg", "1S0", "NIST ASD ground levels, from memory"},
    {13, "Al", "2Po1/2", "NIST ASD ground levels, from memory"},
    {14, "Si", "3P0", "NIST ASD ground levels, from memory"},
    {15, "P", "4So3/2", "NIST ASD ground levels, from memory"},
    {16, "S", "3P2", "NIST ASD ground levels, from memory"},
    {17, "Cl", "2Po3/2", "NIST ASD ground levels, from memory"},
    {18, "Ar", "1S0", "NIST ASD ground levels, from memory"},
    // Period 4.
    {19, "K", "2S1/2", "NIST ASD ground levels, from memory"},
    {20, "Ca", "1S0", "NIST ASD ground levels, from memory"},
    {21, "Sc", "2D3/2", "NIST ASD ground levels, from memory"},
    {22, "Ti", "3F2", "NIST ASD ground levels, from memory"},
    {23, "V", "4F3/2", "NIST ASD ground levels, from memory"},
    {24, "Cr", "7S3", "NIST ASD ground levels, from memory"},
    {25, "Mn", "6S5/2", "NIST ASD ground levels, from memory"},
    {26, "Fe", "5D4", "NIST ASD ground levels, from memory"},
    {27, "Co", "4F9/2", "NIST ASD ground levels, from memory"},
    // Ni: NIST gives the 3d8 4s2 3F4 level as the lowest one. The 3d9 4s 3D3
    // level lies only a few hundredths of an eV above it.
    {28, "Ni", "3F4", "NIST ASD ground levels, from memory"},
    {29, "Cu", "2S1/2", "NIST ASD ground levels, from memory"},
    {30, "Zn", "1S0", "NIST ASD ground levels, from memory"},
    {31, "Ga", "2Po1/2", "NIST ASD ground levels, from memory"},
    {32, "Ge", "3P0", "NIST ASD ground levels, from memory"},
    {33, "As", "4So3/2", "NIST ASD ground levels, from memory"},
    {34, "Se", "3P2", "NIST ASD ground levels, from memory"},
    {35, "Br", "2Po3/2", "NIST ASD ground levels, from memory"},
    {36, "Kr", "1S0", "NIST ASD ground levels, from memory"},
    // Period 5.
    {37, "Rb", "2S1/2", "NIST ASD ground levels, from memory"},
    {38, "Sr", "1S0", "NIST ASD ground levels, from memory"},
    {39, "Y", "2D3/2", "NIST ASD ground levels, from memory"},
    {40, "Zr", "3F2", "NIST ASD ground levels, from memory"},
    {41, "Nb", "6D1/2", "NIST ASD ground levels, from memory"},
    {42, "Mo", "7S3", "NIST ASD ground levels, from memory"},
    {43, "Tc", "6S5/2", "NIST ASD ground levels, from memory"},
    {44, "Ru", "5F5", "NIST ASD ground levels, from memory"},
    {45, "Rh", "4F9/2", "NIST ASD ground levels, from memory"},
    {46, "Pd", "1S0", "NIST ASD ground levels, from memory"},
    {47, "Ag", "2S1/2", "NIST ASD ground levels, from memory"},
    {48, "Cd", "1S0", "NIST ASD ground levels, from memory"},
    {49, "In", "2Po1/2", "NIST ASD ground levels, from memory"},
    {50, "Sn", "3P0", "NIST ASD ground levels, from memory"},
    {51, "Sb", "4So3/2", "NIST ASD ground levels, from memory"},
    {52, "Te", "3P2", "NIST ASD ground levels, from memory"},
    {53, "I", "2Po3/2", "NIST ASD ground levels, from memory"},
    {54, "Xe", "1S0", "NIST ASD ground levels, from memory"},
    // Period 6.
    {55, "Cs", "2S1/2", "NIST ASD ground levels, from memory"},
    {56, "Ba", "1S0", "NIST ASD ground levels, from memory"},
    {57, "La", "2D3/2", "NIST ASD ground levels, from memory"},
    {58, "Ce", "1Go4", "NIST ASD ground levels, from memory"},
    {59, "Pr", "4Io9/2", "NIST ASD ground levels, from memory"},
    {60, "Nd", "5I4", "NIST ASD ground levels, from memory"},
    {61, "Pm", "6Ho5/2", "NIST ASD ground levels, from memory"},
    {62, "Sm", "7F0", "NIST ASD ground levels, from memory"},
    {63, "Eu", "8So7/2", "NIST ASD ground levels, from memory"},
    {64, "Gd", "9Do2", "NIST ASD ground levels, from memory"},
    {65, "Tb", "6Ho15/2", "NIST ASD ground levels, from memory"},
    {66, "Dy", "5I8", "NIST ASD ground levels, from memory"},
    {67, "Ho", "4Io15/2", "NIST ASD ground levels, from memory"},
    {68, "Er", "3H6", "NIST ASD ground levels, from memory"},
    {69, "Tm", "2Fo7/2", "NIST ASD ground levels, from memory"},
    {70, "Yb", "1S0", "NIST ASD ground levels, from memory"},
    {71, "Lu", "2D3/2", "NIST ASD ground levels, from memory"},
    {72, "Hf", "3F2", "NIST ASD ground levels, from memory"},
    {73, "Ta", "4F3/2", "NIST ASD ground levels, from memory"},
    {74, "W", "5D0", "NIST ASD ground levels, from memory"},
    {75, "Re", "6S5/2", "NIST ASD ground levels, from memory"},
    {76, "Os", "5D4", "NIST ASD ground levels, from memory"},
    {77, "Ir", "4F9/2", "NIST ASD ground levels, from memory"},
    {78, "Pt", "3D3", "NIST ASD ground levels, from memory"},
    {79, "Au", "2S1/2", "NIST ASD ground levels, from memory"},
    {80, "Hg", "1S0", "NIST ASD ground levels, from memory"},
    {81, "Tl", "2Po1/2", "NIST ASD ground levels, from memory"},
    {82, "Pb", "3P0", "NIST ASD ground levels, from memory"},
    {83, "Bi", "4So3/2", "NIST ASD ground levels, from memory"},
    {84, "Po", "3P2", "NIST ASD ground levels, from memory"},
    {85, "At", "2Po3/2", "NIST ASD ground levels, from memory"},
    {86, "Rn", "1S0", "NIST ASD ground levels, from memory"},
    // Period 7.
    {87, "Fr", "2S1/2", "NIST ASD ground levels, from memory"},
    {88, "Ra", "1S0", "NIST ASD ground levels, from memory"},
    {89, "Ac", "2D3/2", "NIST ASD ground levels, from memory"},
    {90, "Th", "3F2", "NIST ASD ground levels, from memory"},
    {91, "Pa", "4K11/2", "NIST ASD ground levels, from memory"},
    {92, "U", "5Lo6", "NIST ASD ground levels, from memory"},
    {93, "Np", "6L11/2", "NIST ASD ground levels, from memory"},
    {94, "Pu", "7F0", "NIST ASD ground levels, from memory"},
    {95, "Am", "8So7/2", "NIST ASD ground levels, from memory"},
    {96, "Cm", "9Do2", "NIST ASD ground levels, from memory"},
    {97, "Bk", "6Ho15/2", "NIST ASD ground levels, from memory"},
    {98, "Cf", "5I8", "NIST ASD ground levels, from memory"},
    {99, "Es", "4Io15/2", "NIST ASD ground levels, from memory"},
    {100, "Fm", "3H6", "NIST ASD ground levels, from memory"},
    {101, "Md", "2Fo7/2", "NIST ASD ground levels, from memory"},
    {102, "No", "1S0", "NIST ASD ground levels, from memory"},
    {103, "Lr", "2Po1/2", "NIST ASD ground levels, from memory"},
};

inline constexpr std::size_t kReferenceGroundLevelCount =
    sizeof(kReferenceGroundLevels) / sizeof(kReferenceGroundLevels[0]);

static_assert(kReferenceGroundLevelCount == 103,
              "kReferenceGroundLevels must list Z = 1..103");

// Returns true when row i holds atomic number i + 1 for every row.
constexpr bool ReferenceGroundLevelsAreInOrder() {
  for (std::size_t i = 0; i < kReferenceGroundLevelCount; ++i) {
    if (kReferenceGroundLevels[i].atomic_number != static_cast<int>(i + 1)) {
      return false;
    }
  }
  return true;
}

static_assert(ReferenceGroundLevelsAreInOrder(),
              "kReferenceGroundLevels must be ordered by atomic number");

}  // namespace shellwright::testing

#endif  // SHELLWRIGHT_TESTS_ENGINE_REFERENCE_GROUND_LEVELS_H_
