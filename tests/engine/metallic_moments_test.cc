// Tests for engine/metallic_moments.h: ordered moments of metallic phases
// from composition alone.
//
// Each measured value names its source. The rules are rules of thumb;
// each tolerance says how far the rule is known to stray for that class.

#include "engine/metallic_moments.h"

#include <string>

#include "engine/formula.h"
#include "gmock/gmock.h"
#include "gtest/gtest.h"

namespace shellwright {
namespace {

using ::testing::HasSubstr;
using ::testing::Not;

MetallicMomentEstimate Estimate(const std::string& formula) {
  absl::StatusOr<Formula> f = ParseFormula(formula);
  EXPECT_TRUE(f.ok()) << formula << ": " << f.status();
  if (!f.ok()) return MetallicMomentEstimate();
  return EstimateMetallicMoment(f->amounts);
}

// The estimate of `formula` with `model` lies within `tolerance` of
// `expected` μB per formula unit.
void ExpectMoment(const std::string& formula, MomentModel model,
                  double expected, double tolerance) {
  SCOPED_TRACE(formula);
  const MetallicMomentEstimate e = Estimate(formula);
  EXPECT_EQ(e.model, model) << Name(e.model) << ": " << e.note;
  ASSERT_TRUE(e.saturation.has_value()) << e.note;
  EXPECT_NEAR(*e.saturation, expected, tolerance) << e.note;
  EXPECT_FALSE(e.note.empty());
}

// No estimate for `formula`, with a reason that says `why`.
void ExpectNone(const std::string& formula, const std::string& why) {
  SCOPED_TRACE(formula);
  const MetallicMomentEstimate e = Estimate(formula);
  EXPECT_EQ(e.model, MomentModel::kNone) << e.note;
  EXPECT_FALSE(e.saturation.has_value());
  EXPECT_FALSE(e.effective.has_value());
  EXPECT_EQ(e.localized_unpaired, 0);
  EXPECT_THAT(e.note, HasSubstr(why));
  EXPECT_THAT(e.note, HasSubstr("no estimate"));
}

TEST(MetallicValenceElectrons, CountsAsTheAlloyLiteratureDoes) {
  // s + p for main-group atoms, s + d for d metals, 3 for lanthanides
  // (Galanakis et al., Phys. Rev. B 66, 174429 (2002), from memory).
  auto count = [](const char* symbol) {
    return MetallicValenceElectrons(*FindElementBySymbol(symbol));
  };
  EXPECT_EQ(count("Fe"), 8);
  EXPECT_EQ(count("Co"), 9);
  EXPECT_EQ(count("Mn"), 7);
  EXPECT_EQ(count("Cu"), 11);
  EXPECT_EQ(count("Zn"), 12);
  EXPECT_EQ(count("Pt"), 10);
  EXPECT_EQ(count("Al"), 3);
  EXPECT_EQ(count("Si"), 4);
  EXPECT_EQ(count("Sb"), 5);
  EXPECT_EQ(count("Ga"), 3);
  EXPECT_EQ(count("Nd"), 3);  // Not 4f3 6s2's 5.
  EXPECT_EQ(count("Gd"), 3);
  EXPECT_EQ(count("La"), 3);
  EXPECT_EQ(count("Lu"), 3);  // Not 4f14 5d1 6s2's 17.
  EXPECT_EQ(count("Y"), 3);
  EXPECT_EQ(count("U"), 6);  // 5f3 6d1 7s2.
  EXPECT_EQ(count("He"), 2);
  EXPECT_EQ(count("O"), 6);
}

TEST(MetallicMoments, TotalValenceElectronsPerFormulaUnit) {
  EXPECT_EQ(Estimate("Co2MnSi").total_valence_electrons, 29);    // 18 + 7 + 4.
  EXPECT_EQ(Estimate("NiMnSb").total_valence_electrons, 22);     // 10 + 7 + 5.
  EXPECT_EQ(Estimate("Nd2Fe14B").total_valence_electrons, 121);  // 6+112+3.
  EXPECT_DOUBLE_EQ(Estimate("Fe0.7Co0.3").total_valence_electrons, 8.3);
}

// Full Heusler X2YZ: M = Z_t - 24 (Galanakis, Dederichs and Papanikolaou,
// Phys. Rev. B 66, 174429 (2002), from memory).

TEST(MetallicMoments, FullHeuslerCo2MnSi) {
  // Measured 5.07 μB/f.u. (Brown et al., J. Phys.: Condens. Matter 12,
  // 1827 (2000), from memory).
  ExpectMoment("Co2MnSi", MomentModel::kFullHeusler, 5.07, 0.15);
  EXPECT_EQ(*Estimate("Co2MnSi").saturation, 5);  // 29 - 24.
}

TEST(MetallicMoments, FullHeuslerCo2MnGeAndCo2MnSn) {
  // Measured 5.11 and 5.08 μB/f.u. (Webster, J. Phys. Chem. Solids 32,
  // 1221 (1971), from memory).
  ExpectMoment("Co2MnGe", MomentModel::kFullHeusler, 5.11, 0.15);
  ExpectMoment("Co2MnSn", MomentModel::kFullHeusler, 5.08, 0.15);
}

TEST(MetallicMoments, FullHeuslerCo2MnAlAndCo2MnGa) {
  // Measured 4.01 and 4.05 μB/f.u. (Webster 1971, from memory).
  ExpectMoment("Co2MnAl", MomentModel::kFullHeusler, 4.01, 0.1);
  ExpectMoment("Co2MnGa", MomentModel::kFullHeusler, 4.05, 0.1);
}

TEST(MetallicMoments, FullHeuslerCo2FeSi) {
  // Measured 5.97 μB/f.u. at 5 K (Wurmehl et al., Phys. Rev. B 72, 184434
  // (2005), from memory): the rule's 6, the largest known.
  ExpectMoment("Co2FeSi", MomentModel::kFullHeusler, 5.97, 0.1);
}

TEST(MetallicMoments, FullHeuslerFe2VAlIsNonMagnetic) {
  // Z_t = 24: a non-magnetic semimetal (Nishino et al., Phys. Rev. Lett.
  // 79, 1909 (1997), from memory). An estimate of 0, not no estimate.
  ExpectMoment("Fe2VAl", MomentModel::kFullHeusler, 0, 1e-12);
}

TEST(MetallicMoments, FullHeuslerCo2TiAl) {
  // Measured 0.74 μB/f.u. (Webster 1971, from memory); the rule says 1.
  ExpectMoment("Co2TiAl", MomentModel::kFullHeusler, 0.74, 0.3);
}

TEST(MetallicMoments, FullHeuslerWrittenInAnyOrder) {
  // The X element is the one counted twice, wherever it is written.
  ExpectMoment("MnSiCo2", MomentModel::kFullHeusler, 5, 1e-12);
  ExpectMoment("Co4Mn2Si2", MomentModel::kFullHeusler, 10, 1e-12);  // 2 f.u.
}

TEST(MetallicMoments, NiAndCuBasedFullHeuslersAreTheRulesExceptions) {
  // Ni2MnGa carries 4.17 μB/f.u. (Webster et al., Phil. Mag. B 49, 295
  // (1984), from memory) where Z_t - 24 says 6; Cu2MnAl about 3.6 where it
  // says 8 (Graf, Felser and Parkin, Prog. Solid State Chem. 39, 1 (2011),
  // from memory).
  ExpectNone("Ni2MnGa", "Ni or Cu group");
  ExpectNone("Cu2MnAl", "Ni or Cu group");
}

TEST(MetallicMoments, FullHeuslersWithFourDOrFiveDXAreOutsideTheRule) {
  // Ru2MnSi, Ru2MnGe and Ru2MnSn order antiferromagnetically (Neel points
  // near 300 K; Kanomata et al., J. Alloys Compd. 393, 26 (2005), from
  // memory), where Z_t - 24 says 3 uB.
  for (const char* formula : {"Ru2MnSi", "Ru2MnGe", "Ru2MnSn", "Rh2MnGe"}) {
    SCOPED_TRACE(formula);
    ExpectNone(formula, "3d series");
  }
  // The 3d X compounds keep it: Co2MnGe 5.11 uB (Webster, J. Phys. Chem.
  // Solids 32, 1221 (1971), from memory).
  ExpectMoment("Co2MnGe", MomentModel::kFullHeusler, 5.11, 0.15);
}

TEST(MetallicMoments, QuaternaryAndSubstitutedHeuslersKeepTheRule) {
  // The LiMgPdSn-type quaternary CoFeMnSi: Z_t = 28, rule 4 uB, measured
  // about 3.7 uB per formula unit (Bainsla et al., Phys. Rev. B 91, 104408
  // (2015), from memory).
  ExpectMoment("CoFeMnSi", MomentModel::kFullHeusler, 3.7, 0.35);
  // Co2Mn1-xFexSi follows Z_t - 24 from 5 to 6 uB (Balke et al., Phys.
  // Rev. B 74, 104405 (2006), from memory): x = 0.5, about 5.5.
  ExpectMoment("Co2Mn0.5Fe0.5Si", MomentModel::kFullHeusler, 5.5, 0.15);
  // Substitution on Z: Co2MnAl0.5Si0.5 between Co2MnAl (4.01) and Co2MnSi
  // (5.07) (Webster, J. Phys. Chem. Solids 32, 1221 (1971), from memory,
  // for the end members; the midpoint is the rule's).
  ExpectMoment("Co2MnAl0.5Si0.5", MomentModel::kFullHeusler, 4.54, 0.15);
  // Half-Heusler Ti0.5Zr0.5NiSn, 18 electrons, non-magnetic like TiNiSn
  // (Graf, Felser and Parkin, Prog. Solid State Chem. 39, 1 (2011), from
  // memory).
  ExpectMoment("Ti0.5Zr0.5NiSn", MomentModel::kHalfHeusler, 0, 1e-12);
  // A full site of Ni stays outside the rule, as Ni2MnGa does.
  ExpectNone("NiCoMnSn", "Ni or Cu group");
  ExpectNone("Ni1.5Co0.5MnGa", "Ni or Cu group");
}

TEST(MetallicMoments, FullHeuslersBelowTwentyFourAreFerrimagnets) {
  // Z_t = 22: the rule gives -2, a half-metallic ferrimagnet of 2 uB;
  // Mn2VAl measures about 1.9 uB per formula unit (Jiang, Venkatesan and
  // Coey, Solid State Commun. 118, 513 (2001); Galanakis et al., Phys.
  // Rev. B 75, 092407 (2007); from memory).
  ExpectMoment("Mn2VAl", MomentModel::kFullHeusler, 1.9, 0.15);
  EXPECT_THAT(Estimate("Mn2VAl").note, HasSubstr("ferrimagnet"));
}

TEST(MetallicMoments, NegativeHeuslerRuleBeyondThreeGivesNoEstimate) {
  // Ti2MnAl: Z_t = 18, the rule gives -6 (rule arithmetic).
  ExpectNone("Ti2MnAl", "outside the rule's -3 to 7");
}

// Half-Heusler XYZ: M = Z_t - 18 (Galanakis, Dederichs and Papanikolaou,
// Phys. Rev. B 66, 134428 (2002), from memory).

TEST(MetallicMoments, HalfHeuslerNiMnSb) {
  // Measured 3.85 μB/f.u. at 4.2 K (Otto et al., J. Phys.: Condens. Matter
  // 1, 2341 (1989), from memory); half-metallic with 4 (de Groot et al.,
  // Phys. Rev. Lett. 50, 2024 (1983)).
  ExpectMoment("NiMnSb", MomentModel::kHalfHeusler, 3.85, 0.2);
}

TEST(MetallicMoments, HalfHeuslerPtMnSb) {
  // Measured 4.14 μB/f.u. (Otto et al. 1989, from memory).
  ExpectMoment("PtMnSb", MomentModel::kHalfHeusler, 4.14, 0.2);
}

TEST(MetallicMoments, EighteenElectronHalfHeuslersAreNonMagnetic) {
  // TiNiSn and FeVSb are non-magnetic semiconductors (Graf, Felser and
  // Parkin 2011, from memory): Z_t = 18.
  ExpectMoment("TiNiSn", MomentModel::kHalfHeusler, 0, 1e-12);
  ExpectMoment("FeVSb", MomentModel::kHalfHeusler, 0, 1e-12);
  ExpectMoment("CoMnSb", MomentModel::kHalfHeusler, 3, 1e-12);  // 21 - 18.
}

// 3d alloys: the Slater-Pauling curve. Measured moments per atom at 0 K of
// Fe, Co and Ni from Kittel, Introduction to Solid State Physics, 8th
// ed., table of ferromagnetic crystals (from memory): 2.22, 1.72, 0.606.

TEST(MetallicMoments, PureIronCobaltNickel) {
  ExpectMoment("Fe", MomentModel::kSlaterPaulingAlloy, 2.22, 0.02);
  // Co sits on the Fe-Co line M = 10.75 - n (1.75 against 1.72).
  ExpectMoment("Co", MomentModel::kSlaterPaulingAlloy, 1.72, 0.05);
  ExpectMoment("Ni", MomentModel::kSlaterPaulingAlloy, 0.606, 0.02);
}

TEST(MetallicMoments, IronCobaltNearThePeak) {
  // The curve's maximum, about 2.45 μB per atom near Fe70Co30 (Bozorth,
  // Ferromagnetism (1951), Slater-Pauling plot, from memory); the Fe-Co
  // line M = 10.75 - n meets the rising branch there.
  ExpectMoment("Fe0.7Co0.3", MomentModel::kSlaterPaulingAlloy, 2.45, 0.05);
  // Equiatomic FeCo: about 2.35 μB per atom (Bozorth 1951, from memory).
  ExpectMoment("FeCo", MomentModel::kSlaterPaulingAlloy, 2 * 2.35, 2 * 0.12);
  // Bcc Fe-Co moments per atom at 0 K: Fe80Co20 about 2.42, Fe65Co35
  // about 2.45 (Bardos, J. Appl. Phys. 40, 1371 (1969), from memory); fcc
  // Co90Fe10 about 1.85 (Bozorth 1951, Slater-Pauling plot, from memory).
  ExpectMoment("Fe0.8Co0.2", MomentModel::kSlaterPaulingAlloy, 2.42, 0.06);
  ExpectMoment("Fe0.65Co0.35", MomentModel::kSlaterPaulingAlloy, 2.45, 0.08);
  ExpectMoment("Co0.9Fe0.1", MomentModel::kSlaterPaulingAlloy, 1.85, 0.08);
  // The peak is above both ends of the Fe-Co line.
  EXPECT_GT(*Estimate("Fe0.8Co0.2").saturation, *Estimate("Fe").saturation);
  EXPECT_GT(*Estimate("Fe0.8Co0.2").saturation, *Estimate("Co").saturation);
}

TEST(MetallicMoments, IronNickel) {
  // Fe50Ni50 about 1.6 μB per atom, Ni80Fe20 (Permalloy) about 1.0
  // (Crangle and Hallam, Proc. R. Soc. A 272, 119 (1963), from memory).
  ExpectMoment("Fe0.5Ni0.5", MomentModel::kSlaterPaulingAlloy, 1.6, 0.15);
  ExpectMoment("Ni0.8Fe0.2", MomentModel::kSlaterPaulingAlloy, 1.0, 0.15);
  EXPECT_THAT(Estimate("Fe0.65Ni0.35").note, HasSubstr("Invar"));
}

TEST(MetallicMoments, CobaltNickel) {
  // Co50Ni50 about 1.15 μB per atom (Crangle, Phil. Mag. 46, 499 (1955),
  // from memory).
  ExpectMoment("Co0.5Ni0.5", MomentModel::kSlaterPaulingAlloy, 1.15, 0.15);
}

TEST(MetallicMoments, NickelCopperFallsToZero) {
  // Ni80Cu20 about 0.38 μB per atom; ferromagnetism ends near 55-60% Cu
  // (Ahern, Martin and Sucksmith, Proc. R. Soc. A 248, 145 (1958), from
  // memory).
  ExpectMoment("Ni0.8Cu0.2", MomentModel::kSlaterPaulingAlloy, 0.38, 0.1);
  ExpectMoment("Ni0.5Cu0.5", MomentModel::kSlaterPaulingAlloy, 0.1, 0.1);
  // Each Zn removes two electrons' worth, each Cu one: 10.6 - n.
  EXPECT_NEAR(*Estimate("Ni0.9Zn0.1").saturation, 0.4, 1e-9);
}

TEST(MetallicMoments, IronChromiumOnTheRisingBranch) {
  // About -2.2 μB per unit Cr fraction: Fe80Cr20 about 1.78 μB per atom
  // (Aldred, Phys. Rev. B 14, 219 (1976), from memory).
  ExpectMoment("Fe0.8Cr0.2", MomentModel::kSlaterPaulingAlloy, 1.78, 0.15);
  // Fe0.9V0.1: n = 7.7, rising branch 7.7 - 5.78 (rule arithmetic).
  ExpectMoment("Fe0.9V0.1", MomentModel::kSlaterPaulingAlloy, 1.92, 1e-9);
  // Too far from Fe: Fe60Cr40 (n = 7.2) leaves the line.
  ExpectNone("Fe0.6Cr0.4", "rising branch");
}

TEST(MetallicMoments, NickelChromiumUsesMagneticValence) {
  // Cr's magnetic valence -6 ends Ni's ferromagnetism near 10% Cr (Ni-Cr
  // branch of the Slater-Pauling plot; Malozemoff, Williams and Moruzzi,
  // Phys. Rev. B 29, 1620 (1984), from memory): 0.6 - 6 x 0.05 = 0.3.
  ExpectMoment("Ni0.95Cr0.05", MomentModel::kSlaterPaulingAlloy, 0.3, 1e-9);
}

TEST(MetallicMoments, SmallMainGroupFractionDilutes) {
  // Fe with 3% Si: n = 7.88, rising branch 2.10 μB per atom (rule
  // arithmetic); measured moments of Fe-Si fall by about dilution
  // (common practice, no source).
  ExpectMoment("Fe0.97Si0.03", MomentModel::kSlaterPaulingAlloy, 2.10, 1e-9);
}

TEST(MetallicMoments, IronAndCobaltWithPlatinumOrPalladium) {
  // L1_0 FePt, CoPt and FePd: saturation polarisation J_s about 1.43 T,
  // 1.00 T and 1.38 T (Coey, Magnetism and Magnetic Materials (2010),
  // table of hard magnetic materials, from memory), with lattice
  // parameters a = 3.85, 3.80, 3.85 and c = 3.71, 3.68, 3.72 angstrom
  // (same source, from memory): 3.4, 2.3 and 3.3 μB per formula unit.
  // The falling branch, Pd and Pt counted with N_d↑ = 5, gives 3.2, 2.2
  // and 3.2; tolerance 0.3 μB (the induced Pt/Pd moments, about 0.3 μB,
  // are where the rule is least exact).
  ExpectMoment("FePt", MomentModel::kSlaterPaulingAlloy, 3.4, 0.3);
  ExpectMoment("CoPt", MomentModel::kSlaterPaulingAlloy, 2.3, 0.3);
  ExpectMoment("FePd", MomentModel::kSlaterPaulingAlloy, 3.3, 0.3);
  // Pt-rich FePt3 orders antiferromagnetically, CoPt3 lies off the curve
  // and equiatomic NiPt is nearly non-magnetic: no estimate (common
  // practice, no source).
  ExpectNone("FePt3", "exchange-enhanced");
  ExpectNone("NiPt", "exchange-enhanced");
  ExpectNone("Pt", "exchange-enhanced");
}

TEST(MetallicMoments, AlloysOutsideTheCurve) {
  ExpectNone("Fe3Al", "main-group atoms");
  ExpectNone("Fe3C", "main-group atoms");
  ExpectNone("CuZn", "not ferromagnetic");  // Brass.
  ExpectNone("Mn", "antiferromagnetically");
  ExpectNone("Cr", "antiferromagnetically");
  ExpectNone("Ni0.8Mn0.2", "Mn");
}

// Rare earths: trivalent 4f moments g_J J (ordered) and g_J √(J(J+1)).

TEST(MetallicMoments, GadoliniumAndDysprosiumMetals) {
  // Measured 7.63 and 10.2 μB per atom at 0 K (Kittel, table of
  // ferromagnetic crystals, from memory); conduction electrons add the
  // difference.
  ExpectMoment("Gd", MomentModel::kRareEarth4f, 7.63, 0.7);
  ExpectMoment("Dy", MomentModel::kRareEarth4f, 10.2, 0.7);
  const MetallicMomentEstimate gd = Estimate("Gd");
  EXPECT_EQ(*gd.saturation, 7);  // 8S7/2: g = 2, J = 7/2.
  ASSERT_TRUE(gd.effective.has_value());
  EXPECT_NEAR(*gd.effective, 7.94, 0.01);  // 2 √(63/4).
  EXPECT_EQ(gd.localized_unpaired, 7);
}

TEST(MetallicMoments, LanthanumAndLutetiumCarryNo4fMoment) {
  ExpectMoment("La", MomentModel::kRareEarth4f, 0, 1e-12);
  ExpectMoment("Lu", MomentModel::kRareEarth4f, 0, 1e-12);
}

TEST(MetallicMoments, SamariumEuropiumCeriumCautions) {
  // Sm3+ 6H5/2: g_J J = 2/7 x 5/2 = 0.714.
  const MetallicMomentEstimate sm = Estimate("Sm");
  ASSERT_TRUE(sm.saturation.has_value());
  EXPECT_NEAR(*sm.saturation, 5.0 / 7.0, 1e-9);
  EXPECT_THAT(sm.note, HasSubstr("J multiplets"));
  // Eu counted divalent, 8S7/2: 7 μB.
  ExpectMoment("Eu", MomentModel::kRareEarth4f, 7, 1e-9);
  EXPECT_THAT(Estimate("Eu").note, HasSubstr("divalent"));
  EXPECT_THAT(Estimate("Ce").note, HasSubstr("intermediate-valent"));
}

TEST(MetallicMoments, NdFeBMagnet) {
  // Measured 37.6 μB/f.u. at 4.2 K (Herbst, Rev. Mod. Phys. 63, 819
  // (1991), from memory): 14 x 2.2 + 2 x 3.27 (Nd3+ 4I9/2, g = 8/11).
  ExpectMoment("Nd2Fe14B", MomentModel::kRareEarth4fWith3d, 37.6, 1.0);
}

TEST(MetallicMoments, YttriumIronBoride) {
  // Measured 31.4 μB/f.u. at 4.2 K (Herbst 1991, from memory): Y adds none.
  ExpectMoment("Y2Fe14B", MomentModel::kRareEarth4fWith3d, 31.4, 1.0);
}

TEST(MetallicMoments, HeavyRareEarthsCoupleAntiparallel) {
  // Gd2Fe14B: 30.8 - 2 x 7 = 16.8 (rule arithmetic); light Nd adds.
  ExpectMoment("Gd2Fe14B", MomentModel::kRareEarth4fWith3d, 16.8, 1e-9);
  EXPECT_LT(*Estimate("Gd2Fe14B").saturation, *Estimate("Y2Fe14B").saturation);
  EXPECT_GT(*Estimate("Nd2Fe14B").saturation, *Estimate("Y2Fe14B").saturation);
}

TEST(MetallicMoments, SamariumCobaltAndNitride) {
  // SmCo5: 5 x 1.6 + 0.714; Sm2Fe17N3: 17 x 2.2 + 2 x 0.714 (rule
  // arithmetic); no paramagnetic effective moment from composition.
  ExpectMoment("SmCo5", MomentModel::kRareEarth4fWith3d, 8 + 5.0 / 7.0, 1e-9);
  ExpectMoment("Sm2Fe17N3", MomentModel::kRareEarth4fWith3d, 37.4 + 10.0 / 7.0,
               1e-9);
  EXPECT_FALSE(Estimate("SmCo5").effective.has_value());
}

TEST(MetallicMoments, LavesPhasesRFe2) {
  // Measured at 4.2 K (Buschow, Rep. Prog. Phys. 40, 1179 (1977), from
  // memory): YFe2 2.9, GdFe2 about 3.7, TbFe2 about 5.8 uB per formula
  // unit; the heavy rare earth orders against the Fe sublattice.
  ExpectMoment("YFe2", MomentModel::kRareEarth4fWith3d, 2.9, 0.1);
  ExpectMoment("GdFe2", MomentModel::kRareEarth4fWith3d, 3.7, 0.6);
  ExpectMoment("TbFe2", MomentModel::kRareEarth4fWith3d, 5.8, 0.6);
  EXPECT_THAT(Estimate("GdFe2").note, HasSubstr("Laves"));
}

TEST(MetallicMoments, LavesPhasesRCo2WithAHeavyRareEarth) {
  // Measured at 4.2 K (Gratz and Markosyan, J. Phys.: Condens. Matter 13,
  // R385 (2001); Duc and Goto, Handbook on the Physics and Chemistry of
  // Rare Earths 26 (1999); from memory): GdCo2 about 4.8, TbCo2 about 7.0,
  // HoCo2 about 8.0, ErCo2 about 6.9 uB per formula unit; the Co moment,
  // about 1 uB, is induced by the rare earth and opposes its moment.
  ExpectMoment("GdCo2", MomentModel::kRareEarth4fWith3d, 4.8, 0.5);
  ExpectMoment("TbCo2", MomentModel::kRareEarth4fWith3d, 7.0, 0.6);
  ExpectMoment("HoCo2", MomentModel::kRareEarth4fWith3d, 8.0, 0.6);
  ExpectMoment("ErCo2", MomentModel::kRareEarth4fWith3d, 6.9, 0.6);
  EXPECT_THAT(Estimate("ErCo2").note, HasSubstr("induced Co"));
  // YCo2 and LuCo2 are exchange-enhanced Pauli paramagnets (same sources):
  // no ordered moment to estimate. The light RCo2 are left alone.
  ExpectNone("YCo2", "Pauli paramagnet");
  ExpectNone("LuCo2", "Pauli paramagnet");
  ExpectNone("NdCo2", "light rare earth");
}

TEST(MetallicMoments, ThMn12TypeRFe11Ti) {
  // YFe11Ti about 19-20 uB per formula unit at 4.2 K, about 1.8 per Fe
  // (Buschow, Rep. Prog. Phys. 54, 1123 (1991); Coey, Magnetism and
  // Magnetic Materials (2010); from memory): well below the 2.2 per Fe of
  // R2Fe14B, which read 24.2 before.
  ExpectMoment("YFe11Ti", MomentModel::kRareEarth4fWith3d, 19.5, 1.0);
  EXPECT_THAT(Estimate("YFe11Ti").note, HasSubstr("ThMn12"));
  // The light rare earth adds its g_J J along the Fe moment (rule
  // arithmetic: 11 x 1.8 + 3.27 for Nd3+).
  ExpectMoment("NdFe11Ti", MomentModel::kRareEarth4fWith3d,
               11 * 1.8 + 36.0 / 11.0, 1e-9);
  // Without a stabilising atom the 1:12 rule does not apply.
  EXPECT_THAT(Estimate("SmFe12").note, Not(HasSubstr("ThMn12")));
}

TEST(MetallicMoments, CeriumBesideIronIsTetravalent) {
  // Ce2Fe14B 29.4 uB per formula unit at 4.2 K (Herbst, Rev. Mod. Phys. 63,
  // 819 (1991), from memory), below Y2Fe14B's 31.4; CeFe2 about 2.4
  // (Buschow, Rep. Prog. Phys. 40, 1179 (1977), from memory).
  ExpectMoment("Ce2Fe14B", MomentModel::kRareEarth4fWith3d, 29.4, 1.5);
  ExpectMoment("CeFe2", MomentModel::kRareEarth4fWith3d, 2.4, 0.6);
  EXPECT_THAT(Estimate("CeFe2").note, HasSubstr("tetravalent"));
}

TEST(MetallicMoments, RareEarthCompoundsOutsideTheDomain) {
  ExpectNone("NdFe3", "below 80%");
  ExpectNone("GdCo3", "below 80%");
  ExpectNone("NdMn2", "Mn");
}

TEST(MetallicMoments, OutsideEveryRule) {
  ExpectNone("Pd", "exchange-enhanced");
  ExpectNone("Pt", "exchange-enhanced");
  ExpectNone("MoSi2", "Mo is outside");
  ExpectNone("Si", "main-group");
  ExpectNone("O2", "main-group");
  ExpectNone("U", "actinide");
  const MetallicMomentEstimate none = EstimateMetallicMoment({});
  EXPECT_EQ(none.model, MomentModel::kNone);
}

TEST(MetallicMoments, ModelNames) {
  EXPECT_EQ(Name(MomentModel::kFullHeusler), "slater_pauling_full_heusler");
  EXPECT_EQ(Name(MomentModel::kNone), "none");
  EXPECT_EQ(ParseName<MomentModel>("local_moment").value(),
            MomentModel::kLocalMoment);
}

}  // namespace
}  // namespace shellwright
