#include "engine/internal/charge_dp.h"

#include <algorithm>
#include <limits>
#include <utility>

#include "absl/numeric/bits.h"

namespace shellwright::internal {
namespace {

// One total reached by single-valence choices of a run of layers.
struct SparseEntry {
  int64_t total;
  int64_t weight;     // Packed Weight.
  int32_t link;       // Entry index in the neighbouring map; -1 at the root.
  int32_t candidate;  // Index into Candidates::all; -1 at the root.
};

// Totals reached by single-valence choices: maps[i] holds those of the
// layers before i (a forward run) or from i on (a backward run), each with
// the lightest way to it. A sweep fills as many maps as it has layers
// (SparseSweep); the vectors beyond keep their capacity for the next
// search and are never read.
struct SparseRun {
  std::vector<std::vector<SparseEntry>> maps;
};

// Where each total of the layer being built sits in its map: open
// addressing with linear probing, emptied in O(1) by a new stamp (a
// general hash map frees and rehashes its array for every layer, which
// cost more than the search itself).
class TotalIndex {
 public:
  // Empties the index.
  void Reset() {
    if (slots_.empty()) Resize(64);
    count_ = 0;
    if (++stamp_ == 0) {  // Stamps wrapped: clear for real.
      std::fill(slots_.begin(), slots_.end(), Slot{});
      stamp_ = 1;
    }
  }
  // The index stored for `total`, or a slot to store it in (then
  // `*inserted` is true and the caller must set it before the next call).
  int32_t& Find(int64_t total, bool* inserted) {
    if (2 * (count_ + 1) > slots_.size()) Grow();
    for (size_t i = Home(total);; i = (i + 1) & mask_) {
      Slot& s = slots_[i];
      if (s.stamp != stamp_) {
        s = Slot{total, 0, stamp_};
        ++count_;
        *inserted = true;
        return s.index;
      }
      if (s.total == total) {
        *inserted = false;
        return s.index;
      }
    }
  }
  size_t capacity() const { return slots_.size(); }

 private:
  struct Slot {
    int64_t total = 0;
    int32_t index = 0;
    uint32_t stamp = 0;
  };
  size_t Home(int64_t total) const {
    return (static_cast<uint64_t>(total) * 0x9E3779B97F4A7C15ull) >> shift_;
  }
  void Resize(size_t size) {
    slots_.assign(size, Slot{});
    mask_ = size - 1;
    shift_ = 64 - absl::countr_zero(size);
    stamp_ = 1;
  }
  // Doubles the table, keeping what the current stamp holds.
  void Grow() {
    std::vector<Slot> old;
    old.swap(slots_);
    const uint32_t live = stamp_;
    Resize(2 * old.size());
    for (const Slot& s : old) {
      if (s.stamp != live) continue;
      size_t i = Home(s.total);
      while (slots_[i].stamp == stamp_) i = (i + 1) & mask_;
      slots_[i] = Slot{s.total, s.index, stamp_};
    }
  }

