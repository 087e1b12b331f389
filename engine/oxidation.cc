#include "engine/oxidation.h"

#include <algorithm>
#include <functional>
#include <array>
#include <limits>
#include <numeric>
#include <set>

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

struct StateTable {
  std::array<std::vector<KnownOxidationState>, kMaxAtomicNumber + 1> by_z;
};

const StateTable& States() {
  static const StateTable* const kTable = [] {
    auto* t = new StateTable;
    for (const internal::OxidationStateRow& row :
         internal::OxidationStateRows()) {
      t->by_z[row.atomic_number].push_back({row.state, row.common});
    }
    return t;
  }();
  return *kTable;
}

// One way an element can take its charge.
struct Option {
  int low = 0;   // Lower state (== high for single valence).
  int high = 0;  // Upper state.
  bool low_common = true;
  bool high_common = true;
  // Weight of the option with every atom in the upper state; a mixed
  // option adds per_low_atom for each scaled atom moved to the lower state
  // (the group gap differs between the two states).
  int64_t weight = 0;
  int64_t per_low_atom = 0;
};

struct ElementPlan {
  const Element* element;
  int64_t scaled_count;  // count x L, >= 1.
  bool declared = false;
  // Inline storage: plans are rebuilt per search stage and must not
  // allocate.
  absl::InlinedVector<Option, 24> options;
  int64_t min_contribution = 0;
  int64_t max_contribution = 0;
};

