// Effective moments of ions whose moment is not that of a single J level or
// of a spin-only d shell: the cases where spin-orbit coupling and thermal
// population of excited levels decide what a magnetometer shows.
//
//   Van Vleck sum over J multiplets (Sm3+, Eu3+ and any 4f ion given its
//   multiplet spacing): the levels of a Russell-Saunders term (S, L) split by
//   H = λ L·S (Landé interval rule E_J − E_(J−1) = λJ) are populated by
//   Boltzmann factors, and each level adds its Curie term g_J² J(J+1) and the
//   second-order (Van Vleck) terms to its neighbours J ± 1:
//     χ_mol = (N_A μB² / 3kT) Σ_J (2J+1) [g_J² J(J+1) + 3kT α_J] e^(−E_J/kT)
//                              / Σ_J (2J+1) e^(−E_J/kT)
//     α_J   = [F(J+1)/(E_(J+1) − E_J) − F(J)/(E_J − E_(J−1))] / (6(2J+1))
//     F(J)  = [(S+L+1)² − J²][J² − (S−L)²] / J
//     μ_eff = √(3kTχ_mol / (N_A μB²))
//   Kotani moments of low-spin octahedral 4d and 5d ions t2g^1..t2g^5: the
//   same sum for the t2g term (L' = 1 with orbital moment −kL', spin-orbit
//   ∓kζ/(2S) L'·S), as a function of ζ/kT.
//   Actinide ions: measured moments in named compounds
//   (data/actinide_moments.tsv), else a cautioned range.
//
// docs/method.md ("Beyond the J ground level") derives the formulas, gives
// their limits and sources, and says where they stop. All results are
// idealised estimates for a magnetically dilute ion at a stated temperature
// (default kRoomTemperatureK): crystal fields, covalency, J-mixing and
// exchange all move real moments, and measurement decides.
//
// Example:
//
//   std::optional<shellwright::VanVleckResult> eu =
//       shellwright::VanVleckMoment(63, 3);  // Eu3+ at 300 K
//   eu->effective_moment;     // about 3.3 μB
//   eu->ground_level_moment;  // 0 (7F0)
//   const shellwright::Element* ir = shellwright::FindElementBySymbol("Ir");
//   shellwright::KotaniMoment(*ir, 4);          // about 1.87 μB (t2g^5)
//   shellwright::KotaniMomentT2g(4, 3000, 300);  // about 2.2 μB
//   std::optional<shellwright::ActinideMoment> uo2 =
//       shellwright::FindActinideMoment(92, 4, 8);  // UO2: 3.0-3.2 μB
//
// Thread safety: pure functions.

#ifndef SHELLWRIGHT_ENGINE_ION_MOMENTS_H_
#define SHELLWRIGHT_ENGINE_ION_MOMENTS_H_

#include <optional>

#include "absl/strings/string_view.h"
#include "engine/element.h"
#include "engine/term_symbol.h"

