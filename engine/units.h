// Polyatomic and molecular units, ligands and spin crossover points, and
// where a written formula shows a unit.
//
// A unit (data/units.tsv) is a group of bonded atoms that a formula holds
// as a whole: an oxo-anion (sulfate), a dimer (peroxide, disulfide,
// Hg2 2+), an organic ion (acetate, methylammonium) or a neutral ligand
// (water, ammonia, carbon monoxide). Each atom position has its formal
// oxidation state under the IUPAC ionic approximation (Karen, McArdle and
// Takats, Pure Appl. Chem. 88 (2016) 831): bonds between like atoms split
// equally. Ligands (data/spectrochemical_series.tsv) carry their place in
// the spectrochemical series as a Jørgensen f factor; spin crossover
// points (data/spin_crossover.tsv) say above which f a 3d ion turns low
// spin in an octahedral field.
//
// FindUnitMatches() reads the formula as written (engine/formula.h): a
// group whose contents are a unit's atoms (`(CN)6`, `(SO4)3`, `·5H2O`)
// and a run of terms written as the unit is written (`NH4` and `NO3` in
// `NH4NO3`, `CH3COO` in `CH3COONa`, `S2` in `FeS2`). Units that share
// their atoms (peroxide, superoxide: O2) are one match, whose charge the
// oxidation-state search decides.
//
// Example:
//
//   const shellwright::Unit* u = shellwright::FindUnit("sulfate");
//   u->charge;                       // -2
//   absl::StatusOr<shellwright::Formula> f =
//       shellwright::ParseFormula("NH4NO3");
//   shellwright::UnitMatches m = shellwright::FindUnitMatches(*f);
//   // m[0]: ammonium (terms 0..2), m[1]: nitrate (terms 2..4)
//
// Thread safety: the tables are immutable after their thread-safe first
// use; FindUnitMatches is a pure function.

#ifndef SHELLWRIGHT_ENGINE_UNITS_H_
#define SHELLWRIGHT_ENGINE_UNITS_H_

#include <bitset>
#include <string>
#include <vector>

#include "absl/container/inlined_vector.h"
#include "absl/strings/string_view.h"
#include "absl/types/span.h"
#include "engine/element.h"
#include "engine/formula.h"
#include "engine/rational.h"

namespace shellwright {

// One atom position of a unit.
struct UnitAtom {
  const Element* element;
  int state;  // Formal oxidation state.
  int count;  // Atoms at this position.
};

struct Ligand;

struct Unit {
  std::string name;     // "sulfate".
  std::string formula;  // The first written form: "SO4".
  int charge = 0;
  std::vector<UnitAtom> atoms;  // By position, as the table lists them.
  int unpaired = 0;             // Superoxide 1; most units 0.
  std::string source;
  const Ligand* ligand = nullptr;  // Null when not in the series.
  // For a unit of one element only, its p-block atoms in open-shell
  // states: O in peroxide, S in disulfide, C in acetylide (2 each). A
  // unit read from an unbracketed run must explain the formula strictly
  // better than monatomic ions to be chosen when it has such atoms (MnO2
  // is not a peroxide). Carbon in organic units is not counted: its states
  // come from bonds to other elements.
  int open_shell_atoms = 0;
  int total_atoms = 0;

  // For a unit read from a bare run: whether `cation` is among the free
  // cations it is met with (data/units.tsv, column 'cations').
  bool AcceptsCation(const Element& cation) const;
  // "-" for any; "none" for a unit read from written groups only (the
  // organic fragments: (CH3)2 in Zn(CH3)2, never the run CH3 of CH3Cl).
  std::string cations;
  // `cations` as atomic numbers, read with the tables: every element for
  // "-", every s-block element for "s".
  std::bitset<kMaxAtomicNumber + 1> accepted_cations;
};

// A ligand: a unit or a monatomic anion, with its place in the
// spectrochemical series.
struct Ligand {
  const Unit* unit = nullptr;      // Or:
  const Element* anion = nullptr;  // the element of a monatomic anion.
  double f = 1.0;                  // Jørgensen f factor (water 1.00).
  const Element* donor = nullptr;  // Donor atom.
  int denticity = 1;
  // A tetradentate ligand holding its four donors in one plane (a
  // porphyrinate, phthalocyaninate, salen, cyclam): the metal is square
  // planar with it alone, whatever its d count.
  bool planar = false;
  std::string source;

