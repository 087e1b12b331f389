// Tests for engine/internal/weight.h: the ranking of assignments.

#include "engine/internal/weight.h"

#include "gtest/gtest.h"

namespace shellwright::internal {
namespace {

TEST(Weight, TermsCompareLexicographically) {
  // One uncommon state outranks any number of lesser faults.
  EXPECT_LT(Weight::Of(0, 48, 63999999), Weight::Of(1, 0, 0));
  EXPECT_LT(Weight::Of(0, 0, 63999999), Weight::Of(0, 1, 0));
  EXPECT_LT(Weight::Of(0, 0, 1), Weight::Of(0, 0, 2));
  EXPECT_EQ(Weight(), Weight::Of(0, 0, 0));
}

TEST(Weight, SumsAddTermByTermAndDecode) {
  const Weight w = Weight::Of(2, 1, 37) + Weight::Of(1, 2, 17);
  EXPECT_EQ(w.uncommon(), 3);
  EXPECT_EQ(w.inconsistencies(), 3);
  EXPECT_EQ(w.naturalness(), 54);
  EXPECT_TRUE(w.HasInconsistency());
  EXPECT_FALSE(Weight::Of(5, 0, 18).HasInconsistency());
}

TEST(Weight, InfiniteStaysAboveEveryRealWeight) {
  const Weight heaviest = Weight::Of(96, 48, 63999999);
  EXPECT_LT(heaviest, Weight::Infinite());
  EXPECT_TRUE((Weight::Infinite() + Weight::Of(0, 0, 1)).IsInfinite());
  EXPECT_FALSE(heaviest.IsInfinite());
}

TEST(Weight, UncommonBoundsSeparateTheStages) {
  EXPECT_LT(Weight::Of(1, 48, 63999999), Weight::BelowUncommon(2));
  EXPECT_GE(Weight::Of(2, 0, 0), Weight::BelowUncommon(2));
  EXPECT_EQ(Weight::Uncommon(3).WholeUncommon(), 3);
}

}  // namespace
}  // namespace shellwright::internal
