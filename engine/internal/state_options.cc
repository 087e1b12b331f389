#include "engine/internal/state_options.h"

#include <array>
#include <vector>

#include "engine/internal/data_tables.h"

namespace shellwright::internal {
namespace {

struct StateTable {
  std::array<std::vector<KnownOxidationState>, kMaxAtomicNumber + 1> by_z;
  std::array<std::vector<StateOption>, kMaxAtomicNumber + 1> options_by_z;
  std::array<std::vector<StateOption>, kMaxAtomicNumber + 1>
      common_options_by_z;
};

const StateTable& States() {
  static const StateTable* const kTable = [] {
    auto* t = new StateTable;
    for (const OxidationStateRow& row : OxidationStateRows()) {
      t->by_z[row.atomic_number].push_back({row.state, row.common});
    }
    for (const Element& e : AllElements()) {
      const std::vector<KnownOxidationState>& known = t->by_z[e.atomic_number];
      std::vector<StateOption>& options = t->options_by_z[e.atomic_number];
      auto add = [&](const KnownOxidationState& low,
                     const KnownOxidationState& high) {
        options.push_back(MakeStateOption(e, static_cast<int>(options.size()),
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

}  // namespace

int GroupGap(const Element& e, int state) {
  if (e.block != Block::kP || e.group < 13 || state <= 0) return 0;
  // The heavy p-block elements keep their 6s pair (inert pair effect):
  // Tl+1, Pb+2 and Bi+3 are their usual states (Greenwood and Earnshaw,
  // Chemistry of the Elements, 2nd ed., from memory).
  const int group_state = e.period == 6 ? e.group - 12 : e.group - 10;
  return state < group_state ? group_state - state : 0;
}

int ChalcogenideMaxState(const Element& e) {
  static const std::array<int, kMaxAtomicNumber + 1>* const kMax = [] {
    auto* t = new std::array<int, kMaxAtomicNumber + 1>;
    t->fill(-1);
    for (const ChalcogenideStateRow& row : ChalcogenideStateRows()) {
      (*t)[row.atomic_number] = row.max_state;
    }
    return t;
  }();
  return (*kMax)[e.atomic_number];
}

bool OpenShellState(const Element& e, int state) {
  if (e.block != Block::kP || IsMetal(e) || e.group == 18) return false;
  return state == 0 || (state < 0 && state != e.group - 18);
}

StateOption MakeStateOption(const Element& e, int index, int low, int high,
                            bool low_common, bool high_common) {
  StateOption o;
  o.low = low;
  o.high = high;
  o.low_common = low_common;
  o.high_common = high_common;
  o.index = index;
  o.uncommon = (low_common ? 0 : 1) + (low != high && !high_common ? 1 : 0);
  o.high_gap = GroupGap(e, high);
  o.low_extra_gap = GroupGap(e, low) - o.high_gap;
  return o;
}

absl::Span<const KnownOxidationState> KnownStates(const Element& e) {
  return States().by_z[e.atomic_number];
}

absl::Span<const StateOption> StateOptions(const Element& e) {
  return States().options_by_z[e.atomic_number];
}

absl::Span<const StateOption> CommonStateOptions(const Element& e) {
  return States().common_options_by_z[e.atomic_number];
}

}  // namespace shellwright::internal
