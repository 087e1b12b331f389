// Validation and magnetic annotation of one composition record.
//
// AnalyzeComposition() is the product's main job for one record: parse the
// formula, balance it with oxidation states, annotate each ion with its
// configuration, unpaired electrons, spin state and moment, and check what
// the record declares (oxidation states, a measured moment) against that.
// Every problem becomes a Diagnostic with a severity, a stable code and a
// message; the record is valid exactly when no diagnostic is an error. The
// function never fails: every input gets exactly one report.
//
// The diagnostic codes and their severities are listed in
// engine/diagnostic_codes.h.
//
// Polyatomic and molecular units (engine/units.h) are reported with their
// unpaired electrons; their atoms keep their formal states but are not
// ions. Each d ion's geometry and spin state follow from its ligands
// (engine/coordination.h) unless the record sets them for that element.
// The measured moment tolerance is 0.5 μB (common practice, no source).
//
// Metallic, intermetallic and elemental metal compositions take their
// moments from a rule of thumb for metals instead (engine/metallic_moments.h):
// Slater-Pauling rules, 4f moments, or no estimate.
//
// Two moments are estimated and checked (docs/method.md, "Moments"):
//   - the effective paramagnetic moment (Curie-Weiss), √(Σ count μ²), with
//     an expected range: each 3d ion's follows the spin state decided for
//     it, widened by the published orbital contribution for its d count,
//     geometry and spin state (data/orbital_ranges.tsv); an ion near a
//     spin crossover spans both states; f ions run from the J moment to
//     the tabulated measured value;
//   - the ordered (saturation) moment at low temperature, where a model
//     gives one: Néel sublattices, Slater-Pauling or 4f moments.
// A record's measured_moment is checked against the first, and its
// measured_saturation_moment against the second, each with its own
// tolerance. Moments are idealised estimates from composition alone:
// verify against measurement before relying on them.
//
// Example:
//
//   shellwright::CompositionInput in;
//   in.id = "s1";
//   in.formula = "Fe3O4";
//   shellwright::CompositionReport r = shellwright::AnalyzeComposition(in);
//   r.valid;                      // true
//   r.unpaired_per_formula_unit;  // 14 (Fe2+ 4 + 2 x Fe3+ 5)
//
// Thread safety: thread-safe.

#ifndef SHELLWRIGHT_ENGINE_COMPOSITION_H_
#define SHELLWRIGHT_ENGINE_COMPOSITION_H_

#include <optional>
#include <string>
#include <vector>

#include "engine/atom.h"
#include "engine/coordination.h"
#include "engine/diagnostic_codes.h"
#include "engine/metallic_moments.h"
#include "engine/oxidation.h"

namespace shellwright {

inline constexpr size_t kMaxRecordIdLength = 256;
inline constexpr double kDefaultMomentTolerance = 0.5;  // μB per f.u.
// Kelvin: the temperature of temperature-dependent moments, and its limit.
inline constexpr double kDefaultTemperature = 300;
inline constexpr double kMaxTemperature = 10000;

// N_A μB² / (3 kB) in emu·K/mol, from the CODATA 2018 recommended values
// N_A = 6.02214076e23 /mol, μB = 9.2740100783e-21 erg/G and
// kB = 1.380649e-16 erg/K. The molar Curie constant is this times μ_eff².
double CurieConstantPerMomentSquared();

struct CompositionInput {
  std::string id;
  std::string formula;
  std::optional<int> net_charge;
  std::string declared_states;  // "Fe:3,O:-2"
  std::string geometry;         // "Co:octahedral,Ni:square_planar"
  std::string spin_state;       // "Co:low"
  // Effective paramagnetic moment (Curie-Weiss), μB per formula unit.
  std::optional<double> measured_moment;
  std::optional<double> moment_tolerance;  // μB; default 0.5.
  // Ordered (saturation) moment at low temperature, μB per formula unit.
  std::optional<double> measured_saturation_moment;
  std::optional<double> saturation_moment_tolerance;  // μB; default 0.5.
  // "auto" or "" (recognise), "none", or a family name (engine/sites.h).
  std::string structure_family;
  // Kelvin, > 0, for temperature-dependent moments; default 300.
  std::optional<double> temperature;
  int max_alternatives = 0;  // 0..5: further assignments to report.
  // Values of the formula's variables: "x=0.3, δ=0.05" (formula.h).
  std::string variables;
};

enum class Severity { kError, kWarning, kInfo };

template <>
struct EnumNames<Severity> {
  static constexpr absl::string_view kWhat = "severity";
  static constexpr NamedValue<Severity> kNames[] = {
      {Severity::kError, "error"},
      {Severity::kWarning, "warning"},
      {Severity::kInfo, "info"}};
};

struct Diagnostic {
  Severity severity;
  std::string code;
  std::string message;
  int column = 0;  // 1-based formula column, 0 when not positional.
};

// How an ion's recommended moment was estimated.
enum class IonMomentModel {
  kSpinOnly,    // √(n(n+2)): 3d and main-group ions, orbital moment quenched.
  kJMultiplet,  // g_J √(J(J+1)) of the ground J level: 4f ions.
  kVanVleck,    // A Van Vleck sum over the J multiplets at a temperature.
  kKotani,      // Kotani's t2g moment with spin-orbit coupling (4d, 5d).
  kTabulated,   // A measured value for the ion in its anion class.
};

template <>
struct EnumNames<IonMomentModel> {
  static constexpr absl::string_view kWhat = "ion moment model";
  static constexpr NamedValue<IonMomentModel> kNames[] = {
      {IonMomentModel::kSpinOnly, "spin_only"},
      {IonMomentModel::kJMultiplet, "j_moment"},
      {IonMomentModel::kVanVleck, "van_vleck"},
      {IonMomentModel::kKotani, "kotani"},
      {IonMomentModel::kTabulated, "tabulated"}};
};

// What an ion's expected moment range spans.
enum class RangeBasis {
  kExact,                // The recommended moment only.
  kOrbitalContribution,  // Spin-only widened by the published orbital
                         // contribution (data/orbital_ranges.tsv).
  kSpinCrossover,        // Near a spin crossover: both spin states.
  kMeasured,             // From the model's value to the measured one.
  kSpinStates,           // A 4d or 5d ion: low spin to the free ion.
  kSpinOrbit,            // A Kotani ion: its value at T to spin-only.
  kEstimate,             // A cautioned estimate (actinides untabulated).
};

template <>
struct EnumNames<RangeBasis> {
  static constexpr absl::string_view kWhat = "moment range basis";
  static constexpr NamedValue<RangeBasis> kNames[] = {
      {RangeBasis::kExact, "exact"},
      {RangeBasis::kOrbitalContribution, "orbital_contribution"},
      {RangeBasis::kSpinCrossover, "spin_crossover"},
      {RangeBasis::kMeasured, "measured"},
      {RangeBasis::kSpinStates, "spin_states"},
      {RangeBasis::kSpinOrbit, "spin_orbit"},
      {RangeBasis::kEstimate, "estimate"}};
};

struct IonAnnotation {
  const Element* element;
  int state;
  Rational count;
  AtomDescriptionPtr description;  // Ion with the geometry applied.
  double moment;                   // Recommended moment, μB.
  double moment_low;               // Expected range, μB.
  double moment_high;
  IonMomentModel model = IonMomentModel::kSpinOnly;
  RangeBasis range_basis = RangeBasis::kExact;
  // Ordered moment of one ion at low temperature, μB, and its range: 2S
  // (g = 2) for spin-only ions, g_J J for J-multiplet ions; the range
  // follows the effective range's g.
  double ordered_moment = 0;
  double ordered_low = 0;
  double ordered_high = 0;
  // The site a structure family placed the ion on ("B (octahedral)"), or
  // empty. Points at static storage.
  absl::string_view site = {};
  // For a d ion: the ligand holding most donor sites (null if none is
  // known), the mean f of its ligands and why it has its spin state.
  const Ligand* ligand = nullptr;
  double ligand_f = 0;
  SpinBasis spin_basis = SpinBasis::kNone;
  bool near_spin_crossover = false;
  // A p-block atom in an open-shell formal state (O-1, S-1), a metal of a
  // polynuclear carbonyl paired in metal-metal bonds (Mn2(CO)10), or any
  // atom of a metallic, intermetallic or elemental metal phase (whose
  // moment is the metallic model's, per formula unit): bonded, it carries
  // no unpaired electrons and no moment of its own.
  bool bonded = false;

