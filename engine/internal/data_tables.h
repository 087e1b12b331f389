// Compiled-in copies of the TSV tables in data/. Not part of the API.
//
// The definitions are generated at build time by data/compile_tables from the
// TSV files, which are the single source of truth; see docs/data-sources.md.
// Public code reaches this data through element.h, aufbau.h and the other
// engine headers.
//
// Example:
//   for (const ElementRow& row : ElementRows()) { ... }

#ifndef SHELLWRIGHT_ENGINE_INTERNAL_DATA_TABLES_H_
#define SHELLWRIGHT_ENGINE_INTERNAL_DATA_TABLES_H_

#include "absl/types/span.h"

namespace shellwright::internal {

// data/elements.tsv
struct ElementRow {
  int atomic_number;
  const char* symbol;
  const char* name;
  int period;
  int group;   // 1..18, or 0 for elements without a group.
  char block;  // 's', 'p', 'd' or 'f'.
  double standard_atomic_weight;
  bool weight_is_mass_number;  // True for "[98]"-style entries.
  bool has_electronegativity;
  double pauling_electronegativity;
  const char* weight_text;  // As published: "15.999", "20.180", "[98]".
  bool electronegativity_estimated;
};

// data/configuration_exceptions.tsv
struct ConfigurationExceptionRow {
  int atomic_number;
  const char* configuration;  // Noble-gas-core notation.
  const char* source;
};

// data/ground_level_departures.tsv
struct GroundLevelDepartureRow {
  int atomic_number;
  const char* observed_level;  // ASCII term symbol.
  const char* hund_level;
  const char* source;
};

// data/measured_moments.tsv
struct MeasuredMomentRow {
  int atomic_number;
  int charge;
  bool has_measured_moment;
  double measured_moment;  // Bohr magnetons.
  const char* source;
};

// data/oxidation_states.tsv
struct OxidationStateRow {
  int atomic_number;
  int state;
  bool common;
  const char* source;
};

// data/units.tsv: one atom position of a unit.
struct UnitAtomRow {
  int atomic_number;
  int state;  // Formal oxidation state at this position.
  int count;  // Atoms at this position.
};

// data/units.tsv
struct UnitRow {
  const char* name;
  int charge;
  int first_atom;  // The unit's positions are UnitAtoms()[first_atom, +atoms).
  int atoms;
  int unpaired;
  const char* written;  // '|'-separated written forms: "CH3COO|C2H3O2".
  const char* cations;  // "-", or blocks and symbols: "s,Zn,Cd,Hg".
  const char* source;
};

// data/ligand_abbreviations.tsv
struct LigandAbbreviationRow {
  const char* abbreviation;  // "bpy", "Cp".
  int unit;                  // Index into UnitRows().
  const char* source;
};

// data/spectrochemical_series.tsv
struct LigandRow {
  const char* ligand;       // A unit name, or "" for a monatomic anion.
  int anion_atomic_number;  // The monatomic anion's element, or 0.
  double f;                 // Jørgensen f factor (water 1.00) or estimate.
  int donor_atomic_number;
  int denticity;
  bool planar;  // A tetradentate ligand with its donors in one plane.
  const char* source;
};

// data/spin_crossover.tsv
struct SpinCrossoverRow {
  int atomic_number;
  int state;
  double g;  // Jørgensen g factor, 1000 cm-1; 0 when not tabulated.
  double f_crossover;
  double f_crossover_chalcogenide;  // Among S, Se, Te anions.
  int pairing_cm1;  // Free-ion mean pairing energy; 0 when not tabulated.
  const char* source;
};

// data/chalcogenide_states.tsv
struct ChalcogenideStateRow {
  int atomic_number;
  int max_state;
  const char* source;
};

// data/bound_only_states.tsv
struct BoundOnlyStateRow {
  int atomic_number;
  int state;
  const char* source;
};

// data/state_preferences.tsv
struct StatePreferenceRow {
  int atomic_number;
  // The internal::AnionClass the row is for: 0 hard, 1 soft (chalcogenide
  // anions only), 2 the B sites of an ordered double perovskite, 3 a
  // delafossite, 4 a Zintl phase.
  int anion_class;
  int state;
  int rank;  // 1 is the most natural.
  const char* source;
};

// data/mixed_valence_pairs.tsv
struct MixedValencePairRow {
  int atomic_number;
  int low;
  int high;
  bool oxide_only;
  const char* source;
};

// data/state_electronegativities.tsv
struct StateElectronegativityRow {
  int atomic_number;
  int state;
  double electronegativity;  // Pauling scale.
  const char* source;
};

// data/reduction_potentials.tsv
struct ReductionPotentialRow {
  int atomic_number;
  int oxidised;
  int reduced;
  double volts;  // E0 against the standard hydrogen electrode.
  const char* source;
};

// data/orbital_ranges.tsv
struct OrbitalRangeRow {
  int d_electrons;
  const char* geometry;  // Name(Geometry): "octahedral", ...
  bool low_spin;
  double moment_low;  // Bohr magnetons.
  double moment_high;
  const char* source;
};

// data/multiplet_intervals.tsv
struct MultipletIntervalRow {
  int atomic_number;
  int charge;
  double first_interval_cm1;  // First excited J level above the ground level.
  const char* source;
};

// data/actinide_moments.tsv
struct ActinideMomentRow {
  int atomic_number;
  int charge;
  int anion_atomic_number;  // 0: any anion.
  const char* compound;
  double moment_low;  // Bohr magnetons.
  double moment_high;
  bool tip_only;  // Temperature-independent paramagnetism only.
  const char* source;
};

// data/spin_orbit_constants.tsv
struct SpinOrbitConstantRow {
  int atomic_number;
  int charge;
  double zeta_cm1;  // One-electron spin-orbit coupling constant.
  const char* source;
};

// data/site_preferences.tsv
struct SitePreferenceRow {
  int atomic_number;  // 0 for a row keyed by d count.
  int state;          // 0 for a row keyed by d count.
  int d_electrons;    // The row's d count ("d8"), or -1 for an ion row.
  bool low_spin;      // The value assumes the low-spin state.
  double ospe;        // Octahedral site preference energy, kJ/mol.
  bool spinel_only;   // An effective value for spinels only.
  // 't' strong tetrahedral, 'o' strong octahedral, 'w' weak octahedral,
  // '-' none.
  char preference;
  const char* source;
};

absl::Span<const ElementRow> ElementRows();
absl::Span<const ConfigurationExceptionRow> ConfigurationExceptionRows();
absl::Span<const GroundLevelDepartureRow> GroundLevelDepartureRows();
absl::Span<const MeasuredMomentRow> MeasuredMomentRows();
absl::Span<const OxidationStateRow> OxidationStateRows();
absl::Span<const UnitAtomRow> UnitAtomRows();
absl::Span<const UnitRow> UnitRows();
absl::Span<const LigandAbbreviationRow> LigandAbbreviationRows();
absl::Span<const LigandRow> LigandRows();
absl::Span<const SpinCrossoverRow> SpinCrossoverRows();
absl::Span<const ChalcogenideStateRow> ChalcogenideStateRows();
absl::Span<const BoundOnlyStateRow> BoundOnlyStateRows();
absl::Span<const StatePreferenceRow> StatePreferenceRows();
absl::Span<const MixedValencePairRow> MixedValencePairRows();
absl::Span<const StateElectronegativityRow> StateElectronegativityRows();
absl::Span<const ReductionPotentialRow> ReductionPotentialRows();
absl::Span<const OrbitalRangeRow> OrbitalRangeRows();
absl::Span<const MultipletIntervalRow> MultipletIntervalRows();
absl::Span<const ActinideMomentRow> ActinideMomentRows();
absl::Span<const SpinOrbitConstantRow> SpinOrbitConstantRows();
absl::Span<const SitePreferenceRow> SitePreferenceRows();

}  // namespace shellwright::internal

#endif  // SHELLWRIGHT_ENGINE_INTERNAL_DATA_TABLES_H_