namespace shellwright {

// The temperature at which the functions below quote moments unless the
// caller gives another: room temperature, where most tabulated effective
// moments were measured.
inline constexpr double kRoomTemperatureK = 300.0;

// A 10Dq typical of 4d and 5d hexahalides and oxides, cm⁻¹, for the
// second-order lowering of t2g^3 moments when the caller has no better value
// (common practice, no source: such ions show 20,000-35,000 cm⁻¹).
inline constexpr double kTypicalHeavyTenDqCm = 25000.0;

// The smallest orbital reduction factor k the Kotani range allows for
// (common practice, no source: fits of 4d and 5d t2g moments, as collected
// by Figgis and Lewis, give k from about 0.7 to 1).
inline constexpr double kMinOrbitalReduction = 0.7;

// ---------------------------------------------------------------------------
// Van Vleck sum over J multiplets.

struct VanVleckResult {
  // μ_eff = √(3kTχ_mol / (N_A μB²)), μB: the moment a Curie-law reading of
  // χ at this one temperature gives.
  double effective_moment = 0;
  // χ_mol per mole of the ion, emu/mol (CGS), and χ_mol T, emu·K/mol.
  double molar_susceptibility = 0;
  double chi_t = 0;
  // g_J √(J(J+1)) of the ground J level alone (0 for J = 0): the moment
  // the sum tends to as T → 0.
  double ground_level_moment = 0;
  // |λ| of the Landé interval rule, cm⁻¹, and the temperature used.
  double lambda_cm = 0;
  double temperature_k = 0;
  // The table row's source (VanVleckMoment); empty for VanVleckMultiplets.
  absl::string_view source;
};

// The Van Vleck sum for the Russell-Saunders term with 2S = `two_s` and L =
// `l`, split by H = λ L·S with `lambda_cm` = λ in cm⁻¹: positive for a shell
// less than half full (lowest J = |L − S|), negative for more than half full
// (lowest J = L + S). The electron g is taken as 2.
// Preconditions: two_s >= 0, l >= 0, temperature_k > 0 (use a small
// temperature such as 0.01 K for the T → 0 limit). λ = 0 gives the
// uncoupled limit √(L(L+1) + 4S(S+1)).
VanVleckResult VanVleckMultiplets(int two_s, int l, double lambda_cm,
                                  double temperature_k);

// The Van Vleck sum for the lanthanide ion (`z`, `charge`) whose first
// multiplet interval is tabulated in data/multiplet_intervals.tsv (Ce3+ to
// Yb3+, not Pm3+, Gd3+ or Tm3+), its ground term from Hund's rules and λ from
// the interval. Returns nullopt for ions without a row.
// Precondition: temperature_k > 0.
std::optional<VanVleckResult> VanVleckMoment(
    int z, int charge, double temperature_k = kRoomTemperatureK);

// ---------------------------------------------------------------------------
// Kotani moments of low-spin octahedral 4d and 5d ions.

// μ_eff, μB, of an octahedral t2g^n ion (n = `t2g_electrons`, 1..5) with
// one-electron spin-orbit constant `zeta_cm` (ζ > 0, cm⁻¹) at
// `temperature_k`, after Kotani (1949), in the Russell-Saunders limit within
// t2g (the t2g^n ground term is 2T2, 3T1, 4A2, 3T1, 2T2 for n = 1..5) with
// orbital reduction factor `orbital_reduction` (k; 1 is Kotani's pure t2g, 0
// gives spin-only). t2g^3 (4A2) has no first-order orbital moment: the
// result is spin-only, 3.87 μB.
// Limits (k = 1): T → 0: t2g^1 and t2g^4 → 0, t2g^2 → √(3/2) = 1.22,
// t2g^5 → √3 = 1.73; T → ∞: √(L'(L'+1) + 4S(S+1)) (2.24, 3.16, 3.87,
// 3.16, 2.24).
// Preconditions: 1 <= t2g_electrons <= 5, zeta_cm > 0, temperature_k > 0,
// 0 <= orbital_reduction <= 1.
double KotaniMomentT2g(int t2g_electrons, double zeta_cm, double temperature_k,
                       double orbital_reduction = 1.0);

// The range an effective moment of a low-spin octahedral t2g^n ion may take
// at `temperature_k`, μB, and the values it is built from.
struct KotaniEstimate {
  int t2g_electrons = 0;
  double zeta_cm = 0;
  // KotaniMomentT2g with k = 1.
  double kotani_moment = 0;
  double spin_only_moment = 0;
  // [low, high]: always holds kotani_moment and spin_only_moment, and
  //   t2g^1,2,4,5   the Kotani values for k from kMinOrbitalReduction to 1
  //                 (covalency lowers k);
  //   t2g^2, t2g^4  also the jj-coupling limit of the ground level
  //                 (μ² = 8kT/ζ and 16kT/ζ: strong spin-orbit coupling
  //                 widens the gap to the first excited level);
  //   t2g^3         down to μ_so (1 − 4λ/10Dq), λ = ζ/3 (second-order
  //                 spin-orbit coupling to 4T2).
  double low = 0;
  double high = 0;
  double temperature_k = 0;
  // The spin-orbit constant's source (data/spin_orbit_constants.tsv); empty
  // for KotaniRangeT2g.
  absl::string_view source;
};

// The estimate for t2g^n with ζ = `zeta_cm`; `ten_dq_cm` (10Dq, cm⁻¹) is
// used for t2g^3 only. Preconditions as for KotaniMomentT2g; ten_dq_cm > 0.
KotaniEstimate KotaniRangeT2g(int t2g_electrons, double zeta_cm,
                              double temperature_k = kRoomTemperatureK,
                              double ten_dq_cm = kTypicalHeavyTenDqCm);

// The estimate for the 4d or 5d ion `element` in oxidation `state`, low
// spin octahedral (t2g^n, n = group − state), when its ζ is tabulated in
// data/spin_orbit_constants.tsv. Returns nullopt otherwise (no row, or n
// outside 1..5). Precondition: temperature_k > 0.
std::optional<KotaniEstimate> EstimateKotaniMoment(
    const Element& element, int state,
    double temperature_k = kRoomTemperatureK);

// EstimateKotaniMoment(...)->kotani_moment, or nullopt.
std::optional<double> KotaniMoment(const Element& element, int state,
                                   double temperature_k = kRoomTemperatureK);

// ---------------------------------------------------------------------------
// Actinide ions.

// A measured effective moment from data/actinide_moments.tsv.
struct ActinideMoment {
  // The spread of reported Curie-Weiss moments, μB per actinide ion.
  double low = 0;
  double high = 0;
  // No Curie moment, only temperature-independent paramagnetism (PuO2):
  // low = high = 0.
  bool tip_only = false;
  // False when no row matched the anion and another compound of the ion
  // was taken.
  bool anion_matched = false;
  absl::string_view compound;  // "UO2".
  absl::string_view source;
};

// The measured moment of the actinide ion (`z`, `charge`) with the anion
// element `anion_z` (8 for oxides, 9 fluorides, 17 chlorides, ...; 0 when
// unknown): the row for that anion, else a row for any anion ('-'), else the
// ion's first row (anion_matched false), else nullopt.
std::optional<ActinideMoment> FindActinideMoment(int z, int charge,
                                                 int anion_z);

// A cautioned estimate for an actinide ion without a measured row: an
// estimate, not a measurement.
struct ActinideEstimate {
  int f_electrons = 0;
  TermSymbol ground_term;  // Hund's rules, Russell-Saunders.
  double j_moment = 0;     // g_J √(J(J+1)) of the ground level.
  // [low, high], μB: high is the Russell-Saunders J moment; low is 0 for an
  // even 5f count (a crystal-field singlet may lie lowest, as in PuO2) and
  // kActinideLowFraction × j_moment for an odd count (intermediate coupling,
  // crystal fields and covalency lower 5f moments). 5f5 and 5f6 ions can
  // exceed j_moment through J-mixing (AmO2, about 1.3 against 0.85).
  double low = 0;
  double high = 0;
};

// The lower bound of an odd-count actinide ion's range as a fraction of its
// J moment (common practice, no source: a deliberately wide rule of thumb;
// measured 5f moments lie 10-50% below the free-ion value).
inline constexpr double kActinideLowFraction = 0.5;

// The estimate for the actinide ion (`z`, `charge`): Z 89..103, 5f count
// Z − 86 − charge in 0..14. Returns nullopt outside that domain.
std::optional<ActinideEstimate> EstimateActinideMoment(int z, int charge);

}  // namespace shellwright

#endif  // SHELLWRIGHT_ENGINE_ION_MOMENTS_H_
