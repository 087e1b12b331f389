// Tests for engine/ligand_field.h and the ligand-field part of DescribeAtom():
// octahedral high/low spin occupancies against reference_magnetism.h, SplitD
// for d0..d10 in octahedral, tetrahedral and square-planar fields, the kAuto
// spin-state rule, HasSpinChoice, and geometry requests on ions without an
// open d subshell.

#include "engine/ligand_field.h"

#include <cmath>
#include <string>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "absl/strings/str_cat.h"
#include "engine/atom.h"
#include "engine/configuration.h"
#include "gmock/gmock.h"
#include "gtest/gtest.h"
#include "tests/engine/reference_magnetism.h"
#include "tests/testing/engine_test_util.h"

namespace shellwright {
namespace {

using ::shellwright::testing::Describe;
using ::shellwright::testing::kOctahedralSpinStates;
using ::shellwright::testing::ReferenceOctahedralSpinState;
using ::testing::HasSubstr;

constexpr Geometry kSplitGeometries[] = {Geometry::kOctahedral,
                                         Geometry::kTetrahedral,
                                         Geometry::kSquarePlanar,
                                         Geometry::kSquarePyramidal,
                                         Geometry::kTrigonalPlanar,
                                         Geometry::kPentagonalBipyramidal,
                                         Geometry::kTricappedTrigonalPrismatic};

TEST(LigandField, OctahedralReferenceSpinStates) {
  for (const ReferenceOctahedralSpinState& row : kOctahedralSpinStates) {
    SCOPED_TRACE(absl::StrCat(row.spec, " (", row.source, ")"));
    AtomDescriptionPtr high =
        Describe(row.spec, Geometry::kOctahedral, SpinStatePreference::kHigh);
    ASSERT_NE(high, nullptr);
    ASSERT_TRUE(high->ligand_field.has_value());
    EXPECT_EQ(high->ligand_field->subshell, (Subshell{3, 2}));
    EXPECT_EQ(high->ligand_field->splitting.geometry, Geometry::kOctahedral);
    EXPECT_EQ(high->ligand_field->splitting.spin_state, SpinState::kHigh);
    EXPECT_EQ(high->ligand_field->splitting.Notation(),
              row.high_spin_occupancy);
    EXPECT_EQ(high->ligand_field->splitting.unpaired, row.high_spin_unpaired);
    EXPECT_EQ(high->unpaired_electrons, row.high_spin_unpaired);

    AtomDescriptionPtr low =
        Describe(row.spec, Geometry::kOctahedral, SpinStatePreference::kLow);
    ASSERT_NE(low, nullptr);
    ASSERT_TRUE(low->ligand_field.has_value());
    EXPECT_EQ(low->ligand_field->splitting.spin_state, SpinState::kLow);
    EXPECT_EQ(low->ligand_field->splitting.Notation(), row.low_spin_occupancy);
    EXPECT_EQ(low->ligand_field->splitting.unpaired, row.low_spin_unpaired);
    EXPECT_EQ(low->unpaired_electrons, row.low_spin_unpaired);

    // The spin-only moment follows the ligand-field count.
    EXPECT_NEAR(
        low->moments.spin_only,
        std::sqrt(row.low_spin_unpaired * (row.low_spin_unpaired + 2.0)), 1e-9);
  }
}

TEST(SplitD, ConservesElectronsAndNeverExceedsHund) {
  for (Geometry g : kSplitGeometries) {
    for (SpinState spin : {SpinState::kHigh, SpinState::kLow}) {
      for (int n = 0; n <= 10; ++n) {
        SCOPED_TRACE(absl::StrCat(Name(g), " ", Name(spin), " d", n));
        const LigandFieldSplitting s = SplitD(n, g, spin);
        EXPECT_EQ(s.geometry, g);
        EXPECT_EQ(s.spin_state, spin);
        int electrons = 0;
        int orbitals = 0;
        int unpaired = 0;
        for (const SplitLevel& level : s.levels) {
          EXPECT_GE(level.electrons, 0);
          EXPECT_LE(level.electrons, 2 * level.orbitals);
          // Within one level, Hund's first rule: singly occupy, then pair.
          const int expected_unpaired =
              level.electrons <= level.orbitals
                  ? level.electrons
                  : 2 * level.orbitals - level.electrons;
          EXPECT_EQ(level.unpaired, expected_unpaired);
          electrons += level.electrons;
          orbitals += level.orbitals;
          unpaired += level.unpaired;
        }
        EXPECT_EQ(electrons, n);
        EXPECT_EQ(orbitals, 5);
        EXPECT_EQ(unpaired, s.unpaired);
        EXPECT_LE(s.unpaired, HundUnpairedElectrons(2, n));
        // Unpaired and paired electrons have the same parity as n.
        EXPECT_EQ((n - s.unpaired) % 2, 0);
      }
    }
  }
}

// HasSpinChoice agrees with SplitD: a choice exactly where high and low
// spin leave different unpaired counts.
TEST(HasSpinChoice, MatchesSplitD) {
  for (Geometry g : kSplitGeometries) {
    for (int d = 0; d <= 10; ++d) {
      EXPECT_EQ(HasSpinChoice(d, g), SplitD(d, g, SpinState::kHigh).unpaired !=
                                         SplitD(d, g, SpinState::kLow).unpaired)
          << Name(g) << " d" << d;
    }
  }
  EXPECT_FALSE(HasSpinChoice(5, Geometry::kFree));
  EXPECT_FALSE(HasSpinChoice(-1, Geometry::kOctahedral));
  EXPECT_FALSE(HasSpinChoice(11, Geometry::kOctahedral));
}

// Octahedral d4-d7 can be high or low spin; d0-d3 and d8-d10 have one
// state (Figgis and Hitchman, Ligand Field Theory and Its Applications,
// from memory).
TEST(HasSpinChoice, OctahedralTextbookRange) {
  for (int d = 0; d <= 10; ++d) {
    EXPECT_EQ(HasSpinChoice(d, Geometry::kOctahedral), d >= 4 && d <= 7)
        << "d" << d;
  }
}

TEST(SplitD, HighSpinIsNeverBelowLowSpin) {
  for (Geometry g : kSplitGeometries) {
    for (int n = 0; n <= 10; ++n) {
      SCOPED_TRACE(absl::StrCat(Name(g), " d", n));
      EXPECT_GE(SplitD(n, g, SpinState::kHigh).unpaired,
                SplitD(n, g, SpinState::kLow).unpaired);
    }
  }
}

TEST(SplitD, OctahedralTextbookValues) {
  // Miessler & Tarr, Inorganic Chemistry, ligand field chapter, from memory.
  constexpr int kHigh[] = {0, 1, 2, 3, 4, 5, 4, 3, 2, 1, 0};
  constexpr int kLow[] = {0, 1, 2, 3, 2, 1, 0, 1, 2, 1, 0};
  constexpr const char* kHighNotation[] = {
      "t2g0 eg0", "t2g1 eg0", "t2g2 eg0", "t2g3 eg0", "t2g3 eg1", "t2g3 eg2",
      "t2g4 eg2", "t2g5 eg2", "t2g6 eg2", "t2g6 eg3", "t2g6 eg4"};
  constexpr const char* kLowNotation[] = {
      "t2g0 eg0", "t2g1 eg0", "t2g2 eg0", "t2g3 eg0", "t2g4 eg0", "t2g5 eg0",
      "t2g6 eg0", "t2g6 eg1", "t2g6 eg2", "t2g6 eg3", "t2g6 eg4"};
  for (int n = 0; n <= 10; ++n) {
    SCOPED_TRACE(absl::StrCat("d", n));
    const LigandFieldSplitting high =
        SplitD(n, Geometry::kOctahedral, SpinState::kHigh);
    const LigandFieldSplitting low =
        SplitD(n, Geometry::kOctahedral, SpinState::kLow);
    EXPECT_EQ(high.unpaired, kHigh[n]);
    EXPECT_EQ(low.unpaired, kLow[n]);
    EXPECT_EQ(high.Notation(), kHighNotation[n]);
    EXPECT_EQ(low.Notation(), kLowNotation[n]);
    ASSERT_EQ(high.levels.size(), 2u);
    EXPECT_EQ(high.levels[0].name, "t2g");
    EXPECT_EQ(high.levels[0].orbitals, 3);
    EXPECT_EQ(high.levels[1].name, "eg");
    EXPECT_EQ(high.levels[1].orbitals, 2);
  }
}

TEST(SplitD, TetrahedralTextbookValues) {
  // Miessler & Tarr, Inorganic Chemistry, ligand field chapter, from memory:
  // e below t2; tetrahedral complexes are high spin.
  constexpr int kHigh[] = {0, 1, 2, 3, 4, 5, 4, 3, 2, 1, 0};
  constexpr const char* kHighNotation[] = {
      "e0 t20", "e1 t20", "e2 t20", "e2 t21", "e2 t22", "e2 t23",
      "e3 t23", "e4 t23", "e4 t24", "e4 t25", "e4 t26"};
  for (int n = 0; n <= 10; ++n) {
    SCOPED_TRACE(absl::StrCat("d", n));
    const LigandFieldSplitting high =
        SplitD(n, Geometry::kTetrahedral, SpinState::kHigh);
    EXPECT_EQ(high.unpaired, kHigh[n]);
    EXPECT_EQ(high.Notation(), kHighNotation[n]);
    ASSERT_EQ(high.levels.size(), 2u);
    EXPECT_EQ(high.levels[0].name, "e");
    EXPECT_EQ(high.levels[0].orbitals, 2);
    EXPECT_EQ(high.levels[1].name, "t2");
    EXPECT_EQ(high.levels[1].orbitals, 3);
  }
  // The explicit textbook case: tetrahedral d7 (e.g. [CoCl4]2-) is e4 t2^3,
  // 3 unpaired (Miessler & Tarr, ligand field chapter, from memory).
  const LigandFieldSplitting d7 =
      SplitD(7, Geometry::kTetrahedral, SpinState::kHigh);
  EXPECT_EQ(d7.levels[0].electrons, 4);
  EXPECT_EQ(d7.levels[1].electrons, 3);
  EXPECT_EQ(d7.unpaired, 3);
  // Low spin in a tetrahedral field fills e first: d4 = e4 t2^0.
  const LigandFieldSplitting d4_low =
      SplitD(4, Geometry::kTetrahedral, SpinState::kLow);
  EXPECT_EQ(d4_low.Notation(), "e4 t20");
  EXPECT_EQ(d4_low.unpaired, 0);
}

TEST(SplitD, SquarePlanarD8IsDiamagnetic) {
  // Square-planar d8 leaves the high b1g (dx2-y2) level empty and is
  // diamagnetic (Miessler & Tarr, ligand field chapter, from memory).
  const LigandFieldSplitting d8 =
      SplitD(8, Geometry::kSquarePlanar, SpinState::kLow);
  ASSERT_EQ(d8.levels.size(), 4u);
  EXPECT_EQ(d8.levels.back().name, "b1g");
  EXPECT_EQ(d8.levels.back().electrons, 0);
  EXPECT_EQ(d8.unpaired, 0);
}

// Intermediate spin leaves the square plane's b1g (dx2-y2) empty and
// fills the four lower orbitals high spin: d6 has two unpaired electrons
// (four-coordinate Fe(TPP) and FePc, S = 1), d5 three (MnPc, S = 3/2)
// (Scheidt and Reed, Chem. Rev. 81 (1981) 543; Barraclough, Martin, Mitra
// and Sherwood, J. Chem. Phys. 53 (1970) 1638; both from memory).
TEST(SplitD, SquarePlanarIntermediateSpinLeavesDx2y2Empty) {
  const LigandFieldSplitting d6 =
      SplitD(6, Geometry::kSquarePlanar, SpinState::kIntermediate);
  EXPECT_EQ(d6.Notation(), "eg4 a1g1 b2g1 b1g0");
  EXPECT_EQ(d6.unpaired, 2);
  EXPECT_EQ(
      SplitD(5, Geometry::kSquarePlanar, SpinState::kIntermediate).unpaired, 3);
  // Against high and low spin, d count by d count: the same count as high
  // spin up to d4 (nothing reaches dx2-y2), between the two for d5 and d6,
  // and low spin's from d7 (dx2-y2 opens only when the rest is full).
  for (int d = 0; d <= 10; ++d) {
    SCOPED_TRACE(d);
    const LigandFieldSplitting mid =
        SplitD(d, Geometry::kSquarePlanar, SpinState::kIntermediate);
    const int high =
        SplitD(d, Geometry::kSquarePlanar, SpinState::kHigh).unpaired;
    const int low =
        SplitD(d, Geometry::kSquarePlanar, SpinState::kLow).unpaired;
    int electrons = 0;
    for (const SplitLevel& level : mid.levels) electrons += level.electrons;
    EXPECT_EQ(electrons, d);
    EXPECT_EQ(mid.levels.back().electrons, d <= 8 ? 0 : d - 8);
    if (d <= 4) EXPECT_EQ(mid.unpaired, high);
    if (d == 5 || d == 6) {
      EXPECT_LT(mid.unpaired, high);
      EXPECT_GT(mid.unpaired, low);
    }
    if (d >= 7) EXPECT_EQ(mid.unpaired, low);
  }
  // The square pyramid's b1 is its dx2-y2 too: d6 keeps two.
  const LigandFieldSplitting pyramid =
      SplitD(6, Geometry::kSquarePyramidal, SpinState::kIntermediate);
  EXPECT_EQ(pyramid.levels.back().electrons, 0);
  EXPECT_EQ(pyramid.unpaired, 2);
}

// Intermediate spin is asked for only where it is defined.
TEST(LigandField, IntermediateSpinOnlyInTheSquarePlaneAndPyramid) {
  EXPECT_TRUE(IntermediateSpinApplies(Geometry::kSquarePlanar));
  EXPECT_TRUE(IntermediateSpinApplies(Geometry::kSquarePyramidal));
  EXPECT_FALSE(IntermediateSpinApplies(Geometry::kOctahedral));
  EXPECT_FALSE(IntermediateSpinApplies(Geometry::kTetrahedral));
  AtomQuery q = *ParseAtomQuery("Fe2+", std::nullopt);
  q.spin_state = SpinStatePreference::kIntermediate;
  q.geometry = Geometry::kSquarePlanar;
  absl::StatusOr<AtomDescriptionPtr> planar = DescribeAtom(q);
  ASSERT_TRUE(planar.ok()) << planar.status();
  ASSERT_TRUE((*planar)->ligand_field.has_value());
  EXPECT_EQ((*planar)->ligand_field->splitting.unpaired, 2);
  q.geometry = Geometry::kOctahedral;
  absl::StatusOr<AtomDescriptionPtr> octahedral = DescribeAtom(q);
  EXPECT_EQ(octahedral.status().code(), absl::StatusCode::kInvalidArgument);
  EXPECT_THAT(octahedral.status().message(), HasSubstr("square_planar"));
}

TEST(SplitD, SquareAntiprismaticD2IsDiamagneticWhenLowSpin) {
  // Eight-coordinate d2: both electrons pair in the single low a1 (z2)
  // orbital, so [Mo(CN)8]4- is diamagnetic; d1 ([Mo(CN)8]3-) keeps one
  // (Greenwood and Earnshaw, Chemistry of the Elements, 2nd ed., ch. 23,
  // from memory).
  const LigandFieldSplitting d2 =
      SplitD(2, Geometry::kSquareAntiprismatic, SpinState::kLow);
  ASSERT_EQ(d2.levels.size(), 3u);
  EXPECT_EQ(d2.levels.front().name, "a1");
  EXPECT_EQ(d2.levels.front().electrons, 2);
  EXPECT_EQ(d2.unpaired, 0);
  EXPECT_EQ(
      SplitD(2, Geometry::kSquareAntiprismatic, SpinState::kHigh).unpaired, 2);
  EXPECT_EQ(SplitD(1, Geometry::kSquareAntiprismatic, SpinState::kLow).unpaired,
            1);
  EXPECT_EQ(ResolveSpinState(Geometry::kSquareAntiprismatic,
                             SpinStatePreference::kAuto, 5),
            SpinState::kLow);
}

TEST(SplitD, SquarePyramidalOxoD2PairsInDxy) {
  // An apical oxo raises (dxz, dyz) above dxy: low-spin d2 [ReOCl4]- pairs
  // both electrons in dxy and is diamagnetic, and vanadyl d1 keeps one
  // (Ballhausen and Gray, Inorg. Chem. 1 (1962) 111, from memory).
  const LigandFieldSplitting d2 =
      SplitD(2, Geometry::kSquarePyramidal, SpinState::kLow);
  ASSERT_EQ(d2.levels.size(), 4u);
  EXPECT_EQ(d2.levels.front().name, "b2");
  EXPECT_EQ(d2.levels.front().electrons, 2);
  EXPECT_EQ(d2.unpaired, 0);
  EXPECT_EQ(SplitD(2, Geometry::kSquarePyramidal, SpinState::kHigh).unpaired,
            2);
  // Low-spin d8 ([Ni(CN)5]3-) leaves dx2-y2 empty: diamagnetic.
  const LigandFieldSplitting d8 =
      SplitD(8, Geometry::kSquarePyramidal, SpinState::kLow);
  EXPECT_EQ(d8.levels.back().name, "b1");
  EXPECT_EQ(d8.levels.back().electrons, 0);
  EXPECT_EQ(d8.unpaired, 0);
}

TEST(SplitD, SevenThreeAndNineCoordinateLevels) {
  // Orbital counts per level sum to five, lowest level first as the
  // sigma angular overlap model orders them (common practice, no source).
  struct Row {
    Geometry g;
    const char* lowest;
    size_t levels;
  };
  for (const Row& row :
       {Row{Geometry::kTrigonalPlanar, "e''", 3},
        Row{Geometry::kPentagonalBipyramidal, "e1''", 3},
        Row{Geometry::kTricappedTrigonalPrismatic, "a1'", 3}}) {
    SCOPED_TRACE(Name(row.g));
    const LigandFieldSplitting d10 = SplitD(10, row.g, SpinState::kLow);
    ASSERT_EQ(d10.levels.size(), row.levels);
    EXPECT_EQ(d10.levels.front().name, row.lowest);
    int orbitals = 0;
    for (const SplitLevel& l : d10.levels) orbitals += l.orbitals;
    EXPECT_EQ(orbitals, 5);
    EXPECT_EQ(d10.unpaired, 0);
    EXPECT_EQ(SplitD(0, row.g, SpinState::kHigh).unpaired, 0);
  }
  // High-spin d5 leaves every orbital singly occupied.
  EXPECT_EQ(
      SplitD(5, Geometry::kPentagonalBipyramidal, SpinState::kHigh).unpaired,
      5);
}

TEST(LigandField, SquarePlanarD8IonsAreDiamagneticWithAuto) {
  // Square-planar Ni(II), Pd(II), Pt(II), Au(III) d8 complexes are
  // diamagnetic (Cotton & Wilkinson, Advanced Inorganic Chemistry, from
  // memory).
  for (const char* spec : {"Ni2+", "Pd2+", "Pt2+", "Au3+"}) {
    SCOPED_TRACE(spec);
    AtomDescriptionPtr d = Describe(spec, Geometry::kSquarePlanar);
    ASSERT_NE(d, nullptr);
    ASSERT_TRUE(d->ligand_field.has_value());
    EXPECT_EQ(d->ligand_field->subshell.l, 2);
    EXPECT_EQ(d->ligand_field->splitting.spin_state, SpinState::kLow);
    EXPECT_EQ(d->unpaired_electrons, 0);
    EXPECT_DOUBLE_EQ(d->moments.spin_only, 0.0);
    // The free ion has 2 (kReferenceIons).
    AtomDescriptionPtr free_ion = Describe(spec);
    ASSERT_NE(free_ion, nullptr);
    EXPECT_EQ(free_ion->unpaired_electrons, 2);
  }
}

TEST(LigandField, AutoSpinStateRule) {
  // 3d octahedral -> high spin; 4d/5d octahedral -> low spin (common
  // practice, no source; ligand_field.h).
  AtomDescriptionPtr co3 = Describe("Co3+", Geometry::kOctahedral);
  ASSERT_NE(co3, nullptr);
  ASSERT_TRUE(co3->ligand_field.has_value());
  EXPECT_EQ(co3->ligand_field->splitting.spin_state, SpinState::kHigh);
  EXPECT_EQ(co3->unpaired_electrons, 4);

  AtomDescriptionPtr co3_low =
      Describe("Co3+", Geometry::kOctahedral, SpinStatePreference::kLow);
  ASSERT_NE(co3_low, nullptr);
  EXPECT_EQ(co3_low->unpaired_electrons, 0);
  // Miessler & Tarr (kOctahedralSpinStates): low-spin d6 is t2g6 eg0.
  EXPECT_EQ(co3_low->ligand_field->splitting.Notation(), "t2g6 eg0");

  // Ru3+ is 4d5: low spin t2g5, 1 unpaired.
  AtomDescriptionPtr ru3 = Describe("Ru3+", Geometry::kOctahedral);
  ASSERT_NE(ru3, nullptr);
  ASSERT_TRUE(ru3->ligand_field.has_value());
  EXPECT_EQ(ru3->ligand_field->subshell, (Subshell{4, 2}));
  EXPECT_EQ(ru3->ligand_field->splitting.spin_state, SpinState::kLow);
  EXPECT_EQ(ru3->ligand_field->splitting.Notation(), "t2g5 eg0");
  EXPECT_EQ(ru3->unpaired_electrons, 1);

  // Rh3+ is 4d6: low spin, diamagnetic (real Rh(III) complexes are low
  // spin; reference_ions.h comment, Cotton & Wilkinson, from memory).
  AtomDescriptionPtr rh3 = Describe("Rh3+", Geometry::kOctahedral);
  ASSERT_NE(rh3, nullptr);
  ASSERT_TRUE(rh3->ligand_field.has_value());
  EXPECT_EQ(rh3->unpaired_electrons, 0);

  // 5d: Ir3+ 5d6 also low spin.
  AtomDescriptionPtr ir3 = Describe("Ir3+", Geometry::kOctahedral);
  ASSERT_NE(ir3, nullptr);
  ASSERT_TRUE(ir3->ligand_field.has_value());
  EXPECT_EQ(ir3->ligand_field->subshell, (Subshell{5, 2}));
  EXPECT_EQ(ir3->unpaired_electrons, 0);

  // An explicit preference overrides the rule.
  AtomDescriptionPtr rh3_high =
      Describe("Rh3+", Geometry::kOctahedral, SpinStatePreference::kHigh);
  ASSERT_NE(rh3_high, nullptr);
  EXPECT_EQ(rh3_high->unpaired_electrons, 4);

  // Tetrahedral auto is high spin.
  AtomDescriptionPtr co2_td = Describe("Co2+", Geometry::kTetrahedral);
  ASSERT_NE(co2_td, nullptr);
  ASSERT_TRUE(co2_td->ligand_field.has_value());
  EXPECT_EQ(co2_td->ligand_field->splitting.Notation(), "e4 t23");
  EXPECT_EQ(co2_td->unpaired_electrons, 3);
}

TEST(ResolveSpinState, FollowsDocumentedRule) {
  // Rule from ligand_field.h (common practice, no source).
  EXPECT_EQ(
      ResolveSpinState(Geometry::kOctahedral, SpinStatePreference::kAuto, 3),
      SpinState::kHigh);
  EXPECT_EQ(
      ResolveSpinState(Geometry::kOctahedral, SpinStatePreference::kAuto, 4),
      SpinState::kLow);
  EXPECT_EQ(
      ResolveSpinState(Geometry::kOctahedral, SpinStatePreference::kAuto, 5),
      SpinState::kLow);
  for (int n : {3, 4, 5}) {
    EXPECT_EQ(
        ResolveSpinState(Geometry::kTetrahedral, SpinStatePreference::kAuto, n),
        SpinState::kHigh);
    EXPECT_EQ(ResolveSpinState(Geometry::kSquarePlanar,
                               SpinStatePreference::kAuto, n),
              SpinState::kLow);
    for (Geometry g : kSplitGeometries) {
      EXPECT_EQ(ResolveSpinState(g, SpinStatePreference::kHigh, n),
                SpinState::kHigh);
      EXPECT_EQ(ResolveSpinState(g, SpinStatePreference::kLow, n),
                SpinState::kLow);
      EXPECT_EQ(ResolveSpinState(g, SpinStatePreference::kIntermediate, n),
                SpinState::kIntermediate);
    }
  }
}

TEST(LigandField, GeometryOnNonDIonKeepsFreeIonCountAndAddsNote) {
  struct Case {
    const char* spec;
    int unpaired;  // Free-ion count, kReferenceIons (Greenwood & Earnshaw).
  };
  for (const Case& c : {Case{"Gd3+", 7}, Case{"Na+", 0}, Case{"Eu3+", 6}}) {
    for (Geometry g : kSplitGeometries) {
      SCOPED_TRACE(absl::StrCat(c.spec, " ", Name(g)));
      AtomDescriptionPtr d = Describe(c.spec, g, SpinStatePreference::kLow);
      ASSERT_NE(d, nullptr);
      EXPECT_FALSE(d->ligand_field.has_value());
      EXPECT_EQ(d->unpaired_electrons, c.unpaired);
      bool noted = false;
      for (const std::string& note : d->notes) {
        noted |= note.find(std::string(Name(g))) != std::string::npos;
      }
      EXPECT_TRUE(noted) << "no note mentions the ignored geometry";
    }
  }
  // Without a geometry there is no such note.
  AtomDescriptionPtr gd_free = Describe("Gd3+");
  ASSERT_NE(gd_free, nullptr);
  for (const std::string& note : gd_free->notes) {
    EXPECT_THAT(note, ::testing::Not(HasSubstr("ignored")));
  }
}

TEST(LigandField, FreeGeometryHasNoSplitting) {
  AtomDescriptionPtr fe = Describe("Fe3+");
  ASSERT_NE(fe, nullptr);
  EXPECT_FALSE(fe->ligand_field.has_value());
  EXPECT_EQ(fe->unpaired_electrons, 5);  // kReferenceIons
}

TEST(LigandFieldNames, ParseAndPrint) {
  for (Geometry g : {Geometry::kFree, Geometry::kOctahedral,
                     Geometry::kTetrahedral, Geometry::kSquarePlanar}) {
    absl::StatusOr<Geometry> parsed = ParseName<Geometry>(Name(g));
    ASSERT_TRUE(parsed.ok()) << parsed.status();
    EXPECT_EQ(*parsed, g);
  }
  absl::StatusOr<Geometry> dash = ParseName<Geometry>("square-planar");
  ASSERT_TRUE(dash.ok());
  EXPECT_EQ(*dash, Geometry::kSquarePlanar);
  EXPECT_EQ(ParseName<Geometry>("trigonal").status().code(),
            absl::StatusCode::kInvalidArgument);
  EXPECT_EQ(ParseName<Geometry>("").status().code(),
            absl::StatusCode::kInvalidArgument);

  for (SpinStatePreference s :
       {SpinStatePreference::kAuto, SpinStatePreference::kHigh,
        SpinStatePreference::kLow, SpinStatePreference::kIntermediate}) {
    absl::StatusOr<SpinStatePreference> parsed =
        ParseName<SpinStatePreference>(Name(s));
    ASSERT_TRUE(parsed.ok()) << parsed.status();
    EXPECT_EQ(*parsed, s);
  }
  EXPECT_EQ(ParseName<SpinStatePreference>("medium").status().code(),
            absl::StatusCode::kInvalidArgument);
}

}  // namespace
}  // namespace shellwright
