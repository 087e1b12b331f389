#include "clients/cli/atom_format.h"

#include <cstdio>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "api/caution.h"
#include "engine/atom.h"
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
  Line(&out, "Unpaired electrons", absl::StrCat(d.unpaired_electrons()));
  std::string term = absl::StrCat(d.term_symbol_unicode(), "  (",
                                  d.term_symbol(), "; ", d.term_source(), ")");
  Line(&out, "Ground level", term);
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
    if (!any_open) out += "\n  Open subshells (↑ spin up, ↓ spin down):\n";
    any_open = true;
    absl::StrAppendFormat(&out, "    %d%s  %s  %d/%d\n", s.n(), s.l(),
                          OrbitalBoxes(s.capacity() / 2, s.electrons()),
                          s.electrons(), s.capacity());
  }
  if (!any_open) out += "\n  No open subshells (closed shell).\n";

  if (d.has_ligand_field()) {
    const v1::LigandField& lf = d.ligand_field();
    absl::StrAppendFormat(&out, "\n  Ligand field: %s, %s spin, %s  (%s)\n",
                          lf.geometry(), lf.spin_state(), lf.subshell(),
                          lf.occupancy());
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
  absl::StrAppend(&out, "\n", kMomentCaution, "\n");
  return out;
}

std::string FormatElementsHuman(const v1::ListElementsResponse& elements) {
  std::string out = absl::StrFormat("%-4s %-3s %-14s %-6s %-5s %-5s %-10s %s\n",
                                    "Z", "Sym", "Name", "Period", "Group",
                                    "Block", "Weight", "Configuration");
  for (const v1::Element& e : elements.elements()) {
    const std::string weight =
        e.atomic_weight_is_mass_number()
            ? absl::StrCat("[", static_cast<int>(e.standard_atomic_weight()),
                           "]")
            : absl::StrFormat("%.4g", e.standard_atomic_weight());
    absl::StrAppendFormat(
        &out, "%-4d %-3s %-14s %-6d %-5s %-5s %-10s %s\n", e.atomic_number(),
        e.symbol(), e.name(), e.period(),
        e.group() == 0 ? std::string("-") : absl::StrCat(e.group()), e.block(),
        weight, e.ground_configuration());
  }
  return out;
}

}  // namespace shellwright::cli
