#include "clients/cli/atom_format.h"

#include <algorithm>
#include <array>
#include <cstdio>
#include <iterator>
#include <optional>
#include <vector>

#include "absl/strings/match.h"
#include "absl/strings/numbers.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "absl/strings/str_split.h"
#include "absl/strings/strip.h"
#include "engine/atom.h"
#include "engine/ligand_field.h"
#include "google/protobuf/util/json_util.h"

namespace shellwright::cli {
namespace {

std::string ChargeText(int charge) {
  if (charge == 0) return "0";
  return absl::StrCat(charge > 0 ? "+" : "", charge);
}

void Line(std::string* out, absl::string_view label, absl::string_view value) {
  absl::StrAppendFormat(out, "  %-20s %s\n", label, value);
}

// Superscript digits, for level occupancies: "t2g³ eg²", "e⁴ t2³".
std::string Superscript(int n) {
  static constexpr const char* kDigits[] = {"⁰", "¹", "²", "³", "⁴",
                                            "⁵", "⁶", "⁷", "⁸", "⁹"};
  std::string digits = absl::StrCat(n);
  std::string out;
  for (char c : digits) out += kDigits[c - '0'];
  return out;
}

// The names of the split d levels in `geometry` ("t2g", "eg"; "e", "t2"),
// longest first; made once per geometry.
const std::vector<std::string>& LevelNames(Geometry geometry) {
  constexpr size_t kGeometries = std::size(EnumNames<Geometry>::kNames);
  static const auto* const kByGeometry = [] {
    auto* by_geometry = new std::array<std::vector<std::string>, kGeometries>;
    for (const NamedValue<Geometry>& g : EnumNames<Geometry>::kNames) {
      std::vector<std::string>& names =
          (*by_geometry)[static_cast<size_t>(g.value)];
      for (const SplitLevel& level :
           SplitD(0, g.value, SpinState::kHigh).levels) {
        names.push_back(std::string(level.name));
      }
      std::stable_sort(names.begin(), names.end(),
                       [](const std::string& a, const std::string& b) {
                         return a.size() > b.size();
                       });
    }
    return by_geometry;
  }();
  return (*kByGeometry)[static_cast<size_t>(geometry)];
}

// The d electrons of an occupancy in `geometry`'s levels ("t2g3 eg2": 5),
// and its human form in `human` when not null ("t2g³ eg²"). nullopt when
// a token does not read as a level name and its electrons.
std::optional<int> ReadOccupancy(Geometry geometry, absl::string_view occupancy,
                                 std::string* human) {
  // Each token is a level name and its electrons; the longest level name
  // that leaves only digits is the name.
  const std::vector<std::string>& names = LevelNames(geometry);
  int d_electrons = 0;
  for (absl::string_view token : absl::StrSplit(occupancy, ' ')) {
    bool matched = false;
    for (const std::string& name : names) {
      int n = 0;
      if (absl::StartsWith(token, name) &&
          absl::SimpleAtoi(token.substr(name.size()), &n)) {
        if (human != nullptr) {
          absl::StrAppend(human, human->empty() ? "" : " ", name,
                          Superscript(n));
        }
        d_electrons += n;
        matched = true;
        break;
      }
    }
    if (!matched) return std::nullopt;  // Not a notation this client knows.
  }
  return d_electrons;
}

// The geometry that DescribeLigandField describes, or nullopt where it
// describes none (an unknown or free geometry, no occupancy).
std::optional<Geometry> FieldGeometry(absl::string_view geometry_name,
                                      absl::string_view occupancy) {
  absl::StatusOr<Geometry> geometry = ParseName<Geometry>(geometry_name);
  if (!geometry.ok() || *geometry == Geometry::kFree || occupancy.empty()) {
    return std::nullopt;
  }
  return *geometry;
}

}  // namespace

std::string ToJson(const google::protobuf::Message& message, bool pretty) {
  google::protobuf::util::JsonPrintOptions options;
  options.always_print_primitive_fields = true;
  options.preserve_proto_field_names = true;
  options.add_whitespace = pretty;
  std::string out;
  // Printing a message we built ourselves cannot fail.
  (void)google::protobuf::util::MessageToJsonString(message, &out, options);
  if (pretty && !out.empty() && out.back() == '\n') out.pop_back();
  return out;
}

std::optional<LigandFieldText> DescribeLigandField(
    absl::string_view geometry_name, absl::string_view spin_state,
    absl::string_view occupancy) {
  const std::optional<Geometry> geometry =
      FieldGeometry(geometry_name, occupancy);
  if (!geometry.has_value()) return std::nullopt;
  LigandFieldText text;
  const std::optional<int> d_electrons =
      ReadOccupancy(*geometry, occupancy, &text.occupancy);
  if (!d_electrons.has_value()) return std::nullopt;
  text.geometry = std::string(geometry_name);
  if (*d_electrons == 0 || *d_electrons == 10) {
    text.spin = absl::StrCat(*d_electrons == 0 ? "empty" : "full",
                             " d subshell: no spin state");
    return text;
  }
  const bool choice = HasSpinChoice(*d_electrons, *geometry);
  text.spin = choice ? absl::StrCat(spin_state, " spin")
                     : absl::StrCat("d", *d_electrons, ": one spin state only");
  text.has_spin_choice = choice;
  return text;
}

bool SpinStateMatters(absl::string_view geometry_name,
                      absl::string_view occupancy) {
  const std::optional<Geometry> geometry =
      FieldGeometry(geometry_name, occupancy);
  if (!geometry.has_value()) return true;
  const std::optional<int> d_electrons =
      ReadOccupancy(*geometry, occupancy, /*human=*/nullptr);
  if (!d_electrons.has_value()) return true;
  return *d_electrons != 0 && *d_electrons != 10 &&
         HasSpinChoice(*d_electrons, *geometry);
}

std::string OrbitalBoxes(int orbitals, int electrons) {
  std::string out;
  for (int i = 0; i < orbitals; ++i) {
    const bool up = electrons > i;
    const bool down = electrons > orbitals + i;
    absl::StrAppend(&out, "[", up ? "↑" : " ", down ? "↓" : " ", "]");
  }
  return out;
}

std::string FormatAtomHuman(const v1::AtomDescription& d) {
  std::string out;
  absl::StrAppendFormat(&out, "%s  %s  Z=%d  charge %s  %d electrons\n",
                        FormatSpecies(d.symbol(), d.charge()), d.name(),
                        d.atomic_number(), ChargeText(d.charge()),
                        d.electrons());
  Line(&out, "Configuration",
       d.configuration().empty() ? "(none: bare nucleus)" : d.configuration());
  Line(&out, "Full", d.full_configuration());
  Line(&out, "Filling order", d.filling_order_configuration());
  Line(&out, "Source", d.configuration_source());
  Line(&out, "Block/period/group",
       absl::StrCat(
           d.block(), " / ", d.period(), " / ",
           d.group() == 0 ? std::string("-") : absl::StrCat(d.group())));
  Line(&out, "Valence electrons", absl::StrCat(d.valence_electrons()));
  int free_ion_unpaired = 0;
  for (const v1::Subshell& s : d.subshells()) {
    free_ion_unpaired += s.unpaired_electrons();
  }
  const std::optional<LigandFieldText> field =
      d.has_ligand_field() ? DescribeLigandField(d.ligand_field().geometry(),
                                                 d.ligand_field().spin_state(),
                                                 d.ligand_field().occupancy())
                           : std::nullopt;
  if (d.has_ligand_field() && free_ion_unpaired != d.unpaired_electrons()) {
    // The boxes below show the free ion; say which count is which.
    Line(&out, "Unpaired electrons",
         absl::StrCat(d.unpaired_electrons(), " in the ",
                      d.ligand_field().geometry(), " field (",
                      d.ligand_field().spin_state(), " spin); ",
                      free_ion_unpaired, " in the free ion"));
  } else {
    Line(&out, "Unpaired electrons", absl::StrCat(d.unpaired_electrons()));
  }
  std::string term = absl::StrCat(d.term_symbol_unicode(), "  (",
                                  d.term_symbol(), "; ", d.term_source(), ")");
  // A configuration given with --configuration may be an excited one:
  // its lowest level is then not the atom's ground level.
  Line(&out, d.configuration_user_supplied() ? "Lowest level" : "Ground level",
       d.has_ligand_field() ? absl::StrCat(term, ", free ion") : term);
  if (d.hund_term_symbol() != d.term_symbol()) {
    Line(&out, "Hund's rules predict", d.hund_term_symbol());
  }
  Line(&out, "S, L, J",
       absl::StrFormat("%g, %d, %g  (%s parity)", d.total_spin(),
                       d.orbital_angular_momentum(), d.total_angular_momentum(),
                       d.parity()));

  bool any_open = false;
  for (const v1::Subshell& s : d.subshells()) {
    if (s.electrons() == s.capacity()) continue;
    if (!any_open) {
      absl::StrAppend(&out, "\n  Open subshells",
                      d.has_ligand_field() ? " of the free ion" : "",
                      " (↑ spin up, ↓ spin down):\n");
    }
    any_open = true;
    absl::StrAppendFormat(&out, "    %d%s  %s  %d/%d\n", s.n(), s.l(),
                          OrbitalBoxes(s.capacity() / 2, s.electrons()),
                          s.electrons(), s.capacity());
  }
  if (!any_open) out += "\n  No open subshells (closed shell).\n";

  if (d.has_ligand_field()) {
    const v1::LigandField& lf = d.ligand_field();
    absl::StrAppendFormat(
        &out, "\n  Ligand field: %s, %s, %s  (%s)\n", lf.geometry(),
        field.has_value() ? field->spin
                          : absl::StrCat(lf.spin_state(), " spin"),
        lf.subshell(), field.has_value() ? field->occupancy : lf.occupancy());
    for (int i = lf.levels_size() - 1; i >= 0; --i) {
      const v1::SplitLevel& level = lf.levels(i);
      absl::StrAppendFormat(&out, "    %-4s %s\n", level.name(),
                            OrbitalBoxes(level.orbitals(), level.electrons()));
    }
  }

  out += "\n  Moments (Bohr magnetons):\n";
  absl::StrAppendFormat(
      &out,
      "    spin-only %.2f   J moment %.2f   saturation %.2f   spin %.2f   "
      "g_J %.3f\n",
      d.spin_only_moment(), d.j_moment(), d.saturation_moment(),
      d.spin_moment(), d.lande_g());
  absl::StrAppendFormat(
      &out, "    recommended %.2f (%s)\n", d.recommended_moment(),
      d.recommended_moment_basis() == "j_moment" ? "J moment, open f subshell"
                                                 : "spin-only, orbital moment "
                                                   "quenched");
  if (d.has_measured_moment()) {
    absl::StrAppendFormat(&out, "    measured %.2f (%s)\n", d.measured_moment(),
                          d.measured_moment_source());
  }
  for (const std::string& note : d.notes()) {
    absl::StrAppend(&out, "\n  Note: ", note, "\n");
  }
  return out;
}

void FilterElements(const ElementFilter& filter,
                    v1::ListElementsResponse* elements) {
  google::protobuf::RepeatedPtrField<v1::Element>* list =
      elements->mutable_elements();
  list->erase(
      std::remove_if(
          list->begin(), list->end(),
          [&](const v1::Element& e) {
            return (!filter.block.empty() && e.block() != filter.block) ||
                   (filter.period != 0 && e.period() != filter.period) ||
                   (filter.group != 0 && e.group() != filter.group);
          }),
      list->end());
}

namespace {

// The weight as published ("15.999", "[98]"), or from the number for a
// server that predates atomic_weight_text.
std::string WeightText(const v1::Element& e) {
  if (!e.atomic_weight_text().empty()) return e.atomic_weight_text();
  return e.atomic_weight_is_mass_number()
             ? absl::StrCat("[", static_cast<int>(e.standard_atomic_weight()),
                            "]")
             : absl::StrCat(e.standard_atomic_weight());
}

std::string ElectronegativityText(const v1::Element& e,
                                  absl::string_view none) {
  return e.has_pauling_electronegativity()
             ? absl::StrFormat("%.2f", e.pauling_electronegativity())
             : std::string(none);
}

// The human table marks an estimated value with a leading '~'.
std::string ElectronegativityHuman(const v1::Element& e) {
  return absl::StrCat(e.electronegativity_estimated() ? "~" : "",
                      ElectronegativityText(e, "-"));
}

}  // namespace

std::string FormatElementsHuman(const v1::ListElementsResponse& elements) {
  std::string out = absl::StrFormat(
      "%-4s %-3s %-14s %-6s %-5s %-5s %-12s %-6s %s\n", "Z", "Sym", "Name",
      "Period", "Group", "Block", "Weight", "EN", "Configuration");
  for (const v1::Element& e : elements.elements()) {
    absl::StrAppendFormat(
        &out, "%-4d %-3s %-14s %-6d %-5s %-5s %-12s %-6s %s\n",
        e.atomic_number(), e.symbol(), e.name(), e.period(),
        e.group() == 0 ? std::string("-") : absl::StrCat(e.group()), e.block(),
        WeightText(e), ElectronegativityHuman(e), e.ground_configuration());
  }
  absl::StrAppend(&out, "\n", elements.elements_size(),
                  " elements. Weight: IUPAC standard atomic weight in Da, "
                  "[n] the mass number of the longest-lived isotope. EN: "
                  "Pauling electronegativity, ~ an estimate.\n");
  return out;
}

std::string FormatElementsCsv(const v1::ListElementsResponse& elements) {
  std::string out =
      "atomic_number,symbol,name,period,group,block,standard_atomic_weight,"
      "atomic_weight_is_mass_number,pauling_electronegativity,"
      "ground_configuration,electronegativity_estimated\n";
  for (const v1::Element& e : elements.elements()) {
    // No field holds a comma or a quote (data/elements.tsv).
    absl::StrAppend(
        &out, e.atomic_number(), ",", e.symbol(), ",", e.name(), ",",
        e.period(), ",",
        e.group() == 0 ? std::string() : absl::StrCat(e.group()), ",",
        e.block(), ",",
        absl::StripPrefix(absl::StripSuffix(WeightText(e), "]"), "["), ",",
        e.atomic_weight_is_mass_number() ? "true" : "false", ",",
        ElectronegativityText(e, ""), ",", e.ground_configuration(), ",",
        e.electronegativity_estimated() ? "true" : "false", "\n");
  }
  return out;
}

}  // namespace shellwright::cli
