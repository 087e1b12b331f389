#include "api/atoms.h"

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

// Proto enum values and their engine counterparts; UNSPECIFIED reads as
// the default (free ion, automatic spin state).
struct GeometryPair {
  v1::Geometry proto;
  Geometry engine;
};
constexpr GeometryPair kGeometries[] = {
    {v1::GEOMETRY_FREE, Geometry::kFree},
    {v1::GEOMETRY_OCTAHEDRAL, Geometry::kOctahedral},
    {v1::GEOMETRY_TETRAHEDRAL, Geometry::kTetrahedral},
    {v1::GEOMETRY_SQUARE_PLANAR, Geometry::kSquarePlanar},
    {v1::GEOMETRY_TRIGONAL_PRISMATIC, Geometry::kTrigonalPrismatic},
    {v1::GEOMETRY_TRIGONAL_BIPYRAMIDAL, Geometry::kTrigonalBipyramidal},
    {v1::GEOMETRY_SQUARE_ANTIPRISMATIC, Geometry::kSquareAntiprismatic},
    {v1::GEOMETRY_LINEAR, Geometry::kLinear},
    {v1::GEOMETRY_SQUARE_PYRAMIDAL, Geometry::kSquarePyramidal},
    {v1::GEOMETRY_TRIGONAL_PLANAR, Geometry::kTrigonalPlanar},
    {v1::GEOMETRY_PENTAGONAL_BIPYRAMIDAL, Geometry::kPentagonalBipyramidal},
    {v1::GEOMETRY_TRICAPPED_TRIGONAL_PRISMATIC,
     Geometry::kTricappedTrigonalPrismatic}};

struct SpinPair {
  v1::SpinStatePreference proto;
  SpinStatePreference engine;
};
constexpr SpinPair kSpinStates[] = {
    {v1::SPIN_STATE_AUTO, SpinStatePreference::kAuto},
    {v1::SPIN_STATE_HIGH, SpinStatePreference::kHigh},
    {v1::SPIN_STATE_LOW, SpinStatePreference::kLow},
    {v1::SPIN_STATE_INTERMEDIATE, SpinStatePreference::kIntermediate}};

absl::StatusOr<Geometry> GeometryFromProto(v1::Geometry g) {
  if (g == v1::GEOMETRY_UNSPECIFIED) return Geometry::kFree;
  for (const GeometryPair& p : kGeometries) {
    if (p.proto == g) return p.engine;
  }
  return absl::InvalidArgumentError(
      absl::StrCat("geometry: unknown value ", static_cast<int>(g)));
}

absl::StatusOr<SpinStatePreference> SpinFromProto(v1::SpinStatePreference s) {
  if (s == v1::SPIN_STATE_PREFERENCE_UNSPECIFIED) {
    return SpinStatePreference::kAuto;
  }
  for (const SpinPair& p : kSpinStates) {
    if (p.proto == s) return p.engine;
  }
  return absl::InvalidArgumentError(
      absl::StrCat("spin_state: unknown value ", static_cast<int>(s)));
}

}  // namespace

v1::Geometry GeometryToProto(Geometry geometry) {
  for (const GeometryPair& p : kGeometries) {
    if (p.engine == geometry) return p.proto;
  }
  return v1::GEOMETRY_UNSPECIFIED;
}

v1::SpinStatePreference SpinStatePreferenceToProto(
    SpinStatePreference preference) {
  for (const SpinPair& p : kSpinStates) {
    if (p.engine == preference) return p.proto;
  }
  return v1::SPIN_STATE_PREFERENCE_UNSPECIFIED;
}

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
  out->set_block(std::string(Name(e.block)));
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
  out->set_parity(std::string(Name(d.term.parity)));
  out->set_hund_term_symbol(d.hund_term.value_or(d.term).ToAscii());
  out->set_term_source(d.term_source);

  if (d.ligand_field.has_value()) {
    const LigandFieldSplitting& s = d.ligand_field->splitting;
    out->set_geometry(std::string(Name(s.geometry)));
    out->set_spin_state(std::string(Name(s.spin_state)));
    v1::LigandField* lf = out->mutable_ligand_field();
    lf->set_subshell(d.ligand_field->subshell.ToString());
    lf->set_geometry(std::string(Name(s.geometry)));
    lf->set_spin_state(std::string(Name(s.spin_state)));
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
  out->set_recommended_moment_basis(std::string(Name(m.recommended_basis)));
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
  out->set_block(std::string(Name(e.block)));
  out->set_standard_atomic_weight(e.standard_atomic_weight);
  out->set_atomic_weight_is_mass_number(e.atomic_weight_is_mass_number);
  out->set_atomic_weight_text(std::string(e.atomic_weight_text));
  if (e.pauling_electronegativity.has_value()) {
    out->set_pauling_electronegativity(*e.pauling_electronegativity);
  }
  out->set_electronegativity_estimated(e.electronegativity_estimated);
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

void DescribeAtomItem(const v1::DescribeAtomRequest& request,
                      v1::DescribeAtomResult* out) {
  out->Clear();
  absl::Status s = DescribeAtomMessage(request, out->mutable_description());
  if (!s.ok()) {
    out->mutable_error()->set_code(static_cast<int>(s.code()));
    out->mutable_error()->set_message(std::string(s.message()));
  }
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
    DescribeAtomItem(item, out->add_results());
  }
  return absl::OkStatus();
}

void ListElementsMessage(v1::ListElementsResponse* out) {
  out->Clear();
  for (const Element& e : AllElements()) ElementToProto(e, out->add_elements());
}

}  // namespace shellwright
