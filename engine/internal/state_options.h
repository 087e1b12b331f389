// The per-element options of the oxidation-state search. Internal to the
// engine.
//
// An option is one way an element can take its charge: a single known
// state, or mixed valence over two adjacent known states of the same sign
// (data/oxidation_states.tsv) or over a pair of data/mixed_valence_pairs.tsv.
// The tables are built once, in search order, with what an option's weight
// needs that does not depend on the formula: its naturalness in each anion
// class (group gap plus data/state_preferences.tsv), its spread, and the
// electronegativity of its positive state.
//
// Example:
//
//   const Element* fe = FindElementBySymbol("Fe");
//   for (const StateOption& o : StateOptions(*fe)) {
//     // Fe -2, Fe -2/-1, Fe -1, Fe +1, Fe +1/+2, Fe +2, Fe +2/+3, ...
//   }
//
// Thread safety: the tables are immutable after their thread-safe first
// use.

#ifndef SHELLWRIGHT_ENGINE_INTERNAL_STATE_OPTIONS_H_
#define SHELLWRIGHT_ENGINE_INTERNAL_STATE_OPTIONS_H_

#include <optional>

#include "absl/types/span.h"
#include "engine/element.h"
#include "engine/oxidation.h"

namespace shellwright::internal {

// The anion classes of data/state_preferences.tsv: hard anions, soft
// (chalcogenide) anions only, and the B sites of an ordered double
// perovskite A2BB'O6 whose B' is a 4d or 5d metal (oxide anions; an
// element without rows of its own there reads its hard rows).
// The delafossites ABO2 with A = Cu, Ag, Pd or Pt (CuFeO2, PdCoO2) are a
// fourth class, and the cations of Zintl phases (Eu(II) in EuIn2As2) a
// fifth.
enum class AnionClass {
  kHard = 0,
  kSoft = 1,
  kDoublePerovskite = 2,
  kDelafossite = 3,
  kZintl = 4
};
inline constexpr int kAnionClasses = 5;

struct StateOption {
  int low = 0;   // Lower state (== high for single valence).
  int high = 0;  // Upper state.
  bool low_common = true;
  bool high_common = true;
  int index = 0;     // Position in the element's option list.
  int uncommon = 0;  // Uncommon states among low and high (bound-only: 2).
  // Naturalness per atom in the upper state, by AnionClass, and what an
  // atom in the lower state adds to it (may be negative).
  int high_natural[kAnionClasses] = {};
  int low_extra_natural[kAnionClasses] = {};
  // Naturalness per atom of the mixed valence itself: 1 when mixed, 0 for
  // single valence.
  int spread = 0;
  // A pair of data/mixed_valence_pairs.tsv that holds only among oxides.
  bool needs_oxide = false;
  // Electronegativity of the upper state when it is positive
  // (data/state_electronegativities.tsv, else the element's); 0 when
  // unknown.
  double high_electronegativity = 0;

