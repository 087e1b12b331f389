#include "engine/oxidation.h"

#include <algorithm>
#include <array>
#include <functional>
#include <limits>
#include <numeric>

#include "absl/container/inlined_vector.h"
#include "absl/strings/str_cat.h"
#include "engine/internal/data_tables.h"

namespace shellwright {
namespace {

// Scaled atoms per formula unit above which balancing is refused: the
// charge window would grow too wide to search quickly.
constexpr int64_t kMaxScaledAtoms = 1000000;
constexpr int64_t kMaxWindow = 4000000;

// Lexicographic ranking packed into one integer: uncommon states, then
// electronegativity inconsistencies, then spread (bounded by
// kMaxScaledAtoms x 16 < 2^36).
// Tiers, each strictly above the largest sum of the tiers below it given
// at most kMaxDistinctElements elements and kMaxScaledAtoms atoms:
// spread < 16 x 10^6 < 2^24; group gap < 7 x 10^6 < 2^23 (x 2^24 < 2^47);
// inconsistencies <= 48 (x 2^48 < 2^54); uncommon <= 96 (x 2^54 < 2^61).
constexpr int64_t kUncommonWeight = int64_t{1} << 54;
constexpr int64_t kInconsistencyWeight = int64_t{1} << 48;
constexpr int64_t kGroupGapWeight = int64_t{1} << 24;
constexpr int64_t kInfinity = int64_t{1} << 62;

// How far a positive state of a main-group (p-block) element falls below
// its group oxidation state (group - 10): P+3 in a phosphate scores 2, P+5
// scores 0. Oxyanions put their central atom in the group state (common
// practice, no source), which settles ties such as LiMnPO4 (Mn+2 P+5, not
// Mn+4 P+3).
int GroupGap(const Element& e, int state) {
  if (e.block != Block::kP || e.group < 13 || state <= 0) return 0;
  const int group_state = e.group - 10;
  return state < group_state ? group_state - state : 0;
}

// One way an element can take its charge: a single state, or mixed
// valence over two adjacent known states (low < high), with what its
// weight needs that does not depend on the formula.
struct Option {
  int low = 0;   // Lower state (== high for single valence).
  int high = 0;  // Upper state.
  bool low_common = true;
  bool high_common = true;
  int index = 0;          // Position in the element's options().
  int uncommon = 0;       // Uncommon states among low and high.
  int high_gap = 0;       // GroupGap of the upper state.
  int low_extra_gap = 0;  // GroupGap(low) - GroupGap(high).
};

Option MakeOption(const Element& e, int index, int low, int high,
                  bool low_common, bool high_common) {
  Option o{low, high, low_common, high_common, index};
  o.uncommon = (low_common ? 0 : 1) + (low != high && !high_common ? 1 : 0);
  o.high_gap = GroupGap(e, high);
  o.low_extra_gap = GroupGap(e, low) - o.high_gap;
  return o;
}

struct StateTable {
  std::array<std::vector<KnownOxidationState>, kMaxAtomicNumber + 1> by_z;
  // Every option of each element in search order: each known state,
  // followed by mixed valence with the next known state when both have the
  // same sign. A split across zero (O-1 with O+1) would let any count
  // balance and hide real charge errors. A search stage filters this list
  // (see Allowed) instead of building its own.
  std::array<std::vector<Option>, kMaxAtomicNumber + 1> options_by_z;
  // The options whose states are all common, in the same order: what the
  // first, narrow stage filters.
  std::array<std::vector<Option>, kMaxAtomicNumber + 1> common_options_by_z;
};

const StateTable& States() {
  static const StateTable* const kTable = [] {
    auto* t = new StateTable;
    for (const internal::OxidationStateRow& row :
         internal::OxidationStateRows()) {
      t->by_z[row.atomic_number].push_back({row.state, row.common});
    }
    for (const Element& e : AllElements()) {
      const std::vector<KnownOxidationState>& known = t->by_z[e.atomic_number];
      std::vector<Option>& options = t->options_by_z[e.atomic_number];
      auto add = [&](const KnownOxidationState& low,
                     const KnownOxidationState& high) {
        options.push_back(MakeOption(e, static_cast<int>(options.size()),
                                     low.state, high.state, low.common,
                                     high.common));
        if (low.common && high.common) {
          t->common_options_by_z[e.atomic_number].push_back(options.back());
        }
      };
      for (size_t k = 0; k < known.size(); ++k) {
        add(known[k], known[k]);
        if (k + 1 < known.size() &&
            (known[k].state > 0) == (known[k + 1].state > 0)) {
          add(known[k], known[k + 1]);
        }
      }
    }
    return t;
  }();
  return *kTable;
}

// One element of the formula as the search sees it. Built once per call
// and shared by every stage.
struct ElementPlan {
  const Element* element;
  Rational count;        // Atoms per formula unit.
  int64_t scaled_count;  // count x L, >= 1.
  bool declared = false;
  // The declared states, the only options of a declared element.
  absl::InlinedVector<Option, 1> declared_options;

