// Tests for engine/aufbau.h: ground configurations of all 118 elements
// against an independent reference table, and the filling properties.

#include "engine/aufbau.h"

#include "engine/atom.h"
#include "engine/element.h"
#include "gmock/gmock.h"
#include "gtest/gtest.h"
#include "tests/engine/reference_configurations.h"
#include "tests/testing/engine_test_util.h"

namespace shellwright {
namespace {

using ::shellwright::testing::kReferenceConfigurations;

TEST(Aufbau, All118MatchTheReferenceTable) {
  // Each row of kReferenceConfigurations names its source: NIST ASD
  // ground states for Z <= 103, Madelung predictions for Z >= 104.
  ASSERT_EQ(std::size(kReferenceConfigurations), 118u);
  for (const auto& ref : kReferenceConfigurations) {
    AtomDescriptionPtr d = testing::Describe(ref.symbol);
    ASSERT_NE(d, nullptr);
    EXPECT_EQ(d->element->atomic_number, ref.atomic_number);
    EXPECT_EQ(d->configuration_notation, ref.configuration)
        << ref.symbol << " (" << ref.source << ")";
  }
}

TEST(Aufbau, ElectronCountEqualsZAndNoSubshellOverCapacity) {
  for (int z = 1; z <= kMaxAtomicNumber; ++z) {
    absl::StatusOr<Configuration> c = NeutralGroundConfiguration(z);
    ASSERT_TRUE(c.ok());
    EXPECT_EQ(c->electrons(), z);
    for (Subshell s : c->OccupiedSubshells()) {
      EXPECT_LE(c->occupancy(s), s.Capacity()) << z << " " << s.ToString();
    }
  }
}

TEST(Aufbau, MadelungOrderHoldsForEveryNonException) {
  // Filled in Madelung order: every subshell before the last occupied one
  // (in Madelung order) is full.
  for (int z = 1; z <= kMaxAtomicNumber; ++z) {
    if (!MadelungExceptionSource(z).empty()) continue;
    const Configuration c = *NeutralGroundConfiguration(z);
    EXPECT_EQ(c, Configuration::Madelung(z)) << "Z=" << z;
    bool seen_partial_or_empty = false;
    for (Subshell s : MadelungOrder()) {
      if (seen_partial_or_empty) {
        EXPECT_EQ(c.occupancy(s), 0) << "Z=" << z << " " << s.ToString();
      } else if (c.occupancy(s) < s.Capacity()) {
        seen_partial_or_empty = true;
      }
    }
  }
}

TEST(Aufbau, ExceptionsDepartFromMadelung) {
  // NIST ASD ground states, from memory: Cr and Cu take one 4s electron
  // into 3d.
  EXPECT_FALSE(MadelungExceptionSource(24).empty());
  EXPECT_FALSE(MadelungExceptionSource(29).empty());
  EXPECT_TRUE(MadelungExceptionSource(26).empty());
  EXPECT_NE(*NeutralGroundConfiguration(24), Configuration::Madelung(24));
}

TEST(Aufbau, FormatParseRoundTripForAll118) {
  for (int z = 1; z <= kMaxAtomicNumber; ++z) {
    const Configuration c = *NeutralGroundConfiguration(z);
    for (const std::string& text :
         {c.ToCoreNotation(), c.ToFullNotation(), c.ToFillingOrderNotation(),
          c.ToCoreNotation(z - 1)}) {
      absl::StatusOr<Configuration> parsed = Configuration::Parse(text);
      ASSERT_TRUE(parsed.ok()) << text << ": " << parsed.status();
      EXPECT_EQ(*parsed, c) << text;
    }
  }
}

TEST(Aufbau, BlockMatchesTheLastMadelungSubshell) {
  for (const Element& e : AllElements()) {
    const Configuration c = Configuration::Madelung(e.atomic_number);
    Subshell last{1, 0};
    for (Subshell s : MadelungOrder()) {
      if (c.occupancy(s) > 0) last = s;
    }
    const char expected = e.atomic_number == 2 ? 's' : last.Letter();
    EXPECT_EQ(Name(e.block), std::string(1, expected)) << e.symbol;
  }
}

TEST(Aufbau, ValenceElectronCounts) {
  // Group number for s and d blocks, group - 10 for the p block (common
  // practice, no source).
  for (const Element& e : AllElements()) {
    if (e.group == 0 || e.atomic_number > 103 ||
        !MadelungExceptionSource(e.atomic_number).empty()) {
      continue;
    }
    AtomDescriptionPtr d = testing::Describe(std::string(e.symbol));
    ASSERT_NE(d, nullptr);
    int expected = e.group <= 12 ? e.group : e.group - 10;
    if (e.atomic_number == 2) expected = 2;
    EXPECT_EQ(d->valence_electrons, expected) << e.symbol;
  }
}

TEST(Aufbau, UnpairedElectronsOfNeutralAtoms) {
  // Hund's first rule on NIST ASD ground configurations, from memory.
  EXPECT_EQ(testing::Describe("Fe")->unpaired_electrons, 4);
  EXPECT_EQ(testing::Describe("Cr")->unpaired_electrons, 6);
  EXPECT_EQ(testing::Describe("N")->unpaired_electrons, 3);
  EXPECT_EQ(testing::Describe("O")->unpaired_electrons, 2);
  EXPECT_EQ(testing::Describe("Ne")->unpaired_electrons, 0);
  EXPECT_EQ(testing::Describe("Gd")->unpaired_electrons, 8);
}

}  // namespace
}  // namespace shellwright
