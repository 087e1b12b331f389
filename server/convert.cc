#include "server/convert.h"

#include <algorithm>
#include <string>

#include "absl/strings/str_cat.h"
#include "engine/aufbau.h"
#include "engine/configuration.h"

namespace shellwright {
namespace {

absl::Status FieldError(absl::string_view field, const absl::Status& status) {
  return absl::Status(status.code(),
                      absl::StrCat(field, ": ", status.message()));
}

absl::StatusOr<Geometry> GeometryFromProto(v1::Geometry g) {
  switch (g) {
    case v1::GEOMETRY_UNSPECIFIED:
    case v1::GEOMETRY_FREE:
      return Geometry::kFree;
    case v1::GEOMETRY_OCTAHEDRAL:
      return Geometry::kOctahedral;
    case v1::GEOMETRY_TETRAHEDRAL:
      return Geometry::kTetrahedral;
    case v1::GEOMETRY_SQUARE_PLANAR:
      return Geometry::kSquarePlanar;
    default:
      break;
  }
  return absl::InvalidArgumentError(
      absl::StrCat("geometry: unknown value ", static_cast<int>(g)));
}

absl::StatusOr<SpinStatePreference> SpinFromProto(v1::SpinStatePreference s) {
  switch (s) {
    case v1::SPIN_STATE_PREFERENCE_UNSPECIFIED:
    case v1::SPIN_STATE_AUTO:
      return SpinStatePreference::kAuto;
    case v1::SPIN_STATE_HIGH:
      return SpinStatePreference::kHigh;
    case v1::SPIN_STATE_LOW:
      return SpinStatePreference::kLow;
    default:
      break;
  }
  return absl::InvalidArgumentError(
      absl::StrCat("spin_state: unknown value ", static_cast<int>(s)));
}

std::string TermParity(const TermSymbol& t) {
  return t.parity == Parity::kOdd ? "odd" : "even";
}

}  // namespace

absl::StatusOr<AtomQuery> AtomQueryFromProto(
    const v1::DescribeAtomRequest& request) {
  std::optional<int> charge;
  if (request.has_charge()) charge = request.charge();
  AtomQuery query;
  switch (request.species_case()) {
    case v1::DescribeAtomRequest::kSpec: {
      absl::StatusOr<AtomQuery> q = ParseAtomQuery(request.spec(), charge);
      if (!q.ok()) return FieldError("spec", q.status());
      query = *q;
      break;
    }
    case v1::DescribeAtomRequest::kAtomicNumber: {
      absl::StatusOr<const Element*> e =
          ElementByAtomicNumber(request.atomic_number());
      if (!e.ok()) return FieldError("atomic_number", e.status());
      query.element = *e;
      query.charge = charge.value_or(0);
      break;
    }
    default:
      return absl::InvalidArgumentError(
          "spec: give a species spec or an atomic_number");
  }
  absl::StatusOr<Geometry> geometry = GeometryFromProto(request.geometry());
  if (!geometry.ok()) return geometry.status();
  query.geometry = *geometry;
  absl::StatusOr<SpinStatePreference> spin =
      SpinFromProto(request.spin_state());
  if (!spin.ok()) return spin.status();
  query.spin_state = *spin;
  if (!request.configuration().empty()) {
    absl::StatusOr<Configuration> c =
        Configuration::Parse(request.configuration());
    if (!c.ok()) return FieldError("configuration", c.status());
    query.configuration = *c;
  }
  return query;
}

void AtomDescriptionToProto(const AtomDescription& d,
                            v1::AtomDescription* out) {
  out->Clear();
  const Element& e = *d.element;
  out->set_symbol(std::string(e.symbol));
  out->set_name(std::string(e.name));
  out->set_atomic_number(e.atomic_number);
  out->set_charge(d.charge);
  out->set_electrons(d.electrons);
  out->set_configuration(d.configuration_notation);
  out->set_full_configuration(d.full_notation);
  out->set_filling_order_configuration(d.filling_order_notation);
  for (const SubshellOccupancy& s : d.subshells) {
    v1::Subshell* p = out->add_subshells();
    p->set_n(s.subshell.n);
    p->set_l(std::string(1, s.subshell.Letter()));
    p->set_electrons(s.electrons);
    p->set_capacity(s.capacity);
    p->set_unpaired_electrons(s.unpaired);
  }
  out->set_unpaired_electrons(d.unpaired_electrons);
  out->set_valence_electrons(d.valence_electrons);
  out->set_block(std::string(1, BlockLetter(e.block)));
  out->set_period(e.period);
  out->set_group(e.group);
  out->set_configuration_user_supplied(d.configuration_user_supplied);
  out->set_madelung_exception(d.madelung_exception);
  std::string source = "Madelung filling";
  if (d.configuration_user_supplied) {
    source = "user supplied";
  } else if (d.madelung_exception) {
    source = d.madelung_exception_source;
  } else if (d.charge != 0) {
    // Ions start from the neutral ground configuration, which for some
    // elements (Gd, Cu, Cr, ...) is a measured exception.
    const absl::string_view neutral = MadelungExceptionSource(e.atomic_number);
    source = neutral.empty() ? "ion rule applied to Madelung filling"
                             : absl::StrCat(
                                   "ion rule applied to the measured neutral "
                                   "configuration (",
                                   neutral, ")");
  }
  out->set_configuration_source(source);

  out->set_term_symbol(d.term.ToAscii());
  out->set_term_symbol_unicode(d.term.ToUnicode());
  out->set_spin_multiplicity(d.term.Multiplicity());
  out->set_total_spin(d.term.two_s / 2.0);
  out->set_orbital_angular_momentum(d.term.l);
  out->set_total_angular_momentum(d.term.two_j / 2.0);
  out->set_parity(TermParity(d.term));
  out->set_hund_term_symbol(d.hund_term.value_or(d.term).ToAscii());
  out->set_term_source(d.term_source);

  if (d.ligand_field.has_value()) {
    const LigandFieldSplitting& s = d.ligand_field->splitting;
    out->set_geometry(std::string(GeometryName(s.geometry)));
    out->set_spin_state(std::string(SpinStateName(s.spin_state)));
    v1::LigandField* lf = out->mutable_ligand_field();
    lf->set_subshell(d.ligand_field->subshell.ToString());
    lf->set_geometry(std::string(GeometryName(s.geometry)));
    lf->set_spin_state(std::string(SpinStateName(s.spin_state)));
    lf->set_occupancy(s.Notation());
    for (const SplitLevel& level : s.levels) {
      v1::SplitLevel* p = lf->add_levels();
      p->set_name(std::string(level.name));
      p->set_orbitals(level.orbitals);
      p->set_electrons(level.electrons);
      p->set_unpaired_electrons(level.unpaired);
    }
    lf->set_unpaired_electrons(s.unpaired);
  } else {
    out->set_geometry("free");
  }

  const Moments& m = d.moments;
  out->set_spin_only_moment(m.spin_only);
  out->set_lande_g(m.lande_g);
  out->set_j_moment(m.j_moment);
  out->set_saturation_moment(m.saturation);
  out->set_spin_moment(m.spin_moment);
  out->set_recommended_moment(m.recommended);
  out->set_recommended_moment_basis(
      m.recommended_basis == MomentBasis::kJ ? "j_moment" : "spin_only");
  if (m.measured.has_value()) {
    out->set_measured_moment(*m.measured);
    out->set_measured_moment_source(std::string(m.measured_source));
  }
  for (const std::string& note : d.notes) out->add_notes(note);
}

void ElementToProto(const Element& e, v1::Element* out) {
  out->Clear();
  out->set_atomic_number(e.atomic_number);
  out->set_symbol(std::string(e.symbol));
  out->set_name(std::string(e.name));
  out->set_period(e.period);
  out->set_group(e.group);
  out->set_block(std::string(1, BlockLetter(e.block)));
  out->set_standard_atomic_weight(e.standard_atomic_weight);
  out->set_atomic_weight_is_mass_number(e.atomic_weight_is_mass_number);
  if (e.pauling_electronegativity.has_value()) {
    out->set_pauling_electronegativity(*e.pauling_electronegativity);
  }
  AtomQuery q;
  q.element = &e;
  absl::StatusOr<AtomDescriptionPtr> d = DescribeAtom(q);
  if (d.ok()) out->set_ground_configuration((*d)->configuration_notation);
}

absl::Status DescribeAtomMessage(const v1::DescribeAtomRequest& request,
                                 v1::AtomDescription* out) {
  absl::StatusOr<AtomQuery> query = AtomQueryFromProto(request);
  if (!query.ok()) return query.status();
  absl::StatusOr<AtomDescriptionPtr> d = DescribeAtom(*query);
  if (!d.ok()) {
    const char* field = query->configuration.has_value() ? "configuration"
                        : request.has_charge()           ? "charge"
                                                         : "spec";
    return FieldError(field, d.status());
  }
  AtomDescriptionToProto(**d, out);
  return absl::OkStatus();
}

absl::Status DescribeAtomsMessage(const v1::DescribeAtomsRequest& request,
                                  v1::DescribeAtomsResponse* out) {
  out->Clear();
  if (request.requests_size() > kMaxDescribeAtomsBatch) {
    return absl::InvalidArgumentError(absl::StrCat(
        "requests: ", request.requests_size(), " items, above the limit of ",
        kMaxDescribeAtomsBatch, " per call"));
  }
  for (const v1::DescribeAtomRequest& item : request.requests()) {
    v1::DescribeAtomResult* result = out->add_results();
    absl::Status s = DescribeAtomMessage(item, result->mutable_description());
    if (!s.ok()) {
      result->mutable_error()->set_code(static_cast<int>(s.code()));
      result->mutable_error()->set_message(std::string(s.message()));
    }
  }
  return absl::OkStatus();
}

void ListElementsMessage(v1::ListElementsResponse* out) {
  out->Clear();
  for (const Element& e : AllElements()) ElementToProto(e, out->add_elements());
}

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

absl::string_view CompositionKindName(CompositionKind k) {
  switch (k) {
    case CompositionKind::kIonic:
      return "ionic";
    case CompositionKind::kMetallic:
      return "metallic";
    case CompositionKind::kElemental:
      return "elemental";
  }
  return "ionic";
}

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
    p->set_geometry(std::string(GeometryName(lf.geometry)));
    p->set_spin_state(std::string(SpinStateName(lf.spin_state)));
    p->set_ligand_field_occupancy(lf.Notation());
  } else {
    p->set_geometry("free");
  }
  p->set_term_symbol(d.term.ToAscii());
  p->set_moment(ion.moment);
  p->set_moment_basis(d.moments.recommended_basis == MomentBasis::kJ
                          ? "j_moment"
                          : "spin_only");
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
    p->set_severity(std::string(SeverityName(d.severity)));
    p->set_code(d.code);
    p->set_message(d.message);
    p->set_column(d.column);
  }
  if (!r.assignment.has_value()) return;
  out->set_composition_kind(std::string(CompositionKindName(r.kind)));
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

void AnalyzeRecordToReport(const v1::CompositionRecord& record,
                           v1::RecordReport* out) {
  RecordReportToProto(AnalyzeComposition(CompositionInputFromProto(record)),
                      record, out);
}

}  // namespace shellwright
