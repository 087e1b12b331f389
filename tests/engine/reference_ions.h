// Reference table of configurations and unpaired-electron counts for common
// ions. The engine's ion builder is tested against it. The values were written
// down independently of the engine code, from standard inorganic chemistry
// textbooks as recalled from memory.
//
// Convention: the chemical (in-compound) one, with free-ion Hund filling and
// no ligand field. A cation starts from the neutral atom's ground
// configuration and loses electrons from the subshells outside the noble-gas
// core: the highest n first, then the highest l within one n. So 4s goes
// before 3d, and lanthanides lose 6s, then 5d, then 4f. An anion adds
// electrons in Madelung order. The notation follows
// reference_configurations.h. A configuration that is exactly a noble-gas
// core prints as just the core ("[Ar]"). The He-like configuration prints as
// "1s2" (H-, Li+), the same way neutral He does.
//
// unpaired_electrons is the free-ion Hund's-rule (high-spin) count for the
// open subshell(s).

#ifndef SHELLWRIGHT_TESTS_ENGINE_REFERENCE_IONS_H_
#define SHELLWRIGHT_TESTS_ENGINE_REFERENCE_IONS_H_

#include <cstddef>

namespace shellwright::testing {

struct ReferenceIon {
  const char* spec;
  const char* configuration;
  int unpaired_electrons;
  const char* source;
};

inline constexpr ReferenceIon kReferenceIons[] = {
    // 3d-block cations.
    {"Sc3+", "[Ar]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Ti2+", "[Ar] 3d2", 2,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Ti3+", "[Ar] 3d1", 1,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Ti4+", "[Ar]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"V2+", "[Ar] 3d3", 3,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"V3+", "[Ar] 3d2", 2,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"V4+", "[Ar] 3d1", 1,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"V5+", "[Ar]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    // Cr is [Ar] 3d5 4s1, so Cr2+ loses 4s1 and then one 3d electron.
    {"Cr2+", "[Ar] 3d4", 4,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Cr3+", "[Ar] 3d3", 3,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Cr6+", "[Ar]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Mn2+", "[Ar] 3d5", 5,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Mn3+", "[Ar] 3d4", 4,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Mn4+", "[Ar] 3d3", 3,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Mn7+", "[Ar]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Fe2+", "[Ar] 3d6", 4,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Fe3+", "[Ar] 3d5", 5,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Co2+", "[Ar] 3d7", 3,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Co3+", "[Ar] 3d6", 4,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Ni2+", "[Ar] 3d8", 2,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Ni3+", "[Ar] 3d7", 3,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Cu+", "[Ar] 3d10", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Cu2+", "[Ar] 3d9", 1,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Zn2+", "[Ar] 3d10", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    // 4d-block cations.
    {"Y3+", "[Kr]", 0,
     "Cotton & Wilkinson, Advanced Inorganic Chemistry, from memory"},
    {"Zr4+", "[Kr]", 0,
     "Cotton & Wilkinson, Advanced Inorganic Chemistry, from memory"},
    {"Nb5+", "[Kr]", 0,
     "Cotton & Wilkinson, Advanced Inorganic Chemistry, from memory"},
    {"Mo3+", "[Kr] 4d3", 3,
     "Cotton & Wilkinson, Advanced Inorganic Chemistry, from memory"},
    {"Mo6+", "[Kr]", 0,
     "Cotton & Wilkinson, Advanced Inorganic Chemistry, from memory"},
    // Ru is [Kr] 4d7 5s1.
    {"Ru3+", "[Kr] 4d5", 5,
     "Cotton & Wilkinson, Advanced Inorganic Chemistry, from memory"},
    // Rh is [Kr] 4d8 5s1. The free-ion count is 4. Real Rh(III) complexes
    // are low-spin.
    {"Rh3+", "[Kr] 4d6", 4,
     "Cotton & Wilkinson, Advanced Inorganic Chemistry, from memory"},
    // Pd is [Kr] 4d10, with no 5s electrons.
    {"Pd2+", "[Kr] 4d8", 2,
     "Cotton & Wilkinson, Advanced Inorganic Chemistry, from memory"},
    {"Ag+", "[Kr] 4d10", 0,
     "Cotton & Wilkinson, Advanced Inorganic Chemistry, from memory"},
    {"Cd2+", "[Kr] 4d10", 0,
     "Cotton & Wilkinson, Advanced Inorganic Chemistry, from memory"},
    // 5d-block cations. 4f14 lies outside the [Xe] core, so it is written.
    {"Hf4+", "[Xe] 4f14", 0,
     "Cotton & Wilkinson, Advanced Inorganic Chemistry, from memory"},
    {"Ta5+", "[Xe] 4f14", 0,
     "Cotton & Wilkinson, Advanced Inorganic Chemistry, from memory"},
    {"W6+", "[Xe] 4f14", 0,
     "Cotton & Wilkinson, Advanced Inorganic Chemistry, from memory"},
    {"Re4+", "[Xe] 4f14 5d3", 3,
     "Cotton & Wilkinson, Advanced Inorganic Chemistry, from memory"},
    {"Os4+", "[Xe] 4f14 5d4", 4,
     "Cotton & Wilkinson, Advanced Inorganic Chemistry, from memory"},
    {"Ir3+", "[Xe] 4f14 5d6", 4,
     "Cotton & Wilkinson, Advanced Inorganic Chemistry, from memory"},
    {"Ir4+", "[Xe] 4f14 5d5", 5,
     "Cotton & Wilkinson, Advanced Inorganic Chemistry, from memory"},
    // Pt is [Xe] 4f14 5d9 6s1. The free-ion count for Pt2+ is 2. Square-planar
    // Pt(II) complexes are diamagnetic.
    {"Pt2+", "[Xe] 4f14 5d8", 2,
     "Cotton & Wilkinson, Advanced Inorganic Chemistry, from memory"},
    {"Pt4+", "[Xe] 4f14 5d6", 4,
     "Cotton & Wilkinson, Advanced Inorganic Chemistry, from memory"},
    {"Au+", "[Xe] 4f14 5d10", 0,
     "Cotton & Wilkinson, Advanced Inorganic Chemistry, from memory"},
    {"Au3+", "[Xe] 4f14 5d8", 2,
     "Cotton & Wilkinson, Advanced Inorganic Chemistry, from memory"},
    {"Hg2+", "[Xe] 4f14 5d10", 0,
     "Cotton & Wilkinson, Advanced Inorganic Chemistry, from memory"},
    // Lanthanide ions. Ce = [Xe] 4f1 5d1 6s2 and Gd = [Xe] 4f7 5d1 6s2, so
    // Ce3+ and Gd3+ lose the 5d electron. The rest lose 4f after 6s.
    {"La3+", "[Xe]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Ce3+", "[Xe] 4f1", 1,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Ce4+", "[Xe]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Pr3+", "[Xe] 4f2", 2,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Nd3+", "[Xe] 4f3", 3,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Pm3+", "[Xe] 4f4", 4,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Sm2+", "[Xe] 4f6", 6,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Sm3+", "[Xe] 4f5", 5,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Eu2+", "[Xe] 4f7", 7,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Eu3+", "[Xe] 4f6", 6,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Gd3+", "[Xe] 4f7", 7,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Tb3+", "[Xe] 4f8", 6,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Tb4+", "[Xe] 4f7", 7,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Dy3+", "[Xe] 4f9", 5,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Ho3+", "[Xe] 4f10", 4,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Er3+", "[Xe] 4f11", 3,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Tm3+", "[Xe] 4f12", 2,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Yb2+", "[Xe] 4f14", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Yb3+", "[Xe] 4f13", 1,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Lu3+", "[Xe] 4f14", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    // Actinide ions (chemical convention, 5f^n). U = [Rn] 5f3 6d1 7s2,
    // Np = [Rn] 5f4 6d1 7s2, Pu = [Rn] 5f6 7s2, Am = [Rn] 5f7 7s2.
    {"Th4+", "[Rn]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"U3+", "[Rn] 5f3", 3,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"U4+", "[Rn] 5f2", 2,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"U6+", "[Rn]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Np5+", "[Rn] 5f2", 2,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Pu4+", "[Rn] 5f4", 4,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Am3+", "[Rn] 5f6", 6,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    // p-block cations, including the ns2 "inert pair" ions.
    {"Al3+", "[Ne]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Ga3+", "[Ar] 3d10", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"In3+", "[Kr] 4d10", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"In+", "[Kr] 4d10 5s2", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Tl+", "[Xe] 4f14 5d10 6s2", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Tl3+", "[Xe] 4f14 5d10", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Sn2+", "[Kr] 4d10 5s2", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Sn4+", "[Kr] 4d10", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Pb2+", "[Xe] 4f14 5d10 6s2", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Pb4+", "[Xe] 4f14 5d10", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Sb3+", "[Kr] 4d10 5s2", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Bi3+", "[Xe] 4f14 5d10 6s2", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    // s-block cations. Li+ is He-like, so it prints as "1s2" (see above).
    {"Li+", "1s2", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Na+", "[Ne]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"K+", "[Ar]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Mg2+", "[Ne]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Ca2+", "[Ar]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Sr2+", "[Kr]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Ba2+", "[Xe]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    // Anions (Madelung filling to the next noble-gas configuration).
    {"H-", "1s2", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"F-", "[Ne]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Cl-", "[Ar]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Br-", "[Kr]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"I-", "[Xe]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"O2-", "[Ne]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"S2-", "[Ar]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"Se2-", "[Kr]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"N3-", "[Ne]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
    {"P3-", "[Ar]", 0,
     "Greenwood & Earnshaw, Chemistry of the Elements, from memory"},
};

inline constexpr std::size_t kReferenceIonCount =
    sizeof(kReferenceIons) / sizeof(kReferenceIons[0]);

static_assert(kReferenceIonCount >= 70,
              "kReferenceIons must cover at least 70 ions");

}  // namespace shellwright::testing

#endif  // SHELLWRIGHT_TESTS_ENGINE_REFERENCE_IONS_H_