  bool mixed() const { return low != high; }
  int HighNatural(AnionClass c) const { return high_natural[int(c)]; }
  int LowExtraNatural(AnionClass c) const { return low_extra_natural[int(c)]; }
};

// How far a positive state of a main-group (p-block) element falls below
// its group oxidation state (group - 10): P+3 in a phosphate scores 2,
// P+5 scores 0. Oxyanions put their central atom in the group state
// (common practice, no source), which settles ties such as LiMnPO4
// (Mn+2 P+5, not Mn+4 P+3). For Tl, Pb, Bi and Po the reference is two
// below the group state (inert pair effect): Pb+2 scores 0.
int GroupGap(const Element& e, int state);

// What `state` costs per atom for ranking below the most natural state of
// `e` among anions of class `c` (data/state_preferences.tsv): 2 (rank - 1),
// 2 x the element's largest rank for a state its rows do not list; for an
// element with no rows, 0 for a `common` state and 4 for an uncommon one.
// An element with no soft rows uses its hard rows.
int PreferencePenalty(const Element& e, int state, bool common, AnionClass c);

// Whether data/state_preferences.tsv has rows for `e` in class `c`, and
// whether it lists `state` among them.
bool HasPreferenceRows(const Element& e, AnionClass c);
bool ListedPreference(const Element& e, int state, AnionClass c);

// The electronegativity of `e` in a positive `state`: the value of
// data/state_electronegativities.tsv, else the element's, else 0.
double StateElectronegativity(const Element& e, int state);

// The state-specific electronegativities of `e`
// (data/state_electronegativities.tsv), for the search's thresholds.
absl::Span<const double> StateElectronegativities(const Element& e);

// The standard reduction potential (V) of the couple from `oxidised` down
// to the next state of `e` (data/reduction_potentials.tsv), or nullopt.
std::optional<double> PotentialDownFrom(const Element& e, int oxidised);

// The standard reduction potential (V) of the couple from the next state
// of `e` down to `reduced`, or nullopt.
std::optional<double> PotentialDownTo(const Element& e, int reduced);

// True for a p-block atom in a state that is not its closed-shell one: a
// negative state other than group - 18 (O-1, S-1, C-1, N-2, and the
// polyanion atoms of Zintl phases, Tl-1 in NaTl and Al-1 in SrAl2, whose
// elements are metals), or 0 for a nonmetal (bonded only to its own
// kind); or a positive state that leaves the p subshell part-filled: from
// period 3 down in groups 13 to 16 always (As+2 in realgar As4S4 and Ga+2
// in GaS sit in As-As and Ga-Ga bonds, S+2 in SCl2 makes two bonds), in
// period 2 and among the halogens with an even count of valence electrons
// left (O+2 in OF2, Cl+1 in Cl2O, I+3 in ICl3; an odd count there is a
// radical, NO2 and ClO2, and keeps its free-ion count). Positive states
// that leave no p electrons, or the inert pair, are closed-shell already.
// So are the noble gases' even positive states, as the halogens' (Xe+2 in
// XeF2, Xe+4 in XeF4; Greenwood and Earnshaw, ch. 18, from memory).
// Such an atom is bonded, and carries no free-ion unpaired electrons.
bool OpenShellState(const Element& e, int state);

// The highest state of metal `e` as a cation of chalcogenide anions
// (data/chalcogenide_states.tsv), or -1 when the table has no row.
int ChalcogenideMaxState(const Element& e);

// `needs_oxide`: a pair of data/mixed_valence_pairs.tsv that holds only
// among oxides.
// Whether `state` of `e` is met only bound in a polyatomic unit
// (data/bound_only_states.tsv: Fe+6 in ferrate, O-1 in peroxide).
bool BoundOnlyState(const Element& e, int state);

StateOption MakeStateOption(const Element& e, int index, int low, int high,
                            bool low_common, bool high_common,
                            bool needs_oxide = false);

// Known non-zero states of `e`, in increasing order.
absl::Span<const KnownOxidationState> KnownStates(const Element& e);

// Every option of `e` in search order: each known state, followed by mixed
// valence with the next known state when both have the same sign, and
// with the upper state of each of its data/mixed_valence_pairs.tsv pairs. A
// split across zero (O-1 with O+1) would let any count balance and hide real
// charge errors. A search stage filters this list instead of building its
// own.
absl::Span<const StateOption> StateOptions(const Element& e);

// The options of `e` whose states are all common, in the same order and
// with their index in StateOptions(): what the narrow stage filters.
absl::Span<const StateOption> CommonStateOptions(const Element& e);

// StateOptions(e) and CommonStateOptions(e) from one lookup, for the
// search's plans.
struct OptionTables {
  absl::Span<const StateOption> all;
  absl::Span<const StateOption> common;
};
OptionTables StateOptionTables(const Element& e);

}  // namespace shellwright::internal

#endif  // SHELLWRIGHT_ENGINE_INTERNAL_STATE_OPTIONS_H_
