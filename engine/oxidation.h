// Oxidation-state assignment for a parsed formula.
//
// AssignOxidationStates() gives every element an integer oxidation state
// from data/oxidation_states.tsv so that the states, weighted by the exact
// stoichiometry, sum to the net charge. An element may be split over two
// adjacent known states that bracket its average (mixed valence): Fe3O4 is
// Fe2+ x1 plus Fe3+ x2, Pb3O4 is Pb2+ x2 plus Pb4+ x1, Li0.5CoO2 is
// Co3+ 0.5 plus Co4+ 0.5. The two states never straddle zero, so a split
// cannot absorb an impossible count (Fe2O33 stays unbalanced).
//
// Polyatomic and molecular units (engine/units.h) take part: a written
// group or run that shows a unit's atoms may be read as that unit, whose
// atoms then have the unit's fixed states and whose charge (peroxide or
// superoxide for O2) the search chooses. Each reading (a set of units,
// or none) is searched on its own, and readings rank by, in order:
//   a. no free hydride hydrogen beside free carbon or nitrogen: readings
//      that need one are searched only when no other balances (NH4NO3 is
//      ammonium nitrate, not N+5 with H-1);
//   b. the weight of their best assignment (below), in which open-shell
//      free states (O-1, S-1, C-1) are uncommon in the table, so that a
//      known unit (peroxide, disulfide, acetylide) explains them better;
//   c. fewest open-shell atoms in units read from bare runs (so that MnO2
//      stays Mn+4 oxide, not Mn+2 peroxide, while FeS2 becomes Fe+2
//      disulfide, its monatomic reading needing Fe+4);
//   d. most atoms in units (NH4Cl lists ammonium).
// At most kMaxUnitMatches matches and 2 + (runs used) readings are tried
// (docs/method.md).
//
// Within a reading, candidates rank by, in order:
//   1. fewest uncommon states (a state flagged "no" in the table, or a
//      declared state missing from it; in a compound of non-metals alone,
//      without hydrogen, also the most electronegative element's positive
//      states and the least electronegative one's negative states, which
//      invert the electronegativity order: S2Cl2 is S+1 with Cl-1);
//   2. fewest faults: electronegativity inconsistencies (elements above an
//      electronegativity threshold take negative states and those below
//      positive ones; a positive state is judged by its own value where
//      data/state_electronegativities.tsv gives one; each element that
//      breaks this counts once; the threshold first sits just below the
//      most electronegative element, and when that leaves an
//      inconsistency every threshold between the values is tried), plus
//      one for a redox-incompatible pair (RedoxPair, hard anions only);
//   3. naturalness, per atom: the group gap of positive main-group states
//      (group - 10, or group - 12 for Tl, Pb, Bi: sulfate S+6, phosphate
//      P+5; common practice, no source), the state's preference penalty
//      among the formula's anions (data/state_preferences.tsv: 2 per rank;
//      4 for an uncommon state of an element with no rows), 1 per atom of
//      a mixed-valence element, and 3 per unpaired electron of a radical
//      unit (nitroprusside holds NO+ and Fe(II), not NO and Fe(III)).
// Mixed valence is between adjacent known states of one sign, or over a
// pair of data/mixed_valence_pairs.tsv (AgO is Ag(I)/Ag(III)). The search
// runs on the formula divided by the greatest common divisor of its scaled
// counts, net charge and unit counts, doubled when an element would have
// a single atom, so BaBiO3 and Ba2Bi2O6 get the same states per atom.
// A state met only bound in a unit (data/bound_only_states.tsv: Fe+6 of
// ferrate, O-1 of peroxide) counts as two uncommon states as a free ion,
// so that two merely uncommon states win over it: SrFe0.5Co0.5O3 is
// Fe(IV) with Co(IV), not Fe(VI) with Co(II). Oxygen's positive states
// are candidates only beside fluorine (OF2, O2F2).
// `score` is 100 x uncommon + 10 x faults + naturalness per formula unit,
// each lower term capped below the unit of the one above, so that it
// never orders candidates against the ranking; 0 is a perfect assignment.
//
// The search is dynamic programming over the reachable charge totals, one
// element at a time, with counts scaled to integers by the least common
// denominator of the stoichiometry. Its cost grows with the number of
// elements times the width of the reachable charge window, never with the
// product of the elements' choices.
//
// Units' charges count as the most electronegative partner for the
// consistency test of the free elements.
//
// Compositions made only of metals (alloys, intermetallics) and single
// elements are reported as metallic or elemental with every state 0, when
// the net charge is 0 and no state is declared.
//
// Example:
//
//   absl::StatusOr<shellwright::Formula> f =
//   shellwright::ParseFormula("Fe3O4");
//   absl::StatusOr<shellwright::OxidationResult> r =
//       shellwright::AssignOxidationStates(*f,
//       shellwright::OxidationOptions());
//   // r->best->states: Fe +2 x1, Fe +3 x2, O -2 x4
//
// Thread safety: thread-safe; no shared mutable state.

#ifndef SHELLWRIGHT_ENGINE_OXIDATION_H_
#define SHELLWRIGHT_ENGINE_OXIDATION_H_

#include <optional>
#include <vector>

#include "absl/status/statusor.h"
#include "absl/types/span.h"
#include "engine/bonding.h"
#include "engine/element.h"
#include "engine/formula.h"
#include "engine/rational.h"
#include "util/enum_names.h"

