// Tests for engine/internal/charge_dp.h: the charge dynamic programme.

#include "engine/internal/charge_dp.h"

#include <vector>

#include "gtest/gtest.h"

namespace shellwright::internal {
namespace {

// A layer: its scaled count and its options. An uncommon option weighs
// one uncommon state, a mixed one its spread; nothing else weighs.
struct Layer {
  int64_t scaled_count;
  std::vector<StateOption> options;
};

StateOption Single(int state, int index, bool common = true) {
  StateOption o;
  o.low = o.high = state;
  o.low_common = o.high_common = common;
  o.index = index;
  o.uncommon = common ? 0 : 1;
  return o;
}

StateOption Mixed(int low, int high, int index) {
  StateOption o;
  o.low = low;
  o.high = high;
  o.index = index;
  return o;
}

// Builds the narrow lists (common options) and wide lists (all options).
Candidates Build(const std::vector<Layer>& layers) {
  Candidates c;
  for (int pass = 0; pass < 2; ++pass) {
    for (size_t i = 0; i < layers.size(); ++i) {
      CandidateList& list = pass == 0 ? c.narrow[i] : c.wide[i];
      list.begin = c.all.size();
      list.min_contribution = INT64_MAX;
      list.max_contribution = INT64_MIN;
      for (const StateOption& o : layers[i].options) {
        if (pass == 0 && o.uncommon > 0) continue;
        const Weight w = Weight::Of(o.uncommon, 0,
                                    layers[i].scaled_count * (o.high - o.low));
        c.all.push_back(Candidate{o.index, o.low, o.high, w, Weight()});
        if (o.low != o.high) ++list.mixed;
        list.min_weight = std::min(list.min_weight, w);
        if (o.uncommon > 0) {
          list.min_uncommon_weight = std::min(list.min_uncommon_weight, w);
        }
        list.min_contribution =
            std::min(list.min_contribution, layers[i].scaled_count * o.low);
        list.max_contribution =
            std::max(list.max_contribution, layers[i].scaled_count * o.high);
      }
      list.end = c.all.size();
    }
  }
  return c;
}

std::vector<ChargeItem> Items(const std::vector<Layer>& layers) {
  std::vector<ChargeItem> items;
  for (const Layer& l : layers) items.push_back({l.scaled_count, l.options});
  return items;
}

TEST(ChargeDp, FindsTheMixedValenceSplitOfMagnetite) {
  // Fe3O4: three Fe in +2, +2/+3 or +3 against four O at -2.
  const std::vector<Layer> layers = {
      {3, {Single(2, 0), Mixed(2, 3, 1), Single(3, 2)}},
      {4, {Single(-2, 0)}},
  };
  const Candidates c = Build(layers);
  const Solution s =
      SolveCharge(Items(layers), c, Widening::None(), 0, SearchLimits());
  ASSERT_FALSE(s.weight.IsInfinite());
  EXPECT_EQ(s.choices[0].option, 1);
  EXPECT_EQ(s.choices[0].low_atoms, 1);  // One Fe2+, two Fe3+.
  EXPECT_EQ(s.weight.naturalness(), 3);  // 3 atoms x (3 - 2).
}

TEST(ChargeDp, PrefersTheSingleValenceAnswerWhenOneExists) {
  const std::vector<Layer> layers = {
      {2, {Single(2, 0), Mixed(2, 3, 1), Single(3, 2)}},
      {3, {Single(-2, 0)}},
  };
  const Candidates c = Build(layers);
  const Solution s =
      SolveCharge(Items(layers), c, Widening::None(), 0, SearchLimits());
  ASSERT_FALSE(s.weight.IsInfinite());
  EXPECT_EQ(s.choices[0].option, 2);
  EXPECT_EQ(s.weight, Weight());
}

TEST(ChargeDp, NarrowSearchIgnoresUncommonStatesAndWideSearchUsesThem) {
  // Only the uncommon +4 balances one atom against two at -2.
  const std::vector<Layer> layers = {
      {1, {Single(2, 0), Single(4, 1, /*common=*/false)}},
      {2, {Single(-2, 0)}},
  };
  const Candidates c = Build(layers);
  EXPECT_TRUE(SolveCharge(Items(layers), c, Widening::None(), 0, SearchLimits())
                  .weight.IsInfinite());
  const Solution s = SolveCharge(Items(layers), c, Widening::One(0), 0,
                                 SearchLimits{Weight::Infinite(), true});
  ASSERT_FALSE(s.weight.IsInfinite());
  EXPECT_EQ(s.weight.uncommon(), 1);
  EXPECT_EQ(s.choices[0].option, 1);
}

TEST(ChargeDp, BoundDropsWhatCannotBeatItAndSaysSo) {
  const std::vector<Layer> layers = {
      {1, {Single(2, 0), Single(4, 1, /*common=*/false)}},
      {2, {Single(-2, 0)}},
  };
  const Candidates c = Build(layers);
  Pruning pruning = Pruning::kNone;
  const Solution s =
      SolveCharge(Items(layers), c, Widening::All(), 0,
                  SearchLimits{Weight::Uncommon(1), false}, &pruning);
  EXPECT_TRUE(s.weight.IsInfinite());
  EXPECT_NE(pruning, Pruning::kNone);
}

TEST(ChargeDp, UnreachableTargetHasNoSolution) {
  const std::vector<Layer> layers = {
      {1, {Single(1, 0)}},
      {2, {Single(-1, 0)}},
  };
  const Candidates c = Build(layers);
  EXPECT_TRUE(SolveCharge(Items(layers), c, Widening::All(), 0, SearchLimits())
                  .weight.IsInfinite());
  EXPECT_FALSE(
      SolveCharge(Items(layers), c, Widening::All(), -1, SearchLimits())
          .weight.IsInfinite());
}

// A layered oxide in scaled units (LiNi0.70Co0.15Mn0.15O2 times 20): Li,
// three transition metals with single and mixed options, O. Invented
// layers for the search's mechanics, no chemistry checked.
std::vector<Layer> LayeredOxide(bool without_ni3) {
  std::vector<StateOption> ni = {Single(2, 0), Mixed(2, 3, 1), Mixed(3, 4, 3),
                                 Single(4, 4)};
  if (!without_ni3) ni.push_back(Single(3, 2));
  return {
      {20, {Single(1, 0)}},
      {14, ni},
      {3, {Single(2, 0), Mixed(2, 3, 1), Single(3, 2)}},
      {3,
       {Single(2, 0), Mixed(2, 3, 1), Single(3, 2), Mixed(3, 4, 3),
        Single(4, 4)}},
      {40, {Single(-2, 0)}},
  };
}

// Cell visits a narrow search of `layers` charges to a budget.
int64_t VisitsOf(const std::vector<Layer>& layers, Weight bound) {
  WorkBudget budget{kRecordCellVisits, false};
  SolveCharge(Items(layers), Build(layers), Widening::None(), 0,
              SearchLimits{bound, false, &budget});
  EXPECT_FALSE(budget.exhausted);
  return kRecordCellVisits - budget.cell_visits;
}

TEST(ChargeDp, NarrowWorkBoundCoversTheSearchAndItsForbiddenSubsets) {
  const std::vector<Layer> layers = LayeredOxide(/*without_ni3=*/false);
  int64_t cells = 0;
  const int64_t bound =
      NarrowSearchWorkBound(Items(layers), Build(layers), 0, &cells);
  EXPECT_GT(cells, 1);
  EXPECT_LE(cells, kMaxSearchCells);
  const int64_t full = VisitsOf(layers, Weight::Infinite());
  EXPECT_GT(full, 0);
  EXPECT_LE(full, bound);
  // An option forbidden, and a search bounded tightly: less work still.
  const std::vector<Layer> fewer = LayeredOxide(/*without_ni3=*/true);
  EXPECT_LE(VisitsOf(fewer, Weight::Infinite()), bound);
  EXPECT_LE(VisitsOf(fewer, Weight::Of(0, 0, 1)), bound);
  // A budget of exactly the bound is never exhausted; one visit short of
  // what the search spends is.
  WorkBudget exact{bound, false};
  SolveCharge(Items(layers), Build(layers), Widening::None(), 0,
              SearchLimits{Weight::Infinite(), false, &exact});
  EXPECT_FALSE(exact.exhausted);
  WorkBudget short_one{full - 1, false};
  SolveCharge(Items(layers), Build(layers), Widening::None(), 0,
              SearchLimits{Weight::Infinite(), false, &short_one});
  EXPECT_TRUE(short_one.exhausted);
}

}  // namespace
}  // namespace shellwright::internal
