// Tests for engine/magnetism.h and the moments that DescribeAtom() reports:
// lanthanide J moments against Kittel's table, iron-group spin-only moments,
// the spin-only and Landé formulas, J = 0 levels, saturation and spin
// moments, the recommended basis, and measured moments from
// data/measured_moments.tsv.

#include "engine/magnetism.h"

#include <cmath>
#include <optional>
#include <string>

#include "absl/status/statusor.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/string_view.h"
#include "engine/atom.h"
#include "engine/term_symbol.h"
#include "gmock/gmock.h"
#include "gtest/gtest.h"
#include "tests/engine/reference_magnetism.h"
#include "tests/testing/engine_test_util.h"

namespace shellwright {
namespace {

using ::shellwright::testing::Describe;
using ::shellwright::testing::kIronGroupSpinOnly;
using ::shellwright::testing::kLanthanideEffectiveMagnetons;
using ::shellwright::testing::ReferenceLanthanideMoment;
using ::shellwright::testing::ReferenceSpinOnlyMoment;
using ::testing::HasSubstr;

// Kittel rounded some printed values (see reference_magnetism.h).
constexpr double kKittelTolerance = 0.02;

TermSymbol ParseTermOrFail(absl::string_view text) {
  absl::StatusOr<TermSymbol> t = TermSymbol::Parse(text);
  EXPECT_TRUE(t.ok()) << text << ": " << t.status();
  return t.ok() ? *t : TermSymbol();
}

TEST(Magnetism, LanthanideJMomentsMatchKittel) {
  for (const ReferenceLanthanideMoment& row : kLanthanideEffectiveMagnetons) {
    SCOPED_TRACE(absl::StrCat(row.spec, " (", row.source, ")"));
    AtomDescriptionPtr d = Describe(row.spec);
    ASSERT_NE(d, nullptr);
    EXPECT_EQ(d->term.ToAscii(), row.term);
    EXPECT_NEAR(d->moments.j_moment, row.effective_magnetons, kKittelTolerance);
    // The free-standing function agrees with the description.
    const TermSymbol term = ParseTermOrFail(row.term);
    EXPECT_NEAR(JMoment(term), row.effective_magnetons, kKittelTolerance);
  }
}

TEST(Magnetism, LanthanideLandeFactors) {
  // g_J of the trivalent lanthanide ground terms as exact fractions
  // (Ashcroft & Mermin, Solid State Physics, magnetism chapter, rare-earth
  // table, from memory).
  struct Case {
    const char* spec;
    double g;
    double saturation;  // g_J J
  };
  const Case cases[] = {
      {"Ce3+", 6.0 / 7.0, 6.0 / 7.0 * 2.5},
      {"Pr3+", 4.0 / 5.0, 4.0 / 5.0 * 4.0},
      {"Nd3+", 8.0 / 11.0, 8.0 / 11.0 * 4.5},
      {"Pm3+", 3.0 / 5.0, 3.0 / 5.0 * 4.0},
      {"Sm3+", 2.0 / 7.0, 2.0 / 7.0 * 2.5},
      {"Gd3+", 2.0, 7.0},
      {"Tb3+", 3.0 / 2.0, 9.0},
      {"Dy3+", 4.0 / 3.0, 10.0},
      {"Ho3+", 5.0 / 4.0, 10.0},
      {"Er3+", 6.0 / 5.0, 9.0},
      {"Tm3+", 7.0 / 6.0, 7.0},
      {"Yb3+", 8.0 / 7.0, 4.0},
  };
  for (const Case& c : cases) {
    SCOPED_TRACE(c.spec);
    AtomDescriptionPtr d = Describe(c.spec);
    ASSERT_NE(d, nullptr);
    EXPECT_NEAR(d->moments.lande_g, c.g, 1e-9);
    EXPECT_NEAR(d->moments.saturation, c.saturation, 1e-9);
    // saturation = g J, J moment = g sqrt(J(J+1)), from the reported term.
    const double j = d->term.two_j / 2.0;
    EXPECT_NEAR(d->moments.saturation, d->moments.lande_g * j, 1e-9);
    EXPECT_NEAR(d->moments.j_moment,
                d->moments.lande_g * std::sqrt(j * (j + 1)), 1e-9);
  }
}

TEST(Magnetism, IronGroupSpinOnlyMoments) {
  for (const ReferenceSpinOnlyMoment& row : kIronGroupSpinOnly) {
    SCOPED_TRACE(absl::StrCat(row.spec, " (", row.source, ")"));
    AtomDescriptionPtr d = Describe(row.spec);
    ASSERT_NE(d, nullptr);
    EXPECT_EQ(d->unpaired_electrons, row.unpaired);
    EXPECT_NEAR(d->moments.spin_only, row.spin_only_moment, 0.01);
    EXPECT_NEAR(SpinOnlyMoment(row.unpaired), row.spin_only_moment, 0.01);
    // d ions: orbital moment quenched, so spin-only is recommended.
    EXPECT_EQ(d->moments.recommended_basis, MomentBasis::kSpinOnly);
    EXPECT_DOUBLE_EQ(d->moments.recommended, d->moments.spin_only);
    // Spin moment 2S = n.
    EXPECT_DOUBLE_EQ(d->moments.spin_moment, row.unpaired);
  }
}

TEST(Magnetism, SpinOnlyFormula) {
  // mu_so = sqrt(n(n+2)) (Kittel, Introduction to Solid State Physics,
  // paramagnetism chapter, from memory).
  for (int n = 0; n <= 14; ++n) {
    EXPECT_NEAR(SpinOnlyMoment(n), std::sqrt(n * (n + 2.0)), 1e-12) << n;
  }
  // Familiar rounded values (common practice, no source).
  EXPECT_DOUBLE_EQ(SpinOnlyMoment(0), 0.0);
  EXPECT_NEAR(SpinOnlyMoment(1), 1.732, 0.001);
  EXPECT_NEAR(SpinOnlyMoment(2), 2.828, 0.001);
  EXPECT_NEAR(SpinOnlyMoment(3), 3.873, 0.001);
  EXPECT_NEAR(SpinOnlyMoment(4), 4.899, 0.001);
  EXPECT_NEAR(SpinOnlyMoment(5), 5.916, 0.001);
  EXPECT_NEAR(SpinOnlyMoment(6), 6.928, 0.001);
  EXPECT_NEAR(SpinOnlyMoment(7), 7.937, 0.001);
}

TEST(Magnetism, LandeFormulaSpecialCases) {
  // L = 0: g = 2; S = 0: g = 1 (Landé formula with g_e = 2; common
  // practice, no source).
  EXPECT_DOUBLE_EQ(LandeG(ParseTermOrFail("2S1/2")), 2.0);
  EXPECT_DOUBLE_EQ(LandeG(ParseTermOrFail("6S5/2")), 2.0);
  EXPECT_DOUBLE_EQ(LandeG(ParseTermOrFail("1D2")), 1.0);
  EXPECT_DOUBLE_EQ(LandeG(ParseTermOrFail("1Go4")), 1.0);
  // 2P1/2: g = 2/3; 2P3/2: g = 4/3 (common practice, no source).
  EXPECT_NEAR(LandeG(ParseTermOrFail("2Po1/2")), 2.0 / 3.0, 1e-12);
  EXPECT_NEAR(LandeG(ParseTermOrFail("2Po3/2")), 4.0 / 3.0, 1e-12);
  // Fe 5D4: g = 3/2 (the Landé formula with S = 2, L = 2, J = 4; Kittel,
  // Introduction to Solid State Physics, paramagnetism chapter, from
  // memory).
  EXPECT_NEAR(LandeG(ParseTermOrFail("5D4")), 1.5, 1e-12);
}

// U3- ([Rn] 5f6 6d1 7s2, 8H3/2) was reported with a J moment of -0.775 μB,
// because g_J is negative there (found by tests/fuzz/species_fuzzer).
// g_J = 3/2 + [S(S+1) - L(L+1)] / [2J(J+1)] with S = 7/2, L = 5, J = 3/2
// gives -2/5 (the Landé formula, worked by hand); moments are its size.
TEST(Magnetism, NegativeLandeFactorGivesPositiveMoments) {
  const TermSymbol term = ParseTermOrFail("8H3/2");
  EXPECT_NEAR(LandeG(term), -0.4, 1e-12);
  EXPECT_NEAR(JMoment(term), 0.4 * std::sqrt(1.5 * 2.5), 1e-12);
  EXPECT_NEAR(SaturationMoment(term), 0.4 * 1.5, 1e-12);
  AtomDescriptionPtr u = Describe("U3-");
  ASSERT_NE(u, nullptr);
  EXPECT_EQ(u->term.ToAscii(), "8H3/2");
  EXPECT_GT(u->moments.j_moment, 0);
  EXPECT_GT(u->moments.recommended, 0);
}

TEST(Magnetism, JZeroCarriesNoMoment) {
  // Eu3+ 7F0 (Kittel lanthanide table, from memory): J = 0.
  AtomDescriptionPtr eu = Describe("Eu3+");
  ASSERT_NE(eu, nullptr);
  EXPECT_EQ(eu->term.ToAscii(), "7F0");
  EXPECT_DOUBLE_EQ(eu->moments.lande_g, 0.0);
  EXPECT_DOUBLE_EQ(eu->moments.j_moment, 0.0);
  EXPECT_DOUBLE_EQ(eu->moments.saturation, 0.0);
  // But it still has six unpaired 4f electrons (kReferenceIons).
  EXPECT_EQ(eu->unpaired_electrons, 6);
  EXPECT_DOUBLE_EQ(eu->moments.spin_moment, 6.0);
  EXPECT_NEAR(eu->moments.spin_only, std::sqrt(48.0), 1e-9);

  for (const char* t : {"7F0", "3P0", "1S0", "5D0"}) {
    SCOPED_TRACE(t);
    const TermSymbol term = ParseTermOrFail(t);
    EXPECT_DOUBLE_EQ(LandeG(term), 0.0);
    EXPECT_DOUBLE_EQ(JMoment(term), 0.0);
    EXPECT_DOUBLE_EQ(SaturationMoment(term), 0.0);
    EXPECT_FALSE(std::isnan(LandeG(term)));
  }
}

TEST(Magnetism, GadoliniumIsPureSpin) {
  // Gd3+ 8S7/2: g = 2, p = 7.94 (Kittel lanthanide table, from memory).
  AtomDescriptionPtr gd = Describe("Gd3+");
  ASSERT_NE(gd, nullptr);
  EXPECT_EQ(gd->term.ToAscii(), "8So7/2");
  EXPECT_NEAR(gd->moments.lande_g, 2.0, 1e-12);
  EXPECT_NEAR(gd->moments.j_moment, 7.94, 0.01);
  EXPECT_NEAR(gd->moments.saturation, 7.0, 1e-12);
  EXPECT_DOUBLE_EQ(gd->moments.spin_moment, 7.0);
  // For a pure-spin ion, J and spin-only moments coincide.
  EXPECT_NEAR(gd->moments.j_moment, gd->moments.spin_only, 1e-9);

  const TermSymbol term = ParseTermOrFail("8So7/2");
  EXPECT_NEAR(LandeG(term), 2.0, 1e-12);
  EXPECT_NEAR(JMoment(term), 7.937, 0.001);
  EXPECT_NEAR(SaturationMoment(term), 7.0, 1e-12);
}

TEST(Magnetism, SpinMomentEqualsUnpaired) {
  for (const char* spec : {"Fe3+", "Fe2+", "Cu2+", "Ce3+", "Gd3+", "Ho3+",
                           "Zn2+", "Na+", "O", "Cr"}) {
    SCOPED_TRACE(spec);
    AtomDescriptionPtr d = Describe(spec);
    ASSERT_NE(d, nullptr);
    EXPECT_DOUBLE_EQ(d->moments.spin_moment, d->unpaired_electrons);
    EXPECT_NEAR(
        d->moments.spin_only,
        std::sqrt(d->unpaired_electrons * (d->unpaired_electrons + 2.0)), 1e-9);
  }
}

TEST(Magnetism, RecommendedBasis) {
  // Open 4f or 5f: J moment (orbital moment not quenched); d and
  // main-group ions: spin-only (Kittel, paramagnetism chapter, from memory).
  for (const ReferenceLanthanideMoment& row : kLanthanideEffectiveMagnetons) {
    SCOPED_TRACE(row.spec);
    AtomDescriptionPtr d = Describe(row.spec);
    ASSERT_NE(d, nullptr);
    EXPECT_EQ(d->moments.recommended_basis, MomentBasis::kJ);
    EXPECT_DOUBLE_EQ(d->moments.recommended, d->moments.j_moment);
  }
  for (const char* spec : {"U3+", "U4+", "Am3+"}) {
    SCOPED_TRACE(spec);
    AtomDescriptionPtr d = Describe(spec);
    ASSERT_NE(d, nullptr);
    EXPECT_EQ(d->moments.recommended_basis, MomentBasis::kJ);
  }
  // Closed 4f: nothing open in f, so spin-only.
  for (const char* spec : {"La3+", "Lu3+", "Yb2+", "Fe3+", "Ni2+", "Na+"}) {
    SCOPED_TRACE(spec);
    AtomDescriptionPtr d = Describe(spec);
    ASSERT_NE(d, nullptr);
    EXPECT_EQ(d->moments.recommended_basis, MomentBasis::kSpinOnly);
    EXPECT_DOUBLE_EQ(d->moments.recommended, d->moments.spin_only);
  }
}

TEST(Magnetism, MeasuredMomentsForSmAndEuDepartFromJMoment) {
  // Measured p: Sm3+ 1.5, Eu3+ 3.4 (Kittel, Introduction to Solid State
  // Physics, paramagnetism chapter, from memory). Both differ from g J
  // because excited J multiplets lie close (same source).
  struct Case {
    const char* spec;
    double measured;
  };
  for (const Case& c : {Case{"Sm3+", 1.5}, Case{"Eu3+", 3.4}}) {
    SCOPED_TRACE(c.spec);
    AtomDescriptionPtr d = Describe(c.spec);
    ASSERT_NE(d, nullptr);
    ASSERT_TRUE(d->moments.measured.has_value());
    EXPECT_NEAR(*d->moments.measured, c.measured, 1e-9);
    EXPECT_THAT(std::string(d->moments.measured_source), HasSubstr("Kittel"));
    EXPECT_GT(std::abs(*d->moments.measured - d->moments.j_moment), 0.5);
    bool noted = false;
    for (const std::string& note : d->notes) {
      noted |= note.find("measured") != std::string::npos;
    }
    EXPECT_TRUE(noted) << "expected a note on the measured moment";

    const std::optional<MeasuredMoment> m =
        FindMeasuredMoment(d->element->atomic_number, 3);
    ASSERT_TRUE(m.has_value());
    EXPECT_NEAR(m->moment, c.measured, 1e-9);
  }
  // Gd3+ measured 8.0 (same Kittel table, from memory), close to g J.
  AtomDescriptionPtr gd = Describe("Gd3+");
  ASSERT_NE(gd, nullptr);
  ASSERT_TRUE(gd->moments.measured.has_value());
  EXPECT_NEAR(*gd->moments.measured, 8.0, 1e-9);
  EXPECT_LT(std::abs(*gd->moments.measured - gd->moments.j_moment), 0.2);
}

TEST(Magnetism, NoMeasuredMomentWhereNoneIsTabulated) {
  // Kittel lists no experimental value for Pm3+ (from memory).
  AtomDescriptionPtr pm = Describe("Pm3+");
  ASSERT_NE(pm, nullptr);
  EXPECT_FALSE(pm->moments.measured.has_value());
  EXPECT_TRUE(pm->moments.measured_source.empty());
  EXPECT_FALSE(FindMeasuredMoment(61, 3).has_value());
  // Iron-group ions are not in the lanthanide table.
  AtomDescriptionPtr fe = Describe("Fe3+");
  ASSERT_NE(fe, nullptr);
  EXPECT_FALSE(fe->moments.measured.has_value());
  // The lanthanide values are for the trivalent ion only.
  EXPECT_FALSE(FindMeasuredMoment(62, 2).has_value());
  EXPECT_FALSE(FindMeasuredMoment(62, 0).has_value());
}

}  // namespace
}  // namespace shellwright
