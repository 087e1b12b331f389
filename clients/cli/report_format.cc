#include "clients/cli/report_format.h"

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "api/caution.h"

namespace shellwright::cli {
namespace {

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
    for (const v1::OxidationAssignment& a : r.alternatives()) {
      absl::StrAppendFormat(&out, "  Alternative        %s   (score %g)\n",
                            StatesText(a.oxidation_states()), a.score());
    }
  }
  if (r.ions_size() > 0) {
    absl::StrAppendFormat(&out, "\n  %-8s %-8s %-24s %-9s %-20s %-12s %s\n",
                          "ion", "count", "configuration", "unpaired",
                          "spin state", "split", "moment (μB)");
    for (const v1::IonReport& ion : r.ions()) {
      std::string spin =
          ion.spin_state().empty()
              ? std::string("-")
              : absl::StrCat(ion.spin_state(), " (", ion.geometry(), ")");
      absl::StrAppendFormat(
          &out, "  %-8s %-8g %-24s %-9d %-20s %-12s %.2f  [%.2f-%.2f]\n",
          ion.species(), ion.count(),
          ion.configuration().empty() ? "(none)" : ion.configuration(),
          ion.unpaired_electrons(), spin,
          ion.ligand_field_occupancy().empty() ? "-"
                                               : ion.ligand_field_occupancy(),
          ion.moment(), ion.moment_low(), ion.moment_high());
    }
    absl::StrAppendFormat(
        &out,
        "\n  Per formula unit: %g unpaired electrons, effective moment "
        "%.2f μB (expected range %.2f-%.2f), Curie constant %.4g emu·K/mol, "
        "valence electron concentration %.3g\n",
        r.unpaired_per_formula_unit(), r.effective_moment_per_formula_unit(),
        r.expected_moment_low(), r.expected_moment_high(), r.curie_constant(),
        r.valence_electron_concentration());
  }
  if (r.diagnostics_size() > 0) out += "\n";
  for (const v1::Diagnostic& d : r.diagnostics()) {
    absl::StrAppend(&out, "  ", d.severity(), " ", d.code(), ": ", d.message(),
                    "\n");
  }
  absl::StrAppend(&out, "\n", kMomentCaution, "\n");
  return out;
}

}  // namespace shellwright::cli
