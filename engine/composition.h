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
// Defaults (common practice, no source): d-block ions sit in an octahedral
// field with the `auto` spin rule (3d high spin, 4d/5d low spin) unless the
// record sets a geometry or spin state for that element; the measured
// moment tolerance is 0.5 μB.
//
// Moments are idealised free-ion or crystal-field estimates: the expected
// range runs from every d ion low spin (spin-only) to every d ion with its
// free-ion J moment, and for f ions between the J moment and the tabulated
// measured value. Verify against measurement before relying on them.
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
#include "engine/diagnostic_codes.h"
#include "engine/oxidation.h"

namespace shellwright {

inline constexpr size_t kMaxRecordIdLength = 256;
inline constexpr double kDefaultMomentTolerance = 0.5;  // μB per f.u.

// N_A μB² / (3 kB) in emu·K/mol, from the CODATA 2018 recommended values
// N_A = 6.02214076e23 /mol, μB = 9.2740100783e-21 erg/G and
// kB = 1.380649e-16 erg/K. The molar Curie constant is this times μ_eff².
double CurieConstantPerMomentSquared();

struct CompositionInput {
  std::string id;
  std::string formula;
  std::optional<int> net_charge;
  std::string declared_states;             // "Fe:3,O:-2"
  std::string geometry;                    // "Co:octahedral,Ni:square_planar"
  std::string spin_state;                  // "Co:low"
  std::optional<double> measured_moment;   // μB per formula unit.
  std::optional<double> moment_tolerance;  // μB; default 0.5.
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

struct IonAnnotation {
  const Element* element;
  int state;
  Rational count;
  AtomDescriptionPtr description;  // Ion with the geometry applied.
  double moment;                   // Recommended moment, μB.
  double moment_low;               // Expected range, μB.
  double moment_high;
};

struct CompositionReport {
  std::string id;
  bool valid = false;
  std::vector<Diagnostic> diagnostics;
  CompositionKind kind = CompositionKind::kIonic;
  std::optional<OxidationAssignment> assignment;
  std::vector<OxidationAssignment> alternatives;
  std::vector<IonAnnotation> ions;
  double unpaired_per_formula_unit = 0;
  double effective_moment_per_formula_unit = 0;  // μB.
  double expected_moment_low = 0;                // μB.
  double expected_moment_high = 0;               // μB.
  double curie_constant = 0;                     // emu·K/mol.
  // Composition-averaged valence electrons per atom (see docs/method.md).
  double valence_electron_concentration = 0;
};

// Validates and annotates one record. Never fails: every problem, from an
// unparseable formula to an implausible moment, is a Diagnostic in the
// returned report, whose id is the input's (cut to kMaxRecordIdLength).
// No preconditions. Thread-safe; the first call builds the engine's tables.
CompositionReport AnalyzeComposition(const CompositionInput& input);

}  // namespace shellwright

#endif  // SHELLWRIGHT_ENGINE_COMPOSITION_H_
