#include "clients/cli/report_format.h"

#include <algorithm>
#include <optional>
#include <vector>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "clients/cli/atom_format.h"

namespace shellwright::cli {
namespace {

// `text` padded with spaces to `width` characters (not bytes).
std::string PadTo(const std::string& text, size_t width) {
  size_t chars = 0;
  for (unsigned char c : text) chars += (c & 0xC0) != 0x80;
  return chars >= width ? text : text + std::string(width - chars, ' ');
}

std::string StatesText(
    const google::protobuf::RepeatedPtrField<v1::OxidationState>& states) {
  std::string out;
  for (const v1::OxidationState& s : states) {
    if (!out.empty()) out += ", ";
    absl::StrAppend(&out, s.element(), s.state() > 0 ? "+" : "", s.state(),
                    " ×", s.count_exact(), s.common() ? "" : " (uncommon)",
                    s.unit().empty() ? "" : absl::StrCat(" [", s.unit(), "]"));
  }
  return out;
}

}  // namespace

std::string FormatReportHuman(const v1::RecordReport& r) {
  std::string out =
      absl::StrCat(r.formula(), "  ", r.valid() ? "valid" : "INVALID");
  if (!r.composition_kind().empty()) {
    absl::StrAppend(&out, "  (", r.composition_kind(), ")");
  }
  out += "\n";
  if (r.oxidation_states_size() > 0) {
    absl::StrAppendFormat(&out, "  Oxidation states   %s   (score %g)\n",
                          StatesText(r.oxidation_states()), r.score());
    // Best (lowest score) first, whatever order the report holds them in.
    std::vector<const v1::OxidationAssignment*> alternatives;
    for (const v1::OxidationAssignment& a : r.alternatives()) {
      alternatives.push_back(&a);
    }
    std::stable_sort(
        alternatives.begin(), alternatives.end(),
        [](const v1::OxidationAssignment* a, const v1::OxidationAssignment* b) {
          return a->score() < b->score();
        });
    for (const v1::OxidationAssignment* a : alternatives) {
      absl::StrAppendFormat(&out, "  Alternative        %s   (score %g)\n",
                            StatesText(a->oxidation_states()), a->score());
    }
  }
  if (r.units_size() > 0) {
    std::string units;
    for (const v1::UnitReport& u : r.units()) {
      if (!units.empty()) units += ", ";
      // "(NH4)+", "(SO4)2-", "H2O".
      const int q = u.charge() < 0 ? -u.charge() : u.charge();
      absl::StrAppend(
          &units, u.name(), " ",
          u.charge() == 0 ? u.formula()
                          : absl::StrCat("(", u.formula(), ")",
                                         q == 1 ? "" : absl::StrCat(q),
                                         u.charge() > 0 ? "+" : "-"),
          " ×", u.count_exact(),
          u.unpaired_electrons() > 0
              ? absl::StrCat(" (", u.unpaired_electrons(), " unpaired)")
              : "");
    }
    absl::StrAppend(&out, "  Units              ", units, "\n");
  }
  const bool metallic_model =
      !r.moment_model().empty() && r.moment_model() != "local_moment";
  if (metallic_model && r.ions_size() > 0) {
    // The atoms of a metal: their free-atom unpaired electrons and moments
    // say nothing of the metal's, and are not shown.
    absl::StrAppendFormat(&out, "\n  %-8s %-8s %s\n", "atom", "count",
                          "free-atom configuration");
    for (const v1::IonReport& ion : r.ions()) {
      absl::StrAppendFormat(&out, "  %-8s %-8g %s\n", ion.species(),
                            ion.count(), ion.configuration());
    }
  } else if (r.ions_size() > 0) {
    absl::StrAppendFormat(&out, "\n  %-8s %-8s %-24s %-9s %-20s %-12s %s\n",
                          "ion", "count", "configuration", "unpaired",
                          "spin state                    ", "split",
                          "moment (μB)");
    for (const v1::IonReport& ion : r.ions()) {
      // A spin label only where high and low spin differ; no split shown
      // for an empty or full d subshell.
      const std::optional<LigandFieldText> field = DescribeLigandField(
          ion.geometry(), ion.spin_state(), ion.ligand_field_occupancy());
      std::string spin = "-";
      std::string split = "-";
      if (field.has_value()) {
        spin = field->has_spin_choice
                   ? absl::StrCat(ion.spin_state(), " (", ion.geometry(),
                                  ion.ligand().empty() ? "" : ", ",
                                  ion.ligand(), ")")
                   : absl::StrCat("- (", ion.geometry(), ")");
        if (field->spin.find("d subshell") == std::string::npos) {
          split = field->occupancy;
        }
      } else if (!ion.spin_state().empty()) {
        spin = absl::StrCat(ion.spin_state(), " (", ion.geometry(), ")");
        split = ion.ligand_field_occupancy();
      }
      // No local moment: d electrons paired in metal-metal bonds or
      // itinerant in a metallic layer; no spin state or split to show.
      if (ion.bonded() && ion.spin_state_basis() == "itinerant") {
        spin = absl::StrCat("itinerant (", ion.geometry(), ")");
        split = "-";
      } else if (ion.bonded() && ion.spin_state_basis() == "metal_metal_bond") {
        spin = "paired (metal-metal bonds)";
        split = "-";
      }
      // Pad by characters: the superscripts take several bytes each.
      absl::StrAppendFormat(
          &out, "  %-8s %-8g %-24s %-9d %s %s %.2f  [%.2f-%.2f] %s%s\n",
          ion.species(), ion.count(),
          ion.configuration().empty() ? "(none)" : ion.configuration(),
          ion.unpaired_electrons(), PadTo(spin, 30), PadTo(split, 12),
          ion.moment(), ion.moment_low(), ion.moment_high(), ion.moment_basis(),
          ion.site().empty() ? "" : absl::StrCat(", site ", ion.site()));
    }
  }
  if (metallic_model) {
    // Free-atom figures mean nothing in a metal: the model's own instead.
    absl::StrAppendFormat(
        &out,
        "\n  Per formula unit: %g valence electrons (Z_t), valence "
        "electron concentration %.3g\n",
        r.total_valence_electrons(), r.valence_electron_concentration());
    if (r.effective_moment_per_formula_unit() > 0) {
      absl::StrAppendFormat(
          &out,
          "  Localised 4f: %g unpaired electron%s, effective moment %.2f μB, "
          "Curie constant %.4g emu·K/mol\n",
          r.unpaired_per_formula_unit(),
          r.unpaired_per_formula_unit() == 1 ? "" : "s",
          r.effective_moment_per_formula_unit(), r.curie_constant());
    }
    if (r.saturation_moment_estimated()) {
      absl::StrAppendFormat(
          &out, "  Ordered moment: %.3g μB per formula unit (%s)\n",
          r.saturation_moment_per_formula_unit(), r.moment_model());
    } else {
      absl::StrAppend(&out, "  Ordered moment: no estimate\n");
    }
    absl::StrAppend(&out, "    ", r.moment_note(), "\n",
                    "    A rule of thumb from the composition alone, blind to "
                    "structure, order and temperature: measurement decides.\n");
  } else if (r.ions_size() > 0 || r.units_size() > 0) {
    absl::StrAppendFormat(
        &out,
        "\n  Per formula unit: %g unpaired electron%s, effective moment "
        "%.2f μB (expected range %.2f-%.2f), Curie constant %.4g emu·K/mol, "
        "valence electron concentration %.3g\n",
        r.unpaired_per_formula_unit(),
        r.unpaired_per_formula_unit() == 1 ? "" : "s",
        r.effective_moment_per_formula_unit(), r.expected_moment_low(),
        r.expected_moment_high(), r.curie_constant(),
        r.valence_electron_concentration());
    if (!r.structure_family().empty()) {
      absl::StrAppend(&out, "  Sites: ", r.structure_family(), ": ",
                      r.structure_note(), "\n");
    } else if (!r.structure_note().empty()) {
      // No family, with the reason (the Cr3S4 type: spinel counts, no
      // spinel).
      absl::StrAppend(&out, "  Sites: ", r.structure_note(), "\n");
    }
    if (r.saturation_moment_estimated()) {
      absl::StrAppendFormat(
          &out,
          "  Ordered moment: %.3g μB per formula unit (expected range "
          "%.3g-%.3g, %s)\n",
          r.saturation_moment_per_formula_unit(), r.saturation_moment_low(),
          r.saturation_moment_high(), r.saturation_moment_model());
    }
  }
  if (r.diagnostics_size() > 0) out += "\n";
  for (const v1::Diagnostic& d : r.diagnostics()) {
    absl::StrAppend(&out, "  ", d.severity(), " ", d.code(), ": ", d.message(),
                    "\n");
  }
  return out;
}

}  // namespace shellwright::cli
