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
                    " ×", s.count_exact(), s.common() ? "" : " (uncommon)");
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
  if (r.ions_size() > 0) {
    absl::StrAppendFormat(&out, "\n  %-8s %-8s %-24s %-9s %-20s %-12s %s\n",
                          "ion", "count", "configuration", "unpaired",
                          "spin state", "split", "moment (μB)");
    for (const v1::IonReport& ion : r.ions()) {
      // A spin label only where high and low spin differ; no split shown
      // for an empty or full d subshell.
      const std::optional<LigandFieldText> field = DescribeLigandField(
          ion.geometry(), ion.spin_state(), ion.ligand_field_occupancy());
      std::string spin = "-";
      std::string split = "-";
      if (field.has_value()) {
        spin = field->has_spin_choice
                   ? absl::StrCat(ion.spin_state(), " (", ion.geometry(), ")")
                   : absl::StrCat("- (", ion.geometry(), ")");
        if (field->spin.find("d subshell") == std::string::npos) {
          split = field->occupancy;
        }
      } else if (!ion.spin_state().empty()) {
        spin = absl::StrCat(ion.spin_state(), " (", ion.geometry(), ")");
        split = ion.ligand_field_occupancy();
      }
      // Pad by characters: the superscripts take several bytes each.
      absl::StrAppendFormat(
          &out, "  %-8s %-8g %-24s %-9d %s %s %.2f  [%.2f-%.2f]\n",
          ion.species(), ion.count(),
          ion.configuration().empty() ? "(none)" : ion.configuration(),
          ion.unpaired_electrons(), PadTo(spin, 20), PadTo(split, 12),
          ion.moment(), ion.moment_low(), ion.moment_high());
    }
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
  }
  if (r.diagnostics_size() > 0) out += "\n";
  for (const v1::Diagnostic& d : r.diagnostics()) {
    absl::StrAppend(&out, "  ", d.severity(), " ", d.code(), ": ", d.message(),
                    "\n");
  }
  return out;
}

}  // namespace shellwright::cli