// Candidate electronegativity thresholds: elements above a threshold
// should be negative, those below positive. The first is the default
// (only the most electronegative element(s) above); the others are tried
// when it leaves an inconsistency (NH4Cl: N and Cl both negative).
std::vector<double> Thresholds(const std::vector<ElementPlan>& plans) {
  std::vector<double> values;
  for (const ElementPlan& p : plans) {
    if (p.element->pauling_electronegativity.has_value()) {
      values.push_back(*p.element->pauling_electronegativity);
    }
  }
  std::sort(values.begin(), values.end(), std::greater<double>());
  values.erase(std::unique(values.begin(), values.end()), values.end());
  std::vector<double> out;
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

int64_t OptionWeight(const Element& e, const Option& o, int64_t scaled_count,
                     bool above_threshold) {
  const bool mixed = o.low != o.high;
  int uncommon = (o.low_common ? 0 : 1) + (mixed && !o.high_common ? 1 : 0);
  bool inconsistent = above_threshold ? (o.high > 0) : (o.low < 0);
  const int64_t spread = mixed ? scaled_count * (o.high - o.low) : 0;
  // A mixed option's gap depends on the split: this is the gap with every
  // atom in the upper state, and Option::per_low_atom adds the rest.
  const int64_t gap = scaled_count * GroupGap(e, o.high);
  return uncommon * kUncommonWeight +
         (inconsistent ? kInconsistencyWeight : 0) + gap * kGroupGapWeight +
         spread;
}

// Builds the options of every element. `common_only` keeps options whose
// states are all common (declared states are always kept).
// An option excluded from the search: element index and its states.
struct Forbidden {
  int element = -1;
  int low = 0;
  int high = 0;
};

// `wide` is the element allowed uncommon states (-1: none; kAllWide: all).
constexpr int kAllWide = -2;

std::vector<ElementPlan> BuildPlans(const std::vector<ElementPlan>& base,
                                    const OxidationOptions& options, int wide,
                                    const Forbidden& forbidden,
                                    double threshold) {
  std::vector<ElementPlan> plans = base;
  for (size_t i = 0; i < plans.size(); ++i) {
    ElementPlan& p = plans[i];
    const bool common_only = wide != kAllWide && wide != static_cast<int>(i);
    p.options.clear();
    for (const DeclaredState& d : options.declared) {
      if (d.element != p.element) continue;
      p.declared = true;
      bool common = d.state == 0;  // The elemental state is always known.
      for (const KnownOxidationState& k :
           States().by_z[p.element->atomic_number]) {
        if (k.state == d.state) common = k.common;
      }
      p.options.push_back({d.state, d.state, common, common, 0});
    }
    if (!p.declared) {
      const auto& known = States().by_z[p.element->atomic_number];
      for (size_t k = 0; k < known.size(); ++k) {
        if (!common_only || known[k].common) {
          p.options.push_back({known[k].state, known[k].state, known[k].common,
                               known[k].common, 0});
        }
        // Mixed valence over adjacent known states of the same sign; needs
        // two scaled atoms. A split across zero (O-1 with O+1) would let
        // any count balance and hide real charge errors.
        if (k + 1 < known.size() && p.scaled_count >= 2 &&
            (known[k].state > 0) == (known[k + 1].state > 0) &&
            (!common_only || (known[k].common && known[k + 1].common))) {
          p.options.push_back({known[k].state, known[k + 1].state,
                               known[k].common, known[k + 1].common, 0});
        }
      }
    }
    if (forbidden.element == static_cast<int>(i)) {
      absl::InlinedVector<Option, 24> kept;
      for (const Option& o : p.options) {
        if (o.low != forbidden.low || o.high != forbidden.high) {
          kept.push_back(o);
        }
      }
      p.options = std::move(kept);
    }
    p.min_contribution = std::numeric_limits<int64_t>::max();
    p.max_contribution = std::numeric_limits<int64_t>::min();
    for (Option& o : p.options) {
      o.weight = OptionWeight(*p.element, o, p.scaled_count,
                              AboveThreshold(*p.element, threshold));
      o.per_low_atom = (GroupGap(*p.element, o.low) -
                        GroupGap(*p.element, o.high)) *
                       kGroupGapWeight;
      p.min_contribution =
          std::min(p.min_contribution, p.scaled_count * o.low);
      p.max_contribution =
          std::max(p.max_contribution, p.scaled_count * o.high);
    }
  }
  return plans;
}

// The choice made for one element: option index and, for mixed valence,
// how many scaled atoms take the lower state.
struct Choice {
  int option = -1;
  int64_t low_atoms = 0;
};

struct Solution {
  int64_t weight = kInfinity;
  std::vector<Choice> choices;
};

// Dynamic programming over charge totals.
Solution Solve(const std::vector<ElementPlan>& plans, int64_t target) {
  const size_t n = plans.size();
  for (const ElementPlan& p : plans) {
    if (p.options.empty()) return {};
  }
  // Range of what elements i.. can still contribute.
  // Scratch reused across calls on this thread: the solver runs once or
  // more per record and must not allocate in the common case.
  thread_local std::vector<int64_t> rest_min, rest_max, lo, hi;
  thread_local std::vector<std::vector<int64_t>> cost;
  thread_local std::vector<std::vector<Choice>> back;
  rest_min.assign(n + 1, 0);
  rest_max.assign(n + 1, 0);
  for (size_t i = n; i-- > 0;) {
    rest_min[i] = rest_min[i + 1] + plans[i].min_contribution;
    rest_max[i] = rest_max[i + 1] + plans[i].max_contribution;
  }
  if (target < rest_min[0] || target > rest_max[0]) return {};

  // Layer i holds totals of elements 0..i-1 within [lo[i], hi[i]].
  lo.assign(n + 1, 0);
  hi.assign(n + 1, 0);
  int64_t prefix_min = 0, prefix_max = 0;
  for (size_t i = 1; i <= n; ++i) {
    prefix_min += plans[i - 1].min_contribution;
    prefix_max += plans[i - 1].max_contribution;
    lo[i] = std::max(prefix_min, target - rest_max[i]);
    hi[i] = std::min(prefix_max, target - rest_min[i]);
    if (lo[i] > hi[i] || hi[i] - lo[i] > kMaxWindow) return {};
  }

  if (cost.size() < n + 1) {
    cost.resize(n + 1);
    back.resize(n + 1);
  }
  cost[0].assign(1, 0);
  for (size_t i = 0; i < n; ++i) {
    const ElementPlan& p = plans[i];
    const int64_t width = hi[i + 1] - lo[i + 1] + 1;
    std::vector<int64_t>& next = cost[i + 1];
    next.assign(width, kInfinity);
    back[i + 1].assign(width, Choice{});
    const std::vector<int64_t>& prev = cost[i];
    const int64_t prev_lo = lo[i], prev_hi = hi[i];
    const int64_t c = p.scaled_count;
    for (int oi = 0; oi < static_cast<int>(p.options.size()); ++oi) {
      const Option& o = p.options[oi];
      if (o.low == o.high) {
        const int64_t shift = c * o.low;
        for (int64_t t = lo[i + 1]; t <= hi[i + 1]; ++t) {
          const int64_t q = t - shift;
          if (q < prev_lo || q > prev_hi) continue;
          const int64_t w = prev[q - prev_lo];
          if (w >= kInfinity) continue;
          int64_t& slot = next[t - lo[i + 1]];
          if (w + o.weight < slot) {
            slot = w + o.weight;
            back[i + 1][t - lo[i + 1]] = Choice{oi, 0};
          }
        }
        continue;
      }
      // Mixed: k scaled atoms (1..c-1) at the lower state contribute
      // c*high - k*d with d = high - low and cost weight + k*per_low_atom.
      // For each total t the candidates are prev[t - c*high + k*d]: a
      // window of c-1 cells with stride d, scanned with a monotone deque
      // per residue class. The k-dependent cost is folded in by ranking
      // candidates q by prev[q] + per_low_atom*(q - q_ref)/d, which differs
      // from the true cost by a term that depends on t only.
      const int64_t d = o.high - o.low;
      const int64_t base = c * o.high;
      for (int64_t r = 0; r < d; ++r) {
        // Walk totals t of one residue class in increasing order; the
        // window for t covers q = t - base + k*d, k = 1..c-1.
        int64_t t0 = lo[i + 1] + ((r - (lo[i + 1] % d)) % d + d) % d;
        if (t0 > hi[i + 1]) continue;
        // Monotone queue of (q, adjusted cost) in a reused buffer: a
        // std::deque would allocate for every residue class of every
        // option of every layer.
        thread_local std::vector<std::pair<int64_t, int64_t>> window_buffer;
        window_buffer.clear();
        size_t head = 0;
        const int64_t q_ref = t0 - base;  // k = 0 for t0; same class.
        // First q to add: the smallest candidate of t0 that lies in the
        // previous window (candidates below prev_lo never matter).
        int64_t next_q = t0 - base + d;
        if (next_q < prev_lo) next_q += (prev_lo - next_q + d - 1) / d * d;
        for (int64_t t = t0; t <= hi[i + 1]; t += d) {
          const int64_t q_first = t - base + d;
          const int64_t q_last = std::min(t - base + (c - 1) * d, prev_hi);
          while (next_q <= q_last) {
            if (next_q >= prev_lo && next_q <= prev_hi) {
              const int64_t w = prev[next_q - prev_lo];
              if (w < kInfinity) {
                const int64_t adjusted =
                    w + o.per_low_atom * ((next_q - q_ref) / d);
                while (window_buffer.size() > head &&
                       window_buffer.back().second >= adjusted) {
                  window_buffer.pop_back();
                }
                window_buffer.emplace_back(next_q, adjusted);
              }
            }
            next_q += d;
          }
          while (window_buffer.size() > head &&
                 window_buffer[head].first < q_first) {
            ++head;
          }
          if (window_buffer.size() == head) continue;
          const int64_t w = window_buffer[head].second -
                            o.per_low_atom * (((t - base) - q_ref) / d) +
                            o.weight;
          int64_t& slot = next[t - lo[i + 1]];
          if (w < slot) {
            slot = w;
            const int64_t k = (window_buffer[head].first - (t - base)) / d;
            back[i + 1][t - lo[i + 1]] = Choice{oi, k};
          }
        }
      }
    }
  }
  Solution s;
  if (target < lo[n] || target > hi[n]) return s;
  s.weight = cost[n][target - lo[n]];
  if (s.weight >= kInfinity) return Solution{};
  s.choices.resize(n);
  int64_t t = target;
  for (size_t i = n; i > 0; --i) {
    const Choice ch = back[i][t - lo[i]];
    s.choices[i - 1] = ch;
    const Option& o = plans[i - 1].options[ch.option];
    const int64_t c = plans[i - 1].scaled_count;
    t -= o.low == o.high ? c * o.low : c * o.high - ch.low_atoms * (o.high - o.low);
  }
  return s;
}

OxidationAssignment ToAssignment(const std::vector<ElementPlan>& plans,
                                 const Solution& s, int64_t scale) {
  OxidationAssignment a;
  for (size_t i = 0; i < plans.size(); ++i) {
    const ElementPlan& p = plans[i];
    const Option& o = p.options[s.choices[i].option];
    if (o.low == o.high) {
      a.states.push_back({p.element, o.low, Rational(p.scaled_count, scale),
                          o.low_common, p.declared});
      if (!o.low_common) ++a.uncommon_states;
    } else {
      const int64_t k = s.choices[i].low_atoms;
      a.states.push_back(
          {p.element, o.low, Rational(k, scale), o.low_common, false});
      a.states.push_back({p.element, o.high,
                          Rational(p.scaled_count - k, scale), o.high_common,
                          false});
      a.uncommon_states += (o.low_common ? 0 : 1) + (o.high_common ? 0 : 1);
      a.spread = a.spread + Rational(p.scaled_count * (o.high - o.low), scale);
    }
  }
  a.electronegativity_inconsistencies = static_cast<int>(
      (s.weight % kUncommonWeight) / kInconsistencyWeight);
  int64_t gap = 0;
  for (const AssignedState& st : a.states) {
    gap += GroupGap(*st.element, st.state) * (st.count.num() * scale /
                                              st.count.den());
  }
  a.score = 100.0 * a.uncommon_states +
            10.0 * a.electronegativity_inconsistencies +
            static_cast<double>(gap) / scale + a.spread.ToDouble();
  return a;
}

struct Staged {
  std::vector<ElementPlan> plans;
  Solution solution;
};

// Finds the best assignment by widening the search in stages, each exact
// for what it decides:
//   1. common states only: any solution here outranks all others;
//   2. one element at a time may take uncommon states: if the best has a
//      single uncommon state, no solution with more can beat it;
//   3. every known state for every element.
// Stages 1 and 2 keep the charge windows narrow, which is what makes the
// typical record cheap.
Staged SolveStaged(const std::vector<ElementPlan>& base,
                   const OxidationOptions& options, int64_t target,
                   const Forbidden& forbidden, double threshold) {
  Staged best;
  best.plans = BuildPlans(base, options, -1, forbidden, threshold);
  best.solution = Solve(best.plans, target);
  if (best.solution.weight < kInfinity) return best;
  for (size_t k = 0; k < base.size(); ++k) {
    std::vector<ElementPlan> plans =
        BuildPlans(base, options, static_cast<int>(k), forbidden, threshold);
    Solution s = Solve(plans, target);
    if (s.weight < best.solution.weight) {
      best.plans = std::move(plans);
      best.solution = std::move(s);
    }
  }
  if (best.solution.weight < 2 * kUncommonWeight) return best;
  std::vector<ElementPlan> plans =
      BuildPlans(base, options, kAllWide, forbidden, threshold);
  Solution s = Solve(plans, target);
  if (s.weight < best.solution.weight) {
    best.plans = std::move(plans);
    best.solution = std::move(s);
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
      for (const ElementAmount& amount : formula.amounts) {
        bool declared = false;
        for (const DeclaredState& d : options.declared) {
          declared |= d.element == amount.element;
        }
        a.states.push_back({amount.element, 0, amount.count, true, declared});
      }
      result.best = a;
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
  std::vector<ElementPlan> base;
  int64_t scaled_atoms = 0;
  for (const ElementAmount& a : formula.amounts) {
    ElementPlan p;
    p.element = a.element;
    p.scaled_count = a.count.num() * (scale / a.count.den());
    scaled_atoms += p.scaled_count;
    base.push_back(p);
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
  const std::vector<double> thresholds = Thresholds(base);
  auto solve_best = [&](const OxidationOptions& opts,
                        const Forbidden& forbidden, double* chosen) {
    Staged best = SolveStaged(base, opts, target, forbidden, thresholds[0]);
    *chosen = thresholds[0];
    const bool consistent = best.solution.weight < kInfinity &&
                            best.solution.weight % kUncommonWeight <
                                kInconsistencyWeight;
    if (consistent) return best;
    for (size_t j = 1; j < thresholds.size(); ++j) {
      Staged s = SolveStaged(base, opts, target, forbidden, thresholds[j]);
      if (s.solution.weight < best.solution.weight) {
        best = std::move(s);
        *chosen = thresholds[j];
      }
    }
    return best;
  };
  double threshold = thresholds[0];
  const Staged best = solve_best(options, Forbidden(), &threshold);
  if (best.solution.weight >= kInfinity) {
    if (!undeclared) {
      OxidationOptions free = options;
      free.declared.clear();
      double unused = 0;
      const Staged s = solve_best(free, Forbidden(), &unused);
      if (s.solution.weight < kInfinity) {
        result.without_declared = ToAssignment(s.plans, s.solution, scale);
      }
    }
    return result;
  }
  result.best = ToAssignment(best.plans, best.solution, scale);

  if (options.max_alternatives > 0) {
    // Alternatives: forbid, one element at a time, the option the best
    // assignment chose for it, and take the best of what remains.
    std::vector<std::pair<int64_t, OxidationAssignment>> found;
    for (size_t i = 0; i < base.size(); ++i) {
      if (best.plans[i].declared) continue;
      const Option& chosen =
          best.plans[i].options[best.solution.choices[i].option];
      const Staged s = SolveStaged(
          base, options, target,
          Forbidden{static_cast<int>(i), chosen.low, chosen.high}, threshold);
      if (s.solution.weight >= kInfinity) continue;
      OxidationAssignment a = ToAssignment(s.plans, s.solution, scale);
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
      if (!duplicate) found.emplace_back(s.solution.weight, std::move(a));
    }
    std::stable_sort(found.begin(), found.end(),
                     [](const auto& x, const auto& y) {
                       return x.first < y.first;
                     });
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
