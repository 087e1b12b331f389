// The per-element options of the oxidation-state search. Internal to the
// engine.
//
// An option is one way an element can take its charge: a single known
// state, or mixed valence over two adjacent known states of the same sign
// (data/oxidation_states.tsv). The tables are built once, in search
// order, with what an option's weight needs that does not depend on the
// formula.
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

#include "absl/types/span.h"
#include "engine/element.h"
#include "engine/oxidation.h"

namespace shellwright::internal {

struct StateOption {
  int low = 0;   // Lower state (== high for single valence).
  int high = 0;  // Upper state.
  bool low_common = true;
  bool high_common = true;
  int index = 0;          // Position in the element's option list.
  int uncommon = 0;       // Uncommon states among low and high.
  int high_gap = 0;       // GroupGap of the upper state.
  int low_extra_gap = 0;  // GroupGap(low) - GroupGap(high), >= 0.

  bool mixed() const { return low != high; }
};

// How far a positive state of a main-group (p-block) element falls below
// its group oxidation state (group - 10): P+3 in a phosphate scores 2,
// P+5 scores 0. Oxyanions put their central atom in the group state
// (common practice, no source), which settles ties such as LiMnPO4
// (Mn+2 P+5, not Mn+4 P+3). For Tl, Pb, Bi and Po the reference is two
// below the group state (inert pair effect): Pb+2 scores 0.
int GroupGap(const Element& e, int state);

// True for a p-block nonmetal in a state that is not its closed-shell
// one: a negative state other than group - 18 (O-1, S-1, C-1, N-2), or 0
// (bonded only to its own kind). Positive states, those of the central
// atoms of oxo-anions, are not counted. Such an atom is bonded, and
// carries no free-ion unpaired electrons.
bool OpenShellState(const Element& e, int state);

// The highest state of metal `e` as a cation of chalcogenide anions
// (data/chalcogenide_states.tsv), or -1 when the table has no row.
int ChalcogenideMaxState(const Element& e);

StateOption MakeStateOption(const Element& e, int index, int low, int high,
                            bool low_common, bool high_common);

// Known non-zero states of `e`, in increasing order.
absl::Span<const KnownOxidationState> KnownStates(const Element& e);

// Every option of `e` in search order: each known state, followed by mixed
// valence with the next known state when both have the same sign. A split
// across zero (O-1 with O+1) would let any count balance and hide real
// charge errors. A search stage filters this list instead of building its
// own.
absl::Span<const StateOption> StateOptions(const Element& e);

// The options of `e` whose states are all common, in the same order and
// with their index in StateOptions(): what the narrow stage filters.
absl::Span<const StateOption> CommonStateOptions(const Element& e);

}  // namespace shellwright::internal

#endif  // SHELLWRIGHT_ENGINE_INTERNAL_STATE_OPTIONS_H_
