#include "api/records.h"

#include <algorithm>
#include <string>

#include "absl/strings/str_cat.h"
#include "engine/diagnostic_codes.h"
#include "engine/formula.h"
#include "util/utf8.h"

namespace shellwright {
namespace {

void AssignedToProto(const AssignedState& s, v1::OxidationState* out) {
  out->set_element(std::string(s.element->symbol));
  out->set_state(s.state);
  out->set_count(s.count.ToDouble());
  out->set_count_exact(s.count.ToString());
  out->set_common(s.common);
  out->set_declared(s.declared);
}

}  // namespace

CompositionInput CompositionInputFromProto(
    const v1::CompositionRecord& record) {
  CompositionInput in;
  in.id = record.id();
  in.formula = record.formula();
  if (record.has_charge()) in.net_charge = record.charge();
  in.declared_states = record.declared_states();
  in.geometry = record.geometry();
  in.spin_state = record.spin_state();
  if (record.has_measured_moment()) {
    in.measured_moment = record.measured_moment();
  }
  if (record.has_moment_tolerance()) {
    in.moment_tolerance = record.moment_tolerance();
  }
  if (record.has_max_alternatives()) {
    in.max_alternatives =
        std::clamp(record.max_alternatives(), 0, kMaxAlternatives);
  }
  return in;
}

void IonAnnotationToProto(const IonAnnotation& ion, v1::IonReport* p) {
  p->Clear();
  const AtomDescription& d = *ion.description;
  p->set_element(std::string(ion.element->symbol));
  p->set_state(ion.state);
  p->set_count(ion.count.ToDouble());
  p->set_species(FormatSpecies(ion.element->symbol, ion.state));
  p->set_configuration(d.configuration_notation);
  p->set_unpaired_electrons(d.unpaired_electrons);
  if (d.ligand_field.has_value()) {
    const LigandFieldSplitting& lf = d.ligand_field->splitting;
    p->set_geometry(std::string(Name(lf.geometry)));
    p->set_spin_state(std::string(Name(lf.spin_state)));
    p->set_ligand_field_occupancy(lf.Notation());
  } else {
    p->set_geometry(std::string(Name(Geometry::kFree)));
  }
  p->set_term_symbol(d.term.ToAscii());
  p->set_moment(ion.moment);
  p->set_moment_basis(std::string(Name(d.moments.recommended_basis)));
  p->set_moment_low(ion.moment_low);
  p->set_moment_high(ion.moment_high);
}

absl::string_view EchoedFormula(const v1::CompositionRecord& record) {
  return Utf8Prefix(record.formula(), kMaxFormulaLength);
}

void RecordReportToProto(const CompositionReport& r,
                         const v1::CompositionRecord& record,
                         v1::RecordReport* out) {
  out->Clear();
  out->set_id(r.id);
  out->set_valid(r.valid);
  out->set_row(record.row());
  out->set_formula(std::string(EchoedFormula(record)));
  for (const Diagnostic& d : r.diagnostics) {
    v1::Diagnostic* p = out->add_diagnostics();
    p->set_severity(std::string(Name(d.severity)));
    p->set_code(d.code);
    p->set_message(d.message);
    p->set_column(d.column);
  }
  if (!r.assignment.has_value()) return;
  out->set_composition_kind(std::string(Name(r.kind)));
  for (const AssignedState& s : r.assignment->states) {
    AssignedToProto(s, out->add_oxidation_states());
  }
  out->set_score(r.assignment->score);
  for (const OxidationAssignment& a : r.alternatives) {
    v1::OxidationAssignment* p = out->add_alternatives();
    for (const AssignedState& s : a.states) {
      AssignedToProto(s, p->add_oxidation_states());
    }
    p->set_score(a.score);
    p->set_uncommon_states(a.uncommon_states);
    p->set_electronegativity_inconsistencies(
        a.electronegativity_inconsistencies);
  }
  for (const IonAnnotation& ion : r.ions) {
    IonAnnotationToProto(ion, out->add_ions());
  }
  out->set_unpaired_per_formula_unit(r.unpaired_per_formula_unit);
  out->set_effective_moment_per_formula_unit(
      r.effective_moment_per_formula_unit);
  out->set_expected_moment_low(r.expected_moment_low);
  out->set_expected_moment_high(r.expected_moment_high);
  out->set_curie_constant(r.curie_constant);
  out->set_valence_electron_concentration(r.valence_electron_concentration);
}

void AnalyzeRecord(const v1::CompositionRecord& record, v1::RecordReport* out) {
  RecordReportToProto(AnalyzeComposition(CompositionInputFromProto(record)),
                      record, out);
}

void MalformedRecordReport(const v1::CompositionRecord& partial,
                           absl::string_view problem, v1::RecordReport* out) {
  out->Clear();
  out->set_id(std::string(Utf8Prefix(partial.id(), kMaxRecordIdLength)));
  out->set_row(partial.row());
  out->set_formula(std::string(EchoedFormula(partial)));
  out->set_valid(false);
  v1::Diagnostic* d = out->add_diagnostics();
  d->set_severity(std::string(Name(Severity::kError)));
  d->set_code(codes::kMalformedRecord);
  d->set_message(absl::StrCat("row ", partial.row(), ": ", problem));
}

}  // namespace shellwright