  // "cyanide", "oxide", "fluoride", ...
  std::string Name() const;
};

// Ligand f from which a neutral ligand counts as a pi acceptor that
// stabilises metals in state 0 (carbon monoxide 1.9; common practice, no
// source).
inline constexpr double kPiAcceptorF = 1.8;

// Whether `l` is a neutral or cationic pi-acceptor ligand that stabilises
// low metal states: a unit with f of at least kPiAcceptorF (carbon
// monoxide, benzene, and nitrosonium NO+, isoelectronic with CO) or a
// neutral phosphorus donor (phosphines and phosphites, soft sigma donors
// and pi acceptors: Pd(PPh3)4 is Pd(0); Greenwood and Earnshaw, Chemistry
// of the Elements, 2nd ed., ch. 27, from memory).
bool IsPiAcceptor(const Ligand& l);

// Whether `l` is an anionic pi acceptor: a monodentate carbon donor of the
// strong field, cyanide (f 1.70), isoelectronic with carbon monoxide. The
// cyanometallates hold their metals in states as low as the carbonyls do:
// K4[Ni(CN)4], Ni(0), tetrahedral and diamagnetic like Ni(CO)4, and
// K5[Mn(CN)6], Mn(I) (Greenwood and Earnshaw, Chemistry of the Elements,
// 2nd ed., chs. 24 and 27, from memory).
bool IsAnionicPiAcceptor(const Ligand& l);

// Where a 3d ion turns low spin in an octahedral field.
struct SpinCrossover {
  const Element* element;
  int state;
  double g;            // Jørgensen g factor, 1000 cm-1; 0 if not tabulated.
  double f_crossover;  // Low spin above this ligand f.
  // The same among sulfide, selenide and telluride ligands.
  double f_crossover_chalcogenide;
  int pairing_cm1;  // Free-ion mean pairing energy; 0 if not tabulated.
  std::string source;
};

absl::Span<const Unit> AllUnits();
const Unit* FindUnit(absl::string_view name);
// The ligand entry of a unit, or of the monatomic anion of `element`.
const Ligand* FindAnionLigand(const Element& element);
const SpinCrossover* FindSpinCrossover(const Element& element, int state);

// Most matches FindUnitMatches returns: it bounds the readings the
// oxidation-state search tries (docs/method.md).
inline constexpr size_t kMaxUnitMatches = 8;

// A place where the written formula shows a unit's atoms.
struct UnitMatch {
  // The units with exactly these atoms, lightest charge first (peroxide
  // -2, superoxide -1 for O2); one for most matches.
  absl::Span<const Unit* const> units;
  int first_term = 0;  // Written terms covered: [first_term, end_term).
  int end_term = 0;
  int group = -1;      // The group matched whole, or -1 for a run.
  int enclosing = -1;  // The group the match sits in (a complex '[...]').
  Rational count;      // Units per formula unit.
  // True when every unit of the match has open-shell atoms and the match
  // is a bare run (not a written group): see Unit::open_shell_atoms.
  bool weak = false;

  bool Overlaps(const UnitMatch& o) const {
    return first_term < o.end_term && o.first_term < end_term;
  }
};
using UnitMatches = absl::InlinedVector<UnitMatch, 4>;

// The matches in `formula`, written groups first, then runs, longer runs
// before shorter ones; at most kMaxUnitMatches. Matches may overlap
// (`HCO3` and `CO3`); a reading uses a non-overlapping subset.
UnitMatches FindUnitMatches(const Formula& formula);

}  // namespace shellwright

#endif  // SHELLWRIGHT_ENGINE_UNITS_H_
