#include "engine/ion_moments.h"

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <vector>

#include "engine/internal/data_tables.h"
#include "engine/magnetism.h"

namespace shellwright {
namespace {

// Boltzmann's constant in cm⁻¹ per kelvin (CODATA, from memory).
constexpr double kBoltzmannCmPerK = 0.6950348;
// N_A μB² / (3 k_B) in emu·K/mol (CGS): the Curie constant of one μB²
// (CODATA constants, from memory).
constexpr double kCurieConstantPerMuB2 = 0.125049;

// Van Vleck's F(J) for the J ↔ J−1 interval of the term (S, L).
double VanVleckF(double j, double s, double l) {
  if (j <= 0) return 0;
  return ((s + l + 1) * (s + l + 1) - j * j) * (j * j - (s - l) * (s - l)) / j;
}

// p² = 3kTχ/(N_A μB²) of the term (S, L) split by H = λ L·S (λ in cm⁻¹)
// with magnetic moment operator μB(a J + b S), at kT (cm⁻¹). Atoms have
// a = b = 1 (L + 2S = J + S); a t2g term with orbital reduction k has
// a = −k, b = 2 + k (−kL' + 2S = −kJ + (2 + k)S).
double MultipletP2(double s, double l, double lambda, double a, double b,
                   double kt) {
  // Uncoupled (degenerate) term: the moment operator a L + (a + b) S.
  if (std::abs(lambda) < 1e-9 * kt || s == 0 || l == 0) {
    if (s == 0 || l == 0) {
      // One J level: its Curie term (J = L + S, g from the projection).
      const double j = s + l;
      if (j == 0) return 0;
      const double g =
          a + b * (j * (j + 1) + s * (s + 1) - l * (l + 1)) / (2 * j * (j + 1));
      return g * g * j * (j + 1);
    }
    return a * a * l * (l + 1) + (a + b) * (a + b) * s * (s + 1);
  }
  std::vector<double> js;
  for (double j = std::abs(l - s); j <= l + s + 1e-9; j += 1) js.push_back(j);
  auto energy = [&](double j) {
    return lambda / 2 * (j * (j + 1) - l * (l + 1) - s * (s + 1));
  };
  double e0 = energy(js.front());
  for (double j : js) e0 = std::min(e0, energy(j));
  double numerator = 0;
  double partition = 0;
  for (size_t i = 0; i < js.size(); ++i) {
    const double j = js[i];
    const double g = j == 0
                         ? 0
                         : a + b * (j * (j + 1) + s * (s + 1) - l * (l + 1)) /
                                   (2 * j * (j + 1));
    double alpha = 0;
    if (i + 1 < js.size()) {
      alpha += VanVleckF(j + 1, s, l) / (energy(j + 1) - energy(j));
    }
    if (i > 0) alpha -= VanVleckF(j, s, l) / (energy(j) - energy(j - 1));
    alpha *= b * b / (6 * (2 * j + 1));
    const double weight = (2 * j + 1) * std::exp(-(energy(j) - e0) / kt);
    numerator += weight * (g * g * j * (j + 1) + 3 * kt * alpha);
    partition += weight;
  }
  return numerator / partition;
}

// The 4f (lanthanide) or 5f (actinide) count of an ion, or -1.
int FCount(int z, int charge, int first_z, int core) {
  if (z < first_z || z > first_z + 14) return -1;
  const int n = z - core - charge;
  return n >= 0 && n <= 14 ? n : -1;
}

}  // namespace

VanVleckResult VanVleckMultiplets(int two_s, int l, double lambda_cm,
                                  double temperature_k) {
  const double kt = kBoltzmannCmPerK * temperature_k;
  const double p2 = MultipletP2(two_s / 2.0, l, lambda_cm, 1, 1, kt);
  VanVleckResult r;
  r.effective_moment = std::sqrt(std::max(p2, 0.0));
  r.chi_t = kCurieConstantPerMuB2 * p2;
  r.molar_susceptibility = r.chi_t / temperature_k;
  TermSymbol ground;
  ground.two_s = two_s;
  ground.l = l;
  ground.two_j = lambda_cm >= 0 ? std::abs(2 * l - two_s) : 2 * l + two_s;
  r.ground_level_moment = JMoment(ground);
  r.lambda_cm = std::abs(lambda_cm);
  r.temperature_k = temperature_k;
  return r;
}

std::optional<VanVleckResult> VanVleckMoment(int z, int charge,
                                             double temperature_k) {
  for (const internal::MultipletIntervalRow& row :
       internal::MultipletIntervalRows()) {
    if (row.atomic_number != z || row.charge != charge) continue;
    const int n = FCount(z, charge, 57, 54);
    if (n < 1 || n > 13 || n == 7) return std::nullopt;  // Table-checked.
    const TermSymbol term = HundSubshellTerm(3, n);
    // The first interval lies between the ground level and its neighbour;
    // the interval rule gives it as |λ| times the larger J of the two.
    const double j_ground = term.two_j / 2.0;
    const double j_upper = n < 7 ? j_ground + 1 : j_ground;
    const double lambda = row.first_interval_cm1 / j_upper;
    VanVleckResult r = VanVleckMultiplets(
        term.two_s, term.l, n < 7 ? lambda : -lambda, temperature_k);
    r.source = row.source;
    return r;
  }
  return std::nullopt;
}

double KotaniMomentT2g(int t2g_electrons, double zeta_cm, double temperature_k,
                       double orbital_reduction) {
  const int n = t2g_electrons;
  // Hund's rules within t2g: S = n/2 up to half full, then (6 − n)/2.
  const int two_s = n <= 3 ? n : 6 - n;
  const double s = two_s / 2.0;
  if (n == 3) return SpinOnlyMoment(3);  // 4A2: L' = 0.
  // The t2g orbital momentum is −L' (T-P isomorphism), so ζ Σ l·s becomes
  // −kζ/(2S) L'·S below half full and +kζ/(2S) L'·S above.
  const double k = orbital_reduction;
  const double lambda = (n < 3 ? -1.0 : 1.0) * k * zeta_cm / (2 * s);
  const double kt = kBoltzmannCmPerK * temperature_k;
  const double p2 = MultipletP2(s, 1, lambda, -k, 2 + k, kt);
  return std::sqrt(std::max(p2, 0.0));
}

KotaniEstimate KotaniRangeT2g(int t2g_electrons, double zeta_cm,
                              double temperature_k, double ten_dq_cm) {
  const int n = t2g_electrons;
  KotaniEstimate e;
  e.t2g_electrons = n;
  e.zeta_cm = zeta_cm;
  e.temperature_k = temperature_k;
  e.kotani_moment = KotaniMomentT2g(n, zeta_cm, temperature_k);
  e.spin_only_moment = SpinOnlyMoment(n <= 3 ? n : 6 - n);
  const double kt = kBoltzmannCmPerK * temperature_k;
  double low = std::min(e.kotani_moment, e.spin_only_moment);
  double high = std::max(e.kotani_moment, e.spin_only_moment);
  if (n != 3) {
    // Covalency: k from kMinOrbitalReduction to 1, in steps of 0.05.
    for (double k = kMinOrbitalReduction; k < 1; k += 0.05) {
      const double mu = KotaniMomentT2g(n, zeta_cm, temperature_k, k);
      low = std::min(low, mu);
      high = std::max(high, mu);
    }
  }
  if (n == 2 || n == 4) {
    // jj limit: the ground level (J = 2 of j=3/2², J = 0 of j=3/2⁴) has no
    // first-order moment; its Van Vleck coupling to j=3/2 → j=1/2
    // excitations at 3ζ/2 gives μ² = 8kT/ζ (n = 2) or 16kT/ζ (n = 4).
    low = std::min(low, std::sqrt((n == 2 ? 8.0 : 16.0) * kt / zeta_cm));
  } else if (n == 3) {
    // 4A2: g = 2 − 8λ/10Dq, λ = ζ/3.
    low = e.spin_only_moment * (1 - 4 * (zeta_cm / 3) / ten_dq_cm);
  }
  e.low = std::max(low, 0.0);
  e.high = high;
  return e;
}

std::optional<KotaniEstimate> EstimateKotaniMoment(const Element& element,
                                                   int state,
                                                   double temperature_k) {
  const int z = element.atomic_number;
  if (element.block != Block::kD ||
      (element.period != 5 && element.period != 6)) {
    return std::nullopt;
  }
  const int n = element.group - state;
  if (n < 1 || n > 5) return std::nullopt;
  for (const internal::SpinOrbitConstantRow& row :
       internal::SpinOrbitConstantRows()) {
    if (row.atomic_number != z || row.charge != state) continue;
    KotaniEstimate e = KotaniRangeT2g(n, row.zeta_cm1, temperature_k);
    e.source = row.source;
    return e;
  }
  return std::nullopt;
}

std::optional<double> KotaniMoment(const Element& element, int state,
                                   double temperature_k) {
  std::optional<KotaniEstimate> e =
      EstimateKotaniMoment(element, state, temperature_k);
  if (!e.has_value()) return std::nullopt;
  return e->kotani_moment;
}

std::optional<ActinideMoment> FindActinideMoment(int z, int charge,
                                                 int anion_z) {
  const internal::ActinideMomentRow* exact = nullptr;
  const internal::ActinideMomentRow* any_anion = nullptr;
  const internal::ActinideMomentRow* first = nullptr;
  for (const internal::ActinideMomentRow& row :
       internal::ActinideMomentRows()) {
    if (row.atomic_number != z || row.charge != charge) continue;
    if (first == nullptr) first = &row;
    if (anion_z != 0 && row.anion_atomic_number == anion_z) exact = &row;
    if (row.anion_atomic_number == 0 && any_anion == nullptr) any_anion = &row;
  }
  const internal::ActinideMomentRow* row = exact != nullptr       ? exact
                                           : any_anion != nullptr ? any_anion
                                                                  : first;
  if (row == nullptr) return std::nullopt;
  ActinideMoment m;
  m.low = row->moment_low;
  m.high = row->moment_high;
  m.tip_only = row->tip_only;
  m.anion_matched = row == exact || row == any_anion;
  m.compound = row->compound;
  m.source = row->source;
  return m;
}

std::optional<ActinideEstimate> EstimateActinideMoment(int z, int charge) {
  const int n = FCount(z, charge, 89, 86);
  if (n < 0) return std::nullopt;
  ActinideEstimate e;
  e.f_electrons = n;
  e.ground_term = HundSubshellTerm(3, n);
  e.j_moment = JMoment(e.ground_term);
  e.high = e.j_moment;
  e.low = n % 2 == 0 ? 0.0 : kActinideLowFraction * e.j_moment;
  return e;
}

}  // namespace shellwright