  // Unpaired electrons this ion contributes (0 when bonded).
  int unpaired() const { return bonded ? 0 : description->unpaired_electrons; }
};

// A unit of the assignment with its moment.
struct UnitAnnotation {
  const Unit* unit;
  Rational count;
  double moment;  // Spin-only, from the unit's unpaired electrons, μB.
};

struct CompositionReport {
  std::string id;
  bool valid = false;
  std::vector<Diagnostic> diagnostics;
  CompositionKind kind = CompositionKind::kIonic;
  std::optional<OxidationAssignment> assignment;
  std::vector<OxidationAssignment> alternatives;
  std::vector<IonAnnotation> ions;  // Free ions, in assignment order.
  std::vector<UnitAnnotation> units;
  double unpaired_per_formula_unit = 0;
  double effective_moment_per_formula_unit = 0;  // μB.
  double expected_moment_low = 0;                // μB.
  double expected_moment_high = 0;               // μB.
  double curie_constant = 0;                     // emu·K/mol.
  // Composition-averaged valence electrons per atom, counted as
  // MetallicValenceElectrons does (see docs/method.md).
  double valence_electron_concentration = 0;
  // How the moments were estimated: kLocalMoment for ionic and Zintl
  // compositions (and elemental non-metals), a metallic model or kNone
  // for metallic, intermetallic and elemental metal compositions
  // (engine/metallic_moments.h). For those, the unpaired count and the
  // effective moment above are the model's localised 4f ones, or 0 where
  // the model has none: never free-atom counts.
  MomentModel moment_model = MomentModel::kLocalMoment;
  // Ordered moment per formula unit at low temperature, μB, and its
  // expected range; empty where no model gives one.
  std::optional<double> saturation_moment_per_formula_unit;
  double saturation_moment_low = 0;
  double saturation_moment_high = 0;
  // The model behind the saturation moment (kNone where there is none).
  MomentModel saturation_model = MomentModel::kNone;
  // The structure family the ions were placed with ("spinel"), empty for
  // none, and how the placement was decided.
  absl::string_view structure_family;
  std::string structure_note;
  // How the metallic model reached its figure, or why there is none. A
  // local-moment report leaves it empty, except for a note on a saturation
  // moment outside the sublattice model (4f7 ions: rare_earth_4f) or on
  // why no sublattice model applies (the Cr3S4 type).
  std::string moment_note;
  // Z_t: total valence electrons per formula unit.
  double total_valence_electrons = 0;
};

// Validates and annotates one record. Never fails: every problem, from an
// unparseable formula to an implausible moment, is a Diagnostic in the
// returned report, whose id is the input's (cut to kMaxRecordIdLength).
// No preconditions. Thread-safe; the first call builds the engine's tables.
CompositionReport AnalyzeComposition(const CompositionInput& input);

}  // namespace shellwright

#endif  // SHELLWRIGHT_ENGINE_COMPOSITION_H_
