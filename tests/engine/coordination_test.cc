// Tests for engine/coordination.cc through whole records: the oxidation
// state, geometry and unpaired electrons of the metal in coordination and
// organometallic compounds written as chemists write them (ligand and
// fragment abbreviations, isomer prefixes, hydrides, metal-metal bonded
// dimers), each against its published description.

#include "engine/coordination.h"

#include <string>
#include <vector>

#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"
#include "engine/composition.h"
#include "engine/diagnostic_codes.h"
#include "engine/formula.h"
#include "engine/ligand_field.h"
#include "engine/oxidation.h"
#include "engine/units.h"
#include "gtest/gtest.h"

namespace shellwright {
namespace {

// One compound: the metal's state and geometry (kFree: not checked) and
// the unpaired electrons per formula unit.
struct Expected {
  const char* formula;
  const char* metal;
  int state;
  Geometry geometry;
  double unpaired;
  const char* source;
};

constexpr Geometry kAny = Geometry::kFree;

// The d- or f-block ion of `metal` in `r`, or null.
const IonAnnotation* MetalIon(const CompositionReport& r,
                              const std::string& metal) {
  for (const IonAnnotation& ion : r.ions) {
    if (ion.element->symbol == metal) return &ion;
  }
  return nullptr;
}

void CheckAll(const std::vector<Expected>& table) {
  for (const Expected& e : table) {
    SCOPED_TRACE(absl::StrCat(e.formula, " (", e.source, ")"));
    CompositionInput in;
    in.formula = e.formula;
    const CompositionReport r = AnalyzeComposition(in);
    ASSERT_TRUE(r.valid);
    const IonAnnotation* ion = MetalIon(r, e.metal);
    ASSERT_NE(ion, nullptr);
    EXPECT_EQ(ion->state, e.state);
    if (e.geometry != kAny) {
      ASSERT_TRUE(ion->description->ligand_field.has_value());
      EXPECT_EQ(Name(ion->description->ligand_field->splitting.geometry),
                Name(e.geometry));
    }
    EXPECT_DOUBLE_EQ(r.unpaired_per_formula_unit, e.unpaired);
  }
}

TEST(Coordination, PhosphineComplexes) {
  CheckAll({
      // Wilkinson's catalyst: Rh(I), d8 square planar, diamagnetic.
      {"RhCl(PPh3)3", "Rh", 1, Geometry::kSquarePlanar, 0,
       "Greenwood and Earnshaw, Chemistry of the Elements, 2nd ed., ch. 26, "
       "from memory"},
      // Vaska's complex: Ir(I), d8 square planar, diamagnetic.
      {"IrCl(CO)(PPh3)2", "Ir", 1, Geometry::kSquarePlanar, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 26, from memory"},
      {"Pd(PPh3)4", "Pd", 0, Geometry::kTetrahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 27, from memory"},
      {"Pt(PPh3)4", "Pt", 0, Geometry::kTetrahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 27, from memory"},
      // cis-[PtCl2(PPh3)2]: Pt(II), d8 square planar.
      {"Pt(PPh3)2Cl2", "Pt", 2, Geometry::kSquarePlanar, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 27, from memory"},
      // NiX2(PR3)2: tetrahedral and paramagnetic with PPh3, square planar
      // and diamagnetic with trialkylphosphines and dppe.
      {"Ni(PPh3)2Cl2", "Ni", 2, Geometry::kTetrahedral, 2,
       "Greenwood and Earnshaw, 2nd ed., ch. 27, from memory"},
      {"NiCl2(PMe3)2", "Ni", 2, Geometry::kSquarePlanar, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 27, from memory"},
      {"Ni(PEt3)2Cl2", "Ni", 2, Geometry::kSquarePlanar, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 27, from memory"},
      {"NiCl2(dppe)", "Ni", 2, Geometry::kSquarePlanar, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 27, from memory"},
      {"Ni(PCy3)2Cl2", "Ni", 2, Geometry::kSquarePlanar, 0,
       "common practice, no source (a trialkylphosphine, as PEt3)"},
      {"Fe(CO)3(PPh3)2", "Fe", 0, Geometry::kTrigonalBipyramidal, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 8, from memory (18 electrons)"},
      {"Cr(CO)5(PPh3)", "Cr", 0, Geometry::kOctahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 8, from memory (18 electrons)"},
      {"[Cu(PPh3)4]+", "Cu", 1, Geometry::kTetrahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 28, from memory"},
      {"Ni(P(OPh)3)4", "Ni", 0, Geometry::kTetrahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 27, from memory"},
      // PF3, a pi acceptor like CO: Ni(PF3)4 read Ni(II) with fluoride.
      {"Ni(PF3)4", "Ni", 0, Geometry::kTetrahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 27, from memory"},
      {"HCo(PF3)4", "Co", 1, Geometry::kTrigonalBipyramidal, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 26, from memory"},
  });
}

TEST(Coordination, TwoCoordinateD10IsLinear) {
  CheckAll({
      {"Au(PPh3)Cl", "Au", 1, Geometry::kLinear, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 28, from memory"},
      // The phosphine written with its substituents first, as often.
      {"Ph3PAuCl", "Au", 1, Geometry::kLinear, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 28, from memory"},
      {"K[Au(CN)2]", "Au", 1, Geometry::kLinear, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 28, from memory"},
      {"[Ag(NH3)2]+", "Ag", 1, Geometry::kLinear, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 28, from memory"},
      {"[CuCl2]-", "Cu", 1, Geometry::kLinear, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 28, from memory"},
  });
}

TEST(Coordination, AcetatesAndCpStar) {
  CheckAll({
      {"Cu(OAc)2", "Cu", 2, kAny, 1,
       "Greenwood and Earnshaw, 2nd ed., ch. 28, from memory"},
      {"Mn(OAc)3", "Mn", 3, Geometry::kOctahedral, 4,
       "Greenwood and Earnshaw, 2nd ed., ch. 24, from memory (high-spin "
       "Mn(III))"},
      // Decamethylferrocene: low-spin Fe(II), diamagnetic.
      {"Cp*2Fe", "Fe", 2, Geometry::kOctahedral, 0,
       "Elschenbroich, Organometallics, 3rd ed., from memory"},
      {"Fe(C5Me5)2", "Fe", 2, Geometry::kOctahedral, 0,
       "Elschenbroich, Organometallics, 3rd ed., from memory"},
      // Decamethylmanganocene is low spin (S = 1/2) where manganocene is
      // high spin (S = 5/2).
      {"Cp*2Mn", "Mn", 2, Geometry::kOctahedral, 1,
       "Elschenbroich, Organometallics, 3rd ed., from memory"},
      {"Mn(C5H5)2", "Mn", 2, Geometry::kOctahedral, 5,
       "Elschenbroich, Organometallics, 3rd ed., from memory"},
  });
}

TEST(Coordination, HydrideLigandsTakeASite) {
  CheckAll({
      // Regression: HCo(CO)4 read Co(I) d8 octahedral with 2 unpaired.
      {"HCo(CO)4", "Co", 1, Geometry::kTrigonalBipyramidal, 0,
       "Greenwood and Earnshaw, Chemistry of the Elements, 2nd ed., ch. 26, "
       "from memory (18 electrons, diamagnetic)"},
      {"HMn(CO)5", "Mn", 1, Geometry::kOctahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 24, from memory"},
      {"H2Fe(CO)4", "Fe", 2, Geometry::kOctahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 25, from memory"},
      // Regression: read Rh(-I) with H+.
      {"HRh(CO)(PPh3)3", "Rh", 1, Geometry::kTrigonalBipyramidal, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 26, from memory"},
      {"IrHCl2(PPh3)3", "Ir", 3, Geometry::kOctahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 26, from memory"},
      // Five-coordinate 16-electron Ru(II): square pyramidal, diamagnetic.
      {"RuHCl(PPh3)3", "Ru", 2, kAny, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 25, from memory"},
      {"RuCl2(PPh3)3", "Ru", 2, kAny, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 25, from memory"},
      {"[ReH9]2-", "Re", 7, kAny, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 24, from memory"},
      {"K2ReH9", "Re", 7, kAny, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 24, from memory"},
      {"Mg2FeH6", "Fe", 2, Geometry::kOctahedral, 0,
       "Yvon, Chimia 52 (1998) 613, from memory (low-spin [FeH6]4-)"},
  });
  // Salt-like and interstitial hydrides keep their readings: Na+ H-,
  // Li+ [AlH4]-, and metallic PdH0.6 and LaNi5H6 (no local moments).
  for (const char* formula : {"NaH", "LiAlH4", "PdH0.6", "LaNi5H6"}) {
    SCOPED_TRACE(formula);
    CompositionInput in;
    in.formula = formula;
    const CompositionReport r = AnalyzeComposition(in);
    ASSERT_TRUE(r.valid);
    EXPECT_EQ(r.unpaired_per_formula_unit, 0);
  }
}

TEST(Coordination, OrganometallicDimersPairInMetalMetalBonds) {
  CheckAll({
      // 17 electrons per metal: one metal-metal bond, diamagnetic.
      {"[CpFe(CO)2]2", "Fe", 1, kAny, 0,
       "Elschenbroich, Organometallics, 3rd ed., from memory"},
      {"[Cp*Fe(CO)2]2", "Fe", 1, kAny, 0,
       "Elschenbroich, Organometallics, 3rd ed., from memory"},
      {"[CpMo(CO)3]2", "Mo", 1, kAny, 0,
       "Elschenbroich, Organometallics, 3rd ed., from memory"},
      {"[CpNi(CO)]2", "Ni", 1, kAny, 0,
       "Elschenbroich, Organometallics, 3rd ed., from memory"},
      // The solid dimer; it dissociates in part to the 17-electron radical
      // CpCr(CO)3 in solution.
      {"[CpCr(CO)3]2", "Cr", 1, kAny, 0,
       "Elschenbroich, Organometallics, 3rd ed., from memory"},
      {"CpCr(CO)3", "Cr", 1, Geometry::kOctahedral, 1,
       "Elschenbroich, Organometallics, 3rd ed., from memory"},
      // 18-electron monomers.
      {"CpV(CO)4", "V", 1, kAny, 0,
       "Elschenbroich, Organometallics, 3rd ed., from memory"},
      {"CpCo(CO)2", "Co", 1, Geometry::kTrigonalBipyramidal, 0,
       "Elschenbroich, Organometallics, 3rd ed., from memory"},
      {"CpMn(CO)3", "Mn", 1, Geometry::kOctahedral, 0,
       "Elschenbroich, Organometallics, 3rd ed., from memory"},
      // V(CO)6 stays a 17-electron monomer with one unpaired electron.
      {"V(CO)6", "V", 0, Geometry::kOctahedral, 1,
       "Greenwood and Earnshaw, 2nd ed., ch. 8, from memory"},
      // Quadruple bonds (d4) and the Rh-Rh single bond (d7): diamagnetic.
      {"Cr2(OAc)4(H2O)2", "Cr", 2, kAny, 0,
       "Cotton, Murillo and Walton, Multiple Bonds between Metal Atoms, "
       "3rd ed., 2005, from memory"},
      {"Mo2(OAc)4", "Mo", 2, kAny, 0,
       "Cotton, Murillo and Walton, 3rd ed., from memory"},
      {"Rh2(OAc)4", "Rh", 2, kAny, 0,
       "Cotton, Murillo and Walton, 3rd ed., from memory"},
      {"K2[Re2Cl8]", "Re", 3, kAny, 0,
       "Cotton, Murillo and Walton, 3rd ed., from memory"},
      // Copper(II) acetate: weakly coupled d9 pair, one unpaired electron
      // per Cu in this estimate (about 1.4 muB per Cu measured at room
      // temperature).
      {"[Cu2(OAc)4(H2O)2]", "Cu", 2, kAny, 2,
       "Figgis and Lewis, magnetochemistry tables, from memory"},
  });
}

TEST(Coordination, WernerComplexesAndSandwiches) {
  CheckAll({
      // Regression: the chelating carbonate counted one site, leaving a
      // five-coordinate high-spin Co(III) with 4 unpaired electrons.
      {"[Co(NH3)4(CO3)]+", "Co", 3, Geometry::kOctahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 26, from memory"},
      {"[Co(NH3)4CO3]NO3", "Co", 3, Geometry::kOctahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 26, from memory"},
      {"cis-[PtCl2(NH3)2]", "Pt", 2, Geometry::kSquarePlanar, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 27, from memory (cisplatin)"},
      {"trans-[CoCl2(en)2]Cl", "Co", 3, Geometry::kOctahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 26, from memory"},
      {"fac-[Co(NH3)3(NO2)3]", "Co", 3, Geometry::kOctahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 26, from memory"},
      {"[CuCl5]3-", "Cu", 2, Geometry::kTrigonalBipyramidal, 1,
       "Greenwood and Earnshaw, 2nd ed., ch. 28, from memory"},
      // Uranocene: U(IV) between two C8H8 2- rings, 5f2.
      {"U(C8H8)2", "U", 4, kAny, 2,
       "Greenwood and Earnshaw, 2nd ed., ch. 31, from memory"},
      {"[Fe(C5H5)2]+", "Fe", 3, Geometry::kOctahedral, 1,
       "Elschenbroich, Organometallics, 3rd ed., from memory "
       "(ferrocenium)"},
  });
}

// Cyanide is an anionic pi acceptor: the cyanometallates hold their
// metals in low states, and two metal atoms written in one complex bond.
TEST(Coordination, LowValentAndDinuclearCyanometallates) {
  CheckAll({
      // Ni(0), isoelectronic with Ni(CO)4: tetrahedral, diamagnetic.
      {"K4[Ni(CN)4]", "Ni", 0, Geometry::kTetrahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 27, from memory"},
      // Mn(I), low-spin d6.
      {"K5[Mn(CN)6]", "Mn", 1, Geometry::kOctahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 24, from memory"},
      // Ni(I) pairs with a Ni-Ni bond, each Ni square planar.
      {"K4[Ni2(CN)6]", "Ni", 1, Geometry::kSquarePlanar, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 27, from memory"},
      // Two 17-electron [Co(CN)5]3- joined by a Co-Co bond.
      {"Ba3[Co2(CN)10]", "Co", 2, Geometry::kOctahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 26, from memory"},
      // The monomer keeps its one unpaired electron.
      {"K3[Co(CN)5]", "Co", 2, Geometry::kSquarePyramidal, 1,
       "Greenwood and Earnshaw, 2nd ed., ch. 26, from memory"},
      // Neighbours that keep their states: two complexes, not a dimer, and
      // the Zn(II) and Ni(II) outside them.
      {"K2[Ni(CN)4]", "Ni", 2, Geometry::kSquarePlanar, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 27, from memory"},
      {"K2Zn3[Fe(CN)6]2", "Fe", 2, Geometry::kOctahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 25, from memory"},
      {"Ni3[Fe(CN)6]2", "Fe", 3, Geometry::kOctahedral, 8,
       "common practice, no source (Prussian blue analogue: low-spin "
       "Fe(III) with 1 unpaired each, Ni(II) with 2)"},
  });
}

// Solvent ligands, tren, dimethylglyoximate and 2-phenylpyridinate from
// the tables, written out and abbreviated.
TEST(Coordination, SolventAndChelateLigands) {
  CheckAll({
      // Cu(I) d10 with four acetonitriles: tetrahedral.
      {"[Cu(CH3CN)4]PF6", "Cu", 1, Geometry::kTetrahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 28, from memory"},
      {"[Cu(MeCN)4]BF4", "Cu", 1, Geometry::kTetrahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 28, from memory"},
      // Acetonitrile is too weak to pair Fe(II): high spin.
      {"[Fe(MeCN)6](BF4)2", "Fe", 2, Geometry::kOctahedral, 4,
       "Huheey, Keiter and Keiter, 4th ed., f of MeCN near 1.22, from "
       "memory"},
      {"[Fe(dmso)6](ClO4)3", "Fe", 3, Geometry::kOctahedral, 5,
       "Huheey, Keiter and Keiter, 4th ed., f of dmso near 0.91, from "
       "memory"},
      {"TiCl3(thf)3", "Ti", 3, Geometry::kOctahedral, 1,
       "Greenwood and Earnshaw, 2nd ed., ch. 21, from memory"},
      {"[Ni(tren)(H2O)2]Cl2", "Ni", 2, Geometry::kOctahedral, 2,
       "Housecroft and Sharpe, Inorganic Chemistry, from memory"},
      // Bis(dimethylglyoximato)nickel(II): square planar, diamagnetic.
      {"Ni(dmg)2", "Ni", 2, Geometry::kSquarePlanar, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 27, from memory"},
      {"Ni(Hdmg)2", "Ni", 2, Geometry::kSquarePlanar, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 27, from memory"},
      // Bis(dimethylglyoximato)cobalt(II): square planar, low-spin d7,
      // one unpaired electron, as the cobalt(II) porphyrins.
      {"Co(dmg)2", "Co", 2, Geometry::kSquarePlanar, 1,
       "Figgis and Lewis, magnetochemistry tables, from memory"},
      // Beside weak-field chloride Co(II) stays tetrahedral with three.
      {"CoCl2(PPh3)2", "Co", 2, Geometry::kTetrahedral, 3,
       "Greenwood and Earnshaw, 2nd ed., ch. 26, from memory"},
      {"[Co(dmg)2(py)Cl]", "Co", 3, Geometry::kOctahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 26, from memory (a "
       "cobaloxime, low-spin Co(III))"},
      {"[Ir(ppy)3]", "Ir", 3, Geometry::kOctahedral, 0,
       "Housecroft and Sharpe, Inorganic Chemistry, from memory"},
      {"[Ir(ppy)2(bpy)]PF6", "Ir", 3, Geometry::kOctahedral, 0,
       "Housecroft and Sharpe, Inorganic Chemistry, from memory"},
  });
}

// Hydrocarbon pi ligands: allyl anion, butadiene, cyclooctadiene.
TEST(Coordination, AllylAndDieneLigands) {
  CheckAll({
      {"Ni(C3H5)2", "Ni", 2, Geometry::kSquarePlanar, 0,
       "Elschenbroich, Organometallics, 3rd ed., from memory"},
      {"Co(C3H5)3", "Co", 3, Geometry::kOctahedral, 0,
       "Elschenbroich, Organometallics, 3rd ed., from memory"},
      {"[Pd(C3H5)Cl]2", "Pd", 2, Geometry::kSquarePlanar, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 27, from memory"},
      {"Fe(CO)3(C4H6)", "Fe", 0, kAny, 0,
       "Elschenbroich, Organometallics, 3rd ed., from memory"},
      {"Ni(cod)2", "Ni", 0, Geometry::kTetrahedral, 0,
       "Elschenbroich, Organometallics, 3rd ed., from memory"},
      {"[Rh(cod)Cl]2", "Rh", 1, Geometry::kSquarePlanar, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 26, from memory"},
      // The sandwiches keep their counts: ferrocene 0, cobaltocene 1,
      // nickelocene 2, chromocene 2, dibenzenechromium 0.
      {"Fe(C5H5)2", "Fe", 2, kAny, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 25, from memory"},
      {"Co(C5H5)2", "Co", 2, kAny, 1,
       "Elschenbroich, Organometallics, 3rd ed., from memory"},
      {"Ni(C5H5)2", "Ni", 2, kAny, 2,
       "Elschenbroich, Organometallics, 3rd ed., from memory"},
      {"Cr(C5H5)2", "Cr", 2, kAny, 2,
       "Elschenbroich, Organometallics, 3rd ed., from memory"},
      {"Cr(C6H6)2", "Cr", 0, kAny, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 23, from memory"},
  });
}

// 4d and 5d d2 oxo complexes pair both d electrons in dxy; their halide
// stays halide beside oxygen.
TEST(Coordination, HeavyD2OxoComplexesAreDiamagnetic) {
  CheckAll({
      {"ReOCl3(PPh3)2", "Re", 5, Geometry::kOctahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 24, from memory"},
      {"[ReO2(py)4]Cl", "Re", 5, Geometry::kOctahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 24, from memory"},
      {"Cs2[ReOCl5]", "Re", 5, Geometry::kOctahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 24, from memory"},
      {"K2[OsO2(OH)4]", "Os", 6, Geometry::kOctahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 25, from memory"},
      // Potassium osmate as records write it.
      {"K2OsO4", "Os", 6, Geometry::kOctahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 25, from memory"},
      {"K4[MoO2(CN)4]", "Mo", 4, Geometry::kOctahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 23, from memory"},
      // Neighbours: the tetrahedral d2 ferrate and ruthenate keep two
      // unpaired electrons, as does the d2 Os(VI) of an oxide; the
      // square-pyramidal [ReOCl4]- was diamagnetic already.
      {"K2RuO4", "Ru", 6, Geometry::kTetrahedral, 2,
       "Greenwood and Earnshaw, 2nd ed., ch. 25, from memory"},
      {"Ba2CaOsO6", "Os", 6, Geometry::kOctahedral, 2,
       "common practice, no source (d2 Os(VI) with a local moment in the "
       "ordered double perovskite)"},
      {"K[ReOCl4]", "Re", 5, Geometry::kSquarePyramidal, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 24, from memory"},
  });
}

// Nitrosyls: NO bound to a metal counts as NO+ (nitrosonium), the linear
// three-electron donor of the {MNO}n notation; the metal takes the formal
// state that leaves.
TEST(Coordination, NitrosylsCountNoAsNitrosonium) {
  CheckAll({
      // {CoNO}10 and {Fe(NO)2}10: 18 electrons, tetrahedral, diamagnetic.
      {"Co(CO)3NO", "Co", -1, Geometry::kTetrahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 26, from memory"},
      {"Fe(CO)2(NO)2", "Fe", -2, Geometry::kTetrahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 25, from memory"},
      {"Cr(NO)4", "Cr", -4, Geometry::kTetrahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 23, from memory"},
      // {MnNO}8, five-coordinate: 18 electrons, diamagnetic.
      {"Mn(CO)4NO", "Mn", -1, kAny, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 24, from memory"},
      // Sodium nitroprusside, {FeNO}6: low-spin Fe(II), diamagnetic.
      {"Na2[Fe(CN)5NO]", "Fe", 2, Geometry::kOctahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 25, from memory"},
      // Its one-electron reduction product, {FeNO}7: S = 1/2.
      {"K3[Fe(CN)5NO]", "Fe", 1, Geometry::kOctahedral, 1,
       "Enemark and Feltham, Coord. Chem. Rev. 13 (1974) 339, from memory"},
      {"K3[Cr(CN)5NO]", "Cr", 1, Geometry::kOctahedral, 1,
       "Greenwood and Earnshaw, 2nd ed., ch. 23, from memory (S = 1/2)"},
      // The brown-ring ion, {FeNO}7 among water: high-spin, S = 3/2
      // (about 3.9 uB measured).
      {"[Fe(H2O)5(NO)]SO4", "Fe", 1, Geometry::kOctahedral, 3,
       "Greenwood and Earnshaw, 2nd ed., ch. 11, from memory"},
      {"[Fe(H2O)5NO]2+", "Fe", 1, Geometry::kOctahedral, 3,
       "Greenwood and Earnshaw, 2nd ed., ch. 11, from memory"},
      // {CoNO}8, six-coordinate: the NO bends (Co(III) with NO- in the
      // other convention), diamagnetic.
      {"[Co(NH3)5(NO)]Cl2", "Co", 1, Geometry::kOctahedral, 0,
       "Enemark and Feltham, Coord. Chem. Rev. 13 (1974) 339, from memory; "
       "Greenwood and Earnshaw, 2nd ed., ch. 26, from memory"},
      {"[Ru(NH3)5NO]Cl3", "Ru", 2, Geometry::kOctahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 25, from memory"},
  });
  // Without a metal, NO stays the radical nitric oxide.
  CompositionInput in;
  in.formula = "NO";
  const CompositionReport r = AnalyzeComposition(in);
  ASSERT_TRUE(r.valid);
  ASSERT_EQ(r.units.size(), 1u);
  EXPECT_EQ(r.units[0].unit->name, "nitric oxide");
  EXPECT_EQ(r.unpaired_per_formula_unit, 1);
  in.formula = "Co(CO)3NO";
  const CompositionReport co = AnalyzeComposition(in);
  ASSERT_TRUE(co.valid);
  for (const auto& u : co.units) EXPECT_NE(u.unit->name, "nitric oxide");
}

TEST(Coordination, FiveCoordinateSquarePyramidal) {
  CheckAll({
      // Oxo complexes: the apical oxo; low-spin d2 pairs in dxy.
      {"K[ReOCl4]", "Re", 5, Geometry::kSquarePyramidal, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 24, from memory"},
      {"VO(acac)2", "V", 4, Geometry::kSquarePyramidal, 1,
       "Greenwood and Earnshaw, 2nd ed., ch. 22, from memory (vanadyl "
       "acetylacetonate, 1.73 uB)"},
      {"TiO(acac)2", "Ti", 4, Geometry::kSquarePyramidal, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 21, from memory"},
      // d8 without a neutral pi acceptor, and low-spin d7.
      {"K3[Ni(CN)5]", "Ni", 2, Geometry::kSquarePyramidal, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 27, from memory"},
      {"K3[Co(CN)5]", "Co", 2, Geometry::kSquarePyramidal, 1,
       "Greenwood and Earnshaw, 2nd ed., ch. 26, from memory"},
      // The 16-electron d6 RuCl2(PPh3)3.
      {"RuCl2(PPh3)3", "Ru", 2, Geometry::kSquarePyramidal, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 25, from memory"},
      // With neutral pi acceptors and for d9: trigonal bipyramidal.
      {"Fe(CO)5", "Fe", 0, Geometry::kTrigonalBipyramidal, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 8, from memory"},
      {"Mn(CO)4NO", "Mn", -1, Geometry::kTrigonalBipyramidal, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 24, from memory"},
  });
}

// The sources of PlanarMacrocycles, all recalled.
constexpr char kScheidtReed[] =
    "Scheidt and Reed, Chem. Rev. 81 (1981) 543, from memory";
constexpr char kBarraclough[] =
    "Barraclough, Martin, Mitra and Sherwood, J. Chem. Phys. 53 (1970) 1638, "
    "from memory";
constexpr char kHousecroftSharpe[] =
    "Housecroft and Sharpe, Inorganic Chemistry, from memory";
constexpr char kWieghardt[] = "Wieghardt, Chaudhuri and coworkers, from memory";

// Planar tetradentate macrocycles (porphyrinates, phthalocyaninate,
// salen, cyclam) hold four equatorial sites: square planar alone, square
// pyramidal with one axial ligand, octahedral with two; tacn and cyclen
// bind facially or cis.
TEST(Coordination, PlanarMacrocycles) {
  CheckAll({
      // Four-coordinate 3d d5 and d6 on a strong macrocycle: intermediate
      // spin, dx2-y2 empty.
      // S = 1.
      {"FePc", "Fe", 2, Geometry::kSquarePlanar, 2, kBarraclough},
      // S = 1.
      {"Fe(TPP)", "Fe", 2, Geometry::kSquarePlanar, 2, kScheidtReed},
      // S = 1.
      {"Fe(OEP)", "Fe", 2, Geometry::kSquarePlanar, 2, kScheidtReed},
      // S = 3/2.
      {"MnPc", "Mn", 2, Geometry::kSquarePlanar, 3, kBarraclough},
      // Below the ion's crossover, and d4 either way: high spin.
      // Mn(II) porphyrins, S = 5/2.
      {"Mn(TPP)", "Mn", 2, Geometry::kSquarePlanar, 5, kScheidtReed},
      // S = 2.
      {"Cr(TPP)", "Cr", 2, Geometry::kSquarePlanar, 4, kScheidtReed},
      // d7 to d10: as any square plane.
      // Low-spin Co(II), S = 1/2.
      {"Co(TPP)", "Co", 2, Geometry::kSquarePlanar, 1, kScheidtReed},
      // S = 1/2.
      {"Co(Pc)", "Co", 2, Geometry::kSquarePlanar, 1, kBarraclough},
      // Low-spin Co(II).
      {"Co(salen)", "Co", 2, Geometry::kSquarePlanar, 1, kHousecroftSharpe},
      {"Ni(salen)", "Ni", 2, Geometry::kSquarePlanar, 0, kHousecroftSharpe},
      {"Ni(TPP)", "Ni", 2, Geometry::kSquarePlanar, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 27, from memory"},
      {"Ni(OEP)", "Ni", 2, Geometry::kSquarePlanar, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 27, from memory"},
      // Yellow, diamagnetic.
      {"[Ni(cyclam)](ClO4)2", "Ni", 2, Geometry::kSquarePlanar, 0,
       kHousecroftSharpe},
      {"Cu(Pc)", "Cu", 2, Geometry::kSquarePlanar, 1,
       "Greenwood and Earnshaw, 2nd ed., ch. 28, from memory"},
      {"CuPc", "Cu", 2, Geometry::kSquarePlanar, 1,
       "Greenwood and Earnshaw, 2nd ed., ch. 28, from memory"},
      {"Cu(salen)", "Cu", 2, Geometry::kSquarePlanar, 1, kHousecroftSharpe},
      {"Zn(TPP)", "Zn", 2, kAny, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 29, from memory (d10)"},
      // One axial ligand: square pyramidal, the ion's own crossover.
      // S = 5/2.
      {"Fe(TPP)Cl", "Fe", 3, Geometry::kSquarePyramidal, 5, kScheidtReed},
      {"Fe(salen)Cl", "Fe", 3, Geometry::kSquarePyramidal, 5,
       kHousecroftSharpe},
      // High-spin Mn(III), S = 2.
      {"Mn(TPP)Cl", "Mn", 3, Geometry::kSquarePyramidal, 4, kScheidtReed},
      {"Mn(salen)Cl", "Mn", 3, Geometry::kSquarePyramidal, 4,
       kHousecroftSharpe},
      // Low-spin Co(III).
      {"Co(TPP)Cl", "Co", 3, Geometry::kSquarePyramidal, 0, kScheidtReed},
      // Low-spin Co(II), S = 1/2: one axial ligand does not open dx2-y2.
      {"Co(TPP)(py)", "Co", 2, Geometry::kSquarePyramidal, 1, kScheidtReed},
      {"Co(salen)(py)", "Co", 2, Geometry::kSquarePyramidal, 1, kScheidtReed},
      // {FeNO}7, S = 1/2; Fe(I) by this engine's nitrosonium convention
      // (common practice, no source).
      {"Fe(TPP)(NO)", "Fe", 1, Geometry::kSquarePyramidal, 1, kScheidtReed},
      {"VO(TPP)", "V", 4, Geometry::kSquarePyramidal, 1,
       "Greenwood and Earnshaw, 2nd ed., ch. 22, from memory (vanadyl, "
       "d1)"},
      // Two axial ligands: octahedral.
      // A low-spin hemochrome.
      {"Fe(TPP)(py)2", "Fe", 2, Geometry::kOctahedral, 0, kScheidtReed},
      // S = 2.
      {"Fe(TPP)(thf)2", "Fe", 2, Geometry::kOctahedral, 4, kScheidtReed},
      // trans.
      {"[Ni(cyclam)Cl2]", "Ni", 2, Geometry::kOctahedral, 2, kHousecroftSharpe},
      // Facial and cis macrocycles: octahedral.
      {"[Cr(tacn)2]Cl3", "Cr", 3, Geometry::kOctahedral, 3, kWieghardt},
      // Low spin.
      {"[Co(tacn)2]Cl3", "Co", 3, Geometry::kOctahedral, 0, kWieghardt},
      {"[Ni(tacn)2]Cl2", "Ni", 2, Geometry::kOctahedral, 2, kWieghardt},
      // cis, low-spin Co(III).
      {"[Co(cyclen)Cl2]Cl", "Co", 3, Geometry::kOctahedral, 0,
       kHousecroftSharpe},
      // The cot sandwich of uranium(IV), 5f2.
      {"U(cot)2", "U", 4, kAny, 2,
       "Greenwood and Earnshaw, 2nd ed., ch. 31, from memory (uranocene, "
       "U(IV) 5f2)"},
  });
}

// The spin state labels of the macrocycle rule.
TEST(Coordination, MacrocycleSpinStateLabels) {
  const struct {
    const char* formula;
    const char* metal;
    SpinState spin;
  } kCases[] = {
      // Same sources as PlanarMacrocycles.
      {"FePc", "Fe", SpinState::kIntermediate},
      {"MnPc", "Mn", SpinState::kIntermediate},
      {"Mn(TPP)", "Mn", SpinState::kHigh},
      {"Cr(TPP)", "Cr", SpinState::kHigh},
      {"Co(TPP)", "Co", SpinState::kLow},
      {"Fe(TPP)Cl", "Fe", SpinState::kHigh},
      {"Co(TPP)Cl", "Co", SpinState::kLow},
  };
  for (const auto& c : kCases) {
    SCOPED_TRACE(c.formula);
    CompositionInput in;
    in.formula = c.formula;
    const CompositionReport r = AnalyzeComposition(in);
    ASSERT_TRUE(r.valid);
    const IonAnnotation* ion = MetalIon(r, c.metal);
    ASSERT_NE(ion, nullptr);
    ASSERT_TRUE(ion->description->ligand_field.has_value());
    EXPECT_EQ(Name(ion->description->ligand_field->splitting.spin_state),
              Name(c.spin));
  }
}

// A record may ask for intermediate spin only beside the square-planar or
// square-pyramidal geometry it is defined in.
TEST(Coordination, RecordIntermediateSpinNeedsItsGeometry) {
  CompositionInput planar;
  planar.formula = "FeCl2";
  planar.geometry = "Fe:square_planar";
  planar.spin_state = "Fe:intermediate";
  const CompositionReport ok = AnalyzeComposition(planar);
  ASSERT_TRUE(ok.valid);
  EXPECT_DOUBLE_EQ(ok.unpaired_per_formula_unit, 2);
  for (const char* geometry : {"", "Fe:octahedral"}) {
    SCOPED_TRACE(geometry);
    CompositionInput in = planar;
    in.geometry = geometry;
    const CompositionReport r = AnalyzeComposition(in);
    EXPECT_FALSE(r.valid);
    bool seen = false;
    for (const Diagnostic& d : r.diagnostics) {
      seen |= d.code == codes::kMalformedElementSettings &&
              absl::StrContains(d.message, "Fe:intermediate needs geometry");
    }
    EXPECT_TRUE(seen);
  }
}

TEST(Coordination, ThreeSevenAndNineCoordinate) {
  CheckAll({
      {"Pt(PPh3)3", "Pt", 0, Geometry::kTrigonalPlanar, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 27, from memory"},
      {"K2[Cu(CN)3]", "Cu", 1, Geometry::kTrigonalPlanar, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 28, from memory"},
      {"K[HgI3]", "Hg", 2, Geometry::kTrigonalPlanar, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 29, from memory"},
      {"K3[ZrF7]", "Zr", 4, Geometry::kPentagonalBipyramidal, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 21, from memory"},
      {"K2[ReH9]", "Re", 7, Geometry::kTricappedTrigonalPrismatic, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 24, from memory"},
  });
}

TEST(Coordination, BisAcetylacetonatesOligomeriseOctahedral) {
  // M(acac)2 of Mn to Ni share O atoms in oligomers: octahedral, high
  // spin; Cu(acac)2 stays a square-planar monomer.
  CheckAll({
      {"Ni(acac)2", "Ni", 2, Geometry::kOctahedral, 2,
       "Greenwood and Earnshaw, 2nd ed., ch. 27, from memory (trimer "
       "[Ni(acac)2]3)"},
      {"[Ni(acac)2]3", "Ni", 2, Geometry::kOctahedral, 6,
       "Greenwood and Earnshaw, 2nd ed., ch. 27, from memory"},
      {"Co(acac)2", "Co", 2, Geometry::kOctahedral, 3,
       "Greenwood and Earnshaw, 2nd ed., ch. 26, from memory (tetramer "
       "[Co(acac)2]4)"},
      {"[Co(acac)2]4", "Co", 2, Geometry::kOctahedral, 12,
       "Greenwood and Earnshaw, 2nd ed., ch. 26, from memory"},
      {"Cu(acac)2", "Cu", 2, Geometry::kSquarePlanar, 1,
       "Greenwood and Earnshaw, 2nd ed., ch. 28, from memory"},
  });
}

TEST(Coordination, TetroxidesAndTetrahalidesAreTetrahedral) {
  CheckAll({
      {"RuO4", "Ru", 8, Geometry::kTetrahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 25, from memory"},
      {"OsO4", "Os", 8, Geometry::kTetrahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 25, from memory"},
      {"KReO4", "Re", 7, Geometry::kTetrahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 24, from memory"},
      // Perruthenate, d1.
      {"KRuO4", "Ru", 7, Geometry::kTetrahedral, 1,
       "Greenwood and Earnshaw, 2nd ed., ch. 25, from memory"},
      {"TiCl4", "Ti", 4, Geometry::kTetrahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 21, from memory"},
      {"VCl4", "V", 4, Geometry::kTetrahedral, 1,
       "Greenwood and Earnshaw, 2nd ed., ch. 22, from memory"},
      // TiF4 is a fluoride-bridged polymer, TiO2 and SrTiO3 octahedral.
      {"TiF4", "Ti", 4, Geometry::kOctahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 21, from memory"},
      {"SrTiO3", "Ti", 4, Geometry::kOctahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 21, from memory"},
  });
}

TEST(Coordination, HeavyD8CarbonylDimersStaySquarePlanar) {
  // Regression: the chloride-bridged Rh(I) dimer was read as a metal-metal
  // bonded carbonyl, octahedral.
  CheckAll({
      {"[Rh(CO)2Cl]2", "Rh", 1, Geometry::kSquarePlanar, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 26, from memory"},
      {"Mn2(CO)10", "Mn", 0, Geometry::kOctahedral, 0,
       "Greenwood and Earnshaw, 2nd ed., ch. 8, from memory"},
  });
}

TEST(Coordination, BracketedComplexKeepsItsCounterIon) {
  // Regression: the sulfate run after the complex was left out, giving
  // V(IV) beside S(IV).
  CheckAll({
      {"[V(H2O)6]SO4", "V", 2, Geometry::kOctahedral, 3,
       "Greenwood and Earnshaw, 2nd ed., ch. 22, from memory (d3)"},
  });
  CompositionInput in;
  in.formula = "[V(H2O)6]SO4";
  const CompositionReport r = AnalyzeComposition(in);
  ASSERT_TRUE(r.valid);
  bool sulfate = false;
  for (const auto& u : r.units) sulfate |= u.unit->name == "sulfate";
  EXPECT_TRUE(sulfate);
}

TEST(Coordination, ChargedComplexesReadTheirNeutralLigands) {
  // Regression: a charged complex of neutral ligands read its ligands as
  // loose atoms ([Fe(H2O)6]2+ listed no water unit).
  for (const char* formula :
       {"[Fe(H2O)6]2+", "[Ti(H2O)6]3+", "[Cu(NH3)4]2+", "[Co(NH3)6]3+"}) {
    SCOPED_TRACE(formula);
    CompositionInput in;
    in.formula = formula;
    const CompositionReport r = AnalyzeComposition(in);
    ASSERT_TRUE(r.valid);
    ASSERT_EQ(r.units.size(), 1u);
    EXPECT_EQ(r.units[0].unit->charge, 0);
    EXPECT_TRUE(r.units[0].unit->name == "water" ||
                r.units[0].unit->name == "ammonia");
  }
}

TEST(Coordination, FragmentsAreReadFromWrittenGroupsOnly) {
  // Me, Et, Ph and Cy are carbanions where a formula writes them as
  // groups (ZnMe2 = Zn(CH3)2, Zn(II)); a bare CH3 run (CH3Cl) is not
  // read as methyl.
  CompositionInput in;
  in.formula = "ZnMe2";
  const CompositionReport zn = AnalyzeComposition(in);
  ASSERT_TRUE(zn.valid);
  ASSERT_EQ(zn.units.size(), 1u);
  EXPECT_EQ(zn.units[0].unit->name, "methyl");
  in.formula = "CH3Cl";
  const CompositionReport mecl = AnalyzeComposition(in);
  ASSERT_TRUE(mecl.valid);
  EXPECT_TRUE(mecl.units.empty());
}

TEST(Coordination, QuaternaryAmmoniumCountersHoldNitrogenMinusThree) {
  // NMe4+, NEt4+ and NBu4+: N takes the N-C bond electrons, N-3 as in
  // NH4+, the carbon bonded to N one step up from the alkyl's (ionic
  // approximation: Karen, McArdle and Takats, Pure Appl. Chem. 88 (2016)
  // 831, applied by hand); without the units the alkyl groups read as
  // carbanions and N as N+5. The anion's metal is untouched:
  // (NEt4)2[NiCl4] holds tetrahedral Ni(II), 2 unpaired (Greenwood and
  // Earnshaw, Chemistry of the Elements, 2nd ed., ch. 27, from memory).
  const struct {
    const char* formula;
    const char* unit;
  } kCases[] = {{"[N(CH3)4]Cl", "tetramethylammonium"},
                {"(NMe4)Cl", "tetramethylammonium"},
                {"(NEt4)2[NiCl4]", "tetraethylammonium"},
                {"(NBu4)PF6", "tetrabutylammonium"}};
  for (const auto& c : kCases) {
    SCOPED_TRACE(c.formula);
    CompositionInput in;
    in.formula = c.formula;
    const CompositionReport r = AnalyzeComposition(in);
    ASSERT_TRUE(r.valid);
    bool found = false;
    for (const auto& u : r.units) found |= u.unit->name == c.unit;
    EXPECT_TRUE(found);
    for (const IonAnnotation& ion : r.ions) {
      if (ion.element->symbol == "N") EXPECT_EQ(ion.state, -3);
      if (ion.element->symbol == "Ni") {
        EXPECT_EQ(ion.state, 2);
        EXPECT_EQ(ion.description->unpaired_electrons, 2);
      }
    }
  }
  // n-Butyllithium: Bu is the n-butyl carbanion beside Li(I).
  CompositionInput in;
  in.formula = "BuLi";
  const CompositionReport r = AnalyzeComposition(in);
  ASSERT_TRUE(r.valid);
  ASSERT_EQ(r.units.size(), 1u);
  EXPECT_EQ(r.units[0].unit->name, "butyl");
}

// A record's EnvironmentCache, shared by all its ions and both sides of
// its complexes in turn, gives every ion the environment a call without
// it gives: formulas with and without complexes, Prussian blue (an
// element on both sides), layered pnictides, a brownmillerite, carbonyl
// dimers, spinels and oxides of several d metals.
TEST(Coordination, EnvironmentCacheChangesNoEnvironment) {
  const char* formulas[] = {"Fe4[Fe(CN)6]3",
                            "KFe[Fe(CN)6]",
                            "K3[Fe(CN)6]",
                            "[Co(NH3)6]Cl3",
                            "[Co(NH3)4(CO3)]NO3",
                            "Mn2(CO)10",
                            "Co2(CO)8",
                            "BaFe2As2",
                            "LaFeAsO",
                            "BaMn2As2",
                            "Ca2Fe2O5",
                            "Sr2Co2O5",
                            "NiFe2O4",
                            "MnFe1.5Al0.5O4",
                            "LiNi0.5Co0.2Mn0.3O2",
                            "La0.7Sr0.3MnO3",
                            "(Mg0.2Co0.2Ni0.2Cu0.2Zn0.2)O",
                            "CuSO4·5H2O",
                            "NiCl2(PEt3)2",
                            "Cr2(OAc)4(H2O)2",
                            "MoS2",
                            "PdCoO2",
                            "FeAsS",
                            "K[PtCl3(C2H4)]",
                            "Ni(CO)4",
                            "MoCl2"};
  for (const char* text : formulas) {
    SCOPED_TRACE(text);
    const absl::StatusOr<Formula> f = ParseFormula(text);
    ASSERT_TRUE(f.ok());
    const absl::StatusOr<OxidationResult> r =
        AssignOxidationStates(*f, OxidationOptions());
    ASSERT_TRUE(r.ok());
    ASSERT_TRUE(r->best.has_value());
    EnvironmentCache cache;
    int d_ions = 0;
    for (const AssignedState& s : r->best->states) {
      if (s.unit >= 0 || s.element->block != Block::kD) continue;
      ++d_ions;
      for (const ComplexSide side :
           {ComplexSide::kAsWritten, ComplexSide::kInside,
            ComplexSide::kOutside}) {
        const IonEnvironment plain =
            FindEnvironment(*f, *r->best, s, nullptr, nullptr, side);
        const IonEnvironment cached =
            FindEnvironment(*f, *r->best, s, nullptr, nullptr, side, &cache);
        EXPECT_EQ(cached.geometry, plain.geometry);
        EXPECT_EQ(cached.spin_state, plain.spin_state);
        EXPECT_EQ(cached.ligand, plain.ligand);
        EXPECT_EQ(cached.f, plain.f);
        EXPECT_EQ(cached.basis, plain.basis);
        EXPECT_EQ(cached.near_crossover, plain.near_crossover);
        EXPECT_EQ(cached.metal_metal_bonded, plain.metal_metal_bonded);
      }
    }
    EXPECT_GT(d_ions, 0);
  }
}

}  // namespace
}  // namespace shellwright