namespace shellwright {

// Least common denominator above which a formula is rejected as too finely
// divided to balance exactly (counts with six decimals need at most 10^6).
inline constexpr int64_t kMaxStoichiometryDenominator = 1000000;

// Most distinct elements a formula may hold for balancing.
inline constexpr size_t kMaxDistinctElements = 48;

// A known oxidation state of an element (data/oxidation_states.tsv).
struct KnownOxidationState {
  int state;
  bool common;
};

// Known non-zero states of `element`, in increasing order.
absl::Span<const KnownOxidationState> KnownOxidationStates(
    const Element& element);

// True for metals; false for the nonmetals, the noble gases and the
// metalloids B, Si, Ge, As, Sb, Te and At (common practice, no source).
bool IsMetal(const Element& element);

// One element in one state. A mixed-valence element has two entries.
struct AssignedState {
  const Element* element;
  int state;
  Rational count;  // Atoms per formula unit in this state.
  bool common;     // False for an uncommon or unknown state.
  bool declared;   // The record declared this element's state.
  int unit = -1;   // Index in OxidationAssignment::units; -1 when free.
};

struct Unit;

// A polyatomic or molecular unit in an assignment (engine/units.h).
struct AssignedUnit {
  const Unit* unit;
  Rational count;      // Units per formula unit.
  int group = -1;      // The written group it was read from, or -1.
  int enclosing = -1;  // The written group it sits in ('[Fe(CN)6]'), or -1.
};

// Two free ions of different elements that would react: the oxidant's
// couple (data/reduction_potentials.tsv) lies more than
// kRedoxIncompatibleVolts above the reductant's.
struct RedoxPair {
  const Element* oxidant;
  int oxidant_state;
  double oxidant_volts;  // E0 of oxidant_state down to the next state.
  const Element* reductant;
  int reductant_state;
  double reductant_volts;  // E0 of the state above reductant_state to it.
};

// The gap between two couples' standard potentials above which their
// ions count as incompatible (common practice, no source: Ti(III) reduces
// Fe(III) at 0.67 V, the basis of a standard titration, so ilmenite is
// Fe(II)Ti(IV)). Aqueous potentials describe oxides and halides better
// than sulfides, so the check applies to the hard anion class only:
// chalcopyrite keeps Fe(III) beside Cu(I).
inline constexpr double kRedoxIncompatibleVolts = 0.5;

struct OxidationAssignment {
  // Formula order of the elements; for each, its free ions (lower state
  // first), then its atoms in units.
  std::vector<AssignedState> states;
  std::vector<AssignedUnit> units;
  // Uncommon free states, a bound-only one counting two (see above).
  int uncommon_states = 0;
  int electronegativity_inconsistencies = 0;
  Rational spread;
  // The first redox-incompatible pair, when there is one.
  std::optional<RedoxPair> redox_incompatible;
  // 100 x uncommon + 10 x (inconsistencies + a redox-incompatible pair)
  // + naturalness per formula unit (see above; each term capped below the
  // one above it).
  double score = 0;
};

struct DeclaredState {
  const Element* element;
  int state;
};

struct OxidationOptions {
  int net_charge = 0;
  std::vector<DeclaredState> declared;  // Honoured: those elements are fixed.
  int max_alternatives = 0;             // Further distinct assignments.
};

struct OxidationResult {
  // The bonding class the assignment was made for: an intermetallic,
  // metallic or elemental composition (neutral, with no declared non-zero
  // state) has every state 0, and an intermetallic one its best ionic
  // reading, where one balances, as the first alternative; a Zintl phase
  // balances with its polyanions' 8-N states (a clathrate framework of
  // group 13 and 14 atoms by the four-bonded count: Ga-1 and Ge0 in
  // Ba8Ga16Ge30). `bonding` says why.
  CompositionKind kind = CompositionKind::kIonic;
  BondingClass bonding;
  // Empty when no assignment balances the charge.
  std::optional<OxidationAssignment> best;
  std::vector<OxidationAssignment> alternatives;  // Best first.
  // When declared states made balancing impossible but it is possible
  // without them, the best undeclared assignment (to suggest a fix).
  std::optional<OxidationAssignment> without_declared;
  // True when the exhaustive search would have exceeded the record's work
  // budget, so that the assignments are the best among those with at most
  // one mixed-valence element (see docs/method.md).
  bool one_mixed_search = false;
  // True when the alternatives' own work budget ran out before every
  // element was tried: `alternatives` holds those found until then.
  bool alternatives_cut = false;
};

// INVALID_ARGUMENT when the formula is empty, holds more than
// kMaxDistinctElements elements, is too finely divided (see
// kMaxStoichiometryDenominator) or too large (more than 10^6 atoms after
// scaling), or declares an element it does not contain.
// RESOURCE_EXHAUSTED when even the search restricted to one mixed-valence
// element would exceed the record's work budget. The work per call is
// bounded (about 10 ms and 16 MB on the reference machine; see
// docs/performance.md).
absl::StatusOr<OxidationResult> AssignOxidationStates(
    const Formula& formula, const OxidationOptions& options);

}  // namespace shellwright

#endif  // SHELLWRIGHT_ENGINE_OXIDATION_H_
