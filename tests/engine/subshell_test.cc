// Tests for engine/subshell.h: capacities, indexing and Madelung order.

#include "engine/subshell.h"

#include <set>

#include "gtest/gtest.h"

namespace shellwright {
namespace {

TEST(Subshell, PauliCapacityIsTwiceTheOrbitalCount) {
  // Pauli exclusion: two spin-orbitals per spatial orbital, 2l+1 orbitals.
  EXPECT_EQ((Subshell{1, 0}.Capacity()), 2);
  EXPECT_EQ((Subshell{2, 1}.Capacity()), 6);
  EXPECT_EQ((Subshell{3, 2}.Capacity()), 10);
  EXPECT_EQ((Subshell{4, 3}.Capacity()), 14);
  EXPECT_EQ((Subshell{5, 4}.Capacity()), 18);
}

TEST(Subshell, IndexRoundTrips) {
  std::set<int> seen;
  for (int n = 1; n <= kMaxPrincipalQuantumNumber; ++n) {
    for (int l = 0; l < n; ++l) {
      const Subshell s{n, l};
      EXPECT_EQ(Subshell::FromIndex(s.Index()), s);
      EXPECT_TRUE(seen.insert(s.Index()).second);
      EXPECT_LT(s.Index(), kNumSubshells);
    }
  }
  EXPECT_EQ(static_cast<int>(seen.size()), kNumSubshells);
}

TEST(Subshell, MadelungOrderStartsWithTheAufbauSequence) {
  // Aufbau order by increasing n+l, then n (Madelung rule).
  const char* expected[] = {"1s", "2s", "2p", "3s", "3p", "4s", "3d",
                            "4p", "5s", "4d", "5p", "6s", "4f", "5d",
                            "6p", "7s", "5f", "6d", "7p", "8s"};
  absl::Span<const Subshell> order = MadelungOrder();
  for (size_t i = 0; i < std::size(expected); ++i) {
    EXPECT_EQ(order[i].ToString(), expected[i]) << "position " << i;
  }
}

TEST(Subshell, MadelungOrderIsSortedByNPlusLThenN) {
  absl::Span<const Subshell> order = MadelungOrder();
  ASSERT_EQ(static_cast<int>(order.size()), kNumSubshells);
  for (size_t i = 1; i < order.size(); ++i) {
    const Subshell a = order[i - 1], b = order[i];
    EXPECT_TRUE(a.n + a.l < b.n + b.l || (a.n + a.l == b.n + b.l && a.n < b.n))
        << a.ToString() << " before " << b.ToString();
    EXPECT_EQ(MadelungRank(b), static_cast<int>(i));
  }
}

TEST(Subshell, LettersMapBothWays) {
  EXPECT_EQ(OrbitalQuantumNumberFromLetter('s'), 0);
  EXPECT_EQ(OrbitalQuantumNumberFromLetter('f'), 3);
  EXPECT_EQ(OrbitalQuantumNumberFromLetter('k'), 7);  // j is skipped.
  EXPECT_EQ(OrbitalQuantumNumberFromLetter('j'), -1);
  EXPECT_EQ(OrbitalQuantumNumberFromLetter('S'), -1);
}

}  // namespace
}  // namespace shellwright