  absl::Span<const Option> options() const {
    if (declared) return declared_options;
    return States().options_by_z[element->atomic_number];
  }
  // The options whose states are all common, with their index in
  // options(); all of them for a declared element.
  absl::Span<const Option> common_options() const {
    if (declared) return declared_options;
    return States().common_options_by_z[element->atomic_number];
  }
};

using Plans = absl::InlinedVector<ElementPlan, 8>;

// Candidate electronegativity thresholds: elements above a threshold
// should be negative, those below positive. The first is the default
// (only the most electronegative element(s) above); the others are tried
// when it leaves an inconsistency (NH4Cl: N and Cl both negative).
using ThresholdList = absl::InlinedVector<double, 8>;

ThresholdList Thresholds(const Plans& plans) {
  ThresholdList values;
  for (const ElementPlan& p : plans) {
    if (p.element->pauling_electronegativity.has_value()) {
      values.push_back(*p.element->pauling_electronegativity);
    }
  }
  std::sort(values.begin(), values.end(), std::greater<double>());
  values.erase(std::unique(values.begin(), values.end()), values.end());
  ThresholdList out;
  if (values.empty()) return {std::numeric_limits<double>::infinity()};
  if (values.size() == 1) return {values[0] - 0.01};
  for (size_t j = 0; j + 1 < values.size(); ++j) {
    out.push_back((values[j] + values[j + 1]) / 2);
  }
  return out;
}

bool AboveThreshold(const Element& e, double threshold) {
  return e.pauling_electronegativity.has_value() &&
         *e.pauling_electronegativity > threshold;
}

int64_t OptionWeight(const Option& o, int64_t scaled_count,
                     bool above_threshold) {
  const bool inconsistent = above_threshold ? (o.high > 0) : (o.low < 0);
  const int64_t spread = scaled_count * (o.high - o.low);  // 0 if single.
  // A mixed option's gap depends on the split: this is the gap with every
  // atom in the upper state, and Candidate::per_low_atom adds the rest.
  const int64_t gap = scaled_count * o.high_gap;
  return o.uncommon * kUncommonWeight +
         (inconsistent ? kInconsistencyWeight : 0) + gap * kGroupGapWeight +
         spread;
}

// Builds the plan of every element. Declared elements take exactly their
// declared states.
Plans MakePlans(const Formula& formula, int64_t scale,
                const OxidationOptions& options) {
  Plans plans;
  plans.reserve(formula.amounts.size());
  for (const ElementAmount& a : formula.amounts) {
    ElementPlan& p = plans.emplace_back();
    p.element = a.element;
    p.count = a.count;
    p.scaled_count = a.count.num() * (scale / a.count.den());
    for (const DeclaredState& d : options.declared) {
      if (d.element != p.element) continue;
      p.declared = true;
      bool common = d.state == 0;  // The elemental state is always known.
      for (const KnownOxidationState& k :
           States().by_z[p.element->atomic_number]) {
        if (k.state == d.state) common = k.common;
      }
      p.declared_options.push_back(
          MakeOption(*p.element, static_cast<int>(p.declared_options.size()),
                     d.state, d.state, common, common));
    }
  }
  return plans;
}

// An option excluded from the search: element index and its states.
struct Forbidden {
  int element = -1;
  int low = 0;
  int high = 0;
};

// `wide` is the element allowed uncommon states (-1: none; kAllWide: all).
constexpr int kAllWide = -2;

// Whether element `i` may take option `o`. Undeclared elements keep to
// common states when `common_only`, and mix valence only with two scaled
// atoms; declared states are always kept. The forbidden option is dropped.
bool Allowed(const ElementPlan& p, int i, bool common_only,
             const Forbidden& forbidden, const Option& o) {
  if (!p.declared) {
    if (o.low != o.high && p.scaled_count < 2) return false;
    if (common_only && !(o.low_common && o.high_common)) return false;
  }
  return forbidden.element != i || o.low != forbidden.low ||
         o.high != forbidden.high;
}

// The choice made for one element: option index (in its options()) and,
// for mixed valence, how many scaled atoms take the lower state.
struct Choice {
  int32_t option;
  int32_t low_atoms;  // < scaled_count <= kMaxScaledAtoms.
};

struct Solution {
  int64_t weight = kInfinity;
  // One per element, filled only when weight < kInfinity; fixed storage
  // (left uninitialised) so that solving never allocates.
  std::array<Choice, kMaxDistinctElements> choices;

