// Reference tables for the engine's magnetism code. There are three tables:
// trivalent lanthanide ground terms with their effective magneton numbers,
// iron-group spin-only moments, and octahedral high-spin/low-spin d-electron
// occupancies. The values were written down independently of the engine code,
// from standard solid-state physics and inorganic chemistry textbooks as
// recalled from memory.

#ifndef SHELLWRIGHT_TESTS_ENGINE_REFERENCE_MAGNETISM_H_
#define SHELLWRIGHT_TESTS_ENGINE_REFERENCE_MAGNETISM_H_

#include <cstddef>

namespace shellwright::testing {

// (a) Trivalent lanthanide ions, 4f^n ground terms. effective_magnetons is
// the calculated p = g_J sqrt(J(J+1)) as printed in Kittel's table, recalled
// from memory. Some printed values differ in the last digit from an exact
// evaluation of g_J sqrt(J(J+1)): Sm3+ 0.845, Dy3+ 10.646, Ho3+ 10.607,
// Er3+ 9.581 and Tm3+ 7.561 by exact evaluation. A test should compare with
// a tolerance of at least 0.02 Bohr magnetons.
//
// Kittel prints the term without parity. The parity marker 'o' is added here:
// 4f^n has parity (-1)^(3n), so it is odd when n is odd.
struct ReferenceLanthanideMoment {
  const char* spec;
  const char* term;
  double effective_magnetons;
  const char* source;
};

inline constexpr ReferenceLanthanideMoment kLanthanideEffectiveMagnetons[] = {
    {"Ce3+", "2Fo5/2", 2.54,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "lanthanide table, from memory"},
    {"Pr3+", "3H4", 3.58,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "lanthanide table, from memory"},
    {"Nd3+", "4Io9/2", 3.62,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "lanthanide table, from memory"},
    {"Pm3+", "5I4", 2.68,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "lanthanide table, from memory"},
    {"Sm3+", "6Ho5/2", 0.84,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "lanthanide table, from memory"},
    {"Eu3+", "7F0", 0.00,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "lanthanide table, from memory"},
    {"Gd3+", "8So7/2", 7.94,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "lanthanide table, from memory"},
    {"Tb3+", "7F6", 9.72,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "lanthanide table, from memory"},
    {"Dy3+", "6Ho15/2", 10.63,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "lanthanide table, from memory"},
    {"Ho3+", "5I8", 10.60,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "lanthanide table, from memory"},
    {"Er3+", "4Io15/2", 9.59,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "lanthanide table, from memory"},
    {"Tm3+", "3H6", 7.57,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "lanthanide table, from memory"},
    {"Yb3+", "2Fo7/2", 4.54,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "lanthanide table, from memory"},
};

inline constexpr std::size_t kLanthanideEffectiveMagnetonCount =
    sizeof(kLanthanideEffectiveMagnetons) /
    sizeof(kLanthanideEffectiveMagnetons[0]);

static_assert(kLanthanideEffectiveMagnetonCount == 13,
              "kLanthanideEffectiveMagnetons must list Ce3+..Yb3+");

// (b) Iron-group ions: free-ion unpaired count n and the spin-only moment
// sqrt(n(n+2)) in Bohr magnetons, rounded to two decimals.
struct ReferenceSpinOnlyMoment {
  const char* spec;
  int unpaired;
  double spin_only_moment;
  const char* source;
};

inline constexpr ReferenceSpinOnlyMoment kIronGroupSpinOnly[] = {
    {"Ti3+", 1, 1.73,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "iron group table, from memory"},
    {"V4+", 1, 1.73,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "iron group table, from memory"},
    {"V3+", 2, 2.83,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "iron group table, from memory"},
    {"V2+", 3, 3.87,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "iron group table, from memory"},
    {"Cr3+", 3, 3.87,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "iron group table, from memory"},
    {"Cr2+", 4, 4.90,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "iron group table, from memory"},
    {"Mn3+", 4, 4.90,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "iron group table, from memory"},
    {"Mn2+", 5, 5.92,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "iron group table, from memory"},
    {"Fe3+", 5, 5.92,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "iron group table, from memory"},
    {"Fe2+", 4, 4.90,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "iron group table, from memory"},
    {"Co2+", 3, 3.87,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "iron group table, from memory"},
    {"Ni2+", 2, 2.83,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "iron group table, from memory"},
    {"Cu2+", 1, 1.73,
     "Kittel, Introduction to Solid State Physics, paramagnetism chapter, "
     "iron group table, from memory"},
    // Co3+ is not in Kittel's table. This is the free-ion (high-spin) d6
    // value.
    {"Co3+", 4, 4.90,
     "Greenwood & Earnshaw, Chemistry of the Elements, spin-only formula, "
     "from memory"},
};

inline constexpr std::size_t kIronGroupSpinOnlyCount =
    sizeof(kIronGroupSpinOnly) / sizeof(kIronGroupSpinOnly[0]);

// (c) Octahedral d4-d7 ions: unpaired counts and t2g/eg occupancies for the
// high-spin (weak-field) and low-spin (strong-field) arrangements.
struct ReferenceOctahedralSpinState {
  const char* spec;
  int high_spin_unpaired;
  const char* high_spin_occupancy;
  int low_spin_unpaired;
  const char* low_spin_occupancy;
  const char* source;
};

inline constexpr ReferenceOctahedralSpinState kOctahedralSpinStates[] = {
    // d4.
    {"Cr2+", 4, "t2g3 eg1", 2, "t2g4 eg0",
     "Miessler & Tarr, Inorganic Chemistry, ligand field chapter, "
     "from memory"},
    {"Mn3+", 4, "t2g3 eg1", 2, "t2g4 eg0",
     "Miessler & Tarr, Inorganic Chemistry, ligand field chapter, "
     "from memory"},
    // d5.
    {"Mn2+", 5, "t2g3 eg2", 1, "t2g5 eg0",
     "Miessler & Tarr, Inorganic Chemistry, ligand field chapter, "
     "from memory"},
    {"Fe3+", 5, "t2g3 eg2", 1, "t2g5 eg0",
     "Miessler & Tarr, Inorganic Chemistry, ligand field chapter, "
     "from memory"},
    // d6.
    {"Fe2+", 4, "t2g4 eg2", 0, "t2g6 eg0",
     "Miessler & Tarr, Inorganic Chemistry, ligand field chapter, "
     "from memory"},
    {"Co3+", 4, "t2g4 eg2", 0, "t2g6 eg0",
     "Miessler & Tarr, Inorganic Chemistry, ligand field chapter, "
     "from memory"},
    // d7.
    {"Co2+", 3, "t2g5 eg2", 1, "t2g6 eg1",
     "Miessler & Tarr, Inorganic Chemistry, ligand field chapter, "
     "from memory"},
    {"Ni3+", 3, "t2g5 eg2", 1, "t2g6 eg1",
     "Miessler & Tarr, Inorganic Chemistry, ligand field chapter, "
     "from memory"},
};

inline constexpr std::size_t kOctahedralSpinStateCount =
    sizeof(kOctahedralSpinStates) / sizeof(kOctahedralSpinStates[0]);

}  // namespace shellwright::testing

#endif  // SHELLWRIGHT_TESTS_ENGINE_REFERENCE_MAGNETISM_H_
