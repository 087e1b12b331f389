// Fuzzes full composition analysis (AnalyzeComposition in
// engine/composition.h): every field of a record is drawn from the input.
//
// Properties: a report always comes back; it is valid exactly when no
// diagnostic is an error; a best assignment balances the net charge
// exactly; moments and counts are finite and ranges ordered; all text is
// UTF-8 when the input was.

#include <fuzzer/FuzzedDataProvider.h>

#include <cmath>
#include <cstddef>
#include <cstdint>
#include <string>

#include "engine/composition.h"
#include "engine/formula.h"
#include "tests/fuzz/fuzz_checks.h"

namespace {

bool Finite(double v) { return std::isfinite(v); }

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  FuzzedDataProvider input(data, size);
  shellwright::CompositionInput record;
  record.id = input.ConsumeRandomLengthString(300);
  if (input.ConsumeBool()) {
    record.net_charge = input.ConsumeIntegralInRange(-1000, 1000);
  }
  record.declared_states = input.ConsumeRandomLengthString(64);
  record.geometry = input.ConsumeRandomLengthString(64);
  record.spin_state = input.ConsumeRandomLengthString(32);
  if (input.ConsumeBool()) {
    record.measured_moment = input.ConsumeFloatingPoint<double>();
  }
  if (input.ConsumeBool()) {
    record.moment_tolerance = input.ConsumeFloatingPoint<double>();
  }
  record.max_alternatives = input.ConsumeIntegralInRange(0, 5);
  record.formula = input.ConsumeRemainingBytesAsString();
  const std::string& formula = record.formula;

  const shellwright::CompositionReport report =
      shellwright::AnalyzeComposition(record);

  bool any_error = false;
  for (const shellwright::Diagnostic& d : report.diagnostics) {
    FUZZ_CHECK(!d.code.empty() && !d.message.empty(), formula);
    any_error |= d.severity == shellwright::Severity::kError;
  }
  FUZZ_CHECK(report.valid == !any_error, formula);
  FUZZ_CHECK(report.id.size() <= shellwright::kMaxRecordIdLength, record.id);
  if (shellwright::testing::IsWellFormedUtf8(record.id)) {
    FUZZ_CHECK(shellwright::testing::IsWellFormedUtf8(report.id), record.id);
  }
  if (report.assignment.has_value()) {
    // The net charge is the formula's own charge suffix ("NH4+") when it
    // has one (a record charge that contradicts it is an error, with no
    // assignment), else the record's.
    int net_charge = record.net_charge.value_or(0);
    absl::StatusOr<shellwright::Formula> parsed =
        shellwright::ParseFormula(formula);
    if (parsed.ok() && parsed->charge.has_value()) {
      FUZZ_CHECK(!record.net_charge.has_value() ||
                     *record.net_charge == *parsed->charge,
                 formula);
      net_charge = *parsed->charge;
    }
    shellwright::Rational total;
    for (const shellwright::AssignedState& s : report.assignment->states) {
      FUZZ_CHECK(s.count.num() > 0, formula);
      total = total + s.count * shellwright::Rational(s.state);
    }
    FUZZ_CHECK(total == shellwright::Rational(net_charge), formula);
  }
  for (double v :
       {report.unpaired_per_formula_unit,
        report.effective_moment_per_formula_unit, report.expected_moment_low,
        report.expected_moment_high, report.curie_constant,
        report.valence_electron_concentration, report.total_valence_electrons,
        report.saturation_moment_per_formula_unit.value_or(0)}) {
    FUZZ_CHECK(Finite(v) && v >= 0, formula);
  }
  // Only metallic phases take a metallic moment model, which always says
  // how it reached its figure or why there is none (engine/composition.h).
  // A local-moment report may carry a note too, on a saturation estimate
  // outside the sublattice model (4f7 ions, Cr ferromagnets) or on why
  // none applies.
  const bool local =
      report.moment_model == shellwright::MomentModel::kLocalMoment;
  FUZZ_CHECK(local || report.kind == shellwright::CompositionKind::kMetallic ||
                 report.kind == shellwright::CompositionKind::kIntermetallic ||
                 report.kind == shellwright::CompositionKind::kElemental,
             formula);
  FUZZ_CHECK(local || !report.moment_note.empty(), formula);
  FUZZ_CHECK(
      !local || report.moment_note.empty() ||
          report.saturation_model == shellwright::MomentModel::kRareEarth4f ||
          report.saturation_model ==
              shellwright::MomentModel::kSpinOnlyFerromagnet ||
          !report.saturation_moment_per_formula_unit.has_value(),
      formula);
  FUZZ_CHECK(local || !report.saturation_moment_per_formula_unit.has_value() ||
                 report.moment_model != shellwright::MomentModel::kNone,
             formula);
  FUZZ_CHECK(report.expected_moment_low <= report.expected_moment_high,
             formula);
  for (const shellwright::IonAnnotation& ion : report.ions) {
    FUZZ_CHECK(ion.description != nullptr, formula);
    FUZZ_CHECK(Finite(ion.moment) && Finite(ion.moment_low) &&
                   Finite(ion.moment_high) && ion.moment_low <= ion.moment_high,
               formula);
  }
  const bool utf8_input =
      shellwright::testing::IsWellFormedUtf8(formula) &&
      shellwright::testing::IsWellFormedUtf8(record.id) &&
      shellwright::testing::IsWellFormedUtf8(record.declared_states) &&
      shellwright::testing::IsWellFormedUtf8(record.geometry) &&
      shellwright::testing::IsWellFormedUtf8(record.spin_state);
  if (utf8_input) {
    for (const shellwright::Diagnostic& d : report.diagnostics) {
      FUZZ_CHECK(shellwright::testing::IsWellFormedUtf8(d.message), d.message);
    }
  }
  return 0;
}
