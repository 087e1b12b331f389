// Tests for engine/configuration.h: notations, parsing and Pauli checks.

#include "engine/configuration.h"

#include "gmock/gmock.h"
#include "gtest/gtest.h"
#include "tests/testing/engine_test_util.h"

namespace shellwright {
namespace {

using ::shellwright::testing::ParseOrFail;
using ::testing::HasSubstr;

TEST(Configuration, MadelungFillingOfIron) {
  const Configuration fe = Configuration::Madelung(26);
  EXPECT_EQ(fe.electrons(), 26);
  EXPECT_EQ(fe.ToCoreNotation(), "[Ar] 3d6 4s2");
  EXPECT_EQ(fe.ToFullNotation(), "1s2 2s2 2p6 3s2 3p6 3d6 4s2");
  EXPECT_EQ(fe.ToFillingOrderNotation(), "1s2 2s2 2p6 3s2 3p6 4s2 3d6");
  EXPECT_EQ(fe.UnpairedElectrons(), 4);
}

TEST(Configuration, CompleteCoreCollapses) {
  // Ti4+-like: 18 electrons print as the argon core, not [Ne] 3s2 3p6.
  EXPECT_EQ(ParseOrFail("1s2 2s2 2p6 3s2 3p6").ToCoreNotation(), "[Ar]");
  EXPECT_EQ(ParseOrFail("[Ne] 3s2 3p6").ToCoreNotation(), "[Ar]");
  // A neutral noble gas asks for a smaller core.
  EXPECT_EQ(Configuration::Madelung(18).ToCoreNotation(17), "[Ne] 3s2 3p6");
  // A lone 1s2 stays written out.
  EXPECT_EQ(Configuration::Madelung(2).ToCoreNotation(), "1s2");
  EXPECT_EQ(Configuration::Madelung(3).ToCoreNotation(), "[He] 2s1");
  EXPECT_EQ(Configuration().ToCoreNotation(), "");
}

TEST(Configuration, CoreIsNotUsedWhenAnInnerSubshellIsOpen) {
  // A 3p hole breaks the argon core, so the neon core is used.
  EXPECT_EQ(ParseOrFail("[Ne] 3s2 3p5 3d1").ToCoreNotation(),
            "[Ne] 3s2 3p5 3d1");
}

TEST(Configuration, ParsesCoreAndFullNotation) {
  const Configuration a = ParseOrFail("[Ar] 3d5 4s1");
  EXPECT_EQ(a.electrons(), 24);
  EXPECT_EQ(a.occupancy(Subshell{3, 2}), 5);
  EXPECT_EQ(a.UnpairedElectrons(), 6);
  EXPECT_EQ(ParseOrFail("1s2 2s2 2p6"), Configuration::Madelung(10));
}

TEST(Configuration, ParsesSuperscriptsAndAnyOrder) {
  EXPECT_EQ(ParseOrFail("[Ar] 4s² 3d⁶"), ParseOrFail("[Ar] 3d6 4s2"));
  EXPECT_EQ(ParseOrFail("  [Kr]   4d10 "), ParseOrFail("[Kr] 4d10"));
}

TEST(Configuration, OverCapacityNamesTheSubshell) {
  absl::StatusOr<Configuration> c = Configuration::Parse("[Ne] 3s3");
  ASSERT_FALSE(c.ok());
  EXPECT_EQ(c.status().code(), absl::StatusCode::kInvalidArgument);
  EXPECT_THAT(c.status().message(), HasSubstr("subshell 3s holds 3"));
  EXPECT_THAT(c.status().message(), HasSubstr("Pauli capacity of 2"));
  EXPECT_THAT(Configuration::Parse("[Ar] 3d11").status().message(),
              HasSubstr("subshell 3d holds 11"));
  EXPECT_THAT(Configuration::Parse("[Ar] 3d99999").status().message(),
              HasSubstr("3d"));
}

TEST(Configuration, RejectsMalformedText) {
  struct Case {
    const char* text;
    const char* message_part;
  };
  const Case cases[] = {
      {"", "no subshells"},
      {"   ", "no subshells"},
      {"[Xx] 3d5", "unknown noble-gas core"},
      {"3d5 [Ar]", "must come first"},
      {"[Ar] 3d", "no electron count"},
      {"[Ar] 3z5", "unknown orbital letter"},
      {"[Ar] 2d1", "l must be less than n"},
      {"[Ar] 3p1", "inside the core"},
      {"3d5 3d1", "given twice"},
      {"[Ar] 9s1", "from 1 to 8"},
      {"[Ar] d5", "malformed subshell"},
      {"[Ar] 3d5x", "malformed subshell"},
      {"[Ar] 3D5", "unknown orbital letter"},
  };
  for (const Case& c : cases) {
    absl::StatusOr<Configuration> parsed = Configuration::Parse(c.text);
    EXPECT_FALSE(parsed.ok()) << c.text;
    EXPECT_THAT(parsed.status().message(), HasSubstr(c.message_part)) << c.text;
  }
  EXPECT_FALSE(Configuration::Parse(std::string(10000, '1')).ok());
}

TEST(Configuration, SetOccupancyChecksCapacity) {
  Configuration c;
  EXPECT_TRUE(c.SetOccupancy(Subshell{2, 1}, 6).ok());
  EXPECT_FALSE(c.SetOccupancy(Subshell{2, 1}, 7).ok());
  EXPECT_FALSE(c.SetOccupancy(Subshell{2, 1}, -1).ok());
  EXPECT_EQ(c.occupancy(Subshell{2, 1}), 6);
}

TEST(Configuration, HundUnpairedCounts) {
  // Hund's first rule: one electron per orbital before pairing.
  EXPECT_EQ(HundUnpairedElectrons(2, 0), 0);
  EXPECT_EQ(HundUnpairedElectrons(2, 5), 5);
  EXPECT_EQ(HundUnpairedElectrons(2, 6), 4);
  EXPECT_EQ(HundUnpairedElectrons(3, 7), 7);
  EXPECT_EQ(HundUnpairedElectrons(3, 8), 6);
  EXPECT_EQ(HundUnpairedElectrons(1, 4), 2);
}

}  // namespace
}  // namespace shellwright
