// Tests of engine/bonding.h: the bonding class of real compositions, and
// what the oxidation-state search makes of each class.

#include "engine/bonding.h"

#include <string>

#include "absl/strings/str_cat.h"
#include "engine/formula.h"
#include "engine/oxidation.h"
#include "gtest/gtest.h"

namespace shellwright {
namespace {

BondingClass Classify(const std::string& text) {
  absl::StatusOr<Formula> f = ParseFormula(text);
  EXPECT_TRUE(f.ok()) << text << ": " << f.status();
  return f.ok() ? ClassifyBonding(*f) : BondingClass{};
}

// "Cu:1x1 Fe:3x1 S:-2x2" for the best assignment.
std::string Best(const std::string& text, CompositionKind* kind = nullptr) {
  absl::StatusOr<Formula> f = ParseFormula(text);
  if (!f.ok()) return "parse error";
  absl::StatusOr<OxidationResult> r = AssignOxidationStates(*f, {});
  if (!r.ok() || !r->best.has_value()) return "no balance";
  if (kind != nullptr) *kind = r->kind;
  std::string out;
  for (const AssignedState& s : r->best->states) {
    absl::StrAppend(&out, out.empty() ? "" : " ", s.element->symbol, ":",
                    s.state, "x", s.count.ToString());
  }
  return out;
}

struct Case {
  const char* formula;
  CompositionKind kind;
  const char* source;
};

TEST(Bonding, ClassOfRealCompositions) {
  using K = CompositionKind;
  const Case kCases[] = {
      // Permanent magnets and their relatives: metallic intermetallics
      // (Coey, Magnetism and Magnetic Materials, from memory).
      {"Nd2Fe14B", K::kIntermetallic, "Coey, from memory"},
      {"Sm2Fe17N3", K::kIntermetallic, "Coey, from memory"},
      {"SmCo5", K::kMetallic, "Coey, from memory"},
      {"CoFeB", K::kIntermetallic, "Coey, from memory"},
      // Hydrides: interstitial and metallic for the d-block metals and
      // the group 3 and lanthanide dihydrides, salt-like for the
      // trihydrides and beside electropositive metals (Greenwood and
      // Earnshaw, Chemistry of the Elements, 2nd ed., ch. 3, from memory).
      {"TiH2", K::kIntermetallic, "Greenwood and Earnshaw, from memory"},
      {"ZrH2", K::kIntermetallic, "Greenwood and Earnshaw, from memory"},
      {"PdH0.6", K::kIntermetallic, "Greenwood and Earnshaw, from memory"},
      {"LaH2", K::kIntermetallic, "Greenwood and Earnshaw, from memory"},
      {"LaH3", K::kIonic, "Greenwood and Earnshaw, from memory"},
      {"YH3", K::kIonic, "Greenwood and Earnshaw, from memory"},
      {"Mg2FeH6", K::kIonic, "Greenwood and Earnshaw, from memory"},
      {"MgH2", K::kIonic, "Greenwood and Earnshaw, from memory"},
      // Borides, silicides, germanides (Greenwood and Earnshaw, Chemistry
      // of the Elements, 2nd ed., from memory).
      {"LaB6", K::kIntermetallic, "Greenwood and Earnshaw, from memory"},
      // AlB2-type diborides, graphite-like boron layers, all metals:
      // TiB2 and ZrB2, and the main-group MgB2 (a 39 K superconductor,
      // Nagamatsu et al., Nature 410, 63 (2001)) and AlB2 (Greenwood and
      // Earnshaw, ch. 6; all from memory).
      {"TiB2", K::kIntermetallic, "Greenwood and Earnshaw, from memory"},
      {"ZrB2", K::kIntermetallic, "Greenwood and Earnshaw, from memory"},
      {"MgB2", K::kIntermetallic, "Nagamatsu et al. 2001, from memory"},
      {"AlB2", K::kIntermetallic, "Greenwood and Earnshaw, from memory"},
      {"Mg0.5Al0.5B2", K::kIntermetallic,
       "Greenwood and Earnshaw, from memory"},
      {"MoSi2", K::kIntermetallic, "Greenwood and Earnshaw, from memory"},
      {"MnSi", K::kIntermetallic, "Greenwood and Earnshaw, from memory"},
      {"CoSi", K::kIntermetallic, "Greenwood and Earnshaw, from memory"},
      {"Gd5Si4", K::kIntermetallic,
       "Pecharsky and Gschneidner, PRL 78, "
       "4494 (1997), from memory"},
      // Interstitial carbides, nitrides and hydrides (Greenwood and
      // Earnshaw, from memory).
      {"Fe3C", K::kIntermetallic, "Greenwood and Earnshaw, from memory"},
      {"TiN", K::kIntermetallic, "Greenwood and Earnshaw, from memory"},
      {"Fe4N", K::kIntermetallic, "Greenwood and Earnshaw, from memory"},
      {"LaNi5H6", K::kIntermetallic, "Greenwood and Earnshaw, from memory"},
      {"PdH0.7", K::kIntermetallic, "Greenwood and Earnshaw, from memory"},
      {"NiAs", K::kIntermetallic, "Greenwood and Earnshaw, from memory"},
      // Cu3N is a Cu(I) salt, a semiconductor (Greenwood and Earnshaw,
      // ch. 11, from memory).
      {"Cu3N", K::kIonic, "Greenwood and Earnshaw, from memory"},
      // Heusler compounds (Graf, Felser and Parkin, Prog. Solid State
      // Chem. 39, 1 (2011), from memory).
      {"Co2MnSi", K::kIntermetallic, "Graf et al. 2011, from memory"},
      {"NiMnSb", K::kIntermetallic, "Graf et al. 2011, from memory"},
      // Zintl phases (Schäfer, Eisenmann and Müller, Angew. Chem. 12, 694
      // (1973), from memory).
      {"NaTl", K::kZintl, "Schäfer et al. 1973, from memory"},
      {"CaSi2", K::kZintl, "Schäfer et al. 1973, from memory"},
      {"KGe", K::kZintl, "Schäfer et al. 1973, from memory"},
      {"Ca5Ge3", K::kZintl, "Schäfer et al. 1973, from memory"},
      {"Mg2Si", K::kZintl, "Schäfer et al. 1973, from memory"},
      {"Na3Sb", K::kZintl, "Schäfer et al. 1973, from memory"},
      // Cluster and cage anions (Corbett, Chem. Rev. 85, 383 (1985), from
      // memory) and the 14-1-11 phases (Kauzlarich (ed.), Chemistry,
      // Structure, and Bonding of Zintl Phases and Ions, VCH 1996, from
      // memory).
      {"K4Ge9", K::kZintl, "Corbett 1985, from memory"},
      {"Na4Sn9", K::kZintl, "Corbett 1985, from memory"},
      {"Na3P7", K::kZintl, "Corbett 1985, from memory"},
      {"K3Sb7", K::kZintl, "Corbett 1985, from memory"},
      {"Ca14MnSb11", K::kZintl, "Kauzlarich 1996, from memory"},
      {"Yb14MnSb11", K::kZintl, "Kauzlarich 1996, from memory"},
      // Layered transition-metal pnictides with electropositive cations
      // (Johrendt, J. Mater. Chem. 21 (2011) 13726; Kauzlarich 1996; from
      // memory); with a trivalent rare earth the layers hold P-P pairs and
      // stay intermetallic.
      {"BaFe2As2", K::kZintl, "Johrendt 2011, from memory"},
      {"Ba0.6K0.4Fe2As2", K::kZintl, "Johrendt 2011, from memory"},
      {"LiFeAs", K::kZintl, "Johrendt 2011, from memory"},
      {"EuFe2As2", K::kZintl, "Johrendt 2011, from memory"},
      {"CaMn2Sb2", K::kZintl, "Kauzlarich 1996, from memory"},
      {"BaMn2Bi2", K::kZintl, "Kauzlarich 1996, from memory"},
      {"LaFe2P2", K::kIntermetallic, "Johrendt 2011, from memory"},
      {"CaCu2As2", K::kIntermetallic, "common practice, no source"},
      // Polyphosphides of the d-block metals: P-P bonded frameworks
      // charged by the generalised 8-N rule (von Schnering and Hoenle,
      // Chem. Rev. 88 (1988) 243, from memory); the pyrite-type
      // diphosphides and the skutterudites keep their pair and ring
      // anions, read formally.
      {"FeP4", K::kZintl, "von Schnering and Hoenle 1988, from memory"},
      {"OsP4", K::kZintl, "von Schnering and Hoenle 1988, from memory"},
      {"CdP4", K::kZintl, "von Schnering and Hoenle 1988, from memory"},
      {"CuP2", K::kZintl, "von Schnering and Hoenle 1988, from memory"},
      {"Ag3P11", K::kZintl, "von Schnering and Hoenle 1988, from memory"},
      {"PtP2", K::kIonic, "Hulliger 1968, from memory"},
      {"CoP3", K::kIonic, "common practice, no source"},
      // Metal-rich transition-metal chalcogenides hold metal-metal bonds
      // and are metallic; copper sulfides and the monosulfides stay ionic
      // (Vaughan and Craig, Mineral Chemistry of Metal Sulfides, 1978, from
      // memory).
      {"Ni3S2", K::kIntermetallic, "Vaughan and Craig 1978, from memory"},
      {"Co9S8", K::kIntermetallic, "Vaughan and Craig 1978, from memory"},
      {"Fe4.5Ni4.5S8", K::kIntermetallic,
       "Vaughan and Craig 1978, from memory"},
      {"Pd4S", K::kIntermetallic, "Greenwood and Earnshaw, from memory"},
      {"Cu2S", K::kIonic, "Vaughan and Craig 1978, from memory"},
      {"Cu5FeS4", K::kIonic, "Vaughan and Craig 1978, from memory"},
      {"Fe7S8", K::kIonic, "Vaughan and Craig 1978, from memory"},
      {"NiS", K::kIonic, "Vaughan and Craig 1978, from memory"},
      // Aurides and platinides of the heavy alkali metals, against the
      // intermetallics of the lighter ones (Jansen, Chem. Soc. Rev. 37,
      // 1826 (2008); Karpov, Jansen et al., Angew. Chem. 2003; from
      // memory).
      {"CsAu", K::kIonic, "Jansen 2008, from memory"},
      {"RbAu", K::kIonic, "Jansen 2008, from memory"},
      {"Cs2Pt", K::kIonic, "Karpov et al. 2003, from memory"},
      {"NaAu2", K::kMetallic, "Jansen 2008, from memory"},
      {"Cs3Au2", K::kMetallic, "common practice, no source"},
      // Alloys.
      {"Fe3Al", K::kMetallic, "common practice, no source"},
      {"Mg17Al12", K::kMetallic, "common practice, no source"},
      {"Fe", K::kElemental, "common practice, no source"},
      // Ionic and polar covalent compounds keep formal states.
      {"GdN", K::kIonic, "Greenwood and Earnshaw, from memory"},
      {"LaSb", K::kIonic, "Greenwood and Earnshaw, from memory"},
      {"GaAs", K::kIonic, "Greenwood and Earnshaw, from memory"},
      {"K4[Fe(CN)6]", K::kIonic, "Greenwood and Earnshaw, from memory"},
      {"Fe(C5H5)2", K::kIonic, "Greenwood and Earnshaw, from memory"},
      {"CuFeS2", K::kIonic, "Greenwood and Earnshaw, from memory"},
      {"Li3N", K::kIonic, "Greenwood and Earnshaw, from memory"},
      {"NaH", K::kIonic, "Greenwood and Earnshaw, from memory"},
  };
  for (const Case& c : kCases) {
    SCOPED_TRACE(absl::StrCat(c.formula, " (", c.source, ")"));
    EXPECT_EQ(Name(Classify(c.formula).kind), Name(c.kind));
  }
}

TEST(Bonding, VanArkelKetelaarCoordinates) {
  // Pauling electronegativities Nd 1.14, Fe 1.83, B 2.04 (the elements
  // table's values).
  const BondingClass c = Classify("Nd2Fe14B");
  EXPECT_NEAR(c.electronegativity_difference, 2.04 - 1.14, 1e-9);
  EXPECT_NEAR(c.electronegativity_mean, (2 * 1.14 + 14 * 1.83 + 2.04) / 17,
              1e-9);
  EXPECT_FALSE(c.rule.empty());
}

TEST(Bonding, ZintlPhasesBalanceByTheEightMinusNRule) {
  // Schäfer, Eisenmann and Müller, Angew. Chem. 12, 694 (1973), from
  // memory: Tl- in NaTl, Si- chains in CaSi2, Ge4 tetrahedra (Ge-) in
  // KGe, Ge4- and Ge2 6- in Ca5Ge3.
  CompositionKind kind = CompositionKind::kIonic;
  EXPECT_EQ(Best("NaTl", &kind), "Na:1x1 Tl:-1x1");
  EXPECT_EQ(kind, CompositionKind::kZintl);
  EXPECT_EQ(Best("CaSi2"), "Ca:2x1 Si:-1x2");
  EXPECT_EQ(Best("KGe"), "K:1x1 Ge:-1x1");
  EXPECT_EQ(Best("Ca5Ge3"), "Ca:2x5 Ge:-4x1 Ge:-3x2");
}

TEST(Bonding, ZintlCagesAndClustersHoldNeutralAtoms) {
  // Corbett, Chem. Rev. 85, 383 (1985), from memory: P7 3- holds three
  // two-bonded P- and four three-bonded P0; the deltahedral Ge9 4- and
  // Sn9 4- carry four electrons over nine atoms; CaAs3 holds [As3]2- with
  // one three-bonded As0 (Schäfer et al. 1973, from memory).
  EXPECT_EQ(Best("Na3P7"), "Na:1x3 P:-1x3 P:0x4");
  EXPECT_EQ(Best("K3Sb7"), "K:1x3 Sb:-1x3 Sb:0x4");
  EXPECT_EQ(Best("K4Ge9"), "K:1x4 Ge:-1x4 Ge:0x5");
  EXPECT_EQ(Best("CaAs3"), "Ca:2x1 As:-1x2 As:0x1");
}

TEST(Bonding, EuropiumAndYtterbiumAreDivalentInZintlPhases) {
  // Kauzlarich (ed.), Chemistry, Structure, and Bonding of Zintl Phases and
  // Ions, VCH 1996, from memory: Eu(II) in EuIn2As2, EuAs3 and Eu5In2Sb6
  // (magnetisation: 7 uB Eu2+ moments), Yb(II) in YbZn2Sb2, and Mn(III) of
  // [MnSb4]9- in Ca14MnSb11.
  EXPECT_EQ(Best("EuIn2As2"), "Eu:2x1 In:-1x2 As:0x2");
  EXPECT_EQ(Best("EuAs3"), "Eu:2x1 As:-1x2 As:0x1");
  EXPECT_EQ(Best("Eu5In2Sb6"), "Eu:2x5 In:3x2 Sb:-3x4 Sb:-2x2");
  EXPECT_EQ(Best("YbZn2Sb2"), "Yb:2x1 Zn:2x2 Sb:-3x2");
  EXPECT_EQ(Best("Ca14MnSb11"), "Ca:2x14 Mn:3x1 Sb:-3x9 Sb:-2x2");
}

TEST(Bonding, ZincAndCadmiumAntimonidesHoldSbPairs) {
  // Mozharivskyj et al., Chem. Mater. 16 (2004) 1580, and Snyder et al.,
  // Nature Mater. 3 (2004) 458, from memory: ZnSb and CdSb are Zn2+/Cd2+
  // with Sb2 4- dumbbells; beta-Zn4Sb3 (Zn13Sb10) holds isolated Sb3-
  // beside Sb2 4- dumbbells.
  CompositionKind kind = CompositionKind::kIonic;
  EXPECT_EQ(Best("ZnSb", &kind), "Zn:2x1 Sb:-2x1");
  EXPECT_EQ(kind, CompositionKind::kZintl);
  EXPECT_EQ(Best("CdSb", &kind), "Cd:2x1 Sb:-2x1");
  EXPECT_EQ(kind, CompositionKind::kZintl);
  EXPECT_EQ(Best("Zn4Sb3", &kind), "Zn:2x4 Sb:-3x2 Sb:-2x1");
  EXPECT_EQ(kind, CompositionKind::kZintl);
  EXPECT_EQ(Best("Zn13Sb10"), "Zn:2x13 Sb:-3x6 Sb:-2x4");
  // Normal-valence Zn3As2 and Cd3As2 balance with isolated As3- and stay
  // ionic (Greenwood and Earnshaw, Chemistry of the Elements, 2nd ed.,
  // ch. 13, from memory).
  EXPECT_EQ(Best("Cd3As2", &kind), "Cd:2x3 As:-3x2");
  EXPECT_EQ(kind, CompositionKind::kIonic);
  EXPECT_EQ(Classify("Zn3As2").kind, CompositionKind::kIonic);
}

TEST(Bonding, LayeredPnictidesHoldDivalentTransitionMetals) {
  // Rotter, Tegel and Johrendt, Phys. Rev. Lett. 101 (2008) 107006, and
  // Johrendt, J. Mater. Chem. 21 (2011) 13726, from memory: BaFe2As2 is
  // Ba2+ with [Fe2As2]2- (Fe(II)), KFe2As2 Fe(II)/Fe(III) (Fe +2.5), the
  // 111 phase LiFeAs Fe(II); CaMn2Sb2 and BaMn2As2 Mn(II) (Kauzlarich (ed.),
  // Chemistry, Structure, and Bonding of Zintl Phases and Ions, VCH 1996,
  // from memory).
  CompositionKind kind = CompositionKind::kIonic;
  EXPECT_EQ(Best("BaFe2As2", &kind), "Ba:2x1 Fe:2x2 As:-3x2");
  EXPECT_EQ(kind, CompositionKind::kZintl);
  EXPECT_EQ(Best("KFe2As2"), "K:1x1 Fe:2x1 Fe:3x1 As:-3x2");
  EXPECT_EQ(Best("LiFeAs"), "Li:1x1 Fe:2x1 As:-3x1");
  EXPECT_EQ(Best("CaMn2Sb2"), "Ca:2x1 Mn:2x2 Sb:-3x2");
  EXPECT_EQ(Best("BaMn2As2"), "Ba:2x1 Mn:2x2 As:-3x2");
  EXPECT_EQ(Best("EuFe2As2"), "Eu:2x1 Fe:2x2 As:-3x2");
  EXPECT_EQ(Best("BaNi2As2"), "Ba:2x1 Ni:2x2 As:-3x2");
}

TEST(Bonding, UnbalancedZintlCompositionsArePolarIntermetallics) {
  // BaAl4, BaSn3, CaAl4 and SrGa4 are not electron-precise: they balance
  // neither by the 8-N rule nor formally, and are polar intermetallics,
  // valid records (Nesper, Angew. Chem. Int. Ed. Engl. 30 (1991) 789, from
  // memory). An ionic composition that does not balance stays unbalanced.
  for (const char* formula : {"BaAl4", "BaSn3", "CaAl4", "SrGa4"}) {
    SCOPED_TRACE(formula);
    absl::StatusOr<Formula> f = ParseFormula(formula);
    ASSERT_TRUE(f.ok());
    absl::StatusOr<OxidationResult> r = AssignOxidationStates(*f, {});
    ASSERT_TRUE(r.ok()) << r.status();
    EXPECT_EQ(r->kind, CompositionKind::kIntermetallic);
    EXPECT_EQ(r->bonding.kind, CompositionKind::kIntermetallic);
    ASSERT_TRUE(r->best.has_value());
    for (const AssignedState& s : r->best->states) EXPECT_EQ(s.state, 0);
  }
  absl::StatusOr<Formula> f = ParseFormula("NaCl2");
  ASSERT_TRUE(f.ok());
  absl::StatusOr<OxidationResult> r = AssignOxidationStates(*f, {});
  ASSERT_TRUE(r.ok());
  EXPECT_FALSE(r->best.has_value());
}

TEST(Bonding, IntermetallicsAreStateZeroWithTheFormalReadingAsAlternative) {
  absl::StatusOr<Formula> f = ParseFormula("Co2MnSi");
  ASSERT_TRUE(f.ok());
  absl::StatusOr<OxidationResult> r = AssignOxidationStates(*f, {});
  ASSERT_TRUE(r.ok());
  EXPECT_EQ(r->kind, CompositionKind::kIntermetallic);
  ASSERT_TRUE(r->best.has_value());
  for (const AssignedState& s : r->best->states) EXPECT_EQ(s.state, 0);
  // The formal reading balances, so it is kept for the user who wants it.
  ASSERT_FALSE(r->alternatives.empty());
  int charge = 0;
  bool nonzero = false;
  for (const AssignedState& s : r->alternatives[0].states) {
    charge += s.state * static_cast<int>(s.count.num());
    nonzero |= s.state != 0;
  }
  EXPECT_TRUE(nonzero);
  EXPECT_EQ(charge, 0);
}

TEST(Bonding, ChargeOrDeclaredStatesAskForFormalStates) {
  absl::StatusOr<Formula> f = ParseFormula("TiN");
  ASSERT_TRUE(f.ok());
  OxidationOptions o;
  o.declared.push_back({FindElementBySymbol("Ti"), 3});
  absl::StatusOr<OxidationResult> r = AssignOxidationStates(*f, o);
  ASSERT_TRUE(r.ok());
  EXPECT_EQ(r->kind, CompositionKind::kIonic);
  ASSERT_TRUE(r->best.has_value());
  EXPECT_EQ(r->best->states[1].state, -3);  // N-3 beside Ti+3.
}

}  // namespace
}  // namespace shellwright
