// Describing an atom or ion: configuration, notations, unpaired electrons,
// term symbol, ligand-field spin state and magnetic moments in one value.
//
// This is the engine's main entry point. Neutral atoms and every ion from
// charge -kMaxAnionCharge to +Z are precomputed on first use, so the common
// query (no geometry, no user configuration) is a table lookup that returns
// a shared immutable description.
//
// Species specs accepted by ParseSpeciesSpec():
//   "Fe", "26", "iron"          element by symbol, Z or name (element.h)
//   "Fe3+", "Fe+3", "Fe(III)"   cations (Stock numerals I to X)
//   "O2-", "Cl-", "H-", "O-2"   anions
//   "Fe(0)", "Fe+0"             explicit neutral
//
// Example:
//
//   absl::StatusOr<shellwright::AtomQuery> q =
//       shellwright::ParseAtomQuery("Fe3+", std::nullopt);
//   q->geometry = shellwright::Geometry::kOctahedral;
//   absl::StatusOr<shellwright::AtomDescriptionPtr> d =
//       shellwright::DescribeAtom(*q);
//   (*d)->configuration_notation;  // "[Ar] 3d5"
//   (*d)->unpaired_electrons;      // 5 (3d ions default to high spin)
//   (*d)->term.ToAscii();          // "6S5/2"
//
// Thread safety: all functions are thread-safe. Descriptions are immutable
// and may be shared across threads.

#ifndef SHELLWRIGHT_ENGINE_ATOM_H_
#define SHELLWRIGHT_ENGINE_ATOM_H_

#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "absl/status/statusor.h"
#include "absl/strings/string_view.h"
#include "engine/configuration.h"
#include "engine/element.h"
#include "engine/ligand_field.h"
#include "engine/subshell.h"
#include "engine/term_symbol.h"

namespace shellwright {

// Longest species spec accepted, in bytes.
inline constexpr size_t kMaxSpeciesSpecLength = 64;

// An element with an optional charge, as written in a spec.
struct SpeciesSpec {
  const Element* element = nullptr;
  std::optional<int> charge;
};

// Parses the forms listed in the file comment, and superscript charges
// ("Fe³⁺", "O²⁻"). INVALID_ARGUMENT names the spec and what is wrong with
// it (unknown element, malformed charge, invalid Roman numeral, trailing
// text).
absl::StatusOr<SpeciesSpec> ParseSpeciesSpec(absl::string_view spec);

// An oxidation state written as a declared state or a charge: "3", "+3",
// "-2", "3+", "2-", Roman "III" or "(III)", "-II", superscript "³⁺".
// INVALID_ARGUMENT naming `text` otherwise.
absl::StatusOr<int> ParseOxidationState(absl::string_view text);

// The usual written form of a species, which ParseSpeciesSpec reads back:
// "Fe" (charge 0), "Fe3+", "Cl-", "O2-".
std::string FormatSpecies(absl::string_view symbol, int charge);

// What to describe.
struct AtomQuery {
  const Element* element = nullptr;  // Required.
  int charge = 0;                    // Net charge; positive for cations.
  // Replaces the computed configuration (excited, gas-phase or unusual
  // states). Must hold Z - charge electrons.
  std::optional<Configuration> configuration;
  Geometry geometry = Geometry::kFree;
  SpinStatePreference spin_state = SpinStatePreference::kAuto;
};

// Builds a query from a spec and an optional separate charge (a CLI
// --charge flag or an RPC field). When both carry a charge they must agree.
absl::StatusOr<AtomQuery> ParseAtomQuery(absl::string_view spec,
                                         std::optional<int> charge);

struct SubshellOccupancy {
  Subshell subshell;
  int electrons;
  int capacity;
  int unpaired;  // Hund's first rule within the subshell.
};

// The d-subshell split by a ligand field, when a geometry applies.
struct LigandFieldResult {
  Subshell subshell;  // The d subshell that was split (3d, 4d, 5d, 6d).
  LigandFieldSplitting splitting;
};

// What the recommended moment is based on.
enum class MomentBasis { kSpinOnly, kJ };

// Named after the Moments field each basis reads.
template <>
struct EnumNames<MomentBasis> {
  static constexpr absl::string_view kWhat = "moment basis";
  static constexpr NamedValue<MomentBasis> kNames[] = {
      {MomentBasis::kSpinOnly, "spin_only"}, {MomentBasis::kJ, "j_moment"}};
};

struct Moments {
  double spin_only = 0;    // √(n(n+2)), n = unpaired electrons. μB.
  double lande_g = 0;      // g_J of `term`; 0 when J = 0.
  double j_moment = 0;     // g_J √(J(J+1)) of `term`. μB.
  double saturation = 0;   // g_J J of `term`. μB.
  double spin_moment = 0;  // 2S with S = unpaired / 2. μB.
  // Spin-only for d-electron and main-group ions (orbital moment quenched),
  // the J moment when an f subshell is open.
  double recommended = 0;
  MomentBasis recommended_basis = MomentBasis::kSpinOnly;
  std::optional<double> measured;     // From data/measured_moments.tsv.
  absl::string_view measured_source;  // Empty when `measured` is empty.
};

struct AtomDescription {
  const Element* element = nullptr;
  int charge = 0;
  int electrons = 0;
  Configuration configuration;
  bool configuration_user_supplied = false;
  bool madelung_exception = false;  // Neutral atom in the exception table.
  std::string madelung_exception_source;

  std::string configuration_notation;        // Noble-gas core: "[Ar] 3d6 4s2".
  std::string full_notation;                 // "1s2 2s2 2p6 ... 3d6 4s2".
  std::string filling_order_notation;        // "1s2 ... 4s2 3d6".
  std::vector<SubshellOccupancy> subshells;  // Occupied, by n then l.
  std::vector<Subshell> open_subshells;      // Partly filled, by n then l.

  // Unpaired electrons: Hund filling of every open subshell, or the ligand
  // field's count for the split d subshell when a geometry applies.
  int unpaired_electrons = 0;
  // Electrons in the outermost shell plus, for d-block elements, the
  // (n-1)d subshell and, for f-block elements, also the (n-2)f subshell.
  int valence_electrons = 0;

  // Ground level: the observed one for neutral atoms whose measured level
  // departs from Hund's rules (then `hund_term` holds the prediction),
  // otherwise the Hund's-rules term of the configuration.
  TermSymbol term;
  std::optional<TermSymbol> hund_term;
  std::string term_source;

  std::optional<LigandFieldResult> ligand_field;
  Moments moments;

  // Human-readable remarks: departures from Madelung or Hund, ignored
  // geometry, and the like.
  std::vector<std::string> notes;
};

using AtomDescriptionPtr = std::shared_ptr<const AtomDescription>;

// Describes the species in `query`. INVALID_ARGUMENT for an impossible
// charge or a configuration override that breaks Pauli capacity or does not
// hold Z - charge electrons.
absl::StatusOr<AtomDescriptionPtr> DescribeAtom(const AtomQuery& query);

}  // namespace shellwright

#endif  // SHELLWRIGHT_ENGINE_ATOM_H_
