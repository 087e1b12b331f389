// Ordered (saturation) moments of metallic phases from composition alone:
// Heusler and half-Heusler compounds, 3d transition-metal alloys, and rare
// earths alone or with iron and cobalt.
//
// The free-ion picture that suits salts does not suit metals: in iron the
// 3d electrons are itinerant, and a free Fe atom's four unpaired electrons
// say nothing of bcc iron's 2.22 μB. EstimateMetallicMoment() applies one
// published rule of thumb per case, names it (MomentModel), and gives no
// estimate, with the reason, outside the rules' domains:
//
//   full Heusler X2YZ        M = Z_t - 24 (Slater-Pauling rule for Heusler
//                            compounds); not for X from the Ni or Cu group
//   half-Heusler XYZ         M = Z_t - 18
//   3d alloys                the Slater-Pauling curve against the mean
//                            valence electron count n: rising branch
//                            n - 5.78 (bcc Fe side), falling branch
//                            0.6 + Σ x_i Z_m,i (= 10.6 - n for late 3d
//                            metals; magnetic valence Z_m)
//   rare earths              trivalent 4f moment g_J J (saturation) and
//                            g_J √(J(J+1)) (effective), per atom; Eu
//                            divalent (4f7), as in most intermetallics
//   rare earths with Fe, Co  4f sublattice plus 3d sublattice (Fe 2.2,
//                            Co 1.6 μB per atom), light rare earths
//                            parallel, heavy ones antiparallel
//
// Z_t is the total valence electron count per formula unit, counted as the
// alloy literature does (MetallicValenceElectrons). docs/method.md
// ("Moments of metallic phases") gives the rules, their domains, their
// sources and their accuracy. These are rules of thumb from composition
// alone, blind to structure, order and temperature: measurement decides.
//
// Example:
//
//   absl::StatusOr<shellwright::Formula> f =
//       shellwright::ParseFormula("Co2MnSi");
//   shellwright::MetallicMomentEstimate e =
//       shellwright::EstimateMetallicMoment(f->amounts);
//   e.model;                    // MomentModel::kFullHeusler
//   *e.saturation;              // 5.0 (Z_t = 29)
//   e.total_valence_electrons;  // 29
//
// Thread safety: pure functions.

#ifndef SHELLWRIGHT_ENGINE_METALLIC_MOMENTS_H_
#define SHELLWRIGHT_ENGINE_METALLIC_MOMENTS_H_

#include <optional>
#include <string>

#include "absl/types/span.h"
#include "engine/element.h"
#include "engine/formula.h"
#include "util/enum_names.h"

namespace shellwright {

// How a report's moments were estimated.
enum class MomentModel {
  kLocalMoment,          // Free-ion and ligand-field moments of ions.
  kFullHeusler,          // M = Z_t - 24.
  kHalfHeusler,          // M = Z_t - 18.
  kSlaterPaulingAlloy,   // Slater-Pauling curve of 3d alloys.
  kRareEarth4f,          // Trivalent 4f moments only.
  kRareEarth4fWith3d,    // 4f sublattice plus Fe/Co sublattice.
  kNone,                 // No estimate: outside every rule's domain.
  kSublatticeNeel,       // Néel's collinear sublattices (engine/sites.h).
  kSpinOnlyFerromagnet,  // 2S per ion of a known ferromagnetic class.
};

template <>
struct EnumNames<MomentModel> {
  static constexpr absl::string_view kWhat = "moment model";
  static constexpr NamedValue<MomentModel> kNames[] = {
      {MomentModel::kLocalMoment, "local_moment"},
      {MomentModel::kFullHeusler, "slater_pauling_full_heusler"},
      {MomentModel::kHalfHeusler, "slater_pauling_half_heusler"},
      {MomentModel::kSlaterPaulingAlloy, "slater_pauling_alloy"},
      {MomentModel::kRareEarth4f, "rare_earth_4f"},
      {MomentModel::kRareEarth4fWith3d, "rare_earth_4f_with_3d"},
      {MomentModel::kNone, "none"},
      {MomentModel::kSublatticeNeel, "sublattice_neel"},
      {MomentModel::kSpinOnlyFerromagnet, "spin_only_ferromagnet"}};
};

struct MetallicMomentEstimate {
  MomentModel model = MomentModel::kNone;
  // Ordered moment per formula unit at low temperature, μB; empty when
  // the model gives none.
  std::optional<double> saturation;
  // Paramagnetic effective moment per formula unit, √(Σ count μ_eff²), μB;
  // only where local moments exist (the 4f moments of kRareEarth4f).
  std::optional<double> effective;
  // Localised (4f) unpaired electrons per formula unit; 0 for itinerant
  // models, which count none.
  double localized_unpaired = 0;
  // Z_t: Σ count x MetallicValenceElectrons, per formula unit.
  double total_valence_electrons = 0;
  // How the figure follows from the rule, or why there is none; cautions.
  std::string note;
};

// Valence electrons of a neutral atom as alloy rules count them: s and p
// electrons of main-group elements (Si 4, Sb 5), s plus d of d-block
// metals (Mn 7, Co 9, Cu 11), 3 for every lanthanide (trivalent: 4f
// electrons are not counted), and 5f + 6d + 7s for actinides (U 6).
// Thread-safe.
int MetallicValenceElectrons(const Element& element);

// Valence electrons of a composition, counted by MetallicValenceElectrons.
struct ValenceElectronCount {
  // Z_t = Σ count x valence, rounded to 10^-9 (8.3 for Fe0.7Co0.3, not
  // 8.299999999999999).
  double per_formula_unit = 0;
  double per_atom = 0;  // The valence electron concentration; 0 if no atoms.
};

// The count for these amounts. Thread-safe; cheap enough for every record.
ValenceElectronCount CountValenceElectrons(
    absl::Span<const ElementAmount> amounts);

// The estimate for a metallic, intermetallic or elemental composition
// with these amounts (formula order). Never fails: a composition outside
// every rule's domain gets MomentModel::kNone and the reason in `note`.
// Thread-safe.
MetallicMomentEstimate EstimateMetallicMoment(
    absl::Span<const ElementAmount> amounts);

}  // namespace shellwright

#endif  // SHELLWRIGHT_ENGINE_METALLIC_MOMENTS_H_