  std::vector<Slot> slots_;
  size_t count_ = 0;
  size_t mask_ = 0;
  int shift_ = 63;
  uint32_t stamp_ = 0;
};

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

// Cost of a mixed candidate's cell, in single-candidate cell visits (its
// monotone queue), measured on the reference machine.
constexpr int64_t kMixedVisitCost = 4;

// The visits the work budget charges per cell of a layer with `list`'s
// candidates.
int64_t VisitsPerCell(const CandidateList& list) {
  return static_cast<int64_t>(list.end - list.begin) +
         (kMixedVisitCost - 1) * static_cast<int64_t>(list.mixed);
}

// Per-thread buffers of the searches. A search holds at most
// kMaxSearchCells cells; ReleaseSearchScratch() gives large buffers back.
struct Scratch {
  std::vector<std::vector<int64_t>> cost;
  std::vector<std::vector<Choice>> back;
  std::vector<std::pair<int64_t, int64_t>> window;
  std::vector<UncommonNeed> needs;
  // SolveChargeOneMixed's.
  TotalIndex slot;
  SparseRun forward, backward;
  std::vector<size_t> by_total;
  // Set where a buffer that ReleaseSearchScratch weighs may have grown
  // since it last weighed them: only then can they hold more than it keeps.
  bool grown = false;
};

Scratch& ThreadScratch() {
  thread_local Scratch scratch;
  return scratch;
}

}  // namespace

void ReleaseSearchScratch() {
  constexpr size_t kKeepCells = 1 << 15;
  Scratch& s = ThreadScratch();
  if (!s.grown) return;
  s.grown = false;
  size_t held = s.window.capacity() + s.slot.capacity() + s.by_total.capacity();
  for (const std::vector<int64_t>& layer : s.cost) held += layer.capacity();
  for (const SparseRun* run : {&s.forward, &s.backward}) {
    for (const std::vector<SparseEntry>& map : run->maps) {
      held += map.capacity();
    }
  }
  if (held > kKeepCells) s = Scratch();
}

Solution SolveCharge(absl::Span<const ChargeItem> items,
                     const Candidates& candidates, Widening widening,
                     int64_t target, const SearchLimits& limits,
                     Pruning* pruning) {
  // The search works on packed weights: one integer per cell.
  constexpr int64_t kInfinity = Weight::Infinite().packed();
  constexpr int64_t kUncommonWeight = Weight::kUncommonUnit;
  int64_t bound = limits.bound.packed();
  const bool must_widen = limits.must_widen;
  const int forced_wide = widening.single();
  // Scratch reused across calls on this thread: the solver runs once or
  // more per record and must not allocate in the common case.
  Scratch& scratch = ThreadScratch();
  std::vector<std::vector<int64_t>>& cost = scratch.cost;
  std::vector<std::vector<Choice>>& back = scratch.back;
  std::vector<std::pair<int64_t, int64_t>>& window = scratch.window;
  if (pruning != nullptr) *pruning = Pruning::kNone;
  // Every return returns `s` (its weight infinite until a solution is
  // found), which the caller then holds in place: no copy.
  Solution s;
  // Elements with a single single-state candidate only shift the total and
  // the weight: they are folded into the target and take no layer, which
  // shifts every layer without changing any comparison. Layer i of the
  // search is element element_of[i]; n counts those layers.
  std::array<const CandidateList*, kMaxDistinctElements> lists;
  std::array<int, kMaxDistinctElements> element_of;
  size_t n = 0;
  int64_t fixed_weight = 0;
  for (size_t e = 0; e < items.size(); ++e) {
    const CandidateList* list = widening.Includes(static_cast<int>(e))
                                    ? &candidates.wide[e]
                                    : &candidates.narrow[e];
    if (list->begin == list->end) return s;
    const Candidate& only = candidates.all[list->begin];
    if (list->end - list->begin == 1 && only.low == only.high) {
      // A forced element that must take an uncommon state but has none
      // leaves nothing to search.
      if (must_widen && forced_wide == static_cast<int>(e) &&
          list->min_uncommon_weight.IsInfinite()) {
        return s;
      }
      target -= items[e].scaled_count * only.low;
      fixed_weight += only.weight.packed();
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
    const int64_t w = must_widen && forced_wide == element_of[i]
                          ? lists[i]->min_uncommon_weight.packed()
                          : lists[i]->min_weight.packed();
    rest_weight[i] = w >= kInfinity || rest_weight[i + 1] >= kInfinity
                         ? kInfinity
                         : std::min(kInfinity, rest_weight[i + 1] + w);
  }
  if (target < rest_min[0] || target > rest_max[0]) return s;
  std::vector<UncommonNeed>& needs = scratch.needs;
  if (bound < kInfinity) {
    // From the last layer back, keeping the extensions sorted (largest
    // first) as layers join.
    if (needs.size() < n + 1) needs.resize(n + 1);
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
        } else if ((must_widen && forced_wide == e) ||
                   narrow.begin == narrow.end) {
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
    return s;
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
    if (lo[i] > hi[i]) return s;
  }
  // Memory: the layers' cells, bounded before anything is allocated.
  int64_t cells = 1;
  for (size_t i = 1; i <= n; ++i) cells += hi[i] - lo[i] + 1;
  auto exhaust = [&]() {
    if (limits.budget != nullptr) limits.budget->exhausted = true;
  };
  if (cells > kMaxSearchCells) {
    exhaust();
    return s;
  }

  if (cost.size() < n + 1) {
    scratch.grown = true;
    cost.resize(n + 1);
    back.resize(n + 1);
  }
  cost[0].assign(1, 0);
  // Totals of the previous layer with a finite cost lie in
  // [reach_lo, reach_hi]; cells outside it are never read.
  int64_t reach_lo = 0, reach_hi = 0;
  for (size_t i = 0; i < n; ++i) {
    const int64_t c = items[element_of[i]].scaled_count;
    // Narrow this layer to what the reachable cells can get to.
    lo[i + 1] = std::max(lo[i + 1], reach_lo + lists[i]->min_contribution);
    hi[i + 1] = std::min(hi[i + 1], reach_hi + lists[i]->max_contribution);
    if (lo[i + 1] > hi[i + 1]) return s;
    const int64_t next_lo = lo[i + 1], next_hi = hi[i + 1];
    // The layer's candidates; the writes below cannot change them.
    const size_t list_begin = lists[i]->begin, list_end = lists[i]->end;
    if (limits.budget != nullptr) {
      // A mixed candidate's queue costs about four single visits a cell.
      const int64_t visits = (next_hi - next_lo + 1) * VisitsPerCell(*lists[i]);
      if (visits > limits.budget->cell_visits) {
        exhaust();
        return s;
      }
      limits.budget->cell_visits -= visits;
    }
    // The buffers only grow (ReleaseSearchScratch trims them): a layer
    // narrower than the last one held reuses its storage as it is.
    const size_t width = static_cast<size_t>(next_hi - next_lo + 1);
    std::vector<int64_t>& next_layer = cost[i + 1];
    if (next_layer.size() < width) {
      scratch.grown = true;
      next_layer.resize(width);
    }
    std::fill_n(next_layer.data(), width, kInfinity);
    // Only cells with a finite cost are ever read back, and each of those
    // is written below: no need to clear.
    if (back[i + 1].size() < width) back[i + 1].resize(width);
    int64_t* const next = next_layer.data();
    Choice* const next_back = back[i + 1].data();
    const int64_t* const prev = cost[i].data();
    const int64_t prev_lo = lo[i];
    for (size_t ci = list_begin; ci < list_end; ++ci) {
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
          const int64_t w = src[j] + o.weight.packed();
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
      const int64_t per_low_atom = o.per_low_atom.packed();
      if (reach_lo == reach_hi) {
        // One reachable cell (always so in the first layer): each k
        // reaches one total from it, and there is no window to slide.
        // Totals are independent, so visiting them by k finds what the
        // queue would.
        const int64_t from = reach_lo + base;
        const int64_t k_begin =
            std::max<int64_t>(1, CeilDiv(from - next_hi, d));
        const int64_t k_end = std::min(c - 1, FloorDiv(from - next_lo, d));
        const int64_t w0 = prev[reach_lo - prev_lo] + o.weight.packed();
        for (int64_t k = k_begin; k <= k_end; ++k) {
          const int64_t w = w0 + per_low_atom * k;
          const int64_t cell = from - k * d - next_lo;
          if (w < next[cell]) {
            next[cell] = w;
            next_back[cell] = Choice{oi, static_cast<int32_t>(k)};
          }
        }
        continue;
      }
      // Totals whose window meets the reachable cells.
      const int64_t t_begin = std::max(next_lo, reach_lo + base - (c - 1) * d);
      const int64_t t_end = std::min(next_hi, reach_hi + base - d);
      if (t_begin == t_end) {
        // One total (always so in the last layer): the least of its
        // window by a plain scan, keeping the last of equal costs (the
        // largest q) as the queue does.
        const int64_t s0 = t_begin - base;
        const int64_t j_begin = std::max<int64_t>(1, CeilDiv(reach_lo - s0, d));
        const int64_t j_end = std::min(c - 1, FloorDiv(reach_hi - s0, d));
        int64_t least = kInfinity, least_j = 0;
        for (int64_t j = j_begin; j <= j_end; ++j) {
          const int64_t w = prev[s0 - prev_lo + j * d];
          if (w >= kInfinity) continue;
          const int64_t adjusted = w + per_low_atom * j;
          if (adjusted <= least) {
            least = adjusted;
            least_j = j;
          }
        }
        if (least < kInfinity) {
          const int64_t w = least + o.weight.packed();
          int64_t& slot = next[t_begin - next_lo];
          if (w < slot) {
            slot = w;
            next_back[t_begin - next_lo] =
                Choice{oi, static_cast<int32_t>(least_j)};
          }
        }
        continue;
      }
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
          scratch.grown = true;
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
            const int64_t adjusted = w + per_low_atom * j_next;
            while (tail > head && queue[tail - 1].second >= adjusted) --tail;
            queue[tail++] = {j_next, adjusted};
          }
          while (tail > head && queue[head].first <= m) ++head;
          if (tail == head) continue;
          const int64_t w =
              queue[head].second - per_low_atom * m + o.weight.packed();
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
      // Drop cells that cannot lead below `bound`. A cell passes
      // `promising` when its cost is below `limit` and the rest of the
      // target lies in the span its spare uncommon states allow. The spare
      // only grows as the cost falls, so when the span at the least spare
      // a passing cost can have, and every wider one, holds the rest of
      // every total of this layer, the cost alone decides (the usual case:
      // a bound below one uncommon state leaves no spare to count).
      const UncommonNeed& need = needs[i + 1];
      bool cost_decides = true;
      int64_t limit = std::numeric_limits<int64_t>::min();  // None passes.
      if (rest_weight[i + 1] < bound) {
        limit = bound - rest_weight[i + 1];
        // The spare of the costliest passing cell, limit - 1.
        const int64_t spare =
            rest_weight[i + 1] / kUncommonWeight - need.forced;
        cost_decides = spare >= 0;
        for (int64_t m = std::min<int64_t>(std::max<int64_t>(spare, 0),
                                           need.extensible);
             cost_decides && m <= need.extensible; ++m) {
          cost_decides =
              target - next_hi >= need.lo[m] && target - next_lo <= need.hi[m];
        }
      }
      for (int64_t j = 0; j <= next_hi - next_lo; ++j) {
        if (next[j] < kInfinity &&
            (cost_decides ? next[j] >= limit
                          : !promising(i + 1, next[j], next_lo + j))) {
          next[j] = kInfinity;
          if (pruning != nullptr) *pruning = Pruning::kInSearch;
        }
      }
    }
    // The reachable part of the new layer.
    int64_t a = 0, b = next_hi - next_lo;
    while (a <= b && next[a] >= kInfinity) ++a;
    if (a > b) return s;
    while (next[b] >= kInfinity) --b;
    reach_lo = next_lo + a;
    reach_hi = next_lo + b;
  }
  if (target < lo[n] || target > hi[n]) return s;
  const int64_t weight = cost[n][target - lo[n]];
  if (weight >= kInfinity) return s;
  s.weight = Weight::FromPacked(weight + fixed_weight);
  int64_t t = target;
  for (size_t i = n; i > 0; --i) {
    const Choice ch = back[i][t - lo[i]];
    const int e = element_of[i - 1];
    s.choices[e] = ch;
    const StateOption& o = items[e].options[ch.option];
    const int64_t c = items[e].scaled_count;
    t -= o.low == o.high ? c * o.low
                         : c * o.high - ch.low_atoms * (o.high - o.low);
  }
  return s;
}

namespace {

// Cost of one sparse visit (a hash-map insertion, or a step of a join) in
// dense cell visits, for the WorkBudget: about 8x on the reference
// machine.
constexpr int64_t kSparseVisitCost = 8;

// Fills run->maps layer by layer, in `order`, for the first `layers`
// layers of it, adding each layer's single candidates to the previous map
// and keeping only totals inside [keep_lo[i], keep_hi[i]] after layer i
// joins, and only entries below `bound`. (Dropping those that cannot
// come below it with the least weight of the layers still to come would
// be sound, but it reorders the maps and so changes which of two equally
// light results the join finds first.) Returns false when the budget or
// the cell bound runs out.
bool SparseSweep(absl::Span<const ChargeItem> items,
                 absl::Span<const CandidateList* const> lists,
                 absl::Span<const size_t> order, size_t layers,
                 absl::Span<const int64_t> keep_lo,
                 absl::Span<const int64_t> keep_hi,
                 const Candidates& candidates, int64_t bound,
                 WorkBudget* budget, int64_t* held, SparseRun* run) {
  TotalIndex& slot = ThreadScratch().slot;
  if (run->maps.size() < order.size() + 1) run->maps.resize(order.size() + 1);
  run->maps[0].assign(1, SparseEntry{0, 0, -1, -1});
  for (size_t step = 0; step < layers; ++step) {
    const size_t e = order[step];
    const std::vector<SparseEntry>& prev = run->maps[step];
    const CandidateList& list = *lists[e];
    const int64_t visits = kSparseVisitCost *
                           static_cast<int64_t>(prev.size()) *
                           static_cast<int64_t>(list.end - list.begin);
    if (budget != nullptr) {
      if (visits > budget->cell_visits) return false;
      budget->cell_visits -= visits;
    }
    std::vector<SparseEntry>& next = run->maps[step + 1];
    next.clear();
    // The layer may hold what the search's cell bound leaves.
    const size_t room = static_cast<size_t>(kMaxSearchCells - *held);
    slot.Reset();
    const int64_t count = items[e].scaled_count;
    for (size_t pi = 0; pi < prev.size(); ++pi) {
      for (size_t ci = list.begin; ci < list.end; ++ci) {
        const Candidate& c = candidates.all[ci];
        if (c.low != c.high) continue;
        const int64_t t = prev[pi].total + count * c.low;
        if (t < keep_lo[step] || t > keep_hi[step]) continue;
        const int64_t w = prev[pi].weight + c.weight.packed();
        if (w >= bound) continue;
        bool inserted = false;
        int32_t& index = slot.Find(t, &inserted);
        if (inserted) {
          if (next.size() == room) return false;
          index = static_cast<int32_t>(next.size());
        } else if (w >= next[index].weight) {
          continue;
        }
        const SparseEntry entry{t, w, static_cast<int32_t>(pi),
                                static_cast<int32_t>(ci)};
        if (inserted) {
          next.push_back(entry);
        } else {
          next[index] = entry;
        }
      }
    }
    *held += static_cast<int64_t>(next.size());
    if (*held > kMaxSearchCells) return false;
  }
  return true;
}

// Writes the choices that lead to entry `index` of run.maps[depth], whose
// layers are order[0..depth).
void Trace(const SparseRun& run, absl::Span<const size_t> order,
           const Candidates& candidates, size_t depth, int32_t index,
           Solution* s) {
  for (size_t d = depth; d > 0; --d) {
    const SparseEntry& entry = run.maps[d][index];
    s->choices[order[d - 1]] =
        Choice{candidates.all[entry.candidate].option, 0};
    index = entry.link;
  }
}

}  // namespace

int64_t NarrowSearchWorkBound(absl::Span<const ChargeItem> items,
                              const Candidates& candidates, int64_t target,
                              int64_t* cells) {
  // SolveCharge's charge windows, taken over every item: folding an item
  // with a single candidate into the target removes its layer and leaves
  // the other windows as wide as they are here, and fewer candidates only
  // narrow them. Each layer's visits are its window times its candidates'
  // per-cell cost, as SolveCharge charges them before narrowing a window
  // to the reachable cells.
  const size_t n = items.size();
  std::array<int64_t, kMaxDistinctElements + 1> rest_min, rest_max;
  rest_min[n] = rest_max[n] = 0;
  for (size_t i = n; i-- > 0;) {
    rest_min[i] = rest_min[i + 1] + candidates.narrow[i].min_contribution;
    rest_max[i] = rest_max[i + 1] + candidates.narrow[i].max_contribution;
  }
  int64_t visits = 0, prefix_min = 0, prefix_max = 0;
  *cells = 1;
  for (size_t i = 0; i < n; ++i) {
    const CandidateList& list = candidates.narrow[i];
    prefix_min += list.min_contribution;
    prefix_max += list.max_contribution;
    const int64_t lo = std::max(prefix_min, target - rest_max[i + 1]);
    const int64_t hi = std::min(prefix_max, target - rest_min[i + 1]);
    if (hi < lo) continue;
    *cells += hi - lo + 1;
    visits += (hi - lo + 1) * VisitsPerCell(list);
  }
  return visits;
}

Solution SolveChargeOneMixed(absl::Span<const ChargeItem> items,
                             const Candidates& candidates, Widening widening,
                             int64_t target, const SearchLimits& limits) {
  // Its maps, index and join order grow as they need.
  ThreadScratch().grown = true;
  const size_t n = items.size();
  std::array<const CandidateList*, kMaxDistinctElements> lists;
  for (size_t e = 0; e < n; ++e) {
    lists[e] = widening.Includes(static_cast<int>(e)) ? &candidates.wide[e]
                                                      : &candidates.narrow[e];
    // An item with no candidate leaves nothing to search (and its list's
    // contribution bounds are the empty sentinels, which must not be
    // summed).
    if (lists[e]->begin == lists[e]->end) return Solution();
  }
  const absl::Span<const CandidateList* const> list_span(lists.data(), n);
  auto exhaust = [&]() {
    if (limits.budget != nullptr) limits.budget->exhausted = true;
    return Solution();
  };
  // What the layers before i, and from i on, can contribute (mixed
  // candidates included).
  std::array<int64_t, kMaxDistinctElements + 1> pre_min, pre_max, suf_min,
      suf_max;
  pre_min[0] = pre_max[0] = suf_min[n] = suf_max[n] = 0;
  for (size_t i = 0; i < n; ++i) {
    pre_min[i + 1] = pre_min[i] + lists[i]->min_contribution;
    pre_max[i + 1] = pre_max[i] + lists[i]->max_contribution;
  }
  for (size_t i = n; i-- > 0;) {
    suf_min[i] = suf_min[i + 1] + lists[i]->min_contribution;
    suf_max[i] = suf_max[i + 1] + lists[i]->max_contribution;
  }
  if (target < suf_min[0] || target > suf_max[0]) return Solution();
  // Forward over layers 0..n-1 and backward over n-1..0, each keeping
  // only totals the other side can still complete.
  std::array<size_t, kMaxDistinctElements> forward_order, backward_order;
  std::array<int64_t, kMaxDistinctElements> f_lo, f_hi, b_lo, b_hi;
  for (size_t i = 0; i < n; ++i) {
    forward_order[i] = i;
    f_lo[i] = target - suf_max[i + 1];
    f_hi[i] = target - suf_min[i + 1];
    const size_t e = n - 1 - i;
    backward_order[i] = e;
    b_lo[i] = target - pre_max[e];
    b_hi[i] = target - pre_min[e];
  }
  const absl::Span<const size_t> fo(forward_order.data(), n),
      bo(backward_order.data(), n);
  const int64_t bound = limits.bound.packed();
  int64_t held = 0;
  Scratch& scratch = ThreadScratch();
  SparseRun& forward = scratch.forward;
  SparseRun& backward = scratch.backward;
  // The join reads forward maps 0..n and backward maps 0..n-1.
  if (!SparseSweep(items, list_span, fo, n, {f_lo.data(), n}, {f_hi.data(), n},
                   candidates, bound, limits.budget, &held, &forward) ||
      !SparseSweep(items, list_span, bo, n - 1, {b_lo.data(), n},
                   {b_hi.data(), n}, candidates, bound, limits.budget, &held,
                   &backward)) {
    return exhaust();
  }
  Solution best;
  // No layer mixed.
  const std::vector<SparseEntry>& all = forward.maps[n];
  for (size_t i = 0; i < all.size(); ++i) {
    if (all[i].total != target) continue;
    best.weight = Weight::FromPacked(all[i].weight);
    Trace(forward, fo, candidates, n, static_cast<int32_t>(i), &best);
  }
  // Layer e mixed: the layers before it reach f, those after it g, and its
  // k scaled atoms in the lower state make up the rest:
  // f + g + c*high - k*d = target, 1 <= k <= c-1.
  std::vector<size_t>& by_total = scratch.by_total;
  // from[e]: the least layers e.. add; a `before` entry that cannot come
  // below the bound or the best with them has nothing to join.
  constexpr int64_t kInfinity = Weight::Infinite().packed();
  std::array<int64_t, kMaxDistinctElements + 1> from;
  from[n] = 0;
  for (size_t e = n; e-- > 0;) {
    from[e] = std::min(kInfinity, from[e + 1] + lists[e]->min_weight.packed());
  }
  for (size_t e = 0; e < n; ++e) {
    const std::vector<SparseEntry>& before = forward.maps[e];
    const std::vector<SparseEntry>& after = backward.maps[n - 1 - e];
    // `after` by total, for range lookups.
    by_total.resize(after.size());
    for (size_t i = 0; i < after.size(); ++i) by_total[i] = i;
    std::sort(by_total.begin(), by_total.end(), [&](size_t a, size_t b) {
      return after[a].total < after[b].total;
    });
    const int64_t c = items[e].scaled_count;
    for (size_t ci = lists[e]->begin; ci < lists[e]->end; ++ci) {
      const Candidate& o = candidates.all[ci];
      if (o.low == o.high) continue;
      const int64_t d = o.high - o.low;
      for (size_t fi = 0; fi < before.size(); ++fi) {
        if (before[fi].weight + from[e] >=
            std::min(bound, best.weight.packed())) {
          continue;
        }
        // g = base + k*d with base = target - f - c*high.
        const int64_t base = target - before[fi].total - c * o.high;
        const int64_t g_lo = base + d, g_hi = base + (c - 1) * d;
        auto first = std::lower_bound(
            by_total.begin(), by_total.end(), g_lo,
            [&](size_t i, int64_t v) { return after[i].total < v; });
        int64_t visits = 0;
        for (auto it = first; it != by_total.end() && after[*it].total <= g_hi;
             ++it) {
          ++visits;
          const SparseEntry& g = after[*it];
          if ((g.total - base) % d != 0) continue;
          const int64_t k = (g.total - base) / d;
          const int64_t w = before[fi].weight + g.weight + o.weight.packed() +
                            o.per_low_atom.packed() * k;
          if (w >= bound || w >= best.weight.packed()) continue;
          best.weight = Weight::FromPacked(w);
          Trace(forward, fo, candidates, e, static_cast<int32_t>(fi), &best);
          Trace(backward, bo, candidates, n - 1 - e, static_cast<int32_t>(*it),
                &best);
          best.choices[e] = Choice{o.option, static_cast<int32_t>(k)};
        }
        if (limits.budget != nullptr) {
          const int64_t cost = kSparseVisitCost * (visits + 1);
          if (cost > limits.budget->cell_visits) return exhaust();
          limits.budget->cell_visits -= cost;
        }
      }
    }
  }
  return best;
}

}  // namespace shellwright::internal
