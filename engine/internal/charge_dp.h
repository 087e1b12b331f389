// The charge dynamic programme behind the oxidation-state search.
// Internal to the engine.
//
// Each item of a formula (an element, or a unit that takes one of several
// charges) is a layer. A layer's candidates are the options it may take in
// this search, each with its Weight; a mixed-valence candidate may put any
// number of the item's scaled atoms in its lower state. The programme
// finds the lightest choice of one candidate per layer whose charges,
// weighted by the scaled counts, add up to the target. Its cost grows with
// the number of layers times the width of the reachable charge window,
// never with the product of the layers' choices.
//
// Example (see oxidation.cc for the staged search that drives it):
//
//   Candidates c;
//   BuildCandidates(...);  // narrow and wide lists per item
//   Solution s = SolveCharge(items, c, Widening::None(), target,
//                            SearchLimits());
//   if (!s.weight.IsInfinite()) { /* s.choices[i] for each item */ }
//
// Thread safety: SolveCharge keeps per-thread scratch buffers; calls on
// different threads are independent.

#ifndef SHELLWRIGHT_ENGINE_INTERNAL_CHARGE_DP_H_
#define SHELLWRIGHT_ENGINE_INTERNAL_CHARGE_DP_H_

#include <array>
#include <cstdint>
#include <vector>

#include "absl/types/span.h"
#include "engine/internal/state_options.h"
#include "engine/internal/weight.h"
#include "engine/oxidation.h"

namespace shellwright::internal {

// One layer of the search.
struct ChargeItem {
  int64_t scaled_count = 0;  // Scaled atoms (or units), >= 1.
  // Every option of the item; candidates and choices index into it.
  absl::Span<const StateOption> options;
};

// An option a search allows for one item, with its weights: `weight` with
// every atom in the upper state; a mixed option adds `per_low_atom` for
// each scaled atom moved to the lower state (the group gap differs between
// the two states). per_low_atom >= 0, so `weight` is the least this
// candidate adds.
struct Candidate {
  int option;  // Index into the item's options.
  int low;
  int high;
  Weight weight;
  Weight per_low_atom;
};

// The candidates of one item in one search: [begin, end) of
// Candidates::all, with the least and most the item can contribute.
struct CandidateList {
  size_t begin = 0;
  size_t end = 0;
  // How many of them mix two states (low != high): the work budget counts
  // a mixed candidate's cell as several (charge_dp.cc).
  size_t mixed = 0;
  int64_t min_contribution = 0;
  int64_t max_contribution = 0;
  // Least weight any candidate adds, and least of those with an uncommon
  // state that the narrow list lacks (infinite when there is none).
  Weight min_weight = Weight::Infinite();
  Weight min_uncommon_weight = Weight::Infinite();
};

// Every item's candidates for one search set-up: `narrow` keeps to common
// states, `wide` holds every allowed option.
struct Candidates {
  std::vector<Candidate> all;
  std::array<CandidateList, kMaxDistinctElements> narrow;
  std::array<CandidateList, kMaxDistinctElements> wide;
};

// The choice made for one item: option index and, for mixed valence, how
// many scaled atoms take the lower state.
struct Choice {
  int32_t option;
  int32_t low_atoms;  // < scaled_count <= kMaxScaledAtoms.
};

struct Solution {
  Weight weight = Weight::Infinite();
  // One per item, filled only when weight is finite; fixed storage (left
  // uninitialised) so that solving never allocates.
  std::array<Choice, kMaxDistinctElements> choices;

  Solution() {}  // Not = default: `Solution{}` would zero `choices`.
};

// Which layers take their wide candidates; the others take their narrow
// ones.
class Widening {
 public:
  static Widening None() { return Widening(-1); }
  static Widening One(int item) { return Widening(item); }
  static Widening All() { return Widening(kAll); }

  bool Includes(int item) const { return item_ == kAll || item_ == item; }
  // The single widened item, or -1.
  int single() const { return item_ >= 0 ? item_ : -1; }

 private:
  static constexpr int kAll = -2;
  explicit Widening(int item) : item_(item) {}
  int item_;
};

// The work one record's searches may do, shared by all of them. A search
// that would go over it stops, marks the budget exhausted and finds
// nothing; the caller must then not trust "no solution" (see
// oxidation.cc, which switches to a cheaper method or reports the
// record). Work is counted in cell visits: charge cells times the
// candidates that write them.
struct WorkBudget {
  int64_t cell_visits = 0;  // Remaining.
  bool exhausted = false;
};

// Cell visits (weighted, see charge_dp.cc) one record's exhaustive search
// for its best assignment may spend in SolveCharge, and again its
// alternatives: a few milliseconds each on the reference machine
// (docs/performance.md). The largest record of the regression corpus uses
// about a sixth of it.
inline constexpr int64_t kRecordCellVisits = 6000000;

// Weighted visits SolveChargeOneMixed may spend when the exhaustive search
// ran out.
inline constexpr int64_t kRestrictedCellVisits = 2000000;

// Cells one search may hold at once, over all its layers (16 bytes each:
// a weight and a back pointer, plus at most one layer's width of queue),
// which bounds its memory to about 10 MB.
inline constexpr int64_t kMaxSearchCells = 300000;

// What a search may skip.
struct SearchLimits {
  // Only a solution lighter than `bound` is wanted: any other result is as
  // good as none, which lets the search drop every cell that cannot lead
  // below it. That never changes a result below `bound`.
  Weight bound = Weight::Infinite();
  // No solution exists with narrow candidates only, so the single widened
  // item must take one of its uncommon candidates.
  bool must_widen = false;
  // Work allowance; null means unlimited.
  WorkBudget* budget = nullptr;
};

// Whether a bounded search dropped anything, and where.
enum class Pruning { kNone, kAtStart, kInSearch };

// The lightest choice of candidates whose contributions sum to `target`
// (scaled charge units), within `limits`. `pruning`, when set, tells
// whether and where the bound dropped anything: if it did not, the result
// is the unbounded one. REQUIRES: candidates were built for `items`.
Solution SolveCharge(absl::Span<const ChargeItem> items,
                     const Candidates& candidates, Widening widening,
                     int64_t target, const SearchLimits& limits,
                     Pruning* pruning = nullptr);

// The most work SolveCharge could do with every item on its narrow
// candidates (Widening::None()), for these candidates or for any subset of
// them (an option forbidden): cell visits as the budget counts them, and
// the cells it would hold, in `*cells`. Both are upper bounds, whatever the
// search's bound. REQUIRES: candidates were built for `items`.
int64_t NarrowSearchWorkBound(absl::Span<const ChargeItem> items,
                              const Candidates& candidates, int64_t target,
                              int64_t* cells);

// Gives back this thread's search buffers when a search made them large;
// call it when a record is done, so that one wide record does not hold
// its memory for the life of the thread.
void ReleaseSearchScratch();

// The lightest choice, as SolveCharge finds it, among those with at most
// one mixed-valence layer, on the sparse set of totals that single-valence
// choices reach. Its cost grows with the number of distinct totals, not
// with the width of the charge window, so it serves formulas whose
// fine-grained counts make the window too wide for SolveCharge (a count of
// 0.99999 scales every other count by 10^5). Every layer takes its wide
// candidates where `widening` says so; limits.must_widen is ignored.
Solution SolveChargeOneMixed(absl::Span<const ChargeItem> items,
                             const Candidates& candidates, Widening widening,
                             int64_t target, const SearchLimits& limits);

}  // namespace shellwright::internal

#endif  // SHELLWRIGHT_ENGINE_INTERNAL_CHARGE_DP_H_
