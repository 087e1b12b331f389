// The ranking of candidate oxidation-state assignments. Internal to the
// engine.
//
// A Weight holds the ranking terms of one assignment, or of the part of
// it that one element contributes, and compares them lexicographically:
//   1. uncommon states;
//   2. electronegativity inconsistencies;
//   3. naturalness, summed over scaled atoms: how far positive main-group
//      states fall below the group state (group gap), how far each state
//      ranks below the element's most natural one for the anions present
//      (data/state_preferences.tsv), the spread of mixed valence and the
//      unpaired electrons of radical units. One term, so that the printed
//      score, which adds them, orders assignments as the ranking does.
// Weights add term by term, which is what the charge search needs: the
// weight of an assignment is the sum of its elements' weights. Lower is
// better. The printed score (oxidation.h) is derived from a Weight, never
// kept beside it.
//
// The terms are packed into one integer, each in a field wide enough for
// any formula within the solver's limits (kMaxDistinctElements elements,
// kMaxScaledAtoms scaled atoms), so that comparing and adding cost one
// instruction in the search's inner loop.
//
// Example:
//
//   Weight a = Weight::Of(/*uncommon=*/0, /*inconsistencies=*/1, 0);
//   Weight b = Weight::Of(1, 0, 0);
//   a < b;                    // true: one uncommon state outranks anything
//   (a + b).uncommon();       // 1
//   Weight::Infinite() < a;   // false
//
// Thread safety: value type.

#ifndef SHELLWRIGHT_ENGINE_INTERNAL_WEIGHT_H_
#define SHELLWRIGHT_ENGINE_INTERNAL_WEIGHT_H_

#include <algorithm>
#include <cstdint>

namespace shellwright::internal {

// Scaled atoms per formula unit above which balancing is refused (see
// oxidation.h): the charge window would grow too wide to search quickly.
// The Weight's fields are sized for it.
inline constexpr int64_t kMaxScaledAtoms = 1000000;

class Weight {
 public:
  // Field sizes: naturalness < 64 per scaled atom (group gap <= 7,
  // preference <= 12, spread 1, radical units <= 3 x 3, with
  // room to spare) x 10^6 scaled atoms < 2^26; inconsistencies <= 48
  // (x 2^48 < 2^54); uncommon <= 96 (x 2^54 < 2^61). Each field's unit
  // exceeds the largest sum of the fields below it.
  static constexpr int64_t kUncommonUnit = int64_t{1} << 54;
  static constexpr int64_t kInconsistencyUnit = int64_t{1} << 48;
  static constexpr int64_t kNaturalnessUnit = 1;

  // Zero: the weight of a perfect assignment.
  constexpr Weight() = default;

  // No assignment: heavier than any real one, and a sum with it stays
  // at least as heavy (real weights stay below 2^61).
  static constexpr Weight Infinite() { return Weight(kInfinite); }

  // `naturalness` may be negative only in a difference of weights (a
  // mixed-valence candidate's per-low-atom term, charge_dp.h).
  static constexpr Weight Of(int64_t uncommon, int64_t inconsistencies,
                             int64_t naturalness) {
    return Weight(uncommon * kUncommonUnit +
                  inconsistencies * kInconsistencyUnit +
                  naturalness * kNaturalnessUnit);
  }

  // Each uncommon state counts once, each inconsistent element once;
  // naturalness is in scaled atoms x steps. REQUIRES: a weight, not a
  // difference of weights.
  constexpr int64_t uncommon() const { return packed_ / kUncommonUnit; }
  constexpr int64_t inconsistencies() const {
    return (packed_ % kUncommonUnit) / kInconsistencyUnit;
  }
  constexpr int64_t naturalness() const { return packed_ % kInconsistencyUnit; }

  constexpr bool IsInfinite() const { return packed_ >= kInfinite; }
  // True when the assignment has an electronegativity inconsistency.
  constexpr bool HasInconsistency() const {
    return packed_ % kUncommonUnit >= kInconsistencyUnit;
  }

  // The weight with `n` more uncommon states: a lower bound on what n
  // layers that each must take an uncommon state add.
  static constexpr Weight Uncommon(int64_t n) {
    return Weight(n * kUncommonUnit);
  }

  // The largest weight with at most `n` uncommon states (and any lower
  // terms): a bound that keeps a search to such assignments.
  static constexpr Weight BelowUncommon(int64_t n) {
    return Weight(std::min(kInfinite, n * kUncommonUnit));
  }

  // How many whole uncommon states fit in this weight.
  constexpr int64_t WholeUncommon() const { return packed_ / kUncommonUnit; }

  constexpr int64_t packed() const { return packed_; }
  static constexpr Weight FromPacked(int64_t packed) { return Weight(packed); }

  friend constexpr Weight operator+(Weight a, Weight b) {
    return Weight(a.packed_ + b.packed_);
  }
  friend constexpr Weight operator-(Weight a, Weight b) {
    return Weight(a.packed_ - b.packed_);
  }
  friend constexpr bool operator<(Weight a, Weight b) {
    return a.packed_ < b.packed_;
  }
  friend constexpr bool operator<=(Weight a, Weight b) {
    return a.packed_ <= b.packed_;
  }
  friend constexpr bool operator>=(Weight a, Weight b) {
    return a.packed_ >= b.packed_;
  }
  friend constexpr bool operator==(Weight a, Weight b) {
    return a.packed_ == b.packed_;
  }
  friend constexpr bool operator!=(Weight a, Weight b) {
    return a.packed_ != b.packed_;
  }

 private:
  static constexpr int64_t kInfinite = int64_t{1} << 62;
  explicit constexpr Weight(int64_t packed) : packed_(packed) {}

  int64_t packed_ = 0;
};

}  // namespace shellwright::internal

#endif  // SHELLWRIGHT_ENGINE_INTERNAL_WEIGHT_H_
