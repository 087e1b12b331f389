#include "engine/internal/state_options.h"

#include <algorithm>
#include <array>
#include <utility>
#include <vector>

#include "engine/internal/data_tables.h"

namespace shellwright::internal {
namespace {

struct PreferenceTable {
  // Per element and class: (state, rank) rows, and the largest rank.
  std::array<std::array<std::vector<std::pair<int, int>>, kAnionClasses>,
             kMaxAtomicNumber + 1>
      rows;
  std::array<std::array<int, kAnionClasses>, kMaxAtomicNumber + 1> max_rank{};
  std::array<std::vector<double>, kMaxAtomicNumber + 1> state_en_values;
  std::array<std::vector<std::pair<int, double>>, kMaxAtomicNumber + 1>
      state_en;
};

const PreferenceTable& Preferences() {
  static const PreferenceTable* const kTable = [] {
    auto* t = new PreferenceTable;
    for (const StatePreferenceRow& row : StatePreferenceRows()) {
      const int c = row.anion_class;
      t->rows[row.atomic_number][c].push_back({row.state, row.rank});
      t->max_rank[row.atomic_number][c] =
          std::max(t->max_rank[row.atomic_number][c], row.rank);
    }
    for (const StateElectronegativityRow& row : StateElectronegativityRows()) {
      t->state_en[row.atomic_number].push_back(
          {row.state, row.electronegativity});
      t->state_en_values[row.atomic_number].push_back(row.electronegativity);
    }
    return t;
  }();
  return *kTable;
}

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
                     const KnownOxidationState& high,
                     bool needs_oxide = false) {
        options.push_back(MakeStateOption(e, static_cast<int>(options.size()),
                                          low.state, high.state, low.common,
                                          high.common, needs_oxide));
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
        for (const MixedValencePairRow& pair : MixedValencePairRows()) {
          if (pair.atomic_number != e.atomic_number ||
              pair.low != known[k].state) {
            continue;
          }
          for (const KnownOxidationState& high : known) {
            if (high.state == pair.high) add(known[k], high, pair.oxide_only);
          }
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
  if (e.block != Block::kP) return false;
  if (e.group == 18) {
    // Noble-gas compounds (XeF2, XeF4, KrF2) are closed-shell molecules:
    // an even count left is bonded, as among the halogens.
    const int left = 8 - state;
    return state > 0 && left != 0 && left != 2 && left % 2 == 0;
  }
  if (state < 0) return state != e.group - 18;
  if (state == 0) return !IsMetal(e);
  // A positive state that leaves the p subshell part-filled (neither the
  // group state nor the inert pair's s2): bonded from period 3 down in
  // groups 13 to 16; in period 2 and among the halogens only with an even
  // count left, since an odd one there is a radical (NO2, ClO2).
  const int left = e.group - 10 - state;
  if (left == 0 || left == 2) return false;
  if (e.period >= 3 && e.group <= 16) return true;
  return left % 2 == 0;
}

// What one rank down costs per atom, against 1 per atom of mixed valence.
constexpr int kPreferenceStep = 2;

int PreferencePenalty(const Element& e, int state, bool common, AnionClass c) {
  const PreferenceTable& t = Preferences();
  int k = static_cast<int>(c);
  // The other classes fall back to hard.
  if (t.rows[e.atomic_number][k].empty()) k = 0;
  const std::vector<std::pair<int, int>>& rows = t.rows[e.atomic_number][k];
  if (rows.empty()) return common ? 0 : 2 * kPreferenceStep;
  for (const auto& [s, rank] : rows) {
    if (s == state) return kPreferenceStep * (rank - 1);
  }
  return kPreferenceStep * t.max_rank[e.atomic_number][k];
}

bool HasPreferenceRows(const Element& e, AnionClass c) {
  return !Preferences().rows[e.atomic_number][static_cast<int>(c)].empty();
}

bool ListedPreference(const Element& e, int state, AnionClass c) {
  for (const auto& [s, rank] :
       Preferences().rows[e.atomic_number][static_cast<int>(c)]) {
    if (s == state) return true;
  }
  return false;
}

namespace {

// The rows of data/reduction_potentials.tsv by element.
const std::array<std::vector<ReductionPotentialRow>, kMaxAtomicNumber + 1>&
PotentialsByZ() {
  static const auto* const kTable = [] {
    auto* t = new std::array<std::vector<ReductionPotentialRow>,
                             kMaxAtomicNumber + 1>;
    for (const ReductionPotentialRow& row : ReductionPotentialRows()) {
      (*t)[row.atomic_number].push_back(row);
    }
    return t;
  }();
  return *kTable;
}

}  // namespace

std::optional<double> PotentialDownFrom(const Element& e, int oxidised) {
  for (const ReductionPotentialRow& row : PotentialsByZ()[e.atomic_number]) {
    if (row.oxidised == oxidised) return row.volts;
  }
  return std::nullopt;
}

std::optional<double> PotentialDownTo(const Element& e, int reduced) {
  for (const ReductionPotentialRow& row : PotentialsByZ()[e.atomic_number]) {
    if (row.reduced == reduced) return row.volts;
  }
  return std::nullopt;
}

double StateElectronegativity(const Element& e, int state) {
  for (const auto& [s, en] : Preferences().state_en[e.atomic_number]) {
    if (s == state) return en;
  }
  return e.pauling_electronegativity.value_or(0);
}

absl::Span<const double> StateElectronegativities(const Element& e) {
  return Preferences().state_en_values[e.atomic_number];
}

bool BoundOnlyState(const Element& e, int state) {
  for (const BoundOnlyStateRow& row : BoundOnlyStateRows()) {
    if (row.atomic_number == e.atomic_number && row.state == state) {
      return true;
    }
  }
  return false;
}

StateOption MakeStateOption(const Element& e, int index, int low, int high,
                            bool low_common, bool high_common,
                            bool needs_oxide) {
  StateOption o;
  o.low = low;
  o.high = high;
  o.low_common = low_common;
  o.high_common = high_common;
  o.index = index;
  // A state met only bound in a unit counts twice as a free ion.
  auto uncommon = [&e](int state, bool common) {
    return (common ? 0 : 1) + (BoundOnlyState(e, state) ? 1 : 0);
  };
  o.uncommon = uncommon(low, low_common) +
               (low != high ? uncommon(high, high_common) : 0);
  for (const AnionClass c :
       {AnionClass::kHard, AnionClass::kSoft, AnionClass::kDoublePerovskite,
        AnionClass::kDelafossite, AnionClass::kZintl}) {
    const int k = static_cast<int>(c);
    o.high_natural[k] =
        GroupGap(e, high) + PreferencePenalty(e, high, high_common, c);
    o.low_extra_natural[k] = GroupGap(e, low) +
                             PreferencePenalty(e, low, low_common, c) -
                             o.high_natural[k];
  }
  o.spread = low == high ? 0 : 1;
  o.needs_oxide = needs_oxide;
  o.high_electronegativity = high > 0 ? StateElectronegativity(e, high)
                                      : e.pauling_electronegativity.value_or(0);
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

OptionTables StateOptionTables(const Element& e) {
  const StateTable& t = States();
  return {t.options_by_z[e.atomic_number],
          t.common_options_by_z[e.atomic_number]};
}

}  // namespace shellwright::internal