  Solution() {}  // Not = default: `Solution{}` would zero `choices`.
};

// An option a stage allows for one element, with its weights: `weight`
// with every atom in the upper state; a mixed option adds per_low_atom
// for each scaled atom moved to the lower state (the group gap differs
// between the two states).
struct Candidate {
  int option;
  int low;
  int high;
  int64_t weight;
  int64_t per_low_atom;
};

// The candidates of one element in a stage: [begin, end) of
// Candidates::all, with the least and most the element can contribute.
struct CandidateList {
  size_t begin = 0;
  size_t end = 0;
  int64_t min_contribution = 0;
  int64_t max_contribution = 0;
  // Least weight any candidate adds, and least of those with an uncommon
  // state that the narrow list lacks (kInfinity when there is none).
  int64_t min_weight = kInfinity;
  int64_t min_uncommon_weight = kInfinity;
};

// Every element's candidates for one threshold and forbidden option, kept
// to common states (narrow) or with every known state (wide). Built once
// for all the stages of a search.
struct Candidates {
  std::vector<Candidate> all;
  std::array<CandidateList, kMaxDistinctElements> narrow;
  std::array<CandidateList, kMaxDistinctElements> wide;
};

// Fills the narrow (`common_only`) or wide candidate lists of every
// element, appending to candidates->all.
void BuildCandidates(const Plans& plans, const Forbidden& forbidden,
                     double threshold, bool common_only,
                     Candidates* candidates) {
  for (size_t i = 0; i < plans.size(); ++i) {
    const ElementPlan& p = plans[i];
    const bool above = AboveThreshold(*p.element, threshold);
    CandidateList& list =
        common_only ? candidates->narrow[i] : candidates->wide[i];
    list.begin = candidates->all.size();
    list.min_contribution = std::numeric_limits<int64_t>::max();
    list.max_contribution = std::numeric_limits<int64_t>::min();
    list.min_weight = list.min_uncommon_weight = kInfinity;
    for (const Option& o : common_only ? p.common_options() : p.options()) {
      if (!Allowed(p, static_cast<int>(i), common_only, forbidden, o)) {
        continue;
      }
      const Candidate& added = candidates->all.emplace_back(Candidate{
          o.index, o.low, o.high, OptionWeight(o, p.scaled_count, above),
          o.low_extra_gap * kGroupGapWeight});
      // per_low_atom >= 0 (a lower state is never closer to the group
      // state), so `weight` is the least this candidate adds.
      list.min_weight = std::min(list.min_weight, added.weight);
      if (!p.declared && o.uncommon > 0) {
        list.min_uncommon_weight =
            std::min(list.min_uncommon_weight, added.weight);
      }
      list.min_contribution =
          std::min(list.min_contribution, p.scaled_count * o.low);
      list.max_contribution =
          std::max(list.max_contribution, p.scaled_count * o.high);
    }
    list.end = candidates->all.size();
  }
}

// How many uncommon states layers i.. of a search need at least to add
// up to a given total. Each layer on its narrow candidates contributes
// within their span; one that takes an uncommon candidate reaches at most
// as far as its wide span. So a total outside the span of the narrow
// spans widened by the m largest extensions needs more than m uncommon
// layers, each of which weighs at least kUncommonWeight.
struct UncommonNeed {
  int forced = 0;      // Layers that must take an uncommon candidate.
  int extensible = 0;  // Layers that may.
  // Reachable span with at most m extensible layers uncommon,
  // m = 0..extensible.
  std::array<int64_t, kMaxDistinctElements + 1> lo;
  std::array<int64_t, kMaxDistinctElements + 1> hi;
};

// Inserts `v` into the first `size` entries of `sorted`, largest first.
void InsertDescending(int64_t v, int size,
                      std::array<int64_t, kMaxDistinctElements>* sorted) {
  int k = size;
  for (; k > 0 && (*sorted)[k - 1] < v; --k) (*sorted)[k] = (*sorted)[k - 1];
  (*sorted)[k] = v;
}

// Floor and ceiling of a / b for b > 0.
int64_t FloorDiv(int64_t a, int64_t b) {
  return a >= 0 ? a / b : -((-a + b - 1) / b);
}
int64_t CeilDiv(int64_t a, int64_t b) { return -FloorDiv(-a, b); }

// Whether a bounded search dropped anything, and where (see Solve).
enum class Pruning { kNone, kAtStart, kInSearch };

// Dynamic programming over charge totals. Element `wide` (every element
// for kAllWide) takes its wide candidates, the others their narrow ones.
//
// Only a solution lighter than `bound` is wanted: any other result is as
// good as none (kInfinity), which lets the search drop every cell whose
// cost plus a lower bound on what the remaining elements add reaches
// `bound`. That never changes a result below `bound`: the cells of its
// path, and every cell that ties with them, stay. The lower bound is the
// larger of the least weight the remaining elements add and
// kUncommonWeight times the uncommon states they need to reach the
// target (see UncommonNeed). `must_widen` says that no solution exists
// with narrow candidates only (the narrow stage found none), so element
// `wide` must take one of its uncommon candidates. `pruning`, when set,
// tells whether and where the bound dropped anything: if it did not, the
// result is the unbounded one.
Solution Solve(const Plans& plans, const Candidates& candidates, int wide,
               int64_t target, int64_t bound = kInfinity,
               bool must_widen = false, Pruning* pruning = nullptr) {
  // Scratch reused across calls on this thread: the solver runs once or
  // more per record and must not allocate in the common case.
  thread_local std::vector<std::vector<int64_t>> cost;
  thread_local std::vector<std::vector<Choice>> back;
  thread_local std::vector<std::pair<int64_t, int64_t>> window;
  if (pruning != nullptr) *pruning = Pruning::kNone;
  Solution s;
  // Elements with a single single-state candidate only shift the total and
  // the weight: they are folded into the target and take no layer, which
  // shifts every layer without changing any comparison. Layer i of the
  // search is element element_of[i]; n counts those layers.
  std::array<const CandidateList*, kMaxDistinctElements> lists;
  std::array<int, kMaxDistinctElements> element_of;
  size_t n = 0;
  int64_t fixed_weight = 0;
  for (size_t e = 0; e < plans.size(); ++e) {
    const CandidateList* list = wide == kAllWide || wide == static_cast<int>(e)
                                    ? &candidates.wide[e]
                                    : &candidates.narrow[e];
    if (list->begin == list->end) return Solution();
    const Candidate& only = candidates.all[list->begin];
    if (list->end - list->begin == 1 && only.low == only.high) {
      // A forced element that must take an uncommon state but has none
      // leaves nothing to search.
      if (must_widen && wide == static_cast<int>(e) &&
          list->min_uncommon_weight >= kInfinity) {
        return Solution();
      }
      target -= plans[e].scaled_count * only.low;
      fixed_weight += only.weight;
      s.choices[e] = Choice{only.option, 0};
      continue;
    }
    lists[n] = list;
    element_of[n] = static_cast<int>(e);
    ++n;
  }
  // Only layer costs below this can give a total below `bound`.
  if (bound < kInfinity) bound -= fixed_weight;
  // What layers i.. can still contribute, and the least weight they add.
  std::array<int64_t, kMaxDistinctElements + 1> rest_min, rest_max;
  std::array<int64_t, kMaxDistinctElements + 1> rest_weight;
  rest_min[n] = rest_max[n] = rest_weight[n] = 0;
  for (size_t i = n; i-- > 0;) {
    rest_min[i] = rest_min[i + 1] + lists[i]->min_contribution;
    rest_max[i] = rest_max[i + 1] + lists[i]->max_contribution;
    const int64_t w = must_widen && wide == element_of[i]
                          ? lists[i]->min_uncommon_weight
                          : lists[i]->min_weight;
    rest_weight[i] = w >= kInfinity || rest_weight[i + 1] >= kInfinity
                         ? kInfinity
                         : std::min(kInfinity, rest_weight[i + 1] + w);
  }
  if (target < rest_min[0] || target > rest_max[0]) return Solution();
  thread_local std::vector<UncommonNeed> needs;
  if (bound < kInfinity) {
    // From the last layer back, keeping the extensions sorted (largest
    // first) as layers join.
    needs.resize(n + 1);
    std::array<int64_t, kMaxDistinctElements> down, up;
    int extensible = 0, forced = 0;
    int64_t sum_min = 0, sum_max = 0;
    for (size_t i = n + 1; i-- > 0;) {
      if (i < n) {
        const int e = element_of[i];
        const CandidateList& narrow = candidates.narrow[e];
        const CandidateList& used = *lists[i];
        if (&used == &narrow) {
          sum_min += narrow.min_contribution;
          sum_max += narrow.max_contribution;
        } else if ((must_widen && wide == e) || narrow.begin == narrow.end) {
          ++forced;
          sum_min += used.min_contribution;
          sum_max += used.max_contribution;
        } else {
          sum_min += narrow.min_contribution;
          sum_max += narrow.max_contribution;
          InsertDescending(narrow.min_contribution - used.min_contribution,
                           extensible, &down);
          InsertDescending(used.max_contribution - narrow.max_contribution,
                           extensible, &up);
          ++extensible;
        }
      }
      UncommonNeed& need = needs[i];
      need.forced = forced;
      need.extensible = extensible;
      need.lo[0] = sum_min;
      need.hi[0] = sum_max;
      for (int m = 0; m < extensible; ++m) {
        need.lo[m + 1] = need.lo[m] - down[m];
        need.hi[m + 1] = need.hi[m] + up[m];
      }
    }
  }
  // Whether a cell of layer i with `cost` at total t can still lead to a
  // total weight below `bound`.
  auto promising = [&](size_t i, int64_t cost, int64_t t) {
    if (rest_weight[i] >= bound || cost >= bound - rest_weight[i]) {
      return false;
    }
    const UncommonNeed& need = needs[i];
    const int64_t spare = (bound - 1 - cost) / kUncommonWeight - need.forced;
    if (spare < 0) return false;
    const int64_t m = std::min<int64_t>(spare, need.extensible);
    const int64_t rest = target - t;
    return rest >= need.lo[m] && rest <= need.hi[m];
  };
  if (bound < kInfinity && !promising(0, 0, 0)) {
    if (pruning != nullptr) *pruning = Pruning::kAtStart;
    return Solution();
  }

  // Layer i holds totals of layers 0..i-1 within [lo[i], hi[i]]: what the
  // prefix can reach and the rest can still bring to the target.
  std::array<int64_t, kMaxDistinctElements + 1> lo, hi;
  lo[0] = hi[0] = 0;
  int64_t prefix_min = 0, prefix_max = 0;
  for (size_t i = 1; i <= n; ++i) {
    prefix_min += lists[i - 1]->min_contribution;
    prefix_max += lists[i - 1]->max_contribution;
    lo[i] = std::max(prefix_min, target - rest_max[i]);
    hi[i] = std::min(prefix_max, target - rest_min[i]);
    if (lo[i] > hi[i] || hi[i] - lo[i] > kMaxWindow) return Solution();
  }

  if (cost.size() < n + 1) {
    cost.resize(n + 1);
    back.resize(n + 1);
  }
  cost[0].assign(1, 0);
  // Totals of the previous layer with a finite cost lie in
  // [reach_lo, reach_hi]; cells outside it are never read.
  int64_t reach_lo = 0, reach_hi = 0;
  for (size_t i = 0; i < n; ++i) {
    const int64_t c = plans[element_of[i]].scaled_count;
    // Narrow this layer to what the reachable cells can get to.
    lo[i + 1] = std::max(lo[i + 1], reach_lo + lists[i]->min_contribution);
    hi[i + 1] = std::min(hi[i + 1], reach_hi + lists[i]->max_contribution);
    if (lo[i + 1] > hi[i + 1]) return Solution();
    const int64_t next_lo = lo[i + 1], next_hi = hi[i + 1];
    std::vector<int64_t>& next_layer = cost[i + 1];
    next_layer.assign(next_hi - next_lo + 1, kInfinity);
    // Only cells with a finite cost are ever read back, and each of those
    // is written below: no need to clear.
    back[i + 1].resize(next_hi - next_lo + 1);
    int64_t* const next = next_layer.data();
    Choice* const next_back = back[i + 1].data();
    const int64_t* const prev = cost[i].data();
    const int64_t prev_lo = lo[i];
    for (size_t ci = lists[i]->begin; ci < lists[i]->end; ++ci) {
      const Candidate& o = candidates.all[ci];
      const int32_t oi = o.option;
      if (o.low == o.high) {
        // t = q + shift for every reachable q. An infinite prev[q] gives
        // at least kInfinity (no overflow: weights < 2^62), which never
        // improves a slot.
        const int64_t shift = c * o.low;
        const int64_t t_begin = std::max(next_lo, reach_lo + shift);
        const int64_t t_end = std::min(next_hi, reach_hi + shift);
        if (t_begin > t_end) continue;
        const int64_t* src = prev + (t_begin - shift - prev_lo);
        int64_t* dst = next + (t_begin - next_lo);
        Choice* dst_back = next_back + (t_begin - next_lo);
        for (int64_t j = 0; j <= t_end - t_begin; ++j) {
          const int64_t w = src[j] + o.weight;
          if (w < dst[j]) {
            dst[j] = w;
            dst_back[j] = Choice{oi, 0};
          }
        }
        continue;
      }
      // Mixed: k scaled atoms (1..c-1) at the lower state contribute
      // c*high - k*d with d = high - low and cost weight + k*per_low_atom.
      // For each total t the candidates are prev[t - c*high + k*d]: a
      // window of c-1 cells with stride d, scanned with a monotone deque
      // per residue class. The k-dependent cost is folded in by ranking
      // candidate j (q = s0 + j*d) by prev[q] + per_low_atom*j, which
      // differs from the true cost by a term that depends on t only. The
      // deque keeps, among equal costs, the largest q.
      const int64_t d = o.high - o.low;
      const int64_t base = c * o.high;
      // Totals whose window meets the reachable cells.
      const int64_t t_begin = std::max(next_lo, reach_lo + base - (c - 1) * d);
      const int64_t t_end = std::min(next_hi, reach_hi + base - d);
      for (int64_t r = 0; r < d; ++r) {
        // Walk totals t = t0 + m*d of one residue class; the window for
        // t covers j = m+1 .. m+c-1.
        const int64_t t0 = t_begin + r;
        if (t0 > t_end) break;
        const int64_t s0 = t0 - base;
        int64_t j_next = std::max<int64_t>(1, CeilDiv(reach_lo - s0, d));
        const int64_t j_max = FloorDiv(reach_hi - s0, d);
        if (j_next > j_max) continue;  // No reachable cell in this class.
        // Monotone queue of (j, adjusted cost) in window[head, tail), a
        // reused buffer: a std::deque would allocate for every residue
        // class of every option of every layer. It holds at most one
        // entry per reachable cell of the class.
        if (window.size() < static_cast<size_t>(j_max - j_next + 1)) {
          window.resize(j_max - j_next + 1);
        }
        std::pair<int64_t, int64_t>* const queue = window.data();
        size_t head = 0, tail = 0;
        const int64_t src = s0 - prev_lo;  // prev index of j = 0.
        for (int64_t m = 0, t = t0; t <= t_end; ++m, t += d) {
          const int64_t j_last = std::min(m + c - 1, j_max);
          for (; j_next <= j_last; ++j_next) {
            const int64_t w = prev[src + j_next * d];
            if (w >= kInfinity) continue;
            const int64_t adjusted = w + o.per_low_atom * j_next;
            while (tail > head && queue[tail - 1].second >= adjusted) --tail;
            queue[tail++] = {j_next, adjusted};
          }
          while (tail > head && queue[head].first <= m) ++head;
          if (tail == head) continue;
          const int64_t w = queue[head].second - o.per_low_atom * m + o.weight;
          int64_t& slot = next[t - next_lo];
          if (w < slot) {
            slot = w;
            next_back[t - next_lo] =
                Choice{oi, static_cast<int32_t>(queue[head].first - m)};
          }
        }
      }
    }
    if (bound < kInfinity) {
      // Drop cells that cannot lead below `bound`.
      for (int64_t j = 0; j <= next_hi - next_lo; ++j) {
        if (next[j] < kInfinity && !promising(i + 1, next[j], next_lo + j)) {
          next[j] = kInfinity;
          if (pruning != nullptr) *pruning = Pruning::kInSearch;
        }
      }
    }
    // The reachable part of the new layer.
    int64_t a = 0, b = next_hi - next_lo;
    while (a <= b && next[a] >= kInfinity) ++a;
    if (a > b) return Solution();
    while (next[b] >= kInfinity) --b;
    reach_lo = next_lo + a;
    reach_hi = next_lo + b;
  }
  if (target < lo[n] || target > hi[n]) return Solution();
  const int64_t weight = cost[n][target - lo[n]];
  if (weight >= kInfinity) return Solution();
  s.weight = weight + fixed_weight;
  int64_t t = target;
  for (size_t i = n; i > 0; --i) {
    const Choice ch = back[i][t - lo[i]];
    const int e = element_of[i - 1];
    s.choices[e] = ch;
    const Option& o = plans[e].options()[ch.option];
    const int64_t c = plans[e].scaled_count;
    t -= o.low == o.high ? c * o.low
                         : c * o.high - ch.low_atoms * (o.high - o.low);
  }
  return s;
}

OxidationAssignment ToAssignment(const Plans& plans, const Solution& s,
                                 int64_t scale) {
  OxidationAssignment a;
  a.states.reserve(2 * plans.size());  // Two entries per mixed element.
  int64_t gap = 0;                     // Group gap, in scaled atoms.
  for (size_t i = 0; i < plans.size(); ++i) {
    const ElementPlan& p = plans[i];
    const Option& o = p.options()[s.choices[i].option];
    if (o.low == o.high) {
      a.states.push_back({p.element, o.low, p.count, o.low_common, p.declared});
      if (!o.low_common) ++a.uncommon_states;
      gap += o.high_gap * p.scaled_count;
    } else {
      const int64_t k = s.choices[i].low_atoms;
      a.states.push_back(
          {p.element, o.low, Rational(k, scale), o.low_common, false});
      a.states.push_back({p.element, o.high,
                          Rational(p.scaled_count - k, scale), o.high_common,
                          false});
      a.uncommon_states += (o.low_common ? 0 : 1) + (o.high_common ? 0 : 1);
      a.spread = a.spread + Rational(p.scaled_count * (o.high - o.low), scale);
      gap += (o.high_gap + o.low_extra_gap) * k +
             o.high_gap * (p.scaled_count - k);
    }
  }
  a.electronegativity_inconsistencies =
      static_cast<int>((s.weight % kUncommonWeight) / kInconsistencyWeight);
  a.score = 100.0 * a.uncommon_states +
            10.0 * a.electronegativity_inconsistencies +
            static_cast<double>(gap) / scale + a.spread.ToDouble();
  return a;
}

// Finds the best assignment by widening the search in stages, each exact
// for what it decides:
//   1. common states only: any solution here outranks all others;
//   2. one element at a time may take uncommon states: if the best has a
//      single uncommon state, no solution with more can beat it;
//   3. every known state for every element.
// Stages 1 and 2 keep the charge windows narrow, which is what makes the
// typical record cheap.
//
// Only a result lighter than `bound` is wanted (see Solve): anything else
// may come back as no solution.
Solution SolveStaged(const Plans& plans, int64_t target,
                     const Forbidden& forbidden, double threshold,
                     int64_t bound = kInfinity) {
  thread_local Candidates candidates;
  candidates.all.clear();
  BuildCandidates(plans, forbidden, threshold, /*common_only=*/true,
                  &candidates);
  // Every solution shares the declared states, D of them uncommon. A
  // narrow solution (common and declared states only) weighs below
  // (D + 1) x kUncommonWeight and every solution of the later stages at
  // least that, so a narrow solution ends the search. With a bound up to
  // kUncommonWeight nothing in the later stages can come below it either.
  // With a higher bound, whatever the narrow stage dropped weighs at least
  // the bound, and so does everything the later stages could find.
  Solution best = Solve(plans, candidates, -1, target, bound);
  if (best.weight < kInfinity || bound <= kUncommonWeight) return best;
  BuildCandidates(plans, forbidden, threshold, /*common_only=*/false,
                  &candidates);
  for (size_t k = 0; k < plans.size(); ++k) {
    Solution s = Solve(plans, candidates, static_cast<int>(k), target,
                       std::min(bound, best.weight), /*must_widen=*/true);
    if (s.weight < best.weight) best = std::move(s);
  }
  if (best.weight < 2 * kUncommonWeight) return best;
  // Stage 3, deepened: solutions with at most m uncommon states weigh
  // below (m + 1) x kUncommonWeight, so bounding the search there keeps it
  // to them. The first m that finds one has found the best; a search the
  // bound did not prune was the unbounded one. After two fruitless
  // bounded searches (a record that no state balances, say) the last one
  // goes unbounded, so that deepening never costs more than a few
  // searches.
  const int64_t limit = std::min(bound, best.weight);
  int fruitless = 0;
  for (int64_t m = 2;; ++m) {
    const int64_t cap =
        fruitless == 2 ? limit : std::min((m + 1) * kUncommonWeight, limit);
    Pruning pruning = Pruning::kNone;
    Solution s = Solve(plans, candidates, kAllWide, target, cap,
                       /*must_widen=*/false, &pruning);
    if (s.weight < best.weight) {
      best = std::move(s);
      break;
    }
    if (cap >= limit || pruning == Pruning::kNone) break;
    if (pruning == Pruning::kInSearch) ++fruitless;
  }
  return best;
}

}  // namespace

absl::Span<const KnownOxidationState> KnownOxidationStates(
    const Element& element) {
  return States().by_z[element.atomic_number];
}

bool IsMetal(const Element& e) {
  static const std::array<bool, kMaxAtomicNumber + 1>* const kMetal = [] {
    auto* metal = new std::array<bool, kMaxAtomicNumber + 1>;
    metal->fill(true);
    for (absl::string_view symbol :
         {"H",  "He", "B",  "C",  "N",  "O",  "F",  "Ne", "Si",
          "P",  "S",  "Cl", "Ar", "Ge", "As", "Se", "Br", "Kr",
          "Sb", "Te", "I",  "Xe", "At", "Rn", "Ts", "Og"}) {
      if (const Element* n = FindElementBySymbol(symbol)) {
        (*metal)[n->atomic_number] = false;
      }
    }
    return metal;
  }();
  return (*kMetal)[e.atomic_number];
}

absl::StatusOr<OxidationResult> AssignOxidationStates(
    const Formula& formula, const OxidationOptions& options) {
  if (formula.amounts.empty()) {
    return absl::InvalidArgumentError("formula has no elements");
  }
  if (formula.amounts.size() > kMaxDistinctElements) {
    return absl::InvalidArgumentError(absl::StrCat(
        "formula has ", formula.amounts.size(),
        " distinct elements, above the limit of ", kMaxDistinctElements));
  }
  for (const DeclaredState& d : options.declared) {
    bool present = false;
    for (const ElementAmount& a : formula.amounts) {
      present |= a.element == d.element;
    }
    if (!present) {
      return absl::InvalidArgumentError(
          absl::StrCat("declared state for ", d.element->symbol,
                       ", which the formula does not contain"));
    }
  }
  OxidationResult result;
  const bool undeclared = options.declared.empty();
  bool declared_all_zero = true;
  for (const DeclaredState& d : options.declared) {
    declared_all_zero &= d.state == 0;
  }
  if (options.net_charge == 0 && declared_all_zero) {
    bool all_metal = true;
    for (const ElementAmount& a : formula.amounts) {
      all_metal &= IsMetal(*a.element);
    }
    if (formula.amounts.size() == 1 || all_metal) {
      result.kind = formula.amounts.size() == 1 ? CompositionKind::kElemental
                                                : CompositionKind::kMetallic;
      OxidationAssignment a;
      a.states.reserve(formula.amounts.size());
      for (const ElementAmount& amount : formula.amounts) {
        bool declared = false;
        for (const DeclaredState& d : options.declared) {
          declared |= d.element == amount.element;
        }
        a.states.push_back({amount.element, 0, amount.count, true, declared});
      }
      result.best = std::move(a);
      return result;
    }
  }

  // Scale counts to integers.
  int64_t scale = 1;
  for (const ElementAmount& a : formula.amounts) {
    scale = std::lcm(scale, a.count.den());
    if (scale > kMaxStoichiometryDenominator) {
      return absl::InvalidArgumentError(absl::StrCat(
          "stoichiometry is too finely divided to balance exactly (common "
          "denominator above ",
          kMaxStoichiometryDenominator, ")"));
    }
  }
  int64_t scaled_atoms = 0;
  for (const ElementAmount& a : formula.amounts) {
    scaled_atoms += a.count.num() * (scale / a.count.den());
  }
  if (scaled_atoms > kMaxScaledAtoms) {
    return absl::InvalidArgumentError(
        "stoichiometry is too large to balance (more than 10^6 atoms per "
        "formula unit after scaling to integers)");
  }
  const int64_t target = static_cast<int64_t>(options.net_charge) * scale;

  // Electronegativity consistency is judged against a threshold: the
  // default puts only the most electronegative element on the negative
  // side; the others are searched only when that leaves an inconsistency.
  const Plans plans = MakePlans(formula, scale, options);
  const ThresholdList thresholds = Thresholds(plans);
  auto solve_best = [&](const Plans& search, const Forbidden& forbidden,
                        double* chosen) {
    Solution best = SolveStaged(search, target, forbidden, thresholds[0]);
    *chosen = thresholds[0];
    const bool consistent =
        best.weight < kInfinity &&
        best.weight % kUncommonWeight < kInconsistencyWeight;
    if (consistent) return best;
    for (size_t j = 1; j < thresholds.size(); ++j) {
      Solution s =
          SolveStaged(search, target, forbidden, thresholds[j], best.weight);
      if (s.weight < best.weight) {
        best = std::move(s);
        *chosen = thresholds[j];
      }
    }
    return best;
  };
  double threshold = thresholds[0];
  const Solution best = solve_best(plans, Forbidden(), &threshold);
  if (best.weight >= kInfinity) {
    if (!undeclared) {
      OxidationOptions free = options;
      free.declared.clear();
      const Plans free_plans = MakePlans(formula, scale, free);
      double unused = 0;
      const Solution s = solve_best(free_plans, Forbidden(), &unused);
      if (s.weight < kInfinity) {
        result.without_declared = ToAssignment(free_plans, s, scale);
      }
    }
    return result;
  }
  result.best = ToAssignment(plans, best, scale);

  if (options.max_alternatives > 0) {
    // Alternatives: forbid, one element at a time, the option the best
    // assignment chose for it, and take the best of what remains.
    std::vector<std::pair<int64_t, OxidationAssignment>> found;
    // Once max_alternatives are found, a search only matters if it comes
    // below the heaviest of the lightest max_alternatives (a tie ranks
    // after it, being found later; a duplicate of a skipped one would be
    // skipped too, weighing the same).
    std::vector<int64_t> weights;
    const size_t wanted = static_cast<size_t>(options.max_alternatives);
    for (size_t i = 0; i < plans.size(); ++i) {
      if (plans[i].declared) continue;
      int64_t bound = kInfinity;
      if (found.size() >= wanted) {
        weights.clear();
        for (const auto& [w, unused] : found) weights.push_back(w);
        std::nth_element(weights.begin(), weights.begin() + (wanted - 1),
                         weights.end());
        bound = weights[wanted - 1];
      }
      const Option& chosen = plans[i].options()[best.choices[i].option];
      const Solution s =
          SolveStaged(plans, target,
                      Forbidden{static_cast<int>(i), chosen.low, chosen.high},
                      threshold, bound);
      if (s.weight >= kInfinity) continue;
      OxidationAssignment a = ToAssignment(plans, s, scale);
      bool duplicate = false;
      for (const auto& [w, other] : found) {
        if (other.states.size() != a.states.size()) continue;
        bool same = true;
        for (size_t k = 0; k < a.states.size() && same; ++k) {
          same = a.states[k].element == other.states[k].element &&
                 a.states[k].state == other.states[k].state &&
                 a.states[k].count == other.states[k].count;
        }
        duplicate |= same;
      }
      if (!duplicate) found.emplace_back(s.weight, std::move(a));
    }
    std::stable_sort(
        found.begin(), found.end(),
        [](const auto& x, const auto& y) { return x.first < y.first; });
    for (auto& [w, a] : found) {
      if (static_cast<int>(result.alternatives.size()) >=
          options.max_alternatives) {
        break;
      }
      result.alternatives.push_back(std::move(a));
    }
  }
  return result;
}

}  // namespace shellwright
