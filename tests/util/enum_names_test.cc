// Tests for util/enum_names.h, and that every name table in the project
// names each enumerator once, in both directions.

#include "util/enum_names.h"

#include <set>
#include <string>

#include "engine/atom.h"
#include "engine/composition.h"
#include "engine/element.h"
#include "engine/ligand_field.h"
#include "engine/oxidation.h"
#include "engine/term_symbol.h"
#include "gmock/gmock.h"
#include "gtest/gtest.h"

namespace shellwright {

enum class Shade { kLight, kDark, kUnnamed };

template <>
struct EnumNames<Shade> {
  static constexpr absl::string_view kWhat = "shade";
  static constexpr NamedValue<Shade> kNames[] = {{Shade::kLight, "light"},
                                                 {Shade::kDark, "dark"}};
  static constexpr NamedValue<Shade> kAliases[] = {{Shade::kDark, "dim"}};
};

namespace {

using ::testing::ElementsAre;
using ::testing::HasSubstr;

TEST(EnumNames, NameAndParseReadTheTable) {
  EXPECT_EQ(Name(Shade::kLight), "light");
  EXPECT_EQ(Name(Shade::kDark), "dark");
  EXPECT_EQ(Name(Shade::kUnnamed), "");
  EXPECT_EQ(*ParseName<Shade>("light"), Shade::kLight);
  EXPECT_EQ(*ParseName<Shade>("dim"), Shade::kDark);  // An alias.
  EXPECT_THAT(NameList<Shade>(), ElementsAre("light", "dark"));
  EXPECT_EQ(NamesForMessage<Shade>(), "light or dark");
}

TEST(EnumNames, ParseIsExactAndSaysWhatItExpected) {
  for (const char* bad : {"Light", " light", "", "grey"}) {
    absl::StatusOr<Shade> s = ParseName<Shade>(bad);
    EXPECT_EQ(s.status().code(), absl::StatusCode::kInvalidArgument) << bad;
  }
  EXPECT_EQ(ParseName<Shade>("grey").status().message(),
            "unknown shade 'grey' (expected light or dark)");
  EXPECT_THAT(std::string(ParseName<Geometry>("cubic").status().message()),
              HasSubstr("(expected free, octahedral, tetrahedral, "
                        "square_planar, trigonal_prismatic, "
                        "trigonal_bipyramidal, square_antiprismatic, "
                        "linear, square_pyramidal, trigonal_planar, "
                        "pentagonal_bipyramidal or "
                        "tricapped_trigonal_prismatic)"));
}

// Every enumerator from first to last has one distinct name, and the name
// parses back to it.
template <typename E>
void ExpectRoundTrip(E first, E last) {
  std::set<std::string> seen;
  for (int i = static_cast<int>(first); i <= static_cast<int>(last); ++i) {
    const E value = static_cast<E>(i);
    const absl::string_view name = Name(value);
    EXPECT_FALSE(name.empty()) << EnumNames<E>::kWhat << " value " << i;
    EXPECT_TRUE(seen.insert(std::string(name)).second) << name;
    absl::StatusOr<E> back = ParseName<E>(name);
    ASSERT_TRUE(back.ok()) << back.status();
    EXPECT_EQ(*back, value) << name;
  }
}

TEST(EnumNames, EveryProjectTableRoundTrips) {
  ExpectRoundTrip(Geometry::kFree, Geometry::kTricappedTrigonalPrismatic);
  ExpectRoundTrip(SpinStatePreference::kAuto, SpinStatePreference::kLow);
  ExpectRoundTrip(SpinState::kHigh, SpinState::kLow);
  ExpectRoundTrip(Severity::kError, Severity::kInfo);
  ExpectRoundTrip(CompositionKind::kIonic, CompositionKind::kZintl);
  ExpectRoundTrip(Block::kS, Block::kF);
  ExpectRoundTrip(MomentBasis::kSpinOnly, MomentBasis::kJ);
  ExpectRoundTrip(Parity::kEven, Parity::kOdd);
}

TEST(EnumNames, NamesThatReportsAndRecordsUse) {
  // The report and record vocabulary (docs/api.md) is fixed by these.
  EXPECT_EQ(Name(Geometry::kSquarePlanar), "square_planar");
  EXPECT_EQ(*ParseName<Geometry>("square-planar"), Geometry::kSquarePlanar);
  EXPECT_EQ(Name(MomentBasis::kJ), "j_moment");
  EXPECT_EQ(Name(Severity::kWarning), "warning");
  EXPECT_EQ(Name(CompositionKind::kMetallic), "metallic");
  EXPECT_EQ(Name(Block::kD), "d");
  EXPECT_EQ(Name(Parity::kOdd), "odd");
}

}  // namespace
}  // namespace shellwright
